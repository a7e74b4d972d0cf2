// Re-valuing a zener's feed resistor inside its window. The textbook shunt-regulator window
// (e.g. Sedra & Smith, Microelectronic Circuits) runs from minimum supply and maximum load,
// Rmax = (Vs,min − Vz) / (Iz,min + IL,max), to maximum supply and no load,
// Rmin = (Vs,max − Vz) / Iz,max, where Iz,max is the zener's rated maximum current (IZM, or
// PD / VZ). The light-load end takes the load as absent, as the textbook's form does: a load
// that is unplugged or switched off must not cook the zener. Each corner is solved with the
// zener held at its regulating voltage (its own voltage at Iz,min), which gives every corner's
// Vs, IL and supply resistance at once; the window is the intersection over the corners.
// The value chosen is the largest preferred value whose tolerance stays inside the window:
// near the top, the zener and the resistor dissipate least and the supply is drained least.
// When the window is empty, no value can fix the finding, and its message says so.
import type { CornerPlan, FixRequest } from '../checks/index.js';
import { atCorner } from '../checks/context.js';
import { buildTopology, currentNodes } from '../checks/topology.js';
import type { Circuit, Diode, Resistor } from '../netlist/circuit.js';
import type { Finding, Fix, TextEdit } from '../findings.js';
import { formatPercent, formatQuantity } from '../units.js';
import { readDirectives } from '../checks/directives.js';
import { diodeRatings, resistorRatings } from '../checks/ratings.js';
import type { RatedValue } from '../checks/directives.js';
import { RATING_SYMBOLS, type DiodeRatingKey } from '../checks/vocabulary.js';
import { diodeVoltageAt, measureResistorResponse, type ResistorResponse } from './probes.js';
import { elementNamed, resistorPower, reverseCurrentRange, solveOptionsOf } from './readings.js';
import { changeResistorValue } from './resistor-lines.js';
import { MAXIMUM_CANDIDATES_PER_FINDING, preferredValuesFromTop, RESISTOR_POWER_MARGIN, toleranceMargin, type ResistanceWindow } from './values.js';
import type { FixCandidate } from './together.js';
import type { FixSession, Verdict, Verified } from './verify.js';

type ZenerWindowRequest = Extract<FixRequest, { kind: 'zener-window' }>;

/** Resistors looked at as a zener's feed when the checks found none in series (ours). */
export const MAXIMUM_FEED_CANDIDATES = 4;

export interface ZenerFixes {
  fixes: Fix[];
  /** Said in the finding's message when no fix can be offered, and why. */
  note?: string;
}

/** The feed resistor's window in ohms as fitted (not yet narrowed by its tolerance). */
export interface ZenerWindow extends ResistanceWindow {
  resistor: Resistor;
  /** The voltage the zener was held at: its own voltage at its minimum regulating current (V). */
  zenerVoltage: number;
}

export function zenerWindowFixes(session: FixSession, request: ZenerWindowRequest, finding: Finding, plans: readonly CornerPlan[]): ZenerFixes {
  const started = ZenerWindowSearch.start(session, request, finding, plans);
  if (!(started instanceof ZenerWindowSearch)) return started;
  for (let candidate = started.next(); candidate; candidate = started.next()) started.take(session.verify(candidate.edits, finding));
  return started.result();
}

/**
 * The search for a zener's feed resistor value, from the top of its window down, one value
 * at a time: `next` gives the edits to re-check, `take` its verdict, until `next` gives none;
 * then `result`. Searches in regions that cannot see each other share their re-checks
 * (provider.ts, together.ts).
 */
export class ZenerWindowSearch {
  private index = 0;
  private overPower: number | undefined;
  private done: ZenerFixes | undefined;
  private pending: { edits: TextEdit[]; value: number } | undefined;

  private constructor(
    private readonly session: FixSession,
    private readonly zener: Diode,
    private readonly finding: Finding,
    private readonly window: ZenerWindow,
    private readonly values: readonly number[],
    private readonly range: string,
    private readonly powerRating: number,
  ) {}

  /** A search, or the result at once when no value can be tried (the message's note says why). */
  static start(session: FixSession, request: ZenerWindowRequest, finding: Finding, plans: readonly CornerPlan[]): ZenerWindowSearch | ZenerFixes {
    const zener = elementNamed(session.circuit, request.diode);
    if (!zener || zener.type !== 'D') return { fixes: [] };
    const window = zenerWindow(session, zener, request, plans);
    if (!window || !Number.isFinite(window.maximum)) return { fixes: [] };
    const name = window.resistor.name;
    const range = describeWindow(window, typicalBounds(session, zener), Number.isFinite(request.maximumCurrent));
    if (!(window.maximum > 0) || window.maximum < window.minimum) {
      return { fixes: [], note: ` No value of ${name} can fix this: ${noWindowReason(window, plans, request)}` };
    }
    const directives = readDirectives(session.circuit);
    const resistorRating = resistorRatings(window.resistor, session.settings, directives, session.config);
    const tolerance = toleranceMargin(resistorRating.tolerance?.value, session.settings.preferredSeries);
    const values = preferredValuesFromTop(window, tolerance, session.settings.preferredSeries, MAXIMUM_CANDIDATES_PER_FINDING);
    if (values.length === 0) {
      return {
        fixes: [],
        note: ` ${name} would have to lie within ${range}, and no ${session.settings.preferredSeries} value stays inside it at ±${formatPercent(tolerance)}.`,
      };
    }
    return new ZenerWindowSearch(session, zener, finding, window, values, range, resistorRating.power.value);
  }

  /** The next candidate to re-check, or undefined when the search is over. */
  next(): FixCandidate | undefined {
    if (this.done || this.index >= this.values.length) return undefined;
    const value = this.values[this.index++]!;
    const edits = changeResistorValue(this.session, this.window.resistor, value);
    if (!edits) {
      this.done = { fixes: [] };
      return undefined;
    }
    this.pending = { edits, value };
    return { element: this.window.resistor, target: this.finding, edits, titled: (verified) => this.fixFor(verified, value, edits) };
  }

  /** The verdict on the candidate `next` gave. */
  take(verdict: Verdict): void {
    const pending = this.pending;
    this.pending = undefined;
    if (!pending || this.done) return;
    if (verdict.ok) {
      const power = resistorPower(verdict.verified, this.window.resistor.name);
      // The checks see a resistor's power only when it is strictly in series; a feed resistor shared with the load is checked here.
      if (power === undefined || power > RESISTOR_POWER_MARGIN * this.powerRating) {
        this.session.statistics.rejected++;
        this.overPower = power;
        return;
      }
      this.done = { fixes: [this.fixFor(verdict.verified, pending.value, pending.edits)] };
      return;
    }
    if (verdict.reason === 'budget' || verdict.reason === 'edit-failed') this.index = this.values.length;
  }

  result(): ZenerFixes {
    if (this.done) return this.done;
    const name = this.window.resistor.name;
    if (this.overPower !== undefined) {
      return {
        fixes: [],
        note: ` A value of ${name} inside its window (${this.range}) would dissipate ${formatQuantity(this.overPower, 'W')}, more than ${formatPercent(RESISTOR_POWER_MARGIN)} of its ${formatQuantity(this.powerRating, 'W')} rating: it needs a larger resistor part.`,
      };
    }
    return { fixes: [] };
  }

  private fixFor(verified: Verified, value: number, edits: TextEdit[]): Fix {
    const name = this.window.resistor.name;
    const currents = reverseCurrentRange(verified, this.zener.name);
    const power = resistorPower(verified, name);
    const numbers = [
      currents ? `zener ${formatQuantity(currents.least, 'A')} to ${formatQuantity(currents.largest, 'A')}` : undefined,
      power !== undefined ? `resistor ${formatQuantity(power, 'W')}` : undefined,
      `window ${this.range}`,
    ].filter((each) => each !== undefined);
    return { title: `Change ${name} from ${formatQuantity(this.window.resistor.resistance, 'Ω')} to ${formatQuantity(value, 'Ω')} (${numbers.join(', ')})`, preferred: true, edits };
  }
}

/**
 * The window of the first resistor that feeds the zener at every corner, with the zener held
 * at its regulating voltage. At each corner the zener's reverse current is
 * Iz(R) = B + G / (R + Rp), with G = −share · Voc (probes.ts) and B the current the rest of
 * the circuit gives it (minus the load's draw). Iz ≥ Iz,min gives R ≤ G / (Iz,min − B) − Rp;
 * with the load taken away (B no lower than 0), Iz ≤ Iz,max gives R ≥ G / (Iz,max − B) − Rp.
 * The feed resistor itself is replaced by a test source, so a corner's scaling of it does not
 * enter: the bounds are in ohms as fitted, and other resistors sit at each corner's tolerance.
 */
export function zenerWindow(session: FixSession, zener: Diode, request: ZenerWindowRequest, plans: readonly CornerPlan[]): ZenerWindow | undefined {
  const options = solveOptionsOf(session);
  const nominal = plans[0]?.corner ?? { name: 'nominal' };
  // The zener's own voltage at its minimum regulating current (a reverse current is negative).
  const zenerVoltage = -(diodeVoltageAt(session.circuit, zener, -request.minimumCurrent, nominal, options) ?? -request.zenerVoltage);
  const maximumCurrent = Number.isFinite(request.maximumCurrent) && request.maximumCurrent > request.minimumCurrent ? request.maximumCurrent : Number.POSITIVE_INFINITY;
  const corners = plans.map((plan) => plan.corner);
  for (const resistor of feedCandidates(session.circuit, zener, request)) {
    const responses = measureResistorResponse(session.circuit, zener, -zenerVoltage, resistor, request.minimumCurrent, corners, options);
    const window = windowOf(resistor, zenerVoltage, plans, responses, request.minimumCurrent, maximumCurrent);
    if (window) return window;
  }
  return undefined;
}

function windowOf(
  resistor: Resistor,
  zenerVoltage: number,
  plans: readonly CornerPlan[],
  responses: readonly (ResistorResponse | undefined)[],
  minimumCurrent: number,
  maximumCurrent: number,
): ZenerWindow | undefined {
  const window: ZenerWindow = { resistor, zenerVoltage, minimum: 0, maximum: Number.POSITIVE_INFINITY, minimumCorner: undefined, maximumCorner: undefined };
  for (const [index, plan] of plans.entries()) {
    const response = responses[index];
    if (!response) return undefined;
    // The response is of the forward current; a zener's is a reverse current, so change sign.
    const base = -response.base;
    if (!(-response.share > 0)) return undefined; // the resistor's current does not reach the zener: not its feed
    const gain = -response.share * response.portVoltage;
    if (base < minimumCurrent) {
      // No drive across the resistor at all (gain ≤ 0): the supply is below the zener voltage, and no value helps.
      const largest = gain > 0 ? gain / (minimumCurrent - base) - response.portResistance : 0;
      if (largest < window.maximum) {
        window.maximum = largest;
        window.maximumCorner = plan.corner.name;
      }
    }
    if (Number.isFinite(maximumCurrent)) {
      // The load taken away: what it drew (a negative base) no longer relieves the zener.
      const unloaded = Math.max(base, 0);
      const least = unloaded >= maximumCurrent ? Number.POSITIVE_INFINITY : gain > 0 ? gain / (maximumCurrent - unloaded) - response.portResistance : 0;
      if (least > window.minimum) {
        window.minimum = least;
        window.minimumCorner = plan.corner.name;
      }
    }
  }
  return window;
}

/** Which bounds rest on a typical value rather than the part's own rating (for the title). */
interface TypicalBounds {
  /** The rating that sets Iz,max (IZM, or PD), when it is a typical value. */
  lower?: { key: DiodeRatingKey; rated: RatedValue };
  /** IZK, when it is a typical value. */
  upper?: { key: DiodeRatingKey; rated: RatedValue };
}

function typicalBounds(session: FixSession, zener: Diode): TypicalBounds {
  const ratings = diodeRatings(session.circuit, zener, 'zener', readDirectives(session.circuit), session.config);
  const typical = (rated: RatedValue | undefined) => rated !== undefined && (rated.source.origin === 'library' || rated.source.origin === 'rule-of-thumb');
  const bounds: TypicalBounds = {};
  const limit: DiodeRatingKey = ratings.izm ? 'izm' : 'pd';
  if (typical(ratings[limit])) bounds.lower = { key: limit, rated: ratings[limit]! };
  if (typical(ratings.izk)) bounds.upper = { key: 'izk', rated: ratings.izk! };
  return bounds;
}

/** `12.8 Ω to 845 Ω`, with a word on each bound that rests on a typical value. */
function describeWindow(window: ZenerWindow, typical: TypicalBounds, hasMaximumCurrent: boolean): string {
  const lower = window.minimum > 0 ? formatQuantity(window.minimum, 'Ω') : '0 Ω';
  const notes = [
    typical.lower && hasMaximumCurrent ? `lower bound from a typical ${describeTypical(typical.lower)}` : undefined,
    typical.upper ? `upper bound from a typical ${describeTypical(typical.upper)}` : undefined,
  ].filter((each) => each !== undefined);
  const noLimit = hasMaximumCurrent ? '' : ' (no IZM or PD known for a lower bound)';
  return `${lower} to ${formatQuantity(window.maximum, 'Ω')}${noLimit}${notes.map((note) => `, ${note}`).join('')}`;
}

function describeTypical({ key, rated }: { key: DiodeRatingKey; rated: RatedValue }): string {
  const { symbol, unit } = RATING_SYMBOLS[key];
  return `${symbol} of ${formatQuantity(rated.value, unit)}`;
}

/** The resistors that may feed the zener: those in series, else those at its cathode's junction (through any ammeters). */
function feedCandidates(circuit: Circuit, zener: Diode, request: ZenerWindowRequest): Resistor[] {
  const named = request.seriesResistors.map((name) => elementNamed(circuit, name)).filter((element): element is Resistor => element?.type === 'R');
  if (named.length > 0) return named;
  const topology = buildTopology(circuit);
  let node = zener.nodes[1]!;
  let previous: unknown = zener;
  const visited = new Set<string>();
  // Cross 0 V sources in series (ammeters) to the node where the feed and the load meet.
  for (;;) {
    visited.add(node);
    const others = (topology.connections.get(node) ?? []).filter((element) => element !== previous);
    const ammeter = others.length === 1 && others[0]!.type === 'V' && others[0]!.dc === 0 && currentNodes(others[0]!).length === 2 ? others[0]! : undefined;
    if (!ammeter) break;
    const next = ammeter.nodes[0] === node ? ammeter.nodes[1]! : ammeter.nodes[0]!;
    if (visited.has(next) || topology.rails.has(next)) break;
    previous = ammeter;
    node = next;
  }
  return (topology.connections.get(node) ?? []).filter((element): element is Resistor => element.type === 'R').slice(0, MAXIMUM_FEED_CANDIDATES);
}

function noWindowReason(window: ZenerWindow, plans: readonly CornerPlan[], request: ZenerWindowRequest): string {
  const describe = (corner: string | undefined) => {
    const plan = plans.find((each) => each.corner.name === corner);
    return plan ? ` ${atCorner(plan)}` : '';
  };
  if (!(window.maximum > 0)) {
    return `even with no resistance the zener gets less than ${formatQuantity(request.minimumCurrent, 'A')}${describe(window.maximumCorner)}; the supply is too low for it.`;
  }
  return (
    `keeping ${formatQuantity(request.minimumCurrent, 'A')} in the zener${describe(window.maximumCorner)} (low supply, heaviest load) needs at most ${formatQuantity(window.maximum, 'Ω')}, ` +
    `but keeping it under ${formatQuantity(request.maximumCurrent, 'A')}${describe(window.minimumCorner)} (high supply, no load) needs at least ${formatQuantity(window.minimum, 'Ω')}: ` +
    'the supply range is too wide for this zener and load.'
  );
}
