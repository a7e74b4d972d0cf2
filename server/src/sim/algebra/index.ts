// The algebra layer: a sparse real matrix and its LU factorisation.
export { SparseMatrix } from './matrix.js';
export { SparseLU } from './lu.js';
export type { FactorOptions, FactorResult, FactorStatistics } from './lu.js';
export type { SingularReason } from './markowitz.js';
