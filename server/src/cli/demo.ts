// `npm run demo`: checks the bundled example netlists and shows what `--fix` would do
// (without writing anything).
// It exits 0 whenever it ran, whatever it found: the findings are the point.
import { readdirSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { join, relative } from 'node:path';
import { analyze } from '../analysis.js';
import { createDiskReader, findConfig } from './files.js';
import { formatText } from './report.js';
import { planPreferredFixes } from './fix-plan.js';

export function examplesFolder(): string {
  return fileURLToPath(new URL('../../examples/', import.meta.url));
}

export async function runDemo(): Promise<number> {
  const folder = examplesFolder();
  let names: string[];
  try {
    names = readdirSync(folder).filter((name) => /\.(cir|net|sp|spi|spice|ckt)$/i.test(name)).sort();
  } catch (error) {
    process.stderr.write(`pnlint demo: cannot list ${folder}: ${(error as Error).message}\n`);
    return 2;
  }
  const colour = Boolean(process.stdout.isTTY) && !process.env.NO_COLOR;
  for (const name of names) {
    const path = join(folder, name);
    const reader = createDiskReader();
    const text = reader.read(path) ?? '';
    const analysis = analyze({ uri: path, text, files: reader, config: findConfig(path) });
    const title = analysis.circuit?.title ?? analysis.syntax.statements.find((s) => s.kind === 'title');
    process.stdout.write(`\n== ${relative(process.cwd(), path)}${typeof title === 'string' ? ` — ${title}` : ''}\n`);
    process.stdout.write(formatText([{ path, findings: analysis.findings }], process.cwd(), colour));
    // What `check --fix` would do: one verified fix at a time, re-checked before the next.
    const plan = planPreferredFixes(path, analysis);
    if (plan.applied.length) {
      process.stdout.write('  --fix would apply:\n');
      for (const title of plan.applied) process.stdout.write(`    ${title}\n`);
    }
    for (const problem of plan.problems) process.stdout.write(`  --fix: ${problem}\n`);
  }
  return 0;
}
