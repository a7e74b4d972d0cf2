// What `--fix` does to a file, computed in memory: apply the first preferred fix, check
// again, repeat. Every fix was verified alone, not together with the others, so each
// round re-checks before the next fix is chosen. `check --fix` writes the result; the
// demo only shows it.
import { analyze, type Analysis } from '../analysis.js';
import { applyEdits } from '../edits.js';
import { createDiskReader, findConfig } from './files.js';

/** How many rounds `--fix` may take: each round applies one verified fix and re-checks. */
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
  for (let round = 0; round < FIX_ROUND_LIMIT; round++) {
    const fix = analysis.findings.flatMap((finding) => finding.fixes).find((candidate) => candidate.preferred);
    if (!fix) break;
    const edited = new Map(plan.fixed);
    let applied = true;
    for (const uri of new Set(fix.edits.map((edit) => edit.uri))) {
      if (!plan.original.has(uri)) {
        const onDisk = createDiskReader().read(uri);
        if (onDisk === undefined) {
          applied = false;
          break;
        }
        plan.original.set(uri, onDisk);
      }
      const after = applyEdits(edited.get(uri) ?? plan.original.get(uri)!, fix.edits.filter((edit) => edit.uri === uri));
      if (after === undefined) {
        applied = false;
        break;
      }
      edited.set(uri, after);
    }
    if (!applied) {
      plan.problems.push(`could not apply "${fix.title}"; stopped there`);
      break;
    }
    plan.fixed = edited;
    plan.applied.push(fix.title);
    const reader = createDiskReader();
    for (const [uri, text] of plan.fixed) reader.texts.set(uri, text);
    analysis = analyze({ uri: file, text: reader.read(file)!, files: reader, config: findConfig(file) });
  }
  return plan;
}
