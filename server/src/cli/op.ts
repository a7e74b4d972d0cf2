// `pnlint op <file>`: the solved operating point at each corner, as a table or JSON.
import { analyze } from '../analysis.js';
import { createDiskReader, findConfig } from './files.js';
import { formatOperatingPointJson, formatOperatingPointText } from './op-report.js';

export async function runOperatingPoint(file: string, format: 'text' | 'json'): Promise<number> {
  const reader = createDiskReader();
  const { resolve } = await import('node:path');
  const path = resolve(process.cwd(), file);
  const text = reader.read(path);
  if (text === undefined) {
    process.stderr.write(`pnlint: cannot read ${file}\n`);
    return 2;
  }
  const analysis = analyze({ uri: path, text, files: reader, config: findConfig(path) });
  process.stdout.write(format === 'json' ? formatOperatingPointJson(analysis) : formatOperatingPointText(analysis));
  return 0;
}
