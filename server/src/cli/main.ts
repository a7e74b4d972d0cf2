#!/usr/bin/env node
// The pnlint command line: `check`, `op`, `lsp`, `demo`. Only this folder and lsp/ do I/O.
import { parseArgs } from 'node:util';
import { packageVersion } from './version.js';
import { runCheck } from './check.js';
import { runOperatingPoint } from './op.js';
import { runDemo } from './demo.js';

export const EXIT_CLEAN = 0;
export const EXIT_FINDINGS = 1;
export const EXIT_USAGE = 2;

const USAGE = `pnlint — finds unsafe diode use in SPICE netlists by solving their operating points

usage:
  pnlint check <files or globs…> [--format text|json|sarif] [--fix] [--output <file>]
  pnlint op <file> [--format text|json]
  pnlint lsp --stdio
  pnlint demo
  pnlint --version

check exits 0 when nothing is at error severity, 1 when something is, 2 on a usage or I/O error.
`;


async function main(argv: string[]): Promise<number> {
  const [command, ...rest] = argv;
  if (command === '--version' || command === '-v') {
    process.stdout.write(`${packageVersion()}\n`);
    return EXIT_CLEAN;
  }
  if (command === undefined || command === '--help' || command === '-h' || command === 'help') {
    (command === undefined ? process.stderr : process.stdout).write(USAGE);
    return command === undefined ? EXIT_USAGE : EXIT_CLEAN;
  }
  let parsed;
  try {
    parsed = parseArgs({
      args: rest,
      allowPositionals: true,
      options: {
        format: { type: 'string', short: 'f' },
        fix: { type: 'boolean' },
        output: { type: 'string', short: 'o' },
        stdio: { type: 'boolean' },
        'node-ipc': { type: 'boolean' },
        'client-process-id': { type: 'string' },
      },
    });
  } catch (error) {
    process.stderr.write(`pnlint: ${(error as Error).message}\n\n${USAGE}`);
    return EXIT_USAGE;
  }
  const { values, positionals } = parsed;
  switch (command) {
    case 'check': {
      const format = values.format ?? 'text';
      if (!['text', 'json', 'sarif'].includes(format)) return usageError(`unknown format '${format}' (text, json or sarif)`);
      if (positionals.length === 0) return usageError('check needs at least one file or glob');
      return runCheck({ inputs: positionals, format: format as 'text' | 'json' | 'sarif', fix: values.fix ?? false, output: values.output });
    }
    case 'op': {
      const format = values.format ?? 'text';
      if (!['text', 'json'].includes(format)) return usageError(`unknown format '${format}' (text or json)`);
      if (positionals.length !== 1) return usageError('op needs exactly one file');
      return runOperatingPoint(positionals[0]!, format as 'text' | 'json');
    }
    case 'lsp': {
      const { startStandaloneServer } = await import('./lsp.js');
      startStandaloneServer();
      return new Promise<number>(() => {}); // runs until the client closes the connection
    }
    case 'demo':
      return runDemo();
    default:
      return usageError(`unknown command '${command}'`);
  }
}

function usageError(message: string): number {
  process.stderr.write(`pnlint: ${message}\n\n${USAGE}`);
  return EXIT_USAGE;
}

main(process.argv.slice(2)).then(
  (code) => {
    process.exitCode = code;
  },
  (error: unknown) => {
    process.stderr.write(`pnlint: internal error: ${(error as Error)?.stack ?? String(error)}\n`);
    process.exitCode = EXIT_USAGE;
  },
);
