// led-current-unlimited: an LED's current at the worst corner against its forward-current
// rating, whatever limits it (a resistor, a transistor, a current source, nothing); and an
// LED with no real limit at all, whose current only its own forward voltage sets. LEDs in one
// series string carry one current: a fault of the string is one finding, on its first LED,
// naming the others. When a current sink sets the string's current, the finding names the
// resistor that sets it, and the fix re-values that resistor.
import type { Finding } from '../../findings.js';
import { formatQuantity } from '../../units.js';
import { atCorner, type CheckContext, type CheckedDiode, type DiodeAtCorner } from '../context.js';
import { currentSetterOf, emitterWord, ledString, namesOf, sinkWord, type CurrentSetter } from '../current-sink.js';
import type { TheveninView } from '../fix-request.js';
import { makeFinding } from '../finding.js';
import { describeRating, formatPerPart, partsInParallel } from '../ratings.js';
import { seriesResistors } from '../topology.js';
import { CONDUCTION_THRESHOLD, forwardCurrent, LED_CURRENT_CHANGE_LIMIT, LED_FORWARD_VOLTAGE_SPREAD, worstCorner } from '../thresholds.js';
import { cornerSources, seriesResistorsOf } from './related.js';
import type { Rule } from './rule.js';

const ID = 'led-current-unlimited';

/** What one LED's check found, before the LEDs of a string are told as one. */
interface Verdict {
  diode: CheckedDiode;
  worst: { at: DiodeAtCorner; value: number };
  /** Over its forward-current rating, or within it with nothing but itself setting the current. */
  fault: 'over-rating' | 'no-limit';
  /** The probe's view, for a `no-limit` fault (it decided it). */
  thevenin?: TheveninView;
}

export const ledCurrentUnlimited: Rule = {
  id: ID,
  check(context: CheckContext): Finding[] {
    const verdicts: Verdict[] = [];
    for (const diode of context.diodes) {
      const verdict = judge(context, diode);
      if (verdict) verdicts.push(verdict);
    }
    return groupByString(context, verdicts).map((group) => report(context, group));
  },
};

function judge(context: CheckContext, diode: CheckedDiode): Verdict | undefined {
  if (diode.kind !== 'led' || diode.unchecked) return undefined;
  const worst = worstCorner(diode, forwardCurrent);
  if (!worst || worst.value < CONDUCTION_THRESHOLD) return undefined; // dark at every corner: reversed-diode's business
  const rating = diode.ratings.if;
  // `m=` parts in parallel share the current; the rating is each part's.
  if (rating !== undefined && worst.value / partsInParallel(diode.element) > rating.value) return { diode, worst, fault: 'over-rating' };
  // Within its rating now, but is anything setting the current besides the LED itself?
  // Resistance in series adds to what the LED sees: enough of it settles the question without a probe solve.
  const seriesResistance = seriesResistors(context.topology, diode.element).reduce((sum, resistor) => sum + resistor.resistance, 0);
  const smallestLimit = leastLimitingResistance(worst.value);
  if (seriesResistance >= smallestLimit) return undefined;
  // (LEDs in parallel look like a low resistance to each other: shared-led-resistor speaks for them.)
  if (inParallelWithAnotherLed(context, diode)) return undefined;
  const thevenin = context.theveninView(diode, worst.at);
  if (!thevenin || thevenin.resistance >= smallestLimit) return undefined;
  return { diode, worst, fault: 'no-limit', thevenin };
}

/** The resistance below which the LED's forward-voltage spread would move its current by more than the change limit. */
function leastLimitingResistance(current: number): number {
  return LED_FORWARD_VOLTAGE_SPREAD / (LED_CURRENT_CHANGE_LIMIT * current);
}

/**
 * The verdicts of the LEDs of one series string with the same fault (and the same rating)
 * together, in the order of their first LED; a lone LED is a group of one.
 */
function groupByString(context: CheckContext, verdicts: readonly Verdict[]): Verdict[][] {
  const groups = new Map<string, Verdict[]>();
  for (const verdict of verdicts) {
    const first = ledString(context, verdict.diode)[0] ?? verdict.diode;
    const key = `${first.element.name}|${verdict.fault}|${verdict.diode.ratings.if?.value ?? ''}|${partsInParallel(verdict.diode.element)}`;
    const group = groups.get(key);
    if (group) group.push(verdict);
    else groups.set(key, [verdict]);
  }
  return [...groups.values()];
}

function report(context: CheckContext, group: readonly Verdict[]): Finding {
  const first = group[0]!;
  const others = group.slice(1);
  // One current through the string; the largest of them (leakage aside, they agree).
  const { worst } = group.reduce((largest, each) => (each.worst.value > largest.worst.value ? each : largest));
  const diode = first.diode;
  const name = diode.element.name;
  const current = formatPerPart(diode.element, worst.value, 'A');
  const where = atCorner(worst.at.plan);
  const rating = diode.ratings.if;
  const parts = partsInParallel(diode.element);
  const subject = others.length === 0 ? `LED ${name}` : `LEDs ${namesOf(group.map((each) => each.diode))} in series`;
  const setter = first.fault === 'over-rating' ? currentSetterOf(context, diode, first.worst.at) : undefined;
  const related = [
    ...others.map((each) => ({ location: each.diode.element.location, message: `${each.diode.element.name}, in series with ${name}: the same current` })),
    ...cornerSources(context, worst.at.plan),
    // A MOSFET sink's source resistor is in the LEDs' chain too: it is named once, as what sets the current.
    ...seriesResistorsOf(context, diode).filter((entry) => entry.location !== setter?.resistor.location),
    ...(setter ? setterLocations(setter) : []),
  ];
  const thevenin = first.thevenin ?? (setter ? undefined : context.theveninView(diode, worst.at));
  const request = {
    kind: 'limit-current' as const,
    rule: ID,
    diode: name,
    seriesResistors: seriesResistors(context.topology, diode.element).map((resistor) => resistor.name),
    maximumCurrent: rating ? rating.value * parts : Number.POSITIVE_INFINITY,
    governingCorner: worst.at.plan.corner.name,
    ...(thevenin ? { thevenin } : {}),
    ...(setter
      ? { currentSetter: { transistor: setter.transistor.name, resistor: setter.resistor.name, sensitivity: setter.sensitivity, current: worst.value, activeCorners: setter.activeCorners } }
      : {}),
  };
  if (first.fault === 'over-rating' && rating) {
    const verb = others.length === 0 ? 'carries' : 'carry';
    const cause = setter ? `: ${setterText(setter)}` : thevenin && thevenin.resistance < 1 ? ': nothing in its loop limits the current' : '';
    const finding = makeFinding(ID, 'error', `${subject} ${verb} ${current} ${where}; rating ${describeRating('if', rating)}${cause}.`, diode.element.location, {
      element: name,
      related,
    });
    finding.fixes = context.fixesFor(request, finding);
    return finding;
  }
  const view = first.thevenin!;
  const seen = view.resistance === 0 ? 'an ideal source holds its terminals' : `the circuit around it looks like ${formatQuantity(view.resistance, 'Ω')}`;
  const its = others.length === 0 ? 'its' : 'their';
  const finding = makeFinding(
    ID,
    'error',
    `${subject} ${others.length === 0 ? 'has' : 'have'} no current limit: ${seen}, so ${its} current (${current} ${where}) is set only by ${its} own forward voltage; ` +
      `a ${formatQuantity(LED_FORWARD_VOLTAGE_SPREAD, 'V')} shift between parts or with temperature would change it by more than ${LED_CURRENT_CHANGE_LIMIT * 100} %.`,
    diode.element.location,
    { element: name, related },
  );
  finding.fixes = context.fixesFor({ ...request, maximumCurrent: rating?.value ?? worst.value }, finding);
  return finding;
}

/** "the current sink QSINK sets it with its emitter resistor RE (15 Ω, 472 mV across it)" */
function setterText(setter: CurrentSetter): string {
  const { transistor, resistor } = setter;
  return (
    `the ${sinkWord(transistor)} ${transistor.name} sets it with its ${emitterWord(transistor)} resistor ${resistor.name} ` +
    `(${formatQuantity(resistor.resistance, 'Ω')}, ${formatQuantity(setter.resistorVoltage, 'V')} across it), so ${resistor.name} is the value to change`
  );
}

function setterLocations(setter: CurrentSetter): Finding['related'] {
  const { transistor, resistor } = setter;
  return [
    { location: transistor.location, message: `${transistor.name}, the ${sinkWord(transistor)}` },
    { location: resistor.location, message: `${resistor.name} (${formatQuantity(resistor.resistance, 'Ω')}), which sets the current` },
  ];
}

function inParallelWithAnotherLed(context: CheckContext, diode: CheckedDiode): boolean {
  const [anode, cathode] = diode.element.nodes as [string, string];
  // A partner sits on both nodes: look along the node with fewer elements on it.
  const atAnode = context.topology.connections.get(anode) ?? [];
  const atCathode = context.topology.connections.get(cathode) ?? [];
  return (atAnode.length <= atCathode.length ? atAnode : atCathode).some((element) => {
    if (element === diode.element || element.type !== 'D') return false;
    return element.nodes[0] === anode && element.nodes[1] === cathode && context.diodeOf(element)?.kind === 'led';
  });
}
