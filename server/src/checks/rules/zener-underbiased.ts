// zener-underbiased: a zener's reverse current at the worst corner (low supply, heavy load)
// below its minimum regulating current. A zener that reaches breakdown at no corner is taken
// as a clamp that is meant to stay idle, and left alone, unless its IZK or IZT is given
// (a directive or pnlint.json), which says it is meant to regulate.
import type { Finding } from '../../findings.js';
import { formatQuantity } from '../../units.js';
import { atCorner, type CheckContext } from '../context.js';
import { makeFinding } from '../finding.js';
import { describeRating } from '../ratings.js';
import { seriesResistors } from '../topology.js';
import { CONDUCTION_THRESHOLD, worstCorner } from '../thresholds.js';
import { cornerSources, seriesResistorsOf } from './related.js';
import type { Rule } from './rule.js';

const ID = 'zener-underbiased';

export const zenerUnderbiased: Rule = {
  id: ID,
  check(context: CheckContext): Finding[] {
    const findings: Finding[] = [];
    for (const diode of context.diodes) {
      if (diode.kind !== 'zener' || diode.unchecked) continue;
      const knee = diode.ratings.izk;
      // Regulating somewhere, or declared a regulator by giving its regulating currents.
      const regulating = diode.corners.some((at) => -at.point.current >= CONDUCTION_THRESHOLD && at.point.voltage < 0);
      const declared = [knee, diode.ratings.izt].some((rating) => rating && rating.source.origin !== 'library');
      if (!regulating && !declared) continue;
      if (!knee) continue;
      // Least reverse current: the corner that starves it.
      const worst = worstCorner(diode, (at) => at.point.current);
      if (!worst) continue;
      const reverseCurrent = -worst.value;
      if (reverseCurrent >= knee.value) continue;
      const name = diode.element.name;
      const shown = reverseCurrent > 0 ? `only ${formatQuantity(reverseCurrent, 'A')}` : 'no reverse current';
      const finding = makeFinding(
        ID,
        'warning',
        `Zener ${name} carries ${shown} ${atCorner(worst.at.plan)}, below its minimum regulating current ${describeRating('izk', knee)}: ` +
          `below its knee a real part no longer holds its zener voltage (the model gives ${formatQuantity(-worst.at.point.voltage, 'V')} there).`,
        diode.element.location,
        { element: name, related: [...cornerSources(context, worst.at.plan), ...seriesResistorsOf(context, diode)] },
      );
      const zenerVoltage = diode.ratings.vz?.value ?? Math.max(...diode.corners.map((at) => -at.point.voltage));
      const powerLimit = diode.ratings.pd?.value;
      const maximumCurrent = diode.ratings.izm?.value ?? (powerLimit !== undefined && zenerVoltage > 0 ? powerLimit / zenerVoltage : Number.POSITIVE_INFINITY);
      finding.fixes = context.fixesFor(
        {
          kind: 'zener-window',
          rule: ID,
          diode: name,
          seriesResistors: seriesResistors(context.topology, diode.element).map((resistor) => resistor.name),
          minimumCurrent: knee.value,
          maximumCurrent,
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
