// zener-underbiased: a zener's reverse current at the worst corner (low supply, heavy load)
// below its minimum regulating current. A zener that reaches breakdown at no corner is taken
// as a clamp that is meant to stay idle, and left alone, unless its IZK or IZT is given
// (a directive or pnlint.json), which says it is meant to regulate. A zener fitted forward
// is zener-forward's (zener-forward-bias.ts), not this rule's.
import type { Finding } from '../../findings.js';
import { formatQuantity } from '../../units.js';
import { atCorner, type CheckContext, type CheckedDiode, type DiodeAtCorner } from '../context.js';
import { splitResistorCorner } from '../corners.js';
import { makeFinding } from '../finding.js';
import { describeRating, formatPerPart, partsInParallel } from '../ratings.js';
import { feedResistors } from '../topology.js';
import { CONDUCTION_THRESHOLD, worstCorner } from '../thresholds.js';
import { forwardBiasedZener } from '../zener-forward-bias.js';
import { cornerSources, nodesAt } from './related.js';
import type { Rule } from './rule.js';

const ID = 'zener-underbiased';

export const zenerUnderbiased: Rule = {
  id: ID,
  check(context: CheckContext): Finding[] {
    const findings: Finding[] = [];
    for (const diode of context.diodes) {
      if (diode.kind !== 'zener' || diode.unchecked) continue;
      // Fitted forward: zener-forward says so; its reverse current is not the problem.
      if (forwardBiasedZener(context, diode)) continue;
      const knee = diode.ratings.izk;
      // Regulating somewhere, or declared a regulator by giving its regulating currents.
      const regulating = diode.corners.some((at) => -at.point.current >= CONDUCTION_THRESHOLD && at.point.voltage < 0);
      const declared = [knee, diode.ratings.izt].some((rating) => rating && rating.source.origin !== 'library');
      if (!regulating && !declared) continue;
      if (!knee) continue;
      // Least reverse current: the corner that starves it.
      let worst = worstCorner(diode, (at) => at.point.current);
      if (!worst) continue;
      worst = splitTolerances(context, diode, worst) ?? worst;
      const reverseCurrent = -worst.value;
      // `m=` parts in parallel share the current; each part needs its own IZK.
      const parts = partsInParallel(diode.element);
      if (reverseCurrent / parts >= knee.value) continue;
      const name = diode.element.name;
      const shown = reverseCurrent > 0 ? `only ${formatPerPart(diode.element, reverseCurrent, 'A')}` : 'no reverse current';
      const finding = makeFinding(
        ID,
        'warning',
        `Zener ${name} carries ${shown} ${atCorner(worst.at.plan)}, below its minimum regulating current ${describeRating('izk', knee)}: ` +
          `below its knee a real part no longer holds its zener voltage (the model gives ${formatQuantity(-worst.at.point.voltage, 'V')} there).`,
        diode.element.location,
        {
          element: name,
          related: [
            ...cornerSources(context, worst.at.plan),
            ...feedResistors(context.topology, diode.element, nodesAt(context, worst.at)).map((resistor) => ({
              location: resistor.location,
              message: `${resistor.name} (${formatQuantity(resistor.resistance, 'Ω')}) feeds it`,
            })),
          ],
        },
      );
      const zenerVoltage = diode.ratings.vz?.value ?? Math.max(...diode.corners.map((at) => -at.point.voltage));
      const powerLimit = diode.ratings.pd?.value;
      const maximumCurrent = diode.ratings.izm?.value ?? (powerLimit !== undefined && zenerVoltage > 0 ? powerLimit / zenerVoltage : Number.POSITIVE_INFINITY);
      finding.fixes = context.fixesFor(
        {
          kind: 'zener-window',
          rule: ID,
          diode: name,
          seriesResistors: feedResistors(context.topology, diode.element, nodesAt(context, worst.at)).map((resistor) => resistor.name),
          minimumCurrent: knee.value * parts,
          maximumCurrent: maximumCurrent * parts,
          zenerVoltage,
          governingCorner: worst.at.plan.corner.name,
        },
        finding,
      );
      findings.push(finding);
    }
    return findings;
  },
};

/**
 * Resistor tolerances all one way do not starve a zener most: its feed resistor high and its
 * load resistors low do. Solves that corner beside the worst one found, and keeps the worse.
 */
function splitTolerances(context: CheckContext, diode: CheckedDiode, worst: { at: DiodeAtCorner; value: number }): { at: DiodeAtCorner; value: number } | undefined {
  const tolerances = context.resistorTolerances;
  const feed = new Set(feedResistors(context.topology, diode.element, nodesAt(context, worst.at)).map((resistor) => resistor.name));
  if (tolerances.size === 0 || ![...feed].some((name) => tolerances.has(name))) return undefined;
  const plan = splitResistorCorner(context.circuit, worst.at.plan, feed, tolerances);
  const [result] = context.solveVariant(context.circuit, [plan]);
  const point = result?.ok ? result.point.diodes[diode.element.name] : undefined;
  if (!point || point.current <= worst.value) return undefined;
  return { at: { plan, point }, value: point.current };
}
