// When a zener is fitted forward: it carries a plausible forward current at some corner, and
// is not the forward half of a back-to-back pair (one zener forward while its partner is in
// breakdown is the usual AC clamp). zener-forward reports it; zener-underbiased leaves such
// a zener alone, since its reverse current is not what is wrong with it.
import type { CheckContext, CheckedDiode, DiodeAtCorner } from './context.js';
import { seriesChain } from './topology.js';
import { forwardCurrent, PLAUSIBLE_CURRENT, worstCorner } from './thresholds.js';

/** The corner with the largest forward current of a zener fitted forward; undefined when it is not. */
export function forwardBiasedZener(context: CheckContext, diode: CheckedDiode): { at: DiodeAtCorner; value: number } | undefined {
  if (diode.kind !== 'zener') return undefined;
  const worst = worstCorner(diode, forwardCurrent);
  if (!worst || worst.value < PLAUSIBLE_CURRENT) return undefined;
  const partners = diode.element.nodes.flatMap((node) => seriesChain(context.topology, diode.element, node));
  const backToBack = partners.some((partner) => {
    const other = context.diodeOf(partner);
    const there = other?.corners.find((at) => at.plan === worst.at.plan);
    return other?.kind === 'zener' && there !== undefined && there.point.region === 'breakdown';
  });
  return backToBack ? undefined : worst;
}
