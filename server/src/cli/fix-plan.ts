// What `--fix` does to a file, computed in memory: apply the preferred fixes that a re-check
// passes together (fixes/combined.ts; the first preferred fix alone when none can be
// combined), check again, repeat while preferred fixes remain. Every fix was verified alone,
// and each round's set once more together. `check --fix` writes the result; the demo only
// shows it.
import { analyze, type Analysis } from '../analysis.js';
import { applyEdits } from '../edits.js';
import { combinePreferredFixes } from '../fixes/combined.js';
import { FixSession } from '../fixes/index.js';
import type { FileReader } from '../netlist/circuit.js';
import type { TextEdit } from '../findings.js';
import { DEFAULT_SETTINGS } from '../settings.js';
import { createDiskReader, findConfig } from './files.js';

/** How many rounds `--fix` may take: each round applies the verified set and re-checks. */
export const FIX_ROUND_LIMIT = 50;

export interface FixPlan {
  /** uri → text as read from disk, for every file a fix touches. */
  original: Map<string, string>;
  /** uri → text after the fixes. */
  fixed: Map<string, string>;
  /** The titles of the fixes applied, in order. */
  applied: string[];
  /** Why the plan stopped early, when it did. */
  problems: string[];
}

export function planPreferredFixes(file: string, first: Analysis): FixPlan {
  const plan: FixPlan = { original: new Map(), fixed: new Map(), applied: [], problems: [] };
  let analysis = first;
  let reader: FileReader = createDiskReader();
  for (let round = 0; round < FIX_ROUND_LIMIT; round++) {
    const set = preferredSet(analysis, reader);
    if (!set) break;
    const edited = new Map(plan.fixed);
    let applied = true;
    for (const uri of new Set(set.edits.map((edit) => edit.uri))) {
      if (!plan.original.has(uri)) {
        const onDisk = createDiskReader().read(uri);
        if (onDisk === undefined) {
          applied = false;
          break;
        }
        plan.original.set(uri, onDisk);
      }
      const after = applyEdits(edited.get(uri) ?? plan.original.get(uri)!, set.edits.filter((edit) => edit.uri === uri));
      if (after === undefined) {
        applied = false;
        break;
      }
      edited.set(uri, after);
    }
    if (!applied) {
      plan.problems.push(`could not apply "${set.titles.join('", "')}"; stopped there`);
      break;
    }
    plan.fixed = edited;
    plan.applied.push(...set.titles);
    const next = createDiskReader();
    for (const [uri, text] of plan.fixed) next.texts.set(uri, text);
    reader = next;
    analysis = analyze({ uri: file, text: next.read(file)!, files: next, config: findConfig(file) });
  }
  return plan;
}

/** This round's fixes: the preferred ones that pass together, or the first alone; undefined when there is none. */
function preferredSet(analysis: Analysis, reader: FileReader): { edits: TextEdit[]; titles: string[] } | undefined {
  const first = analysis.findings.flatMap((finding) => finding.fixes).find((candidate) => candidate.preferred);
  if (!first) return undefined;
  if (analysis.circuit && analysis.check) {
    // The CLI checks with the default settings; the set is verified with the same.
    const session = new FixSession(analysis.circuit, analysis.check.findings, reader, DEFAULT_SETTINGS, analysis.config, {});
    const set = combinePreferredFixes(analysis.findings, session);
    if (set.titles.length > 0) return set;
  }
  return { edits: first.edits, titles: [first.title] };
}
