// Newton–Raphson on the circuit equations, as SPICE iterates them (Nagel 1975): each
// iteration loads every device linearised at the present solution (junction steps limited
// by `pnjlim`), solves for the next solution, and stops when every node voltage moved
// less than reltol·max(|old|,|new|) + vntol, every branch current less than
// reltol·max(|old|,|new|) + abstol, no device limited its step, and every device's own
// current test passes.
import type { SparseLU, SparseMatrix } from './algebra/index.js';
import type { CancellationToken } from './types.js';
import type { CircuitSystem, LoadContext } from './mna.js';

export interface NewtonSettings {
  iterationLimit: number;
  relativeTolerance: number;
  voltageTolerance: number;
  currentTolerance: number;
  gmin: number;
  /** Extra conductance from every voltage unknown to ground (gmin stepping); 0 normally. */
  diagonalGmin: number;
  sourceFactor: number;
  /** Start junctions from their own initial voltages on the first iteration. */
  initializeJunctions: boolean;
  /** performance.now() time after which the solve gives up. */
  deadline: number;
  cancellation: CancellationToken | undefined;
}

export type NewtonOutcome =
  | { status: 'converged'; iterations: number }
  | { status: 'singular'; iterations: number; unknown: number }
  | { status: 'iteration-limit'; iterations: number; unknown: number }
  | { status: 'not-finite'; iterations: number; unknown: number }
  | { status: 'budget'; iterations: number }
  | { status: 'cancelled'; iterations: number };

/** Newton's work vectors: `solution` holds the present (and, on return, the latest) solution. */
export class NewtonState {
  solution: Float64Array;
  private next: Float64Array;

  /** Starts from zero in `vectors` (two arrays of the system's size, reused from solve to solve). */
  constructor(vectors: { solution: Float64Array; next: Float64Array }) {
    this.solution = vectors.solution.fill(0);
    this.next = vectors.next;
  }

  swap(): void {
    const t = this.solution;
    this.solution = this.next;
    this.next = t;
  }

  get candidate(): Float64Array {
    return this.next;
  }
}

export function newtonIterate(system: CircuitSystem, matrix: SparseMatrix, lu: SparseLU, state: NewtonState, settings: NewtonSettings): NewtonOutcome {
  const size = system.size;
  const context: LoadContext = {
    solution: state.solution,
    matrix: system.stamps,
    rhs: system.rhs,
    sourceFactor: settings.sourceFactor,
    gmin: settings.gmin,
    initializeJunctions: false,
    nonConvergent: 0,
    relativeTolerance: settings.relativeTolerance,
    currentTolerance: settings.currentTolerance,
  };
  const convergence = { solution: state.solution, relativeTolerance: settings.relativeTolerance, currentTolerance: settings.currentTolerance };
  const values = matrix.values;
  let worst = 0;
  for (let iteration = 1; iteration <= settings.iterationLimit; iteration++) {
    if (settings.cancellation?.isCancellationRequested) return { status: 'cancelled', iterations: iteration - 1 };
    if (performance.now() > settings.deadline) return { status: 'budget', iterations: iteration - 1 };

    context.solution = state.solution;
    context.initializeJunctions = settings.initializeJunctions && iteration === 1;
    context.nonConvergent = 0;
    system.assemble(context, settings.diagonalGmin);
    values.set(system.stamps.subarray(1));

    const factored = lu.factor();
    if (!factored.ok) return { status: 'singular', iterations: iteration, unknown: factored.singularColumn + 1 };
    const next = state.candidate;
    lu.solve(system.rhs.subarray(1), next.subarray(1));
    next[0] = 0;

    // A limited junction rules this iteration out as the last: only make sure nothing overflowed.
    const previous = state.solution;
    const isCurrent = system.isCurrent;
    let moved = false;
    if (context.nonConvergent > 0 && iteration < settings.iterationLimit) {
      let sum = 0;
      for (let i = 1; i < size; i++) sum += next[i];
      if (!Number.isFinite(sum)) {
        for (let i = 1; i < size; i++) if (!Number.isFinite(next[i])) return { status: 'not-finite', iterations: iteration, unknown: i };
      }
      moved = true;
    } else {
      let worstExcess = 0;
      const relative = settings.relativeTolerance;
      const voltageTolerance = settings.voltageTolerance;
      const currentTolerance = settings.currentTolerance;
      for (let i = 1; i < size; i++) {
        const a = previous[i];
        const b = next[i];
        if (!Number.isFinite(b)) return { status: 'not-finite', iterations: iteration, unknown: i };
        const tolerance = relative * Math.max(Math.abs(a), Math.abs(b)) + (isCurrent[i] ? currentTolerance : voltageTolerance);
        const step = Math.abs(b - a);
        if (step > tolerance) {
          moved = true;
          // Only the unknown that moved most is kept, for the message if Newton runs out of iterations.
          const excess = step / tolerance;
          if (excess > worstExcess) {
            worstExcess = excess;
            worst = i;
          }
        }
      }
    }
    let converged = false;
    if (iteration > 1 && context.nonConvergent === 0 && !moved) {
      converged = true;
      convergence.solution = next;
      const devices = system.nonlinearDevices;
      for (let d = 0; d < devices.length; d++) {
        const test = devices[d].converged;
        if (test && !test.call(devices[d], convergence)) {
          converged = false;
          break;
        }
      }
    }
    state.swap();
    if (converged) return { status: 'converged', iterations: iteration };
  }
  return { status: 'iteration-limit', iterations: settings.iterationLimit, unknown: worst };
}
