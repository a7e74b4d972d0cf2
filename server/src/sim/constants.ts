// Physical constants and solver defaults, as the reference engine (ngspice 39) uses them.

/** Boltzmann constant, J/K (CODATA 2014, the value ngspice 39 uses). */
export const BOLTZMANN = 1.38064852e-23;
/** Elementary charge, C (CODATA 2014, the value ngspice 39 uses). */
export const ELEMENTARY_CHARGE = 1.6021766208e-19;
/** k/q, V/K. */
export const BOLTZMANN_OVER_CHARGE = BOLTZMANN / ELEMENTARY_CHARGE;
/** 0 °C in kelvin. */
export const ZERO_CELSIUS_IN_KELVIN = 273.15;
/** SPICE's reference temperature, 27 °C (SPICE3 user's manual, Quarles 1989). */
export const REFERENCE_TEMPERATURE = 300.15;
/** The default circuit and nominal temperature in °C (SPICE3 user's manual). */
export const DEFAULT_TEMPERATURE_CELSIUS = 27;

/** Default convergence tolerances (SPICE3 user's manual, `.options`): relative, node voltage (V), branch current (A). */
export const DEFAULT_RELATIVE_TOLERANCE = 1e-3;
export const DEFAULT_VOLTAGE_TOLERANCE = 1e-6;
export const DEFAULT_CURRENT_TOLERANCE = 1e-12;
/** Minimum conductance across every junction, S (SPICE3 `.options gmin`). */
export const DEFAULT_GMIN = 1e-12;
/** Newton iterations for the plain DC solve (SPICE3 `.options itl1`). */
export const DEFAULT_DC_ITERATION_LIMIT = 100;
/** Newton iterations per gmin or source step (SPICE3 `.options itl2`). */
export const DEFAULT_STEP_ITERATION_LIMIT = 50;
/** gmin stepping divides the shunt by this factor per step (ngspice's `gminfactor` default). */
export const DEFAULT_GMIN_FACTOR = 10;
/** Wall-clock budget of one corner's solve when the caller gives none (ours: generous for 20,000-section circuits). */
export const DEFAULT_BUDGET_MILLISECONDS = 10_000;

/**
 * Exponentials in device equations are continued linearly above this argument, so that a wild
 * Newton step cannot overflow to infinity (e^100 · 1e-14 A is already ~1e29 A; ours, no source).
 */
export const EXPONENT_LIMIT = 100;
