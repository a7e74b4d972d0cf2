// `pnlint check`: many files in one process; findings as text, JSON or SARIF; `--fix`.
import { writeFileSync } from 'node:fs';
import { analyze, type Analysis } from '../analysis.js';
import type { Finding } from '../findings.js';
import { createDiskReader, expandInputs, findConfig, writeFileAtomically } from './files.js';
import { planPreferredFixes } from './fix-plan.js';
import { countFindings, formatJson, formatSarif, formatText, type FileReport } from './report.js';
import { packageVersion } from './version.js';

export interface CheckOptions {
  inputs: string[];
  format: 'text' | 'json' | 'sarif';
  fix: boolean;
  output?: string;
}

export async function runCheck(options: CheckOptions): Promise<number> {
  const cwd = process.cwd();
  const { files, unmatched } = await expandInputs(options.inputs, cwd);
  let ioError = unmatched.length > 0;
  const reports: FileReport[] = unmatched.map((input) => ({ path: input, findings: [], error: `no file matches '${input}'` }));
  const fixNotes: string[] = [];
  const seen = new Set<string>();

  for (const file of files) {
    let result = checkFile(file);
    if (result.error) {
      ioError = true;
      reports.push({ path: file, findings: [], error: result.error });
      continue;
    }
    if (options.fix && result.analysis) {
      const fixed = applyPreferredFixes(file, result.analysis);
      fixNotes.push(...fixed.notes);
      if (fixed.written) result = checkFile(file);
    }
    // A finding in an included file is listed under that file, once.
    const byFile = new Map<string, Finding[]>([[file, []]]);
    for (const finding of result.analysis?.findings ?? []) {
      const key = `${finding.location.uri}:${finding.location.range.start.offset}:${finding.rule}:${finding.message}`;
      if (seen.has(key)) continue;
      seen.add(key);
      byFile.set(finding.location.uri, [...(byFile.get(finding.location.uri) ?? []), finding]);
    }
    // In file order, as a person reads them (syntax findings come from an earlier stage than the rules).
    for (const [path, findings] of byFile) reports.push({ path, findings: findings.sort(byPosition) });
  }

  const rendered =
    options.format === 'json'
      ? formatJson(reports, cwd)
      : options.format === 'sarif'
        ? formatSarif(reports, cwd, packageVersion())
        : formatText(reports, cwd, useColour());
  if (options.output) {
    try {
      writeFileSync(options.output, rendered);
    } catch (error) {
      process.stderr.write(`pnlint: cannot write ${options.output}: ${(error as Error).message}\n`);
      return 2;
    }
  } else process.stdout.write(rendered);
  for (const note of fixNotes) process.stderr.write(`${note}\n`);

  if (ioError) return 2;
  return countFindings(reports).errors > 0 ? 1 : 0;
}

function byPosition(a: Finding, b: Finding): number {
  return a.location.range.start.offset - b.location.range.start.offset;
}

function useColour(): boolean {
  return Boolean(process.stdout.isTTY) && !('NO_COLOR' in process.env && process.env.NO_COLOR !== '');
}

function checkFile(file: string): { analysis?: Analysis; error?: string } {
  const reader = createDiskReader();
  const text = reader.read(file);
  if (text === undefined) return { error: 'cannot read the file' };
  return { analysis: analyze({ uri: file, text, files: reader, config: findConfig(file) }) };
}

/** Applies the preferred fixes as planned, then writes each changed file atomically. */
function applyPreferredFixes(file: string, first: Analysis): { written: boolean; notes: string[] } {
  const plan = planPreferredFixes(file, first);
  const notes = [...plan.applied.map((title) => `pnlint: fixed ${file}: ${title}`), ...plan.problems.map((problem) => `pnlint: ${file}: ${problem}`)];
  let written = false;
  for (const [uri, text] of plan.fixed) {
    const outcome = writeFileAtomically(uri, text, plan.original.get(uri)!);
    if (outcome.ok) written = true;
    else notes.push(`pnlint: did not write ${uri}: ${outcome.reason}`);
  }
  return { written, notes };
}
