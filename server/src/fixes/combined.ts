// The preferred fixes of a file applied together, as the editor's "fix all" applies them.
// Each fix was verified alone, against the circuit as it is; together they may not be right
// (two resistors sized each for the other part unchanged, a flip that changes what another
// fix was measured against). So the combination is re-checked once, and when it fails it
// is built up again one fix at a time, each step re-checked, within the fix budget: only
// combinations that a re-check passed are offered.
import type { Finding, Fix, TextEdit } from '../findings.js';
import type { FixSession } from './verify.js';

export interface CombinedFixes {
  /** The edits of every fix kept, in the order of their findings. */
  edits: TextEdit[];
  /** The titles of the fixes kept, in the same order. */
  titles: string[];
  /** Preferred fixes left out: their edits overlap one kept, a re-check turned them down, or the budget ran out. */
  withheld: number;
}

interface Candidate {
  finding: Finding;
  fix: Fix;
}

/** Two edits that touch the same text, or insert at the same point (their order would be unspecified). */
function clash(a: TextEdit, b: TextEdit): boolean {
  if (a.uri !== b.uri) return false;
  const [aStart, aEnd, bStart, bEnd] = [a.range.start.offset, a.range.end.offset, b.range.start.offset, b.range.end.offset];
  return aStart === bStart || (aStart < bEnd && bStart < aEnd);
}

/**
 * The preferred fixes of `findings` that can be applied together, verified together by
 * `session` (a session of the analysis the findings came from, with a budget of its own).
 */
export function combinePreferredFixes(findings: readonly Finding[], session: FixSession): CombinedFixes {
  const candidates: Candidate[] = [];
  const taken: TextEdit[] = [];
  let withheld = 0;
  for (const finding of findings) {
    const fix = finding.fixes.find((candidate) => candidate.preferred);
    if (!fix) continue;
    // Only edits of the circuit's own files can be re-checked.
    const unverifiable = fix.edits.some((edit) => !session.circuit.files.has(edit.uri));
    if (unverifiable || fix.edits.some((edit) => taken.some((other) => clash(edit, other)))) {
      withheld++;
      continue;
    }
    taken.push(...fix.edits);
    candidates.push({ finding, fix });
  }
  // A single fix was verified on its own already.
  if (candidates.length <= 1 || passes(session, candidates)) return combined(candidates, withheld);
  const kept: Candidate[] = [];
  for (const candidate of candidates) {
    const trial = [...kept, candidate];
    if (trial.length === 1 || passes(session, trial)) kept.push(candidate);
    else withheld++;
  }
  return combined(kept, withheld);
}

/** One re-check of the fixes applied together: every one of their findings gone, and nothing new. */
function passes(session: FixSession, candidates: readonly Candidate[]): boolean {
  if (!session.canVerify()) return false;
  const rechecked = session.recheck(candidates.flatMap(({ fix }) => fix.edits));
  if (!rechecked.ok) return false;
  const remains = session.remainsAmong(rechecked.verified);
  return !candidates.some(({ finding }) => remains(finding)) && !session.bringsNew(rechecked.verified);
}

function combined(candidates: readonly Candidate[], withheld: number): CombinedFixes {
  return { edits: candidates.flatMap(({ fix }) => fix.edits), titles: candidates.map(({ fix }) => fix.title), withheld };
}
