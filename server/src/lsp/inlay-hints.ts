// Inlay hints: each diode's current and voltage at the nominal corner, at the end of
// its line, from the last check of the current text.
import { InlayHintKind, type InlayHint, type InlayHintParams } from 'vscode-languageserver';
import type { DiodeReport } from '../checks/index.js';
import { formatQuantity } from '../units.js';
import type { FeatureContext } from './context.js';
import { uriKey } from './workspace.js';

/** The corner the hints show: the circuit as written (corners.ts names it so). */
const NOMINAL_CORNER = 'nominal';
/** A subcircuit line placed many times shows the first few instances, not a wall of numbers. */
const INSTANCES_SHOWN = 3;

function nominalReading(report: DiodeReport): string | undefined {
  const point = (report.corners.find((corner) => corner.corner === NOMINAL_CORNER) ?? report.corners[0])?.point;
  return point ? `${formatQuantity(point.current, 'A')}, ${formatQuantity(point.voltage, 'V')}` : undefined;
}

export function inlayHints(context: FeatureContext, params: InlayHintParams): InlayHint[] {
  const document = context.documents.get(params.textDocument.uri);
  if (!document) return [];
  const reports = context.current(document)?.diodes ?? [];
  const key = uriKey(document.uri);
  const byLine = new Map<number, DiodeReport[]>();
  for (const report of reports) {
    const { start, end } = report.location.range;
    if (uriKey(report.location.uri) !== key || end.line < params.range.start.line || start.line > params.range.end.line) continue;
    let list = byLine.get(end.line);
    if (!list) byLine.set(end.line, (list = []));
    list.push(report);
  }
  const hints: InlayHint[] = [];
  for (const list of byLine.values()) {
    const readings = list.slice(0, INSTANCES_SHOWN).flatMap((report) => {
      const reading = nominalReading(report);
      return reading ? [list.length > 1 ? `${report.element} ${reading}` : reading] : [];
    });
    if (readings.length === 0) continue;
    if (list.length > INSTANCES_SHOWN) readings.push(`… ${list.length - INSTANCES_SHOWN} more`);
    const end = list[0]!.location.range.end;
    hints.push({
      position: { line: end.line, character: end.column },
      label: readings.join(' · '),
      kind: InlayHintKind.Parameter,
      paddingLeft: true,
      tooltip: 'Diode current and voltage at nominal values, as pnlint solved them',
    });
  }
  return hints;
}
