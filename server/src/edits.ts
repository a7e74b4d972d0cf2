// Applying text edits to a file's text: one place, used by fix verification, `check --fix` and the tests.
import type { TextEdit } from './findings.js';

/**
 * Applies edits (offsets from each range) to `text`. Overlapping edits are refused:
 * undefined is returned rather than a corrupted file.
 */
export function applyEdits(text: string, edits: readonly Pick<TextEdit, 'range' | 'newText'>[]): string | undefined {
  const sorted = [...edits].sort((a, b) => a.range.start.offset - b.range.start.offset || a.range.end.offset - b.range.end.offset);
  let result = '';
  let cursor = 0;
  for (const edit of sorted) {
    const { start, end } = edit.range;
    if (start.offset < cursor || end.offset < start.offset || end.offset > text.length) return undefined;
    result += text.slice(cursor, start.offset) + edit.newText;
    cursor = end.offset;
  }
  return result + text.slice(cursor);
}
