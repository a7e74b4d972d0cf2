// overdissipation: the power in a diode, a zener, or the resistor in series with an LED or a
// zener, at the worst corner, against its rating. A resistor without a rating gets the
// default power rating setting. The LEDs of one series string are one finding (they carry
// one current).
import type { Resistor } from '../../netlist/circuit.js';
import type { Finding } from '../../findings.js';
import { formatQuantity } from '../../units.js';
import { atCorner, type CheckContext } from '../context.js';
import type { CornerPlan } from '../corners.js';
import { ledString } from '../current-sink.js';
import { makeFinding } from '../finding.js';
import { describeRating, formatPerPart, partsInParallel } from '../ratings.js';
import { feedResistors, seriesResistors } from '../topology.js';
import { worstCorner } from '../thresholds.js';
import { kindNameOpening } from '../vocabulary.js';
import { cornerSources, nodesAt } from './related.js';
import type { Rule } from './rule.js';

const ID = 'overdissipation';

export const overdissipation: Rule = {
  id: ID,
  check(context: CheckContext): Finding[] {
    const findings: Finding[] = [];
    const resistorsToCheck = new Map<Resistor, string>();
    const ledStrings = new Map<string, { names: string[]; largest: NonNullable<ReturnType<typeof worstCorner>>; finding: Finding }>();
    for (const diode of context.diodes) {
      if (diode.unchecked) continue;
      if (diode.kind === 'led' || diode.kind === 'zener') {
        // A zener's feed resistor carries its current and the load's: found from the solved voltages.
        const feeding = diode.kind === 'zener' ? diode.corners.flatMap((at) => feedResistors(context.topology, diode.element, nodesAt(context, at))) : [];
        for (const resistor of [...seriesResistors(context.topology, diode.element), ...feeding]) {
          if (!resistorsToCheck.has(resistor)) resistorsToCheck.set(resistor, diode.element.name);
        }
      }
      const worst = worstCorner(diode, (at) => Math.abs(at.point.power));
      if (!worst) continue;
      let rating = diode.ratings.pd;
      let limitText = rating ? describeRating('pd', rating) : undefined;
      if (!rating && diode.kind === 'zener' && diode.ratings.izm && diode.ratings.vz) {
        // No power rating, but IZM × VZ is the same limit.
        const limit = diode.ratings.izm.value * diode.ratings.vz.value;
        rating = { value: limit, source: diode.ratings.izm.source };
        limitText = `${formatQuantity(limit, 'W')} (${describeRating('izm', diode.ratings.izm)} × ${describeRating('vz', diode.ratings.vz)})`;
      }
      // `m=` parts in parallel share the power; the rating is each part's.
      if (!rating || worst.value / partsInParallel(diode.element) <= rating.value) continue;
      const typical = rating.source.origin === 'library';
      // LEDs in one series string carry one current: one finding for the string, on its first LED.
      const stringKey = diode.kind === 'led' ? `${ledString(context, diode)[0]?.element.name}|${rating.value}|${partsInParallel(diode.element)}` : undefined;
      const string = stringKey !== undefined ? ledStrings.get(stringKey) : undefined;
      if (string) {
        if (worst.value > string.largest.value) string.largest = worst;
        string.finding.message = `LEDs ${string.names.join(', ')}, ${diode.element.name} in series each dissipate ${formatPerPart(diode.element, string.largest.value, 'W')} ${atCorner(string.largest.at.plan)}; rating ${limitText}.`;
        string.finding.related.splice(string.names.length - 1, 0, { location: diode.element.location, message: `${diode.element.name}, in series with ${string.names[0]}: the same current` });
        string.names.push(diode.element.name);
        continue;
      }
      const finding = makeFinding(
        ID,
        typical ? 'warning' : 'error',
        `${kindNameOpening(diode.kind)} ${diode.element.name} dissipates ${formatPerPart(diode.element, worst.value, 'W')} ${atCorner(worst.at.plan)}; rating ${limitText}.`,
        diode.element.location,
        { element: diode.element.name, related: cornerSources(context, worst.at.plan) },
      );
      findings.push(finding);
      if (stringKey !== undefined) ledStrings.set(stringKey, { names: [diode.element.name], largest: worst, finding });
    }
    for (const [resistor, diodeName] of resistorsToCheck) {
      const rating = context.resistors.get(resistor.name)?.power;
      const worst = worstResistorPower(context, resistor);
      if (!rating || !worst || worst.power <= rating.value) continue;
      findings.push(
        makeFinding(
          ID,
          'error',
          `Resistor ${resistor.name}, which feeds ${diodeName}, dissipates ${formatQuantity(worst.power, 'W')} ${atCorner(worst.plan)}; rating ${describeRating('p', rating)}.`,
          resistor.location,
          {
            element: resistor.name,
            related: [
              ...cornerSources(context, worst.plan),
              ...(context.elementNamed(diodeName) ? [{ location: context.elementNamed(diodeName)!.location, message: `${diodeName}, which it feeds` }] : []),
            ],
          },
        ),
      );
    }
    return findings;
  },
};

/** V² / R at each solved corner, with the corner's resistor scaling. */
function worstResistorPower(context: CheckContext, resistor: Resistor): { power: number; plan: CornerPlan } | undefined {
  let worst: { power: number; plan: CornerPlan } | undefined;
  context.solves.forEach((result, index) => {
    if (!result.ok) return;
    const plan = context.plans[index]!;
    const [first, second] = resistor.nodes;
    const voltage = (result.point.nodes[first!] ?? 0) - (result.point.nodes[second!] ?? 0);
    const resistance = resistor.resistance * (plan.corner.scale?.[resistor.name] ?? 1);
    if (!(resistance > 0)) return;
    const power = (voltage * voltage) / resistance;
    if (!worst || power > worst.power) worst = { power, plan };
  });
  return worst;
}
