// The checks reach the solver through this one function type, so that counterfactual
// solves (a diode flipped, a diode replaced by a probe) use the very same engine.
import type { Circuit } from '../netlist/circuit.js';
import type { Corner, SolveOptions, SolveResult } from '../sim/types.js';

export type Solver = (circuit: Circuit, corners: readonly Corner[], options?: SolveOptions) => SolveResult[];
