// pnlint's own side of the reference comparison: text → elaborated circuit →
// compiled circuit → DC operating point, from the TypeScript sources. Loaded
// lazily so that the ngspice side of the tests runs even while the netlist or
// solver modules are still missing from the tree.
import type { Circuit, NetlistDiagnostic } from '../../server/src/netlist/circuit.js';
import type { OperatingPoint } from '../../server/src/sim/types.js';
import { diskReader } from './disk-reader.mjs';

export interface PnlintSolve {
  circuit: Circuit | undefined;
  point: OperatingPoint | undefined;
  /** Why there is no operating point, or why it cannot be trusted (an error from elaboration). */
  failure: string | undefined;
  diagnostics: NetlistDiagnostic[];
}

export type PnlintSolver =
  | { available: true; solve(uri: string, text: string): PnlintSolve }
  | { available: false; reason: string };

function describeDiagnostics(diagnostics: NetlistDiagnostic[]): string {
  return diagnostics
    .map((d) => `${d.severity} ${d.code} line ${d.location.range.start.line}: ${d.message}`)
    .join('; ');
}

export async function loadPnlintSolver(): Promise<PnlintSolver> {
  let netlist: typeof import('../../server/src/netlist/index.js');
  let sim: typeof import('../../server/src/sim/index.js');
  try {
    netlist = await import('../../server/src/netlist/index.js');
    sim = await import('../../server/src/sim/index.js');
  } catch (error) {
    return { available: false, reason: `the netlist or solver module is not in the tree yet (${(error as Error).message.split('\n')[0]})` };
  }
  return {
    available: true,
    solve(uri, text) {
      const circuit = netlist.elaborate(uri, text, diskReader);
      const errors = circuit.diagnostics.filter((d) => d.severity === 'error');
      if (errors.length > 0) {
        return { circuit, point: undefined, failure: `elaboration: ${describeDiagnostics(errors)}`, diagnostics: circuit.diagnostics };
      }
      const compiled = sim.compileCircuit(circuit);
      const result = sim.solveOperatingPoint(compiled);
      if (!result.ok) {
        return { circuit, point: undefined, failure: `solve: ${describeDiagnostics(result.diagnostics)}`, diagnostics: result.diagnostics };
      }
      return { circuit, point: result.point, failure: undefined, diagnostics: result.diagnostics };
    },
  };
}
