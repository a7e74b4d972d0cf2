// The CLI's file writing: atomic, and never over a file that changed since it was read.
import { describe, expect, it } from 'vitest';
import { mkdtempSync, mkdirSync, readFileSync, writeFileSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { writeFileAtomically, findConfig } from '../../server/src/cli/files.js';

describe('writeFileAtomically', () => {
  it('replaces the file when it still holds what was read', () => {
    const folder = mkdtempSync(join(tmpdir(), 'pnlint-write-'));
    const path = join(folder, 'a.cir');
    writeFileSync(path, 'old\n');
    expect(writeFileAtomically(path, 'new\n', 'old\n')).toEqual({ ok: true });
    expect(readFileSync(path, 'utf8')).toBe('new\n');
    expect(readdirSync(folder)).toEqual(['a.cir']); // no temporary file left
  });
  it('refuses when the file changed since it was read, and leaves it alone', () => {
    const folder = mkdtempSync(join(tmpdir(), 'pnlint-write-'));
    const path = join(folder, 'a.cir');
    writeFileSync(path, 'edited by someone else\n');
    const outcome = writeFileAtomically(path, 'new\n', 'old\n');
    expect(outcome.ok).toBe(false);
    expect(readFileSync(path, 'utf8')).toBe('edited by someone else\n');
  });
  it('refuses, without creating it, when the file is gone', () => {
    const folder = mkdtempSync(join(tmpdir(), 'pnlint-write-'));
    expect(writeFileAtomically(join(folder, 'gone.cir'), 'x', 'y').ok).toBe(false);
    expect(readdirSync(folder)).toEqual([]);
  });
});

describe('findConfig', () => {
  it('finds the nearest pnlint.json above the file', () => {
    const folder = mkdtempSync(join(tmpdir(), 'pnlint-config-'));
    mkdirSync(join(folder, 'boards', 'power'), { recursive: true });
    writeFileSync(join(folder, 'pnlint.json'), '{}');
    const found = findConfig(join(folder, 'boards', 'power', 'psu.cir'));
    expect(found?.uri).toBe(join(folder, 'pnlint.json'));
  });
});
