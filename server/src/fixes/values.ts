// Choosing a resistor's value: the margins a fix aims for, the window a value must fall in,
// and the preferred values (IEC 60063) to try, in the order they are tried.
import { preferredValuesBetween, SERIES_TOLERANCE } from '../preferred.js';
import type { PreferredSeries } from '../settings.js';

/**
 * An LED is given this fraction of its forward-current rating, and a resistor this fraction
 * of its power rating: keep power below about 50–70 % of the rating (common practice, no
 * source; shared/design/verification.md). An LED's power follows its current, since its
 * forward voltage hardly moves.
 */
export const LED_CURRENT_MARGIN = 0.7;
export const RESISTOR_POWER_MARGIN = 0.7;

/** When the supply leaves too little headroom for the aimed current, aim this much lower, at most this many times (ours). */
export const TARGET_REDUCTION = 0.5;
export const MAXIMUM_TARGET_REDUCTIONS = 4;

/** Preferred values tried for one finding, each one re-simulated (ours: a linear circuit needs the first). */
export const MAXIMUM_CANDIDATES_PER_FINDING = 3;

/** With no lower bound (no current limit above), values are looked for within a decade below the upper bound (ours). */
export const UNBOUNDED_WINDOW_SPAN = 0.1;

/**
 * The tolerance a chosen value must keep inside its window: the resistor's own rating
 * (a `tol=` directive, pnlint.json or the setting) when it has one, else the tolerance its
 * preferred series is made for (IEC 60063: E24 ±5 %, E96 ±1 %), the part a fitter would buy.
 */
export function toleranceMargin(ratedTolerance: number | undefined, series: PreferredSeries): number {
  return ratedTolerance !== undefined && ratedTolerance > 0 ? ratedTolerance : SERIES_TOLERANCE[series];
}

/** A window of acceptable resistances, with the corners that set each end. */
export interface ResistanceWindow {
  minimum: number;
  maximum: number;
  /** The corner whose condition sets the minimum / maximum (for messages). */
  minimumCorner: string | undefined;
  maximumCorner: string | undefined;
}

/**
 * The preferred values inside a window with the part's tolerance at both ends (value × (1 +
 * tolerance) ≤ maximum and value × (1 − tolerance) ≥ minimum), largest first: a zener's feed
 * resistor is best near the top of its window, where it dissipates least and draws least from
 * the supply, and the tolerance is the margin kept below the top.
 */
export function preferredValuesFromTop(window: ResistanceWindow, tolerance: number, series: PreferredSeries, count: number): number[] {
  const high = window.maximum / (1 + tolerance);
  const low = window.minimum > 0 ? window.minimum / (1 - tolerance) : high * UNBOUNDED_WINDOW_SPAN;
  if (!(high > 0) || !(high >= low)) return [];
  return preferredValuesBetween(low, high, series).reverse().slice(0, count);
}
