// Shared by the netlist tests: an in-memory file reader and small lookups.
import { elaborate, type Circuit, type Element, type FileReader, type NetlistDiagnostic } from '../../server/src/netlist/index.js';

/** Files by absolute path; includes resolve relative to the including file, as SPICE engines do. */
export function memoryReader(files: Record<string, string>): FileReader & { reads: string[] } {
  const reads: string[] = [];
  return {
    reads,
    read(uri) {
      reads.push(uri);
      return files[uri];
    },
    resolve(fromUri, path) {
      if (path.startsWith('/')) return normalize(path);
      const folder = fromUri.slice(0, fromUri.lastIndexOf('/') + 1);
      return normalize(folder + path);
    },
  };
}

function normalize(path: string): string {
  const out: string[] = [];
  for (const segment of path.split('/')) {
    if (segment === '..') out.pop();
    else if (segment !== '.' && segment !== '') out.push(segment);
  }
  return '/' + out.join('/');
}

export const TOP = '/project/top.cir';

/** Elaborates `text` as /project/top.cir with `files` beside it. */
export function elaborateText(text: string, files: Record<string, string> = {}, options = {}): Circuit {
  return elaborate(TOP, text, memoryReader(files), options);
}

export function element<T extends Element['type']>(circuit: Circuit, name: string, type?: T): Extract<Element, { type: T }> {
  const found = circuit.elements.find((e) => e.name === name);
  if (!found) throw new Error(`no element ${name}; have ${circuit.elements.map((e) => e.name).join(', ')}`);
  if (type && found.type !== type) throw new Error(`${name} is ${found.type}, not ${type}`);
  return found as Extract<Element, { type: T }>;
}

/** Diagnostics with a code (default: all but `info`). */
export function problems(circuit: Circuit, code?: string): NetlistDiagnostic[] {
  return circuit.diagnostics.filter((d) => (code ? d.code === code : d.severity !== 'info'));
}

/** 0-based line and column of a diagnostic's start and end, for range assertions. */
export function where(d: NetlistDiagnostic): [number, number, number, number] {
  const { start, end } = d.location.range;
  return [start.line, start.column, end.line, end.column];
}

/** The 0-based [line, column, line, column] span of the first `needle` in `text` (single line). */
export function spanOf(text: string, needle: string, occurrence = 0): [number, number, number, number] {
  const lines = text.split('\n');
  let seen = 0;
  for (let line = 0; line < lines.length; line++) {
    let from = 0;
    for (;;) {
      const column = lines[line]!.indexOf(needle, from);
      if (column < 0) break;
      if (seen++ === occurrence) return [line, column, line, column + needle.length];
      from = column + 1;
    }
  }
  throw new Error(`${needle} not in text`);
}
