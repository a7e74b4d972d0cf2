// The CLI's side of the I/O boundary: reading netlists and pnlint.json from disk,
// expanding globs, and writing fixed files safely. The core never does any of this.
import { readFileSync, writeFileSync, renameSync, statSync, existsSync, unlinkSync } from 'node:fs';
import { dirname, resolve, isAbsolute, join, basename } from 'node:path';
import { glob, isDynamicPattern } from 'tinyglobby';
import type { FileReader } from '../netlist/circuit.js';

/** A FileReader over the file system; uris are absolute paths. Remembers what it read. */
export function createDiskReader(): FileReader & { texts: Map<string, string> } {
  const texts = new Map<string, string>();
  return {
    texts,
    read(uri: string): string | undefined {
      const cached = texts.get(uri);
      if (cached !== undefined) return cached;
      try {
        const text = readFileSync(uri, 'utf8');
        texts.set(uri, text);
        return text;
      } catch {
        return undefined;
      }
    },
    resolve(fromUri: string, path: string): string {
      return isAbsolute(path) ? path : resolve(dirname(fromUri), path);
    },
  };
}

/** Expands the command line's files and globs into absolute paths, in the order given, without repeats. */
export async function expandInputs(inputs: string[], cwd: string): Promise<{ files: string[]; unmatched: string[] }> {
  const files: string[] = [];
  const unmatched: string[] = [];
  const seen = new Set<string>();
  for (const input of inputs) {
    const matches = isDynamicPattern(input)
      ? (await glob(input, { cwd, absolute: true, onlyFiles: true })).sort()
      : [resolve(cwd, input)];
    if (matches.length === 0) unmatched.push(input);
    for (const file of matches) {
      if (!seen.has(file)) {
        seen.add(file);
        files.push(file);
      }
    }
  }
  return { files, unmatched };
}

export const CONFIG_FILE_NAME = 'pnlint.json';

/** The nearest pnlint.json at or above the file's folder, stopping at a repository root. */
export function findConfig(file: string): { uri: string; text: string } | undefined {
  let folder = dirname(file);
  for (;;) {
    const candidate = join(folder, CONFIG_FILE_NAME);
    if (existsSync(candidate)) {
      try {
        return { uri: candidate, text: readFileSync(candidate, 'utf8') };
      } catch {
        return undefined;
      }
    }
    if (existsSync(join(folder, '.git'))) return undefined;
    const parent = dirname(folder);
    if (parent === folder) return undefined;
    folder = parent;
  }
}

/**
 * Writes `text` to `path` atomically (a temporary file beside it, then rename), and
 * only if the file still holds `expected`: a file that changed since it was read is
 * never overwritten.
 */
export function writeFileAtomically(path: string, text: string, expected: string): { ok: true } | { ok: false; reason: string } {
  let current: string;
  try {
    current = readFileSync(path, 'utf8');
  } catch (error) {
    return { ok: false, reason: `cannot read it again: ${(error as Error).message}` };
  }
  if (current !== expected) return { ok: false, reason: 'it changed since it was read; not overwritten' };
  const temporary = join(dirname(path), `.${basename(path)}.pnlint-${process.pid}.tmp`);
  try {
    const mode = statSync(path).mode;
    writeFileSync(temporary, text, { encoding: 'utf8', mode });
    renameSync(temporary, path);
    return { ok: true };
  } catch (error) {
    try {
      unlinkSync(temporary);
    } catch {
      // nothing left behind to clean
    }
    return { ok: false, reason: (error as Error).message };
  }
}
