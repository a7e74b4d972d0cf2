// Re-valuing a zener's feed resistor inside its window. The textbook shunt-regulator window
// (e.g. Sedra & Smith, Microelectronic Circuits) runs from minimum supply and maximum load,
// Rmax = (Vs,min − Vz) / (Iz,min + IL,max), to maximum supply and minimum load,
// Rmin = (Vs,max − Vz) / (Iz,max + IL,min) (with no load at minimum, IL,min = 0, the form
// Rmin = (Vs,max − Vz) / Iz,max). Here each corner is solved with the zener held at its own
// voltage at Iz,min (for Rmax) and at Iz,max (for Rmin), which gives every corner's Vs, IL
// and supply resistance at once: the window is the intersection over the corners. When it is
// empty, no value can fix the finding, and its message says so.
import type { CornerPlan, FixRequest } from '../checks/index.js';
import { atCorner } from '../checks/context.js';
import { buildTopology, currentNodes } from '../checks/topology.js';
import type { Circuit, Diode, Resistor } from '../netlist/circuit.js';
import type { Finding, Fix } from '../findings.js';
import { formatPercent, formatQuantity } from '../units.js';
import { readDirectives } from '../checks/directives.js';
import { resistorRatings } from '../checks/ratings.js';
import { diodeVoltageAt, measureResistorResponse, type ResistorResponse } from './probes.js';
import { elementNamed, resistorPower, reverseCurrentRange, scaleAt, solveOptionsOf } from './readings.js';
import { changeResistorValue } from './resistor-lines.js';
import { MAXIMUM_CANDIDATES_PER_FINDING, preferredValuesInside, RESISTOR_POWER_MARGIN, type ResistanceWindow } from './values.js';
import type { FixSession } from './verify.js';

type ZenerWindowRequest = Extract<FixRequest, { kind: 'zener-window' }>;

/** Resistors looked at as a zener's feed when the checks found none in series (ours). */
export const MAXIMUM_FEED_CANDIDATES = 4;

export interface ZenerFixes {
  fixes: Fix[];
  /** Said in the finding's message when no fix can be offered, and why. */
  note?: string;
}

export interface ZenerWindow extends ResistanceWindow {
  resistor: Resistor;
}

export function zenerWindowFixes(session: FixSession, request: ZenerWindowRequest, finding: Finding, plans: readonly CornerPlan[]): ZenerFixes {
  const zener = elementNamed(session.circuit, request.diode);
  if (!zener || zener.type !== 'D') return { fixes: [] };
  const window = zenerWindow(session, zener, request, plans);
  if (!window || !Number.isFinite(window.maximum)) return { fixes: [] };
  const name = window.resistor.name;
  const range = `${formatQuantity(Math.max(window.minimum, 0), 'Ω')} to ${formatQuantity(window.maximum, 'Ω')}`;
  if (!(window.maximum > 0) || window.maximum < window.minimum) {
    return { fixes: [], note: ` No value of ${name} can fix this: ${noWindowReason(window, plans, request)}` };
  }
  // Each corner already takes the resistor at its tolerance, so the window is in nominal values.
  const values = preferredValuesInside(window, 0, session.settings.preferredSeries, MAXIMUM_CANDIDATES_PER_FINDING);
  if (values.length === 0) {
    return { fixes: [], note: ` ${name} would have to lie between ${range}, and no ${session.settings.preferredSeries} value does.` };
  }
  const powerRating = resistorRatings(window.resistor, session.settings, readDirectives(session.circuit), session.config).power.value;
  let overPower: number | undefined;
  for (const value of values) {
    const edits = changeResistorValue(session, window.resistor, value);
    if (!edits) return { fixes: [] };
    const verdict = session.verify(edits, finding);
    if (verdict.ok) {
      const currents = reverseCurrentRange(verdict.verified, zener.name);
      const power = resistorPower(verdict.verified, name);
      // The checks see a resistor's power only when it is strictly in series; a feed resistor shared with the load is checked here.
      if (power === undefined || power > RESISTOR_POWER_MARGIN * powerRating) {
        session.statistics.rejected++;
        overPower = power;
        continue;
      }
      const numbers = [
        currents ? `zener ${formatQuantity(currents.least, 'A')} to ${formatQuantity(currents.largest, 'A')}` : undefined,
        power !== undefined ? `resistor ${formatQuantity(power, 'W')}` : undefined,
        `window ${range}`,
      ].filter((each) => each !== undefined);
      return {
        fixes: [{ title: `Change ${name} from ${formatQuantity(window.resistor.resistance, 'Ω')} to ${formatQuantity(value, 'Ω')} (${numbers.join(', ')})`, preferred: true, edits }],
      };
    }
    if (verdict.reason === 'budget' || verdict.reason === 'edit-failed') break;
  }
  if (overPower !== undefined) {
    return {
      fixes: [],
      note: ` A value of ${name} inside its window (${range}) would dissipate ${formatQuantity(overPower, 'W')}, more than ${formatPercent(RESISTOR_POWER_MARGIN)} of its ${formatQuantity(powerRating, 'W')} rating: it needs a larger resistor part.`,
    };
  }
  return { fixes: [] };
}

/**
 * The window of the first resistor that feeds the zener at every corner: for each corner,
 * the zener's reverse current is Iz(R) = B + G / (R·scale + Rp) with G = −share · Voc (probes.ts), so
 * Iz ≥ Iz,min gives R ≤ (G / (Iz,min − B) − Rp) / scale and Iz ≤ Iz,max gives
 * R ≥ (G / (Iz,max − B) − Rp) / scale.
 */
export function zenerWindow(session: FixSession, zener: Diode, request: ZenerWindowRequest, plans: readonly CornerPlan[]): ZenerWindow | undefined {
  const options = solveOptionsOf(session);
  const nominal = plans[0]?.corner ?? { name: 'nominal' };
  // The zener's own voltage at the two ends of its range (reverse currents are negative).
  const voltageAtKnee = -(diodeVoltageAt(session.circuit, zener, -request.minimumCurrent, nominal, options) ?? -request.zenerVoltage);
  const hasMaximum = Number.isFinite(request.maximumCurrent) && request.maximumCurrent > request.minimumCurrent;
  const voltageAtMaximum = hasMaximum ? -(diodeVoltageAt(session.circuit, zener, -request.maximumCurrent, nominal, options) ?? -request.zenerVoltage) : voltageAtKnee;
  const corners = plans.map((plan) => plan.corner);
  for (const resistor of feedCandidates(session.circuit, zener, request)) {
    const atKnee = measureResistorResponse(session.circuit, zener, -voltageAtKnee, resistor, request.minimumCurrent, corners, options);
    const atMaximum = hasMaximum ? measureResistorResponse(session.circuit, zener, -voltageAtMaximum, resistor, request.minimumCurrent, corners, options) : atKnee;
    const window = windowOf(resistor, plans, atKnee, atMaximum, request.minimumCurrent, hasMaximum ? request.maximumCurrent : Number.POSITIVE_INFINITY);
    if (window) return window;
  }
  return undefined;
}

function windowOf(
  resistor: Resistor,
  plans: readonly CornerPlan[],
  atKnee: readonly (ResistorResponse | undefined)[],
  atMaximum: readonly (ResistorResponse | undefined)[],
  minimumCurrent: number,
  maximumCurrent: number,
): ZenerWindow | undefined {
  const window: ZenerWindow = { resistor, minimum: 0, maximum: Number.POSITIVE_INFINITY, minimumCorner: undefined, maximumCorner: undefined };
  for (const [index, plan] of plans.entries()) {
    const knee = atKnee[index];
    const top = atMaximum[index];
    if (!knee || !top) return undefined;
    // Reverse currents: the response is of the forward current, so change sign.
    const kneeBase = -knee.base;
    const topBase = -top.base;
    if (!(-knee.share > 0) || !(-top.share > 0)) return undefined; // the resistor's current does not reach the zener: not its feed
    const kneeGain = -knee.share * knee.portVoltage;
    const topGain = -top.share * top.portVoltage;
    const scale = scaleAt(plan, resistor.name);
    if (kneeBase < minimumCurrent) {
      // No drive across the resistor at all (kneeGain ≤ 0): the supply is below the zener voltage, and no value helps.
      const largest = kneeGain > 0 ? (kneeGain / (minimumCurrent - kneeBase) - knee.portResistance) / scale : 0;
      if (largest < window.maximum) {
        window.maximum = largest;
        window.maximumCorner = plan.corner.name;
      }
    }
    if (Number.isFinite(maximumCurrent)) {
      const least = topBase >= maximumCurrent ? Number.POSITIVE_INFINITY : topGain > 0 ? (topGain / (maximumCurrent - topBase) - top.portResistance) / scale : 0;
      if (least > window.minimum) {
        window.minimum = least;
        window.minimumCorner = plan.corner.name;
      }
    }
  }
  return window;
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
    `but keeping it under ${formatQuantity(request.maximumCurrent, 'A')}${describe(window.minimumCorner)} (high supply, lightest load) needs at least ${formatQuantity(window.minimum, 'Ω')}: ` +
    'the supply range is too wide for this zener and load.'
  );
}
