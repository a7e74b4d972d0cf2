// The `pnlint/operatingPoint` request: the report that `pnlint op` prints, of the
// document's last complete analysis, for the extension's "show operating point" command.
import type { FeatureContext } from './context.js';
import type { OperatingPointParams, OperatingPointResult } from './protocol.js';
import type { AnalysisRunner } from './runner.js';

export async function operatingPoint(context: FeatureContext, runner: AnalysisRunner, params: OperatingPointParams): Promise<OperatingPointResult> {
  const document = context.workspace.openDocument(params.uri);
  if (!document) return `${params.uri} is not open in the editor.\n`;
  const text = await runner.report(document.uri);
  return text ?? 'The file is still being checked; ask again in a moment.\n';
}
