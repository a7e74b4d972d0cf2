// zener-forward: a zener placed forward clamps at about 0.7 V (common practice, no source),
// not at its zener voltage. Back-to-back zeners, where one conducts forward while its
// partner is in breakdown, are the usual AC clamp and are left alone (zener-forward-bias.ts).
import type { Finding } from '../../findings.js';
import { formatQuantity } from '../../units.js';
import { atCorner, type CheckContext } from '../context.js';
import { makeFinding } from '../finding.js';
import { describeRating } from '../ratings.js';
import { forwardBiasedZener } from '../zener-forward-bias.js';
import { cornerSources } from './related.js';
import type { Rule } from './rule.js';

const ID = 'zener-forward';

export const zenerForward: Rule = {
  id: ID,
  check(context: CheckContext): Finding[] {
    const findings: Finding[] = [];
    for (const diode of context.diodes) {
      if (diode.kind !== 'zener' || diode.unchecked) continue;
      const worst = forwardBiasedZener(context, diode);
      if (!worst) continue;
      const name = diode.element.name;
      const vz = diode.ratings.vz ? ` ${describeRating('vz', diode.ratings.vz)}` : '';
      const finding = makeFinding(
        ID,
        'warning',
        `Zener ${name} is forward-biased: it carries ${formatQuantity(worst.value, 'A')} ${atCorner(worst.at.plan)} and clamps at ${formatQuantity(worst.at.point.voltage, 'V')}, not at its zener voltage${vz}. Turn it around (cathode towards the positive side).`,
        diode.element.location,
        { element: name, related: cornerSources(context, worst.at.plan) },
      );
      finding.fixes = context.fixesFor({ kind: 'flip-diode', rule: ID, diode: name }, finding);
      findings.push(finding);
    }
    return findings;
  },
};
