// An anti-parallel diode across an LED that sees reverse voltage: a small-signal silicon
// diode, cathode to the LED's anode, that conducts when the LED would be reversed, so the
// LED sees only that diode's forward voltage. Its line (and its model's, since no model of
// the user's is known to suit) goes right after the LED's line.
import type { FixRequest } from '../checks/index.js';
import type { Finding, Fix } from '../findings.js';
import { formatQuantity } from '../units.js';
import { leafName } from './names.js';
import { diodeExtremes, elementNamed } from './readings.js';
import { linesAfter, nodeFields } from './source-text.js';
import type { FixCandidate } from './together.js';
import type { FixSession } from './verify.js';

type GuardRequest = Extract<FixRequest, { kind: 'anti-parallel-diode' }>;

/**
 * A generic small-signal silicon diode: about 0.7 V at a few mA, 100 V reverse (typical
 * values, from memory). No area or temperature parameters beyond SPICE's defaults.
 */
export const GUARD_DIODE_PARAMETERS = 'IS=4n N=1.9 RS=0.6 BV=100 IBV=100n';

/** Words in a model name that the checks read as a hint of the diode's kind (checks/classify.ts): kept out of the guard's model name. */
const KIND_HINTS = /led|zen|rect|bridge|schottky/gi;

/** The guard's edits, not yet re-checked; undefined when the LED's node words cannot be found. */
export function guardDiodeCandidate(session: FixSession, request: GuardRequest, finding: Finding): FixCandidate | undefined {
  const led = elementNamed(session.circuit, request.diode);
  if (!led || led.type !== 'D') return undefined;
  const located = session.files.statementOf(led);
  const nodes = located && nodeFields(located.statement, 2);
  if (!located || !nodes) return undefined;
  const [anode, cathode] = nodes as [(typeof nodes)[0], (typeof nodes)[0]];
  const names = session.names.copy();
  const leaf = leafName(led.name);
  const guard = names.fresh('element', `${leaf}_GUARD`);
  const model = names.fresh('model', `SI_GUARD_${leaf.replace(KIND_HINTS, (word) => word[0]!)}`);
  const edits = [linesAfter(located, [`${guard} ${cathode.text} ${anode.text} ${model}`, `.model ${model} D(${GUARD_DIODE_PARAMETERS})`])];
  return {
    element: led,
    target: finding,
    edits,
    titled: (verified) => {
      const after = diodeExtremes(verified, led.name);
      const numbers = after ? ` (LED reverse voltage ${formatQuantity(request.reverseVoltage, 'V')} → ${formatQuantity(Math.max(after.reverseVoltage, 0), 'V')})` : '';
      return { title: `Add anti-parallel diode ${guard} across ${led.name}${numbers}`, preferred: true, edits };
    },
  };
}
