// Fixes verified by re-simulation (product.md, "Fixes"): each finding's request turned into
// text edits, applied to a copy of the files, re-checked, and offered only if the finding
// is gone and nothing new appeared.
export { attachVerifiedFixes, createFixProvider, fixesForRequest, type AttachedFixes, type RequestedFixes, type StatisticsProvider } from './provider.js';
export { FixSession, findingKey, sameProblem, FIX_BUDGET_MILLISECONDS, MAXIMUM_VERIFICATIONS, type FixOptions, type FixStatistics, type Verdict, type Verified } from './verify.js';
export { designSeriesResistor, AIM_TOLERANCE, LEAST_RESISTOR_DROP, type SeriesResistorDesign } from './series-resistor.js';
export { zenerWindow, MAXIMUM_FEED_CANDIDATES, type ZenerWindow } from './zener-resistor.js';
export { GUARD_DIODE_PARAMETERS } from './guard-diode.js';
export { UNIGNORABLE_RULES } from './ignore.js';
export { measureThevenin, diodeVoltageAt, measureResistorResponse, OPEN_CIRCUIT_RESISTANCE, type TheveninMeasurement, type ResistorResponse } from './probes.js';
export {
  LED_CURRENT_MARGIN,
  RESISTOR_POWER_MARGIN,
  TARGET_REDUCTION,
  MAXIMUM_TARGET_REDUCTIONS,
  MAXIMUM_CANDIDATES_PER_FINDING,
  UNBOUNDED_WINDOW_SPAN,
  preferredValuesFromTop,
  toleranceMargin,
  type ResistanceWindow,
} from './values.js';
