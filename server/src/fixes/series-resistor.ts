// Limiting an LED's current with a resistor: inserted in series when there is none, or the
// series resistor re-valued when there is one. The value comes from the circuit's Thevenin
// view of the LED at the governing corner (Voc with the LED removed, Isc with it shorted,
// Rth = Voc / Isc), the current aimed at below the LED's rating with margin, and the LED's
// own forward voltage at that current (solved): R = (Voc − Vf) / I − Rth (Ohm's law). It is
// rounded up within the preferred series, so that the current only falls, and re-simulated.
// When a current sink sets the current, its emitter resistor is re-valued instead.
import type { CornerPlan, FixRequest } from '../checks/index.js';
import { readDirectives } from '../checks/directives.js';
import { resistorRatings } from '../checks/ratings.js';
import { LED_CURRENT_CHANGE_LIMIT, LED_FORWARD_VOLTAGE_SPREAD } from '../checks/thresholds.js';
import type { Diode, Resistor } from '../netlist/circuit.js';
import type { Finding, Fix, TextEdit } from '../findings.js';
import { preferredValue } from '../preferred.js';
import { formatQuantity } from '../units.js';
import { diodeVoltageAt, measureThevenin } from './probes.js';
import { diodeExtremes, elementNamed, lowestScale, planNamed, resistorPower, scaleAt, solveOptionsOf } from './readings.js';
import { changeResistorValue, insertSeriesResistor } from './resistor-lines.js';
import { currentSetterFixes } from './sink-resistor.js';
import {
  LED_CURRENT_MARGIN,
  MAXIMUM_CANDIDATES_PER_FINDING,
  MAXIMUM_TARGET_REDUCTIONS,
  RESISTOR_POWER_MARGIN,
  TARGET_REDUCTION,
} from './values.js';
import type { FixCandidate } from './together.js';
import type { FixSession, Verdict, Verified } from './verify.js';

type LimitCurrent = Extract<FixRequest, { kind: 'limit-current' }>;

/**
 * The least voltage the resistor must drop for the LED to count as limited: the LED rule's own
 * test (its forward-voltage spread must move the current by less than the change limit).
 */
export const LEAST_RESISTOR_DROP = LED_FORWARD_VOLTAGE_SPREAD / LED_CURRENT_CHANGE_LIMIT;

/** A re-checked current this close to the aimed one counts as on aim (ours: far below any part's tolerance, above solver noise). */
export const AIM_TOLERANCE = 1e-3;

/**
 * A re-checked current below this fraction of the aimed one falls far short: a lower value is
 * tried (ours: one E12 step is about 20 %, so a value rounded up in E12 or finer lands above it).
 */
export const UNDERSHOOT = 0.8;

export interface SeriesResistorDesign {
  /** The least resistance (Ω, nominal) that keeps the current at or below `current` at the governing corner. */
  leastResistance: number;
  /** The current aimed at (A) and the LED's forward voltage there (V). */
  current: number;
  forwardVoltage: number;
  openVoltage: number;
  theveninResistance: number;
}

export function currentLimitFixes(session: FixSession, request: LimitCurrent, finding: Finding, plans: readonly CornerPlan[]): Fix[] {
  // A current sink sets the current: its own resistor is the one to change (sink-resistor.ts).
  if (request.currentSetter) return currentSetterFixes(session, request, finding, plans);
  const search = SeriesResistorSearch.start(session, request, finding, plans);
  if (!search) return [];
  for (let candidate = search.next(); candidate; candidate = search.next()) search.take(session.verify(candidate.edits, finding));
  return search.fixes();
}

/**
 * The search for an LED's series resistor, one candidate value at a time: `next` gives the
 * edits to re-check, `take` its verdict, until `next` gives none; then `fixes`. Searches in
 * regions that cannot see each other share their re-checks (provider.ts, together.ts).
 */
export class SeriesResistorSearch {
  /** The first value that passes its re-check, kept in case no later one also meets the aimed current. */
  private passing: Fix | undefined;
  /** The last value that passed and met the aim, while a lower one is tried because the current fell far short. */
  private onAim: Fix | undefined;
  private value: number | undefined;
  private candidates = 0;
  private done = false;
  private result: Fix[] = [];
  private pending: { edits: TextEdit[]; resistorName: string; value: number } | undefined;

  private constructor(
    private readonly session: FixSession,
    private readonly diode: Diode,
    private readonly finding: Finding,
    private readonly existing: Resistor | undefined,
    private readonly design: SeriesResistorDesign,
  ) {
    this.value = preferredValue(design.leastResistance, session.settings.preferredSeries, 'up');
  }

  /** Undefined when no series resistor can be designed (the request's numbers or the circuit's Thevenin view rule it out). */
  static start(session: FixSession, request: LimitCurrent, finding: Finding, plans: readonly CornerPlan[]): SeriesResistorSearch | undefined {
    const diode = elementNamed(session.circuit, request.diode);
    const plan = planNamed(plans, request.governingCorner);
    if (!diode || diode.type !== 'D' || !plan || !Number.isFinite(request.maximumCurrent) || !(request.maximumCurrent > 0)) return undefined;
    const existing = request.seriesResistors.map((name) => elementNamed(session.circuit, name)).find((element): element is Resistor => element?.type === 'R');
    const design = designSeriesResistor(session, diode, request, existing, plan, plans);
    return design && new SeriesResistorSearch(session, diode, finding, existing, design);
  }

  /** The next candidate to re-check, or undefined when the search is over. */
  next(): FixCandidate | undefined {
    if (this.done || this.value === undefined || this.candidates >= MAXIMUM_CANDIDATES_PER_FINDING) return this.finish();
    const value = this.value;
    let edits: TextEdit[] | undefined;
    let resistorName = '';
    if (this.existing) {
      edits = changeResistorValue(this.session, this.existing, value);
      resistorName = this.existing.name;
    } else {
      const inserted = insertSeriesResistor(this.session, this.diode, value);
      edits = inserted?.edits;
      resistorName = inserted?.name ?? '';
    }
    if (!edits) return this.finish();
    this.candidates++;
    this.pending = { edits, resistorName, value };
    const candidateEdits = edits;
    return {
      element: this.diode,
      target: this.finding,
      edits: candidateEdits,
      titled: (verified) => ({ title: title(verified, this.diode.name, resistorName, value, this.existing), preferred: true, edits: candidateEdits }),
    };
  }

  /** The verdict on the candidate `next` gave. */
  take(verdict: Verdict): void {
    const pending = this.pending;
    this.pending = undefined;
    if (!pending || this.done) return;
    const { design, session } = this;
    const series = session.settings.preferredSeries;
    if (!verdict.ok && (verdict.reason === 'budget' || verdict.reason === 'edit-failed')) return void this.finish();
    const rechecked = verdict.ok ? verdict.verified : verdict.rechecked;
    const current = rechecked ? diodeExtremes(rechecked, this.diode.name)?.forwardCurrent : undefined;
    if (verdict.ok) {
      const fix: Fix = { title: title(verdict.verified, this.diode.name, pending.resistorName, pending.value, this.existing), preferred: true, edits: pending.edits };
      const meetsAim = current === undefined || current <= design.current * (1 + AIM_TOLERANCE);
      if (!meetsAim && this.onAim) return void this.finish([this.onAim]); // the lower value overshoots: keep the one that met the aim
      if (meetsAim) {
        // Far short of the aim (the Thevenin view of one LED of a string leaves out the others' forward voltage): try lower once more.
        const lower = current !== undefined && current < design.current * UNDERSHOOT ? preferredValue((pending.value * current) / design.current, series, 'up') : undefined;
        if (lower === undefined || !(lower < pending.value)) return void this.finish([fix]);
        this.onAim = fix;
        this.value = lower;
        return;
      }
      this.passing ??= fix;
    } else if (this.onAim) return void this.finish([this.onAim]);
    // Next: the next value up, or further when the current fell short by more (current about ∝ 1/R where the resistor dominates).
    const nextUp = preferredValue(pending.value * (1 + AIM_TOLERANCE), series, 'up');
    const scaled = current !== undefined && current > design.current ? preferredValue((pending.value * current) / design.current, series, 'up') : undefined;
    this.value = nextUp !== undefined && scaled !== undefined ? Math.max(nextUp, scaled) : nextUp;
  }

  /** The fix found: at most one. */
  fixes(): Fix[] {
    return this.done ? this.result : (this.finish(), this.result);
  }

  private finish(result?: Fix[]): undefined {
    if (!this.done) {
      this.done = true;
      this.result = result ?? (this.onAim ? [this.onAim] : this.passing ? [this.passing] : []);
    }
    return undefined;
  }
}

/** The value to start from: the least resistance, with the aimed current lowered while the supply leaves too little headroom. */
export function designSeriesResistor(
  session: FixSession,
  diode: Diode,
  request: LimitCurrent,
  existing: Resistor | undefined,
  plan: CornerPlan,
  plans: readonly CornerPlan[],
): SeriesResistorDesign | undefined {
  const options = solveOptionsOf(session);
  const thevenin = measureThevenin(session.circuit, diode, plan.corner, options);
  if (!thevenin || !(thevenin.openVoltage > 0)) return undefined;
  // What the rest of the loop contributes, the existing resistor (at this corner's value) taken out.
  const existingAtCorner = existing ? existing.resistance * scaleAt(plan, existing.name) : 0;
  const rest = Math.max(0, thevenin.resistance - existingAtCorner);
  // The resistor at the low end of its tolerance must still be enough.
  const lowScale = existing ? lowestScale(plans, existing.name) : 1 - session.settings.resistorTolerance;
  const powerRating = existing
    ? resistorRatings(existing, session.settings, readDirectives(session.circuit), session.config).power.value
    : session.settings.defaultResistorPower;

  let current = request.maximumCurrent * LED_CURRENT_MARGIN;
  let loweredForPower = false;
  for (let attempt = 0; attempt <= MAXIMUM_TARGET_REDUCTIONS; attempt++) {
    if (request.minimumCurrent !== undefined && current < request.minimumCurrent) return undefined;
    const forwardVoltage = diodeVoltageAt(session.circuit, diode, current, plan.corner, options);
    if (forwardVoltage === undefined) return undefined;
    const drop = thevenin.openVoltage - forwardVoltage;
    if (drop >= LEAST_RESISTOR_DROP) {
      // The resistor drops about `drop` at `current`; keep that within its power rating's margin.
      // (Once lowered for power, the slightly larger drop at the lower current is accepted.)
      const powerLimited = (RESISTOR_POWER_MARGIN * powerRating) / drop;
      if (current > powerLimited && !loweredForPower) {
        current = powerLimited;
        loweredForPower = true;
        continue;
      }
      const leastResistance = (drop / current - rest) / lowScale;
      if (!(leastResistance > 0)) return undefined; // the loop already limits it below the aim
      return { leastResistance, current, forwardVoltage, openVoltage: thevenin.openVoltage, theveninResistance: thevenin.resistance };
    }
    current *= TARGET_REDUCTION;
  }
  return undefined;
}

/** "Insert 150 Ω series resistor (LED 13.8 mA, resistor 29 mW)", with the re-check's numbers. */
function title(verified: Verified, diode: string, resistor: string, value: number, existing: Resistor | undefined): string {
  const current = diodeExtremes(verified, diode)?.forwardCurrent;
  const power = resistorPower(verified, resistor);
  const numbers = [current !== undefined ? `LED ${formatQuantity(current, 'A')}` : undefined, power !== undefined ? `resistor ${formatQuantity(power, 'W')}` : undefined]
    .filter((each) => each !== undefined)
    .join(', ');
  const suffix = numbers ? ` (${numbers})` : '';
  if (existing) return `Change ${existing.name} from ${formatQuantity(existing.resistance, 'Ω')} to ${formatQuantity(value, 'Ω')}${suffix}`;
  return `Insert ${formatQuantity(value, 'Ω')} series resistor${suffix}`;
}
