// forward-overcurrent: a non-LED diode's forward current at the worst corner against its
// rating. A rating that is only a typical value for a guessed class gives a warning, not an
// error: the part may well be larger than the class assumes.
import type { Finding } from '../../findings.js';
import { atCorner, type CheckContext } from '../context.js';
import { makeFinding } from '../finding.js';
import { describeRating, formatPerPart, partsInParallel } from '../ratings.js';
import { forwardCurrent, worstCorner } from '../thresholds.js';
import { kindNameOpening } from '../vocabulary.js';
import { cornerSources } from './related.js';
import type { Rule } from './rule.js';

const ID = 'forward-overcurrent';

export const forwardOvercurrent: Rule = {
  id: ID,
  check(context: CheckContext): Finding[] {
    const findings: Finding[] = [];
    for (const diode of context.diodes) {
      if (diode.kind === 'led' || diode.kind === 'zener' || diode.unchecked) continue;
      const rating = diode.ratings.if;
      const worst = worstCorner(diode, forwardCurrent);
      // `m=` parts in parallel share the current; the rating is each part's.
      if (!rating || !worst || worst.value / partsInParallel(diode.element) <= rating.value) continue;
      const typical = rating.source.origin === 'library';
      const advice = typical ? ` Give the part's own rating (*pnlint: rating ${diode.element.model.name} if=…) if it is larger.` : '';
      findings.push(
        makeFinding(
          ID,
          typical ? 'warning' : 'error',
          `${kindNameOpening(diode.kind)} ${diode.element.name} carries ${formatPerPart(diode.element, worst.value, 'A')} forward ${atCorner(worst.at.plan)}; rating ${describeRating('if', rating)}.${advice}`,
          diode.element.location,
          { element: diode.element.name, related: cornerSources(context, worst.at.plan) },
        ),
      );
    }
    return findings;
  },
};
