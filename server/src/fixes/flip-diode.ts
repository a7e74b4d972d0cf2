// Turning a diode around: its two node words swapped on its line, nothing else touched.
import type { FixRequest } from '../checks/index.js';
import { CONDUCTION_THRESHOLD } from '../checks/thresholds.js';
import type { Finding, Fix } from '../findings.js';
import { formatQuantity } from '../units.js';
import { diodeExtremes, elementNamed } from './readings.js';
import { nodeFields, replaceEdit } from './source-text.js';
import type { FixSession } from './verify.js';

type FlipRequest = Extract<FixRequest, { kind: 'flip-diode' }>;

export function flipDiodeFixes(session: FixSession, request: FlipRequest, finding: Finding): Fix[] {
  const diode = elementNamed(session.circuit, request.diode);
  if (!diode || diode.type !== 'D') return [];
  const located = session.files.statementOf(diode);
  const nodes = located && nodeFields(located.statement, 2);
  if (!located || !nodes) return [];
  const [anode, cathode] = nodes as [(typeof nodes)[0], (typeof nodes)[0]];
  const edits = [replaceEdit(located.uri, anode.range, cathode.text), replaceEdit(located.uri, cathode.range, anode.text)];
  const verdict = session.verify(edits, finding);
  if (!verdict.ok) return [];
  const after = diodeExtremes(verdict.verified, diode.name);
  const then = !after
    ? ''
    : after.forwardCurrent >= CONDUCTION_THRESHOLD
      ? `; it then carries ${formatQuantity(after.forwardCurrent, 'A')}`
      : `; it then blocks ${formatQuantity(after.reverseVoltage, 'V')}`;
  return [{ title: `Turn ${diode.name} around (anode to ${cathode.text}, cathode to ${anode.text}${then})`, preferred: true, edits }];
}
