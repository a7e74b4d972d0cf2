// The project's solver, bound to the checks' Solver shape.
import { solveCorners } from '../sim/index.js';
import type { Solver } from './solver.js';

export const defaultSolver: Solver = (circuit, corners, options) => solveCorners(circuit, [...corners], options ?? {});
