// Every tolerance of the algebra layer, with where it comes from.

/**
 * Threshold pivoting when the pivots are chosen: a pivot must be at least this
 * fraction of the largest entry left in its column. 0.1 is the value Duff,
 * Erisman and Reid recommend for the Markowitz strategy (Direct Methods for
 * Sparse Matrices, 1986): it bounds each step's growth of the entries by a
 * factor of 11 and still leaves the ordering room to keep the factors sparse.
 */
export const PIVOT_SELECTION_THRESHOLD = 0.1;

/**
 * When the kept pivot order is reused, a pivot is still accepted down to this
 * fraction of the largest entry below it; only below that is the order chosen
 * afresh. 1e-3 is SPICE's default relative pivot ratio (`pivrel`, SPICE3
 * user's manual, Quarles 1989; ngspice manual, .options). The gap between the
 * two thresholds keeps Newton's small changes of value from forcing re-pivots.
 */
export const PIVOT_ACCEPTANCE_THRESHOLD = 1e-3;

/**
 * An entry no larger than this fraction of the largest original entry in its
 * column is a numerical zero: about 450 times the double-precision unit
 * roundoff, a little more than the rounding residue that an exact cancellation
 * leaves behind (common practice, no source). Relative to the column, not an
 * absolute floor, so that a matrix of tiny conductances is not called singular.
 */
export const NUMERICAL_ZERO_RELATIVE = 1e-13;

/**
 * Markowitz search: stop once this many rows or columns holding an acceptable
 * pivot have been looked at. Searching only a few of the sparsest lines costs
 * little in fill and bounds the search time (the limited search described in
 * Duff, Erisman and Reid, Direct Methods for Sparse Matrices, 1986); the number
 * four itself is common practice, no source.
 */
export const MARKOWITZ_SEARCH_LIMIT = 4;
