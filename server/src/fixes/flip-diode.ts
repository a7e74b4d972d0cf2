// Turning a diode around: its two node words swapped on its line, nothing else touched.
import type { FixRequest } from '../checks/index.js';
import { CONDUCTION_THRESHOLD } from '../checks/thresholds.js';
import type { Finding, Fix } from '../findings.js';
import { formatQuantity } from '../units.js';
import { diodeExtremes, elementNamed } from './readings.js';
import { leafName } from './names.js';
import { nodeFields, replaceEdit } from './source-text.js';
import type { FixCandidate } from './together.js';
import type { FixSession } from './verify.js';

type FlipRequest = Extract<FixRequest, { kind: 'flip-diode' }>;

/**
 * Below this a diode neither blocks nor conducts anything worth naming (ours): a freewheel
 * diode turned around, with its coil's transistor off, sits at a few nanovolts.
 */
const NEGLIGIBLE_VOLTAGE = 1e-3;

/** The flip's edits, not yet re-checked; undefined when the diode's node words cannot be found. */
export function flipDiodeCandidate(session: FixSession, request: FlipRequest, finding: Finding): FixCandidate | undefined {
  const diode = elementNamed(session.circuit, request.diode);
  if (!diode || diode.type !== 'D') return undefined;
  const located = session.files.statementOf(diode);
  const nodes = located && nodeFields(located.statement, 2);
  if (!located || !nodes) return undefined;
  const [anode, cathode] = nodes as [(typeof nodes)[0], (typeof nodes)[0]];
  const edits = [replaceEdit(located, anode.span, cathode.text), replaceEdit(located, cathode.span, anode.text)];
  return {
    element: diode,
    target: finding,
    edits,
    titled: (verified) => {
      const after = diodeExtremes(verified, diode.name);
      const then = !after
        ? ''
        : after.forwardCurrent >= CONDUCTION_THRESHOLD
          ? `; it then carries ${formatQuantity(after.forwardCurrent, 'A')}`
          : after.reverseVoltage >= NEGLIGIBLE_VOLTAGE
            ? `; it then blocks ${formatQuantity(after.reverseVoltage, 'V')}`
            : '; it then idles';
      // A line inside a subcircuit is every instance's line: the title says so.
      const what = diode.instances.length > 0 ? `${leafName(diode.name)} around in every instance of its subcircuit` : `${diode.name} around`;
      return { title: `Turn ${what} (anode to ${cathode.text}, cathode to ${anode.text}${then})`, preferred: true, edits };
    },
  };
}
