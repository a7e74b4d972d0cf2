// reverse-overvoltage: the peak reverse voltage across a diode against its reverse rating,
// derated (default 80 %): error above the rating or in breakdown (at least IBV in reverse:
// breakdown.ts), warning inside the margin.
// Zeners are meant to work in breakdown and are left to their own rules. Time-varying
// sources are sampled quasi-statically; where a capacitor sits beside a diode, the samples
// are also solved with it holding its charge (held-charge.ts), which is what doubles a
// half-wave rectifier's reverse voltage.
import type { Finding } from '../../findings.js';
import { formatPercent, formatQuantity } from '../../units.js';
import { inReverseBreakdown } from '../breakdown.js';
import { atCorner, type CheckContext } from '../context.js';
import { makeFinding } from '../finding.js';
import { describeRating } from '../ratings.js';
import { KIND_NAMES, kindNameOpening } from '../vocabulary.js';
import { cornerSources } from './related.js';
import type { Rule } from './rule.js';

const ID = 'reverse-overvoltage';

/** An unrated diode blocking at least this gets a note that it was not checked (ours: below it any diode is fine). */
export const UNRATED_REVERSE_NOTICE = 5;

export const reverseOvervoltage: Rule = {
  id: ID,
  check(context: CheckContext): Finding[] {
    const findings: Finding[] = [];
    for (const diode of context.diodes) {
      if (diode.kind === 'zener' || diode.unchecked) continue;
      // The corners as solved, then the quasi-static ones again with capacitors holding their charge.
      const candidates = [...diode.corners.map((at) => ({ at, held: false })), ...diode.heldCharge.map((at) => ({ at, held: true }))];
      let worst: (typeof candidates)[number] | undefined;
      for (const candidate of candidates) if (!worst || -candidate.at.point.voltage > -worst.at.point.voltage) worst = candidate;
      if (!worst || worst.at.point.voltage >= 0) continue;
      const breakdown = candidates.find((candidate) => inReverseBreakdown(diode.element, candidate.at.point));
      const governing = breakdown ?? worst;
      const name = diode.element.name;
      const rating = diode.ratings.vrrm;
      const where = atCorner(governing.at.plan) + (governing.held ? heldNote(context) : '');
      const related = cornerSources(context, governing.at.plan);
      if (governing.held) {
        for (const held of context.heldCapacitors) {
          const capacitor = context.elementNamed(held.name);
          if (capacitor) related.push({ location: capacitor.location, message: `${held.name} held at ${formatQuantity(held.voltage, 'V')}` });
        }
      }
      const what = `${KIND_NAMES[diode.kind]} ${name}`;
      const reverse = -worst.at.point.voltage;
      const peak = formatQuantity(reverse, 'V');
      const request = diode.kind === 'led' ? { kind: 'anti-parallel-diode' as const, rule: ID, diode: name, reverseVoltage: reverse } : undefined;
      const push = (severity: 'error' | 'warning', message: string) => {
        const finding = makeFinding(ID, severity, message, diode.element.location, { element: name, related });
        if (request) finding.fixes = context.fixesFor(request, finding);
        findings.push(finding);
      };
      if (breakdown) {
        const point = breakdown.at.point;
        push('error', `${kindNameOpening(diode.kind)} ${name} is driven into reverse breakdown ${where} (${formatQuantity(-point.voltage, 'V')} reverse, ${formatQuantity(-point.current, 'A')})${rating ? `; rating ${describeRating('vrrm', rating)}` : ''}.`);
        continue;
      }
      if (!rating) {
        // Nothing to compare with: say so rather than pass it silently.
        if (reverse >= UNRATED_REVERSE_NOTICE) {
          findings.push(
            makeFinding(
              ID,
              'info',
              `Reverse voltage across ${what} reaches ${peak} ${where}, but no reverse rating is known (no BV in model ${diode.element.model.name}, no directive), so it is not checked. Give it with *pnlint: rating ${diode.element.model.name} vrrm=….`,
              diode.element.location,
              { element: name, related },
            ),
          );
        }
        continue;
      }
      const derated = rating.value * context.settings.deratingMargin;
      // A typical value for a guessed class is no datasheet: say so, and do not call it an error.
      const typical = rating.source.origin === 'library';
      const advice = typical ? ` Give the part's own rating (*pnlint: rating ${diode.element.model.name} vrrm=…) if it is higher.` : '';
      if (reverse > rating.value) {
        push(typical ? 'warning' : 'error', `Reverse voltage across ${what} reaches ${peak} ${where}; rating ${describeRating('vrrm', rating)}.${advice}`);
      } else if (reverse > derated) {
        push(
          'warning',
          `Reverse voltage across ${what} reaches ${peak} ${where}, above ${formatPercent(context.settings.deratingMargin)} of its rating ${describeRating('vrrm', rating)} (keep it below ${formatQuantity(derated, 'V')}).${advice}`,
        );
      }
    }
    return findings;
  },
};

/** ", with C1 holding its charge (31.4 V) as a filter capacitor does". */
function heldNote(context: CheckContext): string {
  const held = context.heldCapacitors.map((each) => `${each.name} holding its charge (${formatQuantity(each.voltage, 'V')})`).join(', ');
  return `, with ${held} as a filter capacitor does`;
}
