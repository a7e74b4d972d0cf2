// Related locations that most findings carry: the sources that set the corner, the
// resistors in series with the diode.
import type { Finding } from '../../findings.js';
import { formatQuantity } from '../../units.js';
import type { CheckContext, CheckedDiode, DiodeAtCorner } from '../context.js';
import type { CornerPlan } from '../corners.js';
import { seriesResistors } from '../topology.js';

export function cornerSources(context: CheckContext, plan: CornerPlan): Finding['related'] {
  const related: Finding['related'] = [];
  for (const level of plan.levels) {
    const source = context.elementNamed(level.source);
    if (source) related.push({ location: source.location, message: `${source.name} at ${formatQuantity(level.value, source.type === 'I' ? 'A' : 'V')} (${level.role})` });
  }
  return related;
}

export function seriesResistorsOf(context: CheckContext, diode: CheckedDiode): Finding['related'] {
  return seriesResistors(context.topology, diode.element).map((resistor) => ({
    location: resistor.location,
    message: `${resistor.name} (${formatQuantity(resistor.resistance, 'Ω')}) in series`,
  }));
}

/** The node voltages of the solve a diode's operating point came from (the base solves, or a variant's when not found there). */
export function nodesAt(context: CheckContext, at: DiodeAtCorner): Readonly<Record<string, number>> {
  const index = context.plans.indexOf(at.plan);
  const result = index >= 0 ? context.solves[index] : undefined;
  return result?.ok ? result.point.nodes : {};
}
