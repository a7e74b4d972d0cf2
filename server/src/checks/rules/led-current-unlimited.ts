// led-current-unlimited: an LED's current at the worst corner against its forward-current
// rating, whatever limits it (a resistor, a transistor, a current source, nothing); and an
// LED with no real limit at all, whose current only its own forward voltage sets.
import type { Finding } from '../../findings.js';
import { formatQuantity } from '../../units.js';
import { atCorner, type CheckContext, type CheckedDiode } from '../context.js';
import { makeFinding } from '../finding.js';
import { describeRating, formatPerPart, partsInParallel } from '../ratings.js';
import { seriesResistors } from '../topology.js';
import { CONDUCTION_THRESHOLD, forwardCurrent, LED_CURRENT_CHANGE_LIMIT, LED_FORWARD_VOLTAGE_SPREAD, worstCorner } from '../thresholds.js';
import { cornerSources, seriesResistorsOf } from './related.js';
import type { Rule } from './rule.js';

const ID = 'led-current-unlimited';

export const ledCurrentUnlimited: Rule = {
  id: ID,
  check(context: CheckContext): Finding[] {
    const findings: Finding[] = [];
    for (const diode of context.diodes) {
      if (diode.kind !== 'led' || diode.unchecked) continue;
      const worst = worstCorner(diode, forwardCurrent);
      if (!worst || worst.value < CONDUCTION_THRESHOLD) continue; // dark at every corner: reversed-diode's business
      const name = diode.element.name;
      const current = formatPerPart(diode.element, worst.value, 'A');
      const where = atCorner(worst.at.plan);
      const related = [...cornerSources(context, worst.at.plan), ...seriesResistorsOf(context, diode)];
      const rating = diode.ratings.if;
      // `m=` parts in parallel share the current; the rating is each part's.
      const parts = partsInParallel(diode.element);
      const overRating = rating !== undefined && worst.value / parts > rating.value;
      // Resistance in series adds to what the LED sees: enough of it settles the question without a probe solve.
      const seriesResistance = seriesResistors(context.topology, diode.element).reduce((sum, resistor) => sum + resistor.resistance, 0);
      const smallestLimit = LED_FORWARD_VOLTAGE_SPREAD / (LED_CURRENT_CHANGE_LIMIT * worst.value);
      if (!overRating && seriesResistance >= smallestLimit) continue;
      const thevenin = context.theveninView(diode, worst.at);
      const request = {
        kind: 'limit-current' as const,
        rule: ID,
        diode: name,
        seriesResistors: seriesResistors(context.topology, diode.element).map((resistor) => resistor.name),
        maximumCurrent: rating ? rating.value * parts : Number.POSITIVE_INFINITY,
        governingCorner: worst.at.plan.corner.name,
        ...(thevenin ? { thevenin } : {}),
      };
      if (rating && overRating) {
        const limit = thevenin && thevenin.resistance < 1 ? ': nothing in its loop limits the current' : '';
        const finding = makeFinding(
          ID,
          'error',
          `LED ${name} carries ${current} ${where}; rating ${describeRating('if', rating)}${limit}.`,
          diode.element.location,
          { element: name, related },
        );
        finding.fixes = context.fixesFor(request, finding);
        findings.push(finding);
        continue;
      }
      // Within its rating now, but is anything setting the current besides the LED itself?
      // (LEDs in parallel look like a low resistance to each other: shared-led-resistor speaks for them.)
      if (!thevenin || inParallelWithAnotherLed(context, diode)) continue;
      if (thevenin.resistance >= smallestLimit) continue;
      const seen = thevenin.resistance === 0 ? 'an ideal source holds its terminals' : `the circuit around it looks like ${formatQuantity(thevenin.resistance, 'Ω')}`;
      const finding = makeFinding(
        ID,
        'error',
        `LED ${name} has no current limit: ${seen}, so its current (${current} ${where}) is set only by its own forward voltage; ` +
          `a ${formatQuantity(LED_FORWARD_VOLTAGE_SPREAD, 'V')} shift between parts or with temperature would change it by more than ${LED_CURRENT_CHANGE_LIMIT * 100} %.`,
        diode.element.location,
        { element: name, related },
      );
      finding.fixes = context.fixesFor({ ...request, maximumCurrent: rating?.value ?? worst.value }, finding);
      findings.push(finding);
    }
    return findings;
  },
};

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
