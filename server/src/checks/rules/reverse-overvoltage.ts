// reverse-overvoltage: the peak reverse voltage across a diode against its reverse rating,
// derated (default 80 %): error above the rating or in breakdown, warning inside the margin.
// Zeners are meant to work in breakdown and are left to their own rules.
import type { Finding } from '../../findings.js';
import { formatPercent, formatQuantity } from '../../units.js';
import { atCorner, type CheckContext } from '../context.js';
import { makeFinding } from '../finding.js';
import { describeRating } from '../ratings.js';
import { reverseVoltage, worstCorner } from '../thresholds.js';
import { KIND_NAMES } from '../vocabulary.js';
import { cornerSources } from './related.js';
import type { Rule } from './rule.js';

const ID = 'reverse-overvoltage';

/** What a DC solve cannot see, said whenever the peak came from a quasi-static corner of a circuit with capacitors. */
const HELD_CHARGE_NOTE =
  ' A capacitor holding its charge can add to this: a half-wave rectifier with a filter capacitor sees about twice the peak (Sedra & Smith).';

export const reverseOvervoltage: Rule = {
  id: ID,
  check(context: CheckContext): Finding[] {
    const findings: Finding[] = [];
    for (const diode of context.diodes) {
      if (diode.kind === 'zener' || diode.unchecked) continue;
      const worst = worstCorner(diode, reverseVoltage);
      if (!worst || worst.value <= 0) continue;
      const name = diode.element.name;
      const rating = diode.ratings.vrrm;
      const inBreakdown = diode.corners.find((each) => each.point.region === 'breakdown');
      const where = atCorner((inBreakdown ?? worst.at).plan);
      const note = worst.at.plan.quasiStatic && context.hasReactiveElements ? HELD_CHARGE_NOTE : '';
      const related = cornerSources(context, worst.at.plan);
      const what = `${KIND_NAMES[diode.kind]} ${name}`;
      const peak = formatQuantity(worst.value, 'V');
      const request = diode.kind === 'led' ? { kind: 'anti-parallel-diode' as const, rule: ID, diode: name, reverseVoltage: worst.value } : undefined;
      const push = (severity: 'error' | 'warning', message: string) => {
        const finding = makeFinding(ID, severity, message, diode.element.location, { element: name, related });
        if (request) finding.fixes = context.fixesFor(request, finding);
        findings.push(finding);
      };
      if (inBreakdown) {
        push('error', `${what} is driven into reverse breakdown ${where} (${formatQuantity(-inBreakdown.point.voltage, 'V')} reverse, ${formatQuantity(-inBreakdown.point.current, 'A')})${rating ? `; rating ${describeRating('vrrm', rating)}` : ''}.${note}`);
        continue;
      }
      if (!rating) continue; // no reverse rating known: the report says so in the op output
      const derated = rating.value * context.settings.deratingMargin;
      if (worst.value > rating.value) {
        push('error', `Reverse voltage across ${what} reaches ${peak} ${where}; rating ${describeRating('vrrm', rating)}.${note}`);
      } else if (worst.value > derated) {
        push(
          'warning',
          `Reverse voltage across ${what} reaches ${peak} ${where}, above ${formatPercent(context.settings.deratingMargin)} of its rating ${describeRating('vrrm', rating)} (keep it below ${formatQuantity(derated, 'V')}).${note}`,
        );
      }
    }
    return findings;
  },
};
