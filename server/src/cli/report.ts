// What `pnlint check` prints: one function per output format, all from the same findings.
import { relative, sep } from 'node:path';
import { pathToFileURL } from 'node:url';
import type { Finding } from '../findings.js';
import { RULES } from '../rule-ids.js';

export interface FileReport {
  /** Absolute path. */
  path: string;
  findings: Finding[];
  /** Set when the file could not be read or analysed. */
  error?: string;
}

export interface Totals {
  errors: number;
  warnings: number;
  infos: number;
}

export function countFindings(reports: FileReport[]): Totals {
  const totals = { errors: 0, warnings: 0, infos: 0 };
  for (const report of reports) {
    for (const finding of report.findings) {
      if (finding.severity === 'error') totals.errors++;
      else if (finding.severity === 'warning') totals.warnings++;
      else totals.infos++;
    }
  }
  return totals;
}

function displayPath(path: string, cwd: string): string {
  const shown = relative(cwd, path);
  return shown.startsWith('..') || shown === '' ? path : shown.split(sep).join('/');
}

const COLOURS = { error: '\x1b[31m', warning: '\x1b[33m', info: '\x1b[36m', dim: '\x1b[2m', reset: '\x1b[0m' };

/** `file:line:col severity rule message`, 1-based, with related places and fixes indented below. */
export function formatText(reports: FileReport[], cwd: string, colour: boolean): string {
  const paint = (code: string, text: string) => (colour ? `${code}${text}${COLOURS.reset}` : text);
  const lines: string[] = [];
  for (const report of reports) {
    const path = displayPath(report.path, cwd);
    if (report.error) lines.push(`${path}: ${paint(COLOURS.error, 'error')} ${report.error}`);
    for (const finding of report.findings) {
      const { line, column } = finding.location.range.start;
      const severity = paint(COLOURS[finding.severity], finding.severity);
      lines.push(`${path}:${line + 1}:${column + 1} ${severity} ${finding.rule} ${finding.message}`);
      for (const related of finding.related) {
        const at = related.location.range.start;
        lines.push(paint(COLOURS.dim, `    ${displayPath(related.location.uri, cwd)}:${at.line + 1}:${at.column + 1} ${related.message}`));
      }
      for (const fix of finding.fixes) lines.push(`    fix${fix.preferred ? ' (preferred)' : ''}: ${fix.title}`);
    }
  }
  const totals = countFindings(reports);
  const files = reports.length;
  lines.push(
    `${totals.errors} error${totals.errors === 1 ? '' : 's'}, ${totals.warnings} warning${totals.warnings === 1 ? '' : 's'}, ` +
      `${totals.infos} info in ${files} file${files === 1 ? '' : 's'}`,
  );
  return lines.join('\n') + '\n';
}

function jsonRange(finding: Finding) {
  const { start, end } = finding.location.range;
  return { start: { line: start.line + 1, column: start.column + 1 }, end: { line: end.line + 1, column: end.column + 1 } };
}

/** The stable JSON shape (version 1): 1-based lines and columns. */
export function formatJson(reports: FileReport[], cwd: string): string {
  const files = reports.map((report) => ({
    path: displayPath(report.path, cwd),
    ...(report.error ? { error: report.error } : {}),
    findings: report.findings.map((finding) => ({
      rule: finding.rule,
      severity: finding.severity,
      message: finding.message,
      ...(finding.element ? { element: finding.element } : {}),
      range: jsonRange(finding),
      fixes: finding.fixes.map((fix) => ({ title: fix.title, preferred: fix.preferred })),
    })),
  }));
  return JSON.stringify({ version: 1, files }, null, 2) + '\n';
}

const SARIF_LEVEL = { error: 'error', warning: 'warning', info: 'note' } as const;

/** SARIF 2.1.0 (OASIS), paths relative to the working folder through %SRCROOT%. */
export function formatSarif(reports: FileReport[], cwd: string, version: string): string {
  const ruleIndex = new Map(RULES.map((rule, index) => [rule.id, index]));
  const artifact = (path: string) => {
    const shown = displayPath(path, cwd);
    return shown === path ? { uri: pathToFileURL(path).href } : { uri: encodeURI(shown), uriBaseId: '%SRCROOT%' };
  };
  const region = (finding: Finding['location']) => ({
    startLine: finding.range.start.line + 1,
    startColumn: finding.range.start.column + 1,
    endLine: finding.range.end.line + 1,
    endColumn: finding.range.end.column + 1,
  });
  const results = reports.flatMap((report) =>
    report.findings.map((finding) => ({
      ruleId: finding.rule,
      ...(ruleIndex.has(finding.rule) ? { ruleIndex: ruleIndex.get(finding.rule)! } : {}),
      level: SARIF_LEVEL[finding.severity],
      message: { text: finding.message },
      locations: [{ physicalLocation: { artifactLocation: artifact(finding.location.uri), region: region(finding.location) } }],
      ...(finding.related.length
        ? {
            relatedLocations: finding.related.map((related, id) => ({
              id,
              message: { text: related.message },
              physicalLocation: { artifactLocation: artifact(related.location.uri), region: region(related.location) },
            })),
          }
        : {}),
      ...(finding.fixes.length
        ? {
            fixes: finding.fixes.map((fix) => ({
              description: { text: fix.title },
              artifactChanges: groupEditsByFile(fix.edits).map(([uri, edits]) => ({
                artifactLocation: artifact(uri),
                replacements: edits.map((edit) => ({
                  deletedRegion: { charOffset: edit.range.start.offset, charLength: edit.range.end.offset - edit.range.start.offset },
                  insertedContent: { text: edit.newText },
                })),
              })),
            })),
          }
        : {}),
    })),
  );
  const notifications = reports
    .filter((report) => report.error)
    .map((report) => ({ level: 'error', message: { text: report.error! }, locations: [{ physicalLocation: { artifactLocation: artifact(report.path) } }] }));
  const log = {
    $schema: 'https://json.schemastore.org/sarif-2.1.0.json',
    version: '2.1.0',
    runs: [
      {
        tool: {
          driver: {
            name: 'pnlint',
            version,
            rules: RULES.map((rule) => ({
              id: rule.id,
              shortDescription: { text: rule.summary },
              defaultConfiguration: { level: SARIF_LEVEL[rule.defaultSeverity] },
            })),
          },
        },
        originalUriBaseIds: { '%SRCROOT%': { uri: pathToFileURL(cwd.endsWith(sep) ? cwd : cwd + sep).href } },
        columnKind: 'utf16CodeUnits',
        invocations: [{ executionSuccessful: true, ...(notifications.length ? { toolExecutionNotifications: notifications } : {}) }],
        results,
      },
    ],
  };
  return JSON.stringify(log, null, 2) + '\n';
}

function groupEditsByFile(edits: Finding['fixes'][number]['edits']): [string, typeof edits][] {
  const byFile = new Map<string, typeof edits>();
  for (const edit of edits) byFile.set(edit.uri, [...(byFile.get(edit.uri) ?? []), edit]);
  return [...byFile];
}
