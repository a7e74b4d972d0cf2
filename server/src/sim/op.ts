// The DC operating point: plain Newton, then gmin stepping, then source stepping (the
// order and step rules of ngspice 39's `.op`), each under an iteration cap, a wall-clock
// budget and the caller's cancellation token. Never throws: a circuit that cannot be
// solved comes back as `ok: false` with an `unsolved-circuit` diagnostic naming the cause.
import type { Circuit, NetlistDiagnostic } from '../netlist/circuit.js';
import {
  DEFAULT_BUDGET_MILLISECONDS,
  DEFAULT_CURRENT_TOLERANCE,
  DEFAULT_DC_ITERATION_LIMIT,
  DEFAULT_GMIN,
  DEFAULT_GMIN_FACTOR,
  DEFAULT_RELATIVE_TOLERANCE,
  DEFAULT_STEP_ITERATION_LIMIT,
  DEFAULT_TEMPERATURE_CELSIUS,
  DEFAULT_VOLTAGE_TOLERANCE,
  ZERO_CELSIUS_IN_KELVIN,
} from './constants.js';
import { compileCircuit, type CompiledCircuit } from './compile.js';
import { MINIMUM_SATURATION_CURRENT } from './devices/diode.js';
import { circuitLocation } from './diagnose.js';
import type { CornerConditions, DeviceResultSink } from './mna.js';
import { NewtonState, newtonIterate, type NewtonOutcome, type NewtonSettings } from './newton.js';
import type { Corner, DiodeOperatingPoint, OperatingPoint, SolveOptions, SolveResult } from './types.js';

/** gmin stepping starts from this shunt conductance, S (ngspice 39 `dynamic_gmin`). */
const GMIN_STEPPING_START = 1e-2;
/** Source stepping's first raise of the source factor, and the smallest it may shrink to (ngspice 39 `gillespie_src`). */
const SOURCE_STEPPING_FIRST_RAISE = 1e-3;
const SOURCE_STEPPING_SMALLEST_RAISE = 1e-7;
/** gmin stepping gives up when its step factor has shrunk to this (ngspice 39). */
const GMIN_STEPPING_SMALLEST_FACTOR = 1.00005;
/** Safety cap on the number of gmin or source steps, so that no rule can loop (ours). */
const MAXIMUM_CONTINUATION_STEPS = 1000;

export const NOMINAL_CORNER: Corner = { name: 'nominal' };

/**
 * Reads a name → number map as written, else case-insensitively (the first key that matches),
 * through an index built on the first miss: a corner that scales thousands of resistors is
 * read by thousands of devices, which must not each scan every key.
 */
function caseInsensitiveLookup(map: Record<string, number> | undefined): (name: string) => number | undefined {
  if (!map) return () => undefined;
  let lowerCased: Map<string, number> | undefined;
  return (name) => {
    const exact = map[name];
    if (typeof exact === 'number') return exact;
    if (!lowerCased) {
      lowerCased = new Map();
      for (const key of Object.keys(map)) {
        const lower = key.toLowerCase();
        if (!lowerCased.has(lower)) lowerCased.set(lower, map[key]!);
      }
    }
    return lowerCased.get(name.toLowerCase());
  };
}

function positiveOption(options: Record<string, number>, key: string, fallback: number): number {
  const value = options[key];
  return typeof value === 'number' && Number.isFinite(value) && value > 0 ? value : fallback;
}

interface Tolerances {
  relativeTolerance: number;
  voltageTolerance: number;
  currentTolerance: number;
  gmin: number;
  dcIterationLimit: number;
  stepIterationLimit: number;
}

function tolerancesOf(circuit: Circuit, options: SolveOptions): Tolerances {
  const o = circuit.options ?? {};
  const cap = options.iterationLimit !== undefined && options.iterationLimit > 0 ? Math.floor(options.iterationLimit) : undefined;
  return {
    relativeTolerance: positiveOption(o, 'reltol', DEFAULT_RELATIVE_TOLERANCE),
    voltageTolerance: positiveOption(o, 'vntol', DEFAULT_VOLTAGE_TOLERANCE),
    currentTolerance: positiveOption(o, 'abstol', DEFAULT_CURRENT_TOLERANCE),
    gmin: typeof o.gmin === 'number' && o.gmin >= 0 ? o.gmin : DEFAULT_GMIN,
    dcIterationLimit: cap ?? Math.floor(positiveOption(o, 'itl1', DEFAULT_DC_ITERATION_LIMIT)),
    stepIterationLimit: cap ?? Math.floor(positiveOption(o, 'itl2', DEFAULT_STEP_ITERATION_LIMIT)),
  };
}

function conditionsOf(circuit: Circuit, corner: Corner, tolerances: Tolerances): CornerConditions {
  const celsius = corner.temperature ?? circuit.temperature ?? DEFAULT_TEMPERATURE_CELSIUS;
  const nominalCelsius = positiveOption(circuit.options ?? {}, 'tnom', Number.NaN);
  const scaleOf = caseInsensitiveLookup(corner.scale);
  const sourceOf = caseInsensitiveLookup(corner.sources);
  return {
    temperature: celsius + ZERO_CELSIUS_IN_KELVIN,
    nominalTemperature: (Number.isFinite(nominalCelsius) ? nominalCelsius : DEFAULT_TEMPERATURE_CELSIUS) + ZERO_CELSIUS_IN_KELVIN,
    scaleOf: (name) => scaleOf(name) ?? 1,
    sourceValue: (name, value) => sourceOf(name) ?? value,
    gmin: tolerances.gmin,
    relativeTolerance: tolerances.relativeTolerance,
    minimumSaturationCurrent: minimumSaturationCurrentOf(circuit.options ?? {}),
  };
}

/**
 * ngspice 39's floor under a diode card's IS: `.options epsmin` when it is a finite number of
 * at least 0, else its default. ngspice 39 takes max(IS, epsmin) for any epsmin (showmod); a
 * negative epsmin would only let a mistyped negative IS through, which no solve survives.
 */
function minimumSaturationCurrentOf(options: Record<string, number>): number {
  const value = options.epsmin;
  return typeof value === 'number' && Number.isFinite(value) && value >= 0 ? value : MINIMUM_SATURATION_CURRENT;
}

type Method = OperatingPoint['method'];

interface Attempt {
  outcome: NewtonOutcome;
  method: Method;
  iterations: number;
}

/** Solves one corner of a compiled circuit. */
export function solveOperatingPoint(compiled: CompiledCircuit, corner: Corner = NOMINAL_CORNER, options: SolveOptions = {}): SolveResult {
  const started = performance.now();
  const { circuit, system } = compiled;
  const diagnostics: NetlistDiagnostic[] = [...compiled.diagnostics];
  const fail = (message: string, unknown?: number): SolveResult => {
    diagnostics.push({ severity: 'warning', code: 'unsolved-circuit', message, location: locationOfUnknown(compiled, unknown) });
    return { ok: false, corner: corner.name, diagnostics };
  };
  try {
    if (compiled.unsolvable) return { ok: false, corner: corner.name, diagnostics };
    const tolerances = tolerancesOf(circuit, options);
    const budget = options.budgetMilliseconds !== undefined && options.budgetMilliseconds >= 0 ? options.budgetMilliseconds : DEFAULT_BUDGET_MILLISECONDS;
    const deadline = started + budget;
    const conditions = conditionsOf(circuit, corner, tolerances);
    for (const device of system.devices) {
      device.reset?.();
      device.prepare(conditions);
    }
    system.invalidateLinear();

    const state = new NewtonState(system.workVectors());
    const warm = options.initialGuess !== undefined;
    if (options.initialGuess) {
      const guess = caseInsensitiveLookup(options.initialGuess);
      for (const [name, index] of compiled.nodeIndex) {
        const value = guess(name);
        if (index > 0 && value !== undefined && Number.isFinite(value)) state.solution[index] = value;
      }
      for (const device of system.devices) device.warmStart?.(state.solution);
    }

    const settings: NewtonSettings = {
      iterationLimit: tolerances.dcIterationLimit,
      relativeTolerance: tolerances.relativeTolerance,
      voltageTolerance: tolerances.voltageTolerance,
      currentTolerance: tolerances.currentTolerance,
      gmin: tolerances.gmin,
      diagonalGmin: 0,
      sourceFactor: 1,
      initializeJunctions: !warm,
      deadline,
      cancellation: options.cancellation,
    };
    const attempt = solveWithContinuation(compiled, state, settings, tolerances);
    const outcome = attempt.outcome;
    for (const device of system.devices) {
      const found = device.solveDiagnostics?.();
      if (found?.length) diagnostics.push(...found);
    }

    switch (outcome.status) {
      case 'converged':
        return {
          ok: true,
          point: buildPoint(compiled, state.solution, corner.name, attempt.method, attempt.iterations, performance.now() - started),
          diagnostics,
        };
      case 'cancelled':
        return fail(`the solve at corner ${corner.name} was cancelled before it finished`);
      case 'budget':
        return fail(`the solve at corner ${corner.name} was stopped after its budget of ${budget} ms (${attempt.iterations} Newton iterations) without converging`);
      case 'singular':
        return fail(
          `the circuit equations are singular at ${system.describe(outcome.unknown)}: its voltage or current is not determined by the rest of the circuit (look for a node with no DC path to ground or a loop of sources)`,
          outcome.unknown,
        );
      case 'not-finite':
        return fail(`the solution overflowed at ${system.describe(outcome.unknown)}: the circuit has no finite operating point as written`, outcome.unknown);
      case 'iteration-limit':
        return fail(
          `no DC operating point found after ${attempt.iterations} Newton iterations (plain, gmin stepping and source stepping)` +
            (outcome.unknown > 0 ? `; the solution kept moving most at ${system.describe(outcome.unknown)}` : ''),
          outcome.unknown > 0 ? outcome.unknown : undefined,
        );
    }
  } catch (error) {
    // The solver must never throw at its caller; this is a bug in pnlint, said as such.
    return fail(`internal solver error: ${error instanceof Error ? error.message : String(error)}`);
  }
}

function locationOfUnknown(compiled: CompiledCircuit, unknown: number | undefined) {
  const { circuit, system } = compiled;
  const described = unknown !== undefined ? system.unknown(unknown) : undefined;
  if (described) {
    const { kind, name } = described;
    const element =
      kind === 'node' ? circuit.elements.find((e) => e.nodes.includes(name)) : circuit.elements.find((e) => e.name === name);
    return circuitLocation(circuit, element);
  }
  return circuitLocation(circuit);
}

/** Plain Newton; on failure gmin stepping; on failure source stepping. */
function solveWithContinuation(compiled: CompiledCircuit, state: NewtonState, settings: NewtonSettings, tolerances: Tolerances): Attempt {
  const { system, matrix, lu } = compiled;
  let total = 0;
  const run = (overrides: Partial<NewtonSettings>): NewtonOutcome => {
    const outcome = newtonIterate(system, matrix, lu, state, { ...settings, ...overrides });
    total += outcome.iterations;
    return outcome;
  };
  const stop = (o: NewtonOutcome): boolean => o.status === 'cancelled' || o.status === 'budget';

  const initial = Float64Array.from(state.solution);
  // Each strategy starts afresh from the caller's starting point, as ngspice restarts its states.
  const restart = (): void => {
    state.solution.set(initial);
    for (const device of system.devices) {
      device.reset?.();
      if (!settings.initializeJunctions) device.warmStart?.(state.solution);
    }
  };
  const plain = run({});
  if (plain.status === 'converged' || stop(plain)) return { outcome: plain, method: 'newton', iterations: total };
  let lastFailure: NewtonOutcome = plain;

  // gmin stepping (ngspice's dynamic gmin): a shunt on every node, shrunk while Newton keeps converging.
  restart();
  const gmin = gminStepping(run, state, settings, tolerances);
  if (gmin.status === 'converged' || stop(gmin)) return { outcome: gmin, method: 'gmin-stepping', iterations: total };
  if (gmin.status !== 'iteration-limit') lastFailure = gmin;

  // Source stepping (ngspice's gillespie_src): ramp every independent source up from zero.
  restart();
  const source = sourceStepping(run, state, settings, tolerances);
  if (source.status === 'converged' || stop(source)) return { outcome: source, method: 'source-stepping', iterations: total };
  const reported = lastFailure.status === 'iteration-limit' ? source : lastFailure;
  return { outcome: { ...reported, iterations: total } as NewtonOutcome, method: 'newton', iterations: total };
}

type Run = (overrides: Partial<NewtonSettings>) => NewtonOutcome;

/** A continuation step that converged within a quarter of its cap was easy: the next may be bolder (ngspice 39). */
function quickStep(limit: number): number {
  return limit / 4;
}

function gminStepping(run: Run, state: NewtonState, settings: NewtonSettings, tolerances: Tolerances): NewtonOutcome {
  const target = Math.max(tolerances.gmin, 0);
  let factor = DEFAULT_GMIN_FACTOR;
  let previousGmin = GMIN_STEPPING_START;
  let diagonalGmin = previousGmin / factor;
  let saved = Float64Array.from(state.solution);
  let first = true;
  const limit = tolerances.stepIterationLimit;
  for (let step = 0; step < MAXIMUM_CONTINUATION_STEPS; step++) {
    const outcome = run({ diagonalGmin, iterationLimit: limit, initializeJunctions: first && settings.initializeJunctions });
    if (outcome.status === 'cancelled' || outcome.status === 'budget') return outcome;
    if (outcome.status === 'converged') {
      first = false;
      if (diagonalGmin <= target) break;
      saved = Float64Array.from(state.solution);
      if (outcome.iterations <= quickStep(limit)) factor = Math.min(factor * Math.sqrt(factor), DEFAULT_GMIN_FACTOR);
      if (outcome.iterations > (3 * limit) / 4) factor = Math.sqrt(factor);
      previousGmin = diagonalGmin;
      if (diagonalGmin < factor * target) {
        factor = diagonalGmin / target;
        diagonalGmin = target;
      } else {
        diagonalGmin /= factor;
      }
    } else {
      if (factor < GMIN_STEPPING_SMALLEST_FACTOR) return outcome;
      factor = Math.sqrt(Math.sqrt(factor));
      diagonalGmin = previousGmin / factor;
      state.solution.set(saved);
    }
  }
  // The last step without any shunt.
  return run({ diagonalGmin: 0, initializeJunctions: false });
}

function sourceStepping(run: Run, state: NewtonState, settings: NewtonSettings, tolerances: Tolerances): NewtonOutcome {
  const limit = tolerances.stepIterationLimit;
  // With every source at zero the answer is zero: start the junctions there too (not at their
  // critical voltages), so that this first step takes two iterations.
  state.solution.fill(0);
  let outcome = run({ sourceFactor: 0, iterationLimit: limit, initializeJunctions: false });
  if (outcome.status !== 'converged') return outcome;
  let converged = 0;
  let raise = SOURCE_STEPPING_FIRST_RAISE;
  let saved = Float64Array.from(state.solution);
  let factor = converged + raise;
  for (let step = 0; step < MAXIMUM_CONTINUATION_STEPS && raise >= SOURCE_STEPPING_SMALLEST_RAISE && converged < 1; step++) {
    outcome = run({ sourceFactor: factor, iterationLimit: limit, initializeJunctions: false });
    if (outcome.status === 'cancelled' || outcome.status === 'budget') return outcome;
    if (outcome.status === 'converged') {
      converged = factor;
      saved = Float64Array.from(state.solution);
      if (outcome.iterations <= quickStep(limit)) raise *= 1.5;
      if (outcome.iterations > (3 * limit) / 4) raise *= 0.5;
      factor = converged + raise;
    } else {
      if (factor - converged < 1e-8) break;
      raise = Math.min(raise / 10, 0.01);
      factor = converged;
      state.solution.set(saved);
    }
    if (factor > 1) factor = 1;
  }
  if (converged < 1) return outcome.status === 'converged' ? { status: 'iteration-limit', iterations: 0, unknown: 0 } : outcome;
  return outcome;
}

function buildPoint(compiled: CompiledCircuit, solution: Float64Array, corner: string, method: Method, iterations: number, milliseconds: number): OperatingPoint {
  const nodes: Record<string, number> = { '0': 0 };
  // forEach, not for…of: no [name, index] pair allocated per node.
  compiled.nodeIndex.forEach((index, name) => (nodes[name] = index === 0 ? 0 : solution[index]));
  const branches: Record<string, number> = {};
  const terminals: Record<string, number[]> = {};
  const diodes: Record<string, DiodeOperatingPoint> = {};
  const sink: DeviceResultSink = {
    branch: (name, current) => (branches[name] = current),
    terminals: (name, currents) => (terminals[name] = currents),
    diode: (name, point) => (diodes[name] = point),
  };
  for (const device of compiled.system.devices) device.report(solution, sink);
  // Capacitors are open at DC: no current, but listed so that every element has its branch.
  for (const element of compiled.circuit.elements) {
    if (element.type === 'C') {
      branches[element.name] = 0;
      terminals[element.name] = [0, 0];
    }
  }
  return { corner, nodes, branches, terminals, diodes, method, iterations, milliseconds };
}

/**
 * Compiles once and solves each corner in turn: each from a cold start, as a reference SPICE
 * engine would, unless `startFromFirstCorner` asks for warm starts; within `totalBudgetMilliseconds`
 * for all of them when it is given.
 */
export function solveCorners(circuit: Circuit, corners: readonly Corner[], options: SolveOptions = {}): SolveResult[] {
  const started = performance.now();
  const compiled = compileCircuit(circuit);
  const total = options.totalBudgetMilliseconds;
  const warm = options.startFromFirstCorner === true;
  // In warm mode the caller's guess serves the first corner only, and circuits with switches get none.
  const { initialGuess, ...withoutGuess } = options;
  const coldOptions = warm ? withoutGuess : options;
  const warmStarts = warm && !holdsSwitchState(circuit);
  const results: SolveResult[] = [];
  let guess = warmStarts ? initialGuess : undefined;
  for (const corner of corners) {
    let cornerOptions = coldOptions;
    if (options.cancellation?.isCancellationRequested) {
      results.push(notReached(compiled, corner, 'the solve was cancelled'));
      continue;
    }
    if (total !== undefined) {
      const remaining = total - (performance.now() - started);
      if (remaining <= 0) {
        results.push(notReached(compiled, corner, `the ${total} ms budget for all corners was spent on the corners before it`));
        continue;
      }
      cornerOptions = { ...coldOptions, budgetMilliseconds: Math.min(options.budgetMilliseconds ?? DEFAULT_BUDGET_MILLISECONDS, remaining) };
    }
    let result: SolveResult | undefined;
    if (guess) {
      result = solveOperatingPoint(compiled, corner, { ...cornerOptions, initialGuess: guess });
      // A warm start that does not converge says nothing about the corner: solve it cold as well.
      if (!result.ok && !options.cancellation?.isCancellationRequested) result = undefined;
    }
    result ??= solveOperatingPoint(compiled, corner, cornerOptions);
    if (warmStarts && results.length === 0 && result.ok) guess = result.point.nodes;
    results.push(result);
  }
  return results;
}

/**
 * Switches keep their state from one Newton iteration to the next and may settle either way
 * near their thresholds: a warm start could leave one in another state than a cold start
 * would, so such circuits are always solved cold.
 */
function holdsSwitchState(circuit: Circuit): boolean {
  return circuit.elements.some((element) => element.type === 'S' || element.type === 'W');
}

/** A corner not solved at all, and why. */
function notReached(compiled: CompiledCircuit, corner: Corner, why: string): SolveResult {
  const diagnostics: NetlistDiagnostic[] = [...compiled.diagnostics];
  diagnostics.push({
    severity: 'warning',
    code: 'unsolved-circuit',
    message: `the solve at corner ${corner.name} was not started: ${why}`,
    location: circuitLocation(compiled.circuit),
  });
  return { ok: false, corner: corner.name, diagnostics };
}
