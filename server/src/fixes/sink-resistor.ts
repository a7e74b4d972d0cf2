// Re-valuing the resistor that sets a current sink's current (its emitter or source
// resistor), when the LEDs in its collector carry too much. A resistor in series with the
// LEDs would not do: the sink would take up the extra drop by leaving its active region
// (a saturated transistor), and the current would then hang on the supply, as if the sink
// were not there. The sink's current follows its resistor as I ∝ R^s, s measured by the
// checks (about −1 when the base is held: I ≈ VE / RE); the value is aimed at the LED's
// rating with margin, at the resistor's low tolerance, rounded up in the preferred series,
// and re-simulated. A value is kept only if the transistor stays active at every corner
// where it was active before.
import type { CornerPlan, FixRequest } from '../checks/index.js';
import { collectorEmitterVoltage, drainSourceVoltage, transistorActive } from '../checks/current-sink.js';
import type { Bjt, Mosfet, Resistor } from '../netlist/circuit.js';
import type { Finding, Fix, TextEdit } from '../findings.js';
import { preferredValue } from '../preferred.js';
import { formatQuantity } from '../units.js';
import { diodeExtremes, elementNamed, lowestScale, planNamed, resistorPower, scaleAt } from './readings.js';
import { changeResistorValue } from './resistor-lines.js';
import { AIM_TOLERANCE } from './series-resistor.js';
import { LED_CURRENT_MARGIN, MAXIMUM_CANDIDATES_PER_FINDING } from './values.js';
import type { FixCandidate } from './together.js';
import type { FixSession, Verdict, Verified } from './verify.js';

type LimitCurrent = Extract<FixRequest, { kind: 'limit-current' }>;
type CurrentSetter = NonNullable<LimitCurrent['currentSetter']>;

export function currentSetterFixes(session: FixSession, request: LimitCurrent, finding: Finding, plans: readonly CornerPlan[]): Fix[] {
  const search = SinkResistorSearch.start(session, request, finding, plans);
  if (!search) return [];
  for (let candidate = search.next(); candidate; candidate = search.next()) search.take(session.verify(candidate.edits, finding));
  return search.fixes();
}

/**
 * The search for a sink's resistor value, one candidate at a time: `next` gives the edits to
 * re-check, `take` its verdict, until `next` gives none; then `fixes`. Searches in regions
 * that cannot see each other share their re-checks (provider.ts, together.ts).
 */
export class SinkResistorSearch {
  private value: number | undefined;
  private candidates = 0;
  private passing: Fix | undefined;
  private found: Fix | undefined;
  private over = false;
  private pending: { edits: TextEdit[]; value: number } | undefined;

  private constructor(
    private readonly session: FixSession,
    private readonly request: LimitCurrent,
    private readonly setter: CurrentSetter,
    private readonly resistor: Resistor,
    private readonly finding: Finding,
    private readonly aimed: number,
    least: number,
  ) {
    this.value = preferredValue(least, session.settings.preferredSeries, 'up');
  }

  static start(session: FixSession, request: LimitCurrent, finding: Finding, plans: readonly CornerPlan[]): SinkResistorSearch | undefined {
    const setter = request.currentSetter;
    if (!setter) return undefined;
    const resistor = elementNamed(session.circuit, setter.resistor);
    const plan = planNamed(plans, request.governingCorner);
    if (!resistor || resistor.type !== 'R' || !plan || !Number.isFinite(request.maximumCurrent) || !(setter.sensitivity < 0) || !(setter.current > 0)) return undefined;
    const aimed = request.maximumCurrent * LED_CURRENT_MARGIN;
    // At the governing corner the resistor had its corner's value; the new one must hold at its lowest.
    const atCorner = resistor.resistance * scaleAt(plan, resistor.name);
    const least = (atCorner * Math.pow(setter.current / aimed, -1 / setter.sensitivity)) / lowestScale(plans, resistor.name);
    return new SinkResistorSearch(session, request, setter, resistor, finding, aimed, least);
  }

  /** The next candidate to re-check, or undefined when the search is over. */
  next(): FixCandidate | undefined {
    if (this.over || this.value === undefined || this.candidates >= MAXIMUM_CANDIDATES_PER_FINDING) return undefined;
    const value = this.value;
    const edits = changeResistorValue(this.session, this.resistor, value);
    if (!edits) {
      this.over = true;
      return undefined;
    }
    this.candidates++;
    this.pending = { edits, value };
    return { element: this.resistor, target: this.finding, edits, titled: (verified) => this.fixFor(verified, value, edits) };
  }

  /** The verdict on the candidate `next` gave. */
  take(verdict: Verdict): void {
    const pending = this.pending;
    this.pending = undefined;
    if (!pending || this.over) return;
    const { session, setter, aimed } = this;
    if (!verdict.ok && (verdict.reason === 'budget' || verdict.reason === 'edit-failed')) {
      this.over = true;
      return;
    }
    const rechecked = verdict.ok ? verdict.verified : verdict.rechecked;
    const current = rechecked ? diodeExtremes(rechecked, this.request.diode)?.forwardCurrent : undefined;
    if (verdict.ok) {
      const headroom = leastHeadroom(verdict.verified, setter);
      if (headroom === undefined) {
        // The re-check passed, but the sink no longer regulates somewhere it did: that defeats the design.
        session.statistics.rejected++;
      } else {
        const fix = this.fixFor(verdict.verified, pending.value, pending.edits);
        if (current === undefined || current <= aimed * (1 + AIM_TOLERANCE)) {
          this.found = fix;
          this.over = true;
          return;
        }
        this.passing ??= fix;
      }
    }
    // Next: the next value up, or further when the current is still high (I ∝ R^s).
    const series = session.settings.preferredSeries;
    const nextUp = preferredValue(pending.value * (1 + AIM_TOLERANCE), series, 'up');
    const scaled = current !== undefined && current > aimed ? preferredValue(pending.value * Math.pow(current / aimed, -1 / setter.sensitivity), series, 'up') : undefined;
    this.value = nextUp !== undefined && scaled !== undefined ? Math.max(nextUp, scaled) : nextUp;
  }

  /** The fix found: at most one. */
  fixes(): Fix[] {
    const fix = this.found ?? this.passing;
    return fix ? [fix] : [];
  }

  private fixFor(verified: Verified, value: number, edits: TextEdit[]): Fix {
    const headroom = leastHeadroom(verified, this.setter);
    const name = `Change ${this.resistor.name} from ${formatQuantity(this.resistor.resistance, 'Ω')} to ${formatQuantity(value, 'Ω')}`;
    return { title: headroom ? title(verified, this.request.diode, this.resistor, value, this.setter.transistor, headroom) : name, preferred: true, edits };
  }
}

/** The sink's headroom after the fix: the least collector-emitter (drain-source) voltage where it is active, and at how many corners it is not. */
interface Headroom {
  voltage: number;
  word: string;
  /** Corners at which it is saturated (each one at which it already was before the fix), and all the corners solved. */
  saturated: number;
  corners: number;
}

/**
 * The sink's headroom over the re-check's corners; undefined when it has left its active region
 * at a corner where it was active before the fix, or is active nowhere.
 */
function leastHeadroom(verified: Verified, setter: CurrentSetter): Headroom | undefined {
  const transistor = elementNamed(verified.circuit, setter.transistor);
  if (!transistor || (transistor.type !== 'Q' && transistor.type !== 'M')) return undefined;
  const wasActive = new Set(setter.activeCorners);
  let least: number | undefined;
  let saturated = 0;
  let corners = 0;
  for (const [index, result] of verified.check.solves.entries()) {
    if (!result.ok) continue;
    corners++;
    const corner = verified.check.cornerPlans[index]?.corner.name;
    if (!transistorActive(transistor, result.point)) {
      if (corner === undefined || wasActive.has(corner)) return undefined;
      saturated++;
      continue;
    }
    const voltage = headroomOf(transistor, result.point);
    if (voltage !== undefined && (least === undefined || voltage < least)) least = voltage;
  }
  if (least === undefined) return undefined;
  return { voltage: least, word: transistor.type === 'Q' ? 'collector-emitter' : 'drain-source', saturated, corners };
}

function headroomOf(transistor: Bjt | Mosfet, point: Parameters<typeof transistorActive>[1]): number | undefined {
  return transistor.type === 'Q' ? collectorEmitterVoltage(transistor, point) : drainSourceVoltage(transistor, point);
}

/** "Change RE from 15 Ω to 39 Ω (LED 13 mA, resistor 6.67 mW, QSINK collector-emitter 8.54 V or more)", with the re-check's numbers. */
function title(verified: Verified, diode: string, resistor: Resistor, value: number, transistor: string, headroom: Headroom): string {
  const current = diodeExtremes(verified, diode)?.forwardCurrent;
  const power = resistorPower(verified, resistor.name);
  const numbers = [
    current !== undefined ? `LED ${formatQuantity(current, 'A')}` : undefined,
    power !== undefined ? `resistor ${formatQuantity(power, 'W')}` : undefined,
    `${transistor} ${headroom.word} ${formatQuantity(headroom.voltage, 'V')} or more`,
  ].filter((each) => each !== undefined);
  // A sink that had no headroom at some corners before the fix still has none there: said, not hidden.
  if (headroom.saturated > 0) numbers.push(`saturated at ${headroom.saturated} of ${headroom.corners} corners, as before`);
  return `Change ${resistor.name} from ${formatQuantity(resistor.resistance, 'Ω')} to ${formatQuantity(value, 'Ω')} (${numbers.join(', ')})`;
}
