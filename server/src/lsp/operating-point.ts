// The `pnlint/operatingPoint` request: the report of the file's operating points for
// the extension's "show operating point" command, from the current analysis.
import type { Analysis } from '../analysis.js';
import type { FeatureContext } from './context.js';
import type { OperatingPointParams, OperatingPointResult } from './protocol.js';

export function operatingPoint(context: FeatureContext, params: OperatingPointParams): OperatingPointResult {
  const document = context.workspace.openDocument(params.uri);
  if (!document) return `${params.uri} is not open in the editor.\n`;
  const checked = context.current(document);
  if (!checked) return 'The file is still being checked; ask again in a moment.\n';
  return formatReport(checked.analysis);
}

function formatReport(analysis: Analysis): string {
  const lines = [`Operating point of ${analysis.uri}`, ''];
  const circuit = analysis.circuit;
  if (!circuit) {
    lines.push('No circuit: the netlist could not be elaborated (see the diagnostics).');
    return `${lines.join('\n')}\n`;
  }
  lines.push(`${circuit.elements.length} elements, ${circuit.nodes.length} nodes, ${circuit.temperature} °C.`);
  lines.push('The operating point is not part of the analysis yet, so no voltages or currents can be shown.');
  return `${lines.join('\n')}\n`;
}
