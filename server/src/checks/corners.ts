// The worst-case corners a circuit is solved at (issue 4, "Corners"): nominal, then each
// independent source at its minimum and maximum, their combinations, resistors at ± their
// tolerance, and each circuit temperature. Time-varying sources are taken quasi-statically
// at their extremes and breakpoints (SIN offset ± amplitude, both PULSE levels, every PWL
// point): a DC solve at that instant, with capacitors open and inductors shorted.
import type { Circuit, CurrentSource, VoltageSource, Waveform } from '../netlist/circuit.js';
import type { Settings } from '../settings.js';
import type { Corner } from '../sim/types.js';
import { formatPercent, formatQuantity, formatTemperature } from '../units.js';

/** The range a supply may take, from a directive or pnlint.json. */
export interface SupplyLimits {
  source: string;
  min?: number;
  max?: number;
  tolerance?: number;
  /** "from directive on line 4", "default supply tolerance 5 %". */
  description: string;
}

/** One source level a corner uses, as messages show it. */
export interface SourceLevel {
  source: string;
  value: number;
  /** `min`, `max`, `SIN peak`, `PWL point 3`, … */
  role: string;
  /** True when the level is an instant of a time-varying source. */
  quasiStatic: boolean;
}

export interface CornerPlan {
  corner: Corner;
  /** "V1 = 5.25 V (max corner)", "nominal values". */
  description: string;
  levels: SourceLevel[];
  /** −1: resistors at their low tolerance, +1 high, 0 nominal. */
  resistorSide: -1 | 0 | 1;
  temperature: number;
  quasiStatic: boolean;
}

/** Full combinations of source extremes are solved up to this many varying sources (2⁴ = 16 corners; ours). */
export const MAXIMUM_COMBINED_SOURCES = 4;
/** Corners beyond this are not solved: the plan falls back to one source at a time (ours, keeps a check under a second). */
export const MAXIMUM_CORNERS = 96;

type IndependentSource = VoltageSource | CurrentSource;

/** Every level a source is checked at besides its nominal value, low and high extremes first. */
export function sourceLevels(source: IndependentSource, limits: SupplyLimits | undefined, defaultTolerance: number): SourceLevel[] {
  const name = source.name;
  const level = (value: number, role: string, quasiStatic: boolean): SourceLevel => ({ source: name, value, role, quasiStatic });
  const waveform = source.waveform;
  if (!waveform || waveform.shape === 'dc') {
    const nominal = source.dc;
    if (limits && (limits.min !== undefined || limits.max !== undefined)) {
      // A bound not given stays at the nominal value, which the nominal corner already covers.
      return [level(limits.min ?? nominal, 'min', false), level(limits.max ?? nominal, 'max', false)].filter(
        (each) => each.value !== nominal,
      );
    }
    const tolerance = limits?.tolerance ?? defaultTolerance;
    // A 0 V source is an ammeter, not a supply: it has no range.
    if (nominal === 0 || tolerance === 0) return [];
    return byMagnitude([nominal * (1 - tolerance), nominal * (1 + tolerance)]).map((value, index) =>
      level(value, index === 0 ? 'min' : 'max', false),
    );
  }
  const breakpoints = waveformBreakpoints(waveform);
  if (breakpoints.length === 0) return [];
  let values = breakpoints.map((point) => point.value);
  const lowest = Math.min(...values);
  const highest = Math.max(...values);
  let low = lowest;
  let high = highest;
  if (limits && (limits.min !== undefined || limits.max !== undefined)) {
    low = limits.min ?? lowest;
    high = limits.max ?? highest;
  } else {
    const tolerance = limits?.tolerance ?? defaultTolerance;
    low = lowest - tolerance * Math.abs(lowest);
    high = highest + tolerance * Math.abs(highest);
  }
  const levels: SourceLevel[] = [];
  const seen = new Set<number>();
  const add = (value: number, role: string) => {
    if (seen.has(value)) return;
    seen.add(value);
    levels.push(level(value, role, true));
  };
  const roleOf = (value: number) => breakpoints.find((point) => point.value === value)?.role ?? 'level';
  add(low, `${roleOf(lowest)}, min`);
  add(high, `${roleOf(highest)}, max`);
  values = values.filter((value) => value !== lowest && value !== highest);
  for (const point of breakpoints) if (values.includes(point.value)) add(point.value, point.role);
  return levels;
}

/** The instants worth a quasi-static solve: extremes and breakpoints of a waveform. */
export function waveformBreakpoints(waveform: Waveform): { value: number; role: string }[] {
  switch (waveform.shape) {
    case 'dc':
      return [{ value: waveform.value, role: 'DC' }];
    case 'sin':
      return [
        { value: waveform.offset - Math.abs(waveform.amplitude), role: 'SIN trough' },
        { value: waveform.offset + Math.abs(waveform.amplitude), role: 'SIN peak' },
      ];
    case 'pulse':
      return [
        { value: waveform.initial, role: 'PULSE initial level' },
        { value: waveform.pulsed, role: 'PULSE pulsed level' },
      ];
    case 'pwl':
      return waveform.points.map((point, index) => ({ value: point.value, role: `PWL point ${index + 1}` }));
    case 'exp':
      return [
        { value: waveform.initial, role: 'EXP initial level' },
        { value: waveform.pulsed, role: 'EXP pulsed level' },
      ];
    case 'sffm':
      return [
        { value: waveform.offset - Math.abs(waveform.amplitude), role: 'SFFM trough' },
        { value: waveform.offset + Math.abs(waveform.amplitude), role: 'SFFM peak' },
      ];
  }
}

function byMagnitude(values: number[]): number[] {
  return [...values].sort((a, b) => Math.abs(a) - Math.abs(b));
}

/**
 * Plans the corners to solve. `resistorTolerances` maps each resistor with a tolerance
 * (from a directive, pnlint.json or the setting) to it.
 */
export function planCorners(
  circuit: Circuit,
  settings: Settings,
  supplies: readonly SupplyLimits[],
  resistorTolerances: ReadonlyMap<string, number>,
): CornerPlan[] {
  return cornerPlanning(circuit, settings, supplies, resistorTolerances).plans;
}

/** The corners, and how many were left out to stay within MAXIMUM_CORNERS (the caller reports it). */
export function cornerPlanning(
  circuit: Circuit,
  settings: Settings,
  supplies: readonly SupplyLimits[],
  resistorTolerances: ReadonlyMap<string, number>,
): { plans: CornerPlan[]; leftOut: number } {
  const sources = circuit.elements.filter((element): element is IndependentSource => element.type === 'V' || element.type === 'I');
  const varying: SourceLevel[][] = [];
  for (const source of sources) {
    const limits = supplies.find((supply) => supply.source.toLowerCase() === source.name.toLowerCase());
    const levels = sourceLevels(source, limits, settings.supplyTolerance);
    if (levels.length > 0) varying.push(levels);
  }

  // Source settings: nominal, each source at each of its levels alone, then combinations of extremes.
  const sourceSets: SourceLevel[][] = [[]];
  for (const levels of varying) for (const level of levels) sourceSets.push([level]);
  const extremes = varying.map((levels) => levels.slice(0, 2));
  if (varying.length >= 2) {
    if (varying.length <= MAXIMUM_COMBINED_SOURCES) sourceSets.push(...combinations(extremes).filter((set) => set.length === varying.length));
    else sourceSets.push(extremes.map((levels) => levels[0]!), extremes.map((levels) => levels[levels.length - 1]!));
  }

  const temperatures = [...new Set([circuit.temperature, ...settings.temperatures])];
  const resistorSides: (-1 | 0 | 1)[] = resistorTolerances.size > 0 ? [0, -1, 1] : [0];

  const wanted = sourceSets.length * resistorSides.length * temperatures.length;
  let sets = sourceSets;
  if (wanted > MAXIMUM_CORNERS) sets = sourceSets.filter((set) => set.length <= 1);
  const plans: CornerPlan[] = [];
  for (const temperature of temperatures) {
    for (const resistorSide of resistorSides) {
      for (const levels of sets) {
        if (plans.length >= MAXIMUM_CORNERS) break;
        plans.push(makePlan(circuit, levels, resistorSide, temperature, resistorTolerances));
      }
    }
  }
  return { plans, leftOut: wanted - plans.length };
}

function combinations(extremes: SourceLevel[][]): SourceLevel[][] {
  let sets: SourceLevel[][] = [[]];
  for (const levels of extremes) sets = sets.flatMap((set) => levels.map((level) => [...set, level]));
  return sets;
}

function makePlan(
  circuit: Circuit,
  levels: SourceLevel[],
  resistorSide: -1 | 0 | 1,
  temperature: number,
  resistorTolerances: ReadonlyMap<string, number>,
): CornerPlan {
  let resistors: ResistorSetting | undefined;
  if (resistorSide !== 0) {
    const scale: Record<string, number> = {};
    const tolerances = new Set<number>();
    for (const [resistor, tolerance] of resistorTolerances) {
      scale[resistor] = 1 + resistorSide * tolerance;
      tolerances.add(tolerance);
    }
    const spread = tolerances.size === 1 ? formatPercent([...tolerances][0]!) : 'their tolerance';
    resistors = { scale, description: `resistors ${resistorSide < 0 ? '−' : '+'}${spread}`, name: `resistors ${resistorSide < 0 ? 'low' : 'high'}` };
  }
  return assemblePlan(circuit, levels, resistors, resistorSide, temperature);
}

interface ResistorSetting {
  scale: Record<string, number>;
  description: string;
  name: string;
}

function assemblePlan(circuit: Circuit, levels: SourceLevel[], resistors: ResistorSetting | undefined, resistorSide: -1 | 0 | 1, temperature: number): CornerPlan {
  const corner: Corner = { name: '' };
  const parts: string[] = [];
  const nameParts: string[] = [];
  if (levels.length > 0) {
    corner.sources = {};
    for (const level of levels) {
      corner.sources[level.source] = level.value;
      const unit = circuit.elements.find((element) => element.name === level.source)?.type === 'I' ? 'A' : 'V';
      parts.push(`${level.source} = ${formatQuantity(level.value, unit)} (${level.role})`);
      nameParts.push(`${level.source} ${level.role}`);
    }
  }
  if (resistors) {
    corner.scale = resistors.scale;
    parts.push(resistors.description);
    nameParts.push(resistors.name);
  }
  if (temperature !== circuit.temperature) {
    corner.temperature = temperature;
    parts.push(formatTemperature(temperature));
    nameParts.push(formatTemperature(temperature));
  }
  corner.name = nameParts.length === 0 ? 'nominal' : nameParts.join(', ');
  let description = parts.length === 0 ? 'nominal values' : parts.join(', ');
  if (parts.length === 1 && description.endsWith(')')) description = `${description.slice(0, -1)} corner)`;
  const quasiStatic = levels.some((level) => level.quasiStatic);
  return { corner, description, levels, resistorSide, temperature, quasiStatic };
}

/**
 * A corner like `plan`, but with the resistors in `raised` at their high tolerance and every
 * other toleranced resistor at its low one: a zener's feed resistor high while its load draws
 * most (low supply, heaviest load).
 */
export function splitResistorCorner(circuit: Circuit, plan: CornerPlan, raised: ReadonlySet<string>, resistorTolerances: ReadonlyMap<string, number>): CornerPlan {
  const scale: Record<string, number> = {};
  for (const [resistor, tolerance] of resistorTolerances) scale[resistor] = raised.has(resistor) ? 1 + tolerance : 1 - tolerance;
  const names = [...raised].filter((name) => resistorTolerances.has(name));
  const description = `${names.join(', ')} at +tolerance, other resistors at −tolerance`;
  return assemblePlan(circuit, plan.levels, { scale, description, name: `${names.join(', ')} high, others low` }, 0, plan.temperature);
}
