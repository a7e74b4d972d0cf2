// Cautions (product.md): where a circuit reaches hazardous voltages, say that the check is
// a design aid, not a safety approval.
import type { Circuit, CurrentSource, VoltageSource } from '../netlist/circuit.js';
import type { Finding } from '../findings.js';
import type { SolveResult } from '../sim/types.js';
import { formatQuantity } from '../units.js';
import { makeFinding } from './finding.js';

/** Extra-low-voltage limits: 50 V AC (rms) and 120 V ripple-free DC (the usual ELV limits, as product.md states them). */
export const EXTRA_LOW_VOLTAGE_AC_RMS = 50;
export const EXTRA_LOW_VOLTAGE_DC = 120;

const CAUTION_TEXT =
  'pnlint is a design aid, not a safety approval: for circuits at hazardous voltages follow your local electrical codes and have the design reviewed under licensed practice.';

export function hazardCautions(circuit: Circuit, solves: readonly SolveResult[]): Finding[] {
  for (const element of circuit.elements) {
    if (element.type !== 'V') continue;
    const hazard = sourceHazard(element);
    if (hazard) return [makeFinding('hazardous-voltage', 'info', `${element.name} ${hazard}. ${CAUTION_TEXT}`, element.location, { element: element.name })];
  }
  // A transformer model or a controlled source can also lift a node above the limit.
  for (const result of solves) {
    if (!result.ok) continue;
    for (const [node, voltage] of Object.entries(result.point.nodes)) {
      if (Math.abs(voltage) > EXTRA_LOW_VOLTAGE_DC) {
        const where = circuit.elements.find((element) => element.nodes.includes(node)) ?? circuit.elements[0];
        if (!where) return [];
        return [
          makeFinding(
            'hazardous-voltage',
            'info',
            `Node ${node} reaches ${formatQuantity(voltage, 'V')}, above ${EXTRA_LOW_VOLTAGE_DC} V DC. ${CAUTION_TEXT}`,
            where.location,
          ),
        ];
      }
    }
  }
  return [];
}

function sourceHazard(source: VoltageSource | CurrentSource): string | undefined {
  const waveform = source.waveform;
  if (waveform?.shape === 'sin') {
    const rms = Math.abs(waveform.amplitude) / Math.SQRT2;
    if (rms > EXTRA_LOW_VOLTAGE_AC_RMS) return `is ${formatQuantity(rms, 'V')} rms AC, above ${EXTRA_LOW_VOLTAGE_AC_RMS} V AC`;
    const peak = Math.abs(waveform.offset) + Math.abs(waveform.amplitude);
    if (peak > EXTRA_LOW_VOLTAGE_DC) return `peaks at ${formatQuantity(peak, 'V')}, above ${EXTRA_LOW_VOLTAGE_DC} V`;
    return undefined;
  }
  const values = [source.dc];
  if (waveform?.shape === 'pulse') values.push(waveform.initial, waveform.pulsed);
  if (waveform?.shape === 'pwl') values.push(...waveform.points.map((point) => point.value));
  if (waveform?.shape === 'exp') values.push(waveform.initial, waveform.pulsed);
  const peak = Math.max(...values.map(Math.abs));
  if (peak > EXTRA_LOW_VOLTAGE_DC) return `reaches ${formatQuantity(peak, 'V')}, above ${EXTRA_LOW_VOLTAGE_DC} V DC`;
  return undefined;
}
