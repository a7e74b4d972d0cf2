// Re-simulation of a candidate fix: its edits applied to copies of the files, the copy
// elaborated and checked again (without fixes, so no recursion), and the result compared
// with the original check. A fix is kept only if its finding is gone and nothing new
// appeared. Findings are compared by rule, element and kind, not by position, since the
// inserted lines move everything below them. Bounded: a number of re-checks and a time
// budget per analysis, and the caller's cancellation.
import type { Circuit, FileReader, NetlistDiagnostic } from '../netlist/circuit.js';
import { elaborate, type ElaborateOptions } from '../netlist/index.js';
import { checkCircuit, type CheckResult } from '../checks/index.js';
import { readDirectives } from '../checks/directives.js';
import { applySuppressions } from '../checks/suppression.js';
import type { WorkspaceConfig } from '../config.js';
import { applyEdits } from '../edits.js';
import type { Finding, TextEdit } from '../findings.js';
import type { Settings } from '../settings.js';
import type { CancellationToken } from '../sim/types.js';
import { NameRegistry } from './names.js';
import { SourceFiles } from './source-text.js';

/** Re-checks allowed for the fixes of one analysis (ours: a few per finding for a handful of findings). */
export const MAXIMUM_VERIFICATIONS = 40;
/** Wall-clock budget for all the fixes of one analysis (ours: keeps a check with fixes near a second). */
export const FIX_BUDGET_MILLISECONDS = 1500;

export interface FixOptions {
  /** The options the circuit was first elaborated with (restricted mode), used again for each copy. */
  elaborate?: ElaborateOptions;
  cancellation?: CancellationToken;
  /** Re-checks allowed for one analysis; default MAXIMUM_VERIFICATIONS. */
  maximumVerifications?: number;
  /** Wall-clock budget for all fixes of one analysis, ms; default FIX_BUDGET_MILLISECONDS. */
  budgetMilliseconds?: number;
}

/** What the fixes of one analysis cost, for the log and the benchmark. */
export interface FixStatistics {
  /** Full re-checks run (each elaborates and solves every corner). */
  verifications: number;
  /** Candidate fixes rejected by their re-check. */
  rejected: number;
  /** Requests left without a fix because the budget ran out or the analysis was cancelled. */
  skipped: number;
  milliseconds: number;
}

export interface Verified {
  circuit: Circuit;
  check: CheckResult;
}

export type Verdict =
  | { ok: true; verified: Verified }
  /** `rechecked`: the copy's check, when it got that far (a value that fell short says by how much). */
  | { ok: false; reason: 'target-remains' | 'new-finding' | 'edit-failed' | 'budget'; rechecked?: Verified };

/** One analysis' worth of fix building: the original circuit, its findings, and the budget. */
export class FixSession {
  readonly files: SourceFiles;
  private readonly baseline: KnownFindings;
  private readonly deadline: number;
  private readonly maximumVerifications: number;
  private originalDirectiveProblems: number | undefined;
  private nameRegistry: NameRegistry | undefined;

  constructor(
    readonly circuit: Circuit,
    baselineFindings: readonly Finding[],
    private readonly reader: FileReader,
    readonly settings: Settings,
    readonly config: WorkspaceConfig | undefined,
    readonly options: FixOptions,
    /** Shared when several sessions spend one analysis' budget (the provider's case). */
    readonly statistics: FixStatistics = { verifications: 0, rejected: 0, skipped: 0, milliseconds: 0 },
  ) {
    this.files = new SourceFiles(circuit);
    this.baseline = new KnownFindings(baselineFindings, circuit);
    this.deadline = performance.now() + (options.budgetMilliseconds ?? FIX_BUDGET_MILLISECONDS);
    this.maximumVerifications = options.maximumVerifications ?? MAXIMUM_VERIFICATIONS;
  }

  /** The names already taken in the circuit's files, gathered when a fix first needs a new name. */
  get names(): NameRegistry {
    this.nameRegistry ??= NameRegistry.of(this.circuit, this.files);
    return this.nameRegistry;
  }

  /** False once the budget is spent or the analysis is cancelled. */
  canVerify(): boolean {
    return !this.options.cancellation?.isCancellationRequested && this.statistics.verifications < this.maximumVerifications && performance.now() < this.deadline;
  }

  /** The circuit elaborated from the files with `edits` applied; undefined if an edit does not apply. */
  elaborateEdited(edits: readonly TextEdit[]): Circuit | undefined {
    const texts = new Map<string, string>();
    for (const uri of new Set(edits.map((edit) => edit.uri))) {
      const original = this.circuit.files.get(uri);
      if (original === undefined) return undefined;
      const edited = applyEdits(original, edits.filter((edit) => edit.uri === uri));
      if (edited === undefined) return undefined;
      texts.set(uri, edited);
    }
    const reader: FileReader = {
      read: (uri) => texts.get(uri) ?? this.circuit.files.get(uri) ?? this.reader.read(uri),
      resolve: (from, path) => this.reader.resolve(from, path),
    };
    const top = texts.get(this.circuit.uri) ?? this.circuit.files.get(this.circuit.uri);
    if (top === undefined) return undefined;
    return elaborate(this.circuit.uri, top, reader, this.options.elaborate ?? {});
  }

  /** Applies the edits to copies, re-checks, and says whether `target` is gone with nothing new. */
  verify(edits: readonly TextEdit[], target: Finding): Verdict {
    const rechecked = this.recheck(edits);
    if (!rechecked.ok) {
      if (rechecked.reason === 'budget') this.statistics.skipped++;
      else this.statistics.rejected++;
      return rechecked;
    }
    const verified = rechecked.verified;
    if (this.remains(verified, target)) return this.reject('target-remains', verified);
    if (this.bringsNew(verified)) return this.reject('new-finding', verified);
    return { ok: true, verified };
  }

  /**
   * One re-check: the edits applied to copies, the copy elaborated and checked in full (it
   * counts as one verification, whatever number of fixes it carries). `budget` when the
   * budget was spent before it could start, or the analysis was cancelled while it ran.
   */
  recheck(edits: readonly TextEdit[]): { ok: true; verified: Verified } | { ok: false; reason: 'edit-failed' | 'budget' } {
    if (!this.canVerify()) return { ok: false, reason: 'budget' };
    const started = performance.now();
    try {
      this.statistics.verifications++;
      const circuit = this.elaborateEdited(edits);
      if (!circuit) return { ok: false, reason: 'edit-failed' };
      const check = checkCircuit(circuit, this.settings, this.config, this.options.cancellation ? { cancellation: this.options.cancellation } : {});
      // A cancelled check is incomplete: its missing findings prove nothing.
      if (this.options.cancellation?.isCancellationRequested) return { ok: false, reason: 'budget' };
      return { ok: true, verified: { circuit, check } };
    } finally {
      this.statistics.milliseconds += performance.now() - started;
    }
  }

  /** Whether the re-check still reports the target's problem. */
  remains(verified: Verified, target: Finding): boolean {
    return verified.check.findings.some((finding) => sameProblem(finding, target));
  }

  /** `remains` for many targets judged against one re-check: its findings indexed once. */
  remainsAmong(verified: Verified): (target: Finding) => boolean {
    const problems = new Set<string>();
    for (const finding of verified.check.findings) {
      if (finding.element !== undefined) problems.add(elementProblem(finding.rule, finding.element));
      problems.add(findingKey(finding));
    }
    return (target) => problems.has(target.element !== undefined ? elementProblem(target.rule, target.element) : findingKey(target));
  }

  /** Whether the re-check reports anything the original check did not. */
  bringsNew(verified: Verified): boolean {
    const found = this.newFindings(verified);
    return found.otherwise || found.aboutElements.length > 0;
  }

  /** What the re-check reports that the original check did not. */
  newFindings(verified: Verified): NewFindings {
    return this.baseline.newIn(verified.check.findings, verified.circuit);
  }

  /**
   * An ignore directive needs no re-simulation: the copy is elaborated and its directives read.
   * Says which findings it suppresses, and whether it brought a directive diagnostic with it.
   */
  suppresses(edits: readonly TextEdit[], findings: readonly Finding[]): { suppressed: boolean[]; directiveProblems: boolean } {
    const circuit = this.elaborateEdited(edits);
    if (!circuit) return { suppressed: findings.map(() => false), directiveProblems: true };
    const directives = readDirectives(circuit);
    this.originalDirectiveProblems ??= readDirectives(this.circuit).findings.length;
    const directiveProblems = directives.findings.length > this.originalDirectiveProblems;
    // One pass over all of them: applySuppressions keeps what no directive silences.
    const kept = new Set(applySuppressions([...findings], circuit, directives, this.config));
    return { suppressed: findings.map((finding) => !kept.has(finding)), directiveProblems };
  }

  /** Counts a candidate fix that its re-check turned down. */
  reject(reason: 'target-remains' | 'new-finding' | 'edit-failed', rechecked?: Verified): Verdict {
    this.statistics.rejected++;
    return rechecked ? { ok: false, reason, rechecked } : { ok: false, reason };
  }
}

/** The same problem: rule and element, or for a finding with no element, its kind. */
export function sameProblem(finding: Finding, target: Finding): boolean {
  if (finding.rule !== target.rule) return false;
  if (target.element !== undefined) return finding.element !== undefined && finding.element.toLowerCase() === target.element.toLowerCase();
  return findingKey(finding) === findingKey(target);
}

/** The key `sameProblem` compares for a target about an element (`|` is in no rule id). */
const elementProblem = (rule: string, element: string) => `${rule}|element|${element.toLowerCase()}`;

/**
 * What identifies a finding across an edit: its rule, element and severity; a finding with no
 * element (a caution, a directive or netlist diagnostic) by its message with the numbers
 * taken out, since line numbers and values move.
 */
export function findingKey(finding: Pick<Finding, 'rule' | 'severity' | 'message' | 'element'>): string {
  if (finding.element !== undefined) return `${finding.rule}|${finding.severity}|${finding.element.toLowerCase()}`;
  return `${finding.rule}|${finding.severity}|${withoutNumbers(finding.message)}`;
}

/** A number, with the space and SI prefix before a unit symbol: `13.8 mA` and `980 µA` both become `#A`. */
const NUMBER_WITH_PREFIX = /[-−]?\d+(?:\.\d+)?(?:e[-+]?\d+)?(?:\s?[fpnµumkMGT]?(?=[ΩVAWHF%°]))?/g;

function withoutNumbers(message: string): string {
  return message.replace(NUMBER_WITH_PREFIX, '#');
}

/** How grave a severity is: a finding that comes back graver than it was is new. */
const GRAVITY: Readonly<Record<Finding['severity'], number>> = { info: 0, warning: 1, error: 2 };

/**
 * The original check's findings, for telling what a re-check adds. A finding about an element
 * is known when the original had one of the same rule about that element, or naming it among
 * the elements of its kind that it is about (a finding about a group of LEDs is filed under the
 * first of them, which a fix may take out of the group), at the same severity or a graver one:
 * a problem that a fix makes milder (an error that is now a warning) is not new. Other findings
 * and netlist diagnostics are counted by their key.
 */
class KnownFindings {
  /** By rule: every element the original's findings of that rule are about or name in their group, with the gravest severity. */
  private readonly known = new Map<string, Map<string, number>>();
  private readonly counts: Map<string, number>;

  constructor(findings: readonly Finding[], circuit: Circuit) {
    const names = elementNames(circuit);
    for (const finding of findings) {
      if (finding.element === undefined) continue;
      let known = this.known.get(finding.rule);
      if (!known) this.known.set(finding.rule, (known = new Map()));
      const gravity = GRAVITY[finding.severity];
      for (const element of groupOf(finding, names)) known.set(element, Math.max(gravity, known.get(element) ?? -1));
    }
    this.counts = countKeys(findings, circuit.diagnostics);
  }

  /**
   * What a re-check reports that the original did not: the new findings about elements, and
   * whether anything else is new (a finding with no element, a netlist diagnostic).
   */
  newIn(findings: readonly Finding[], circuit: Circuit): NewFindings {
    const aboutElements: Finding[] = [];
    for (const finding of findings) {
      if (finding.element === undefined) continue;
      const known = this.known.get(finding.rule)?.get(finding.element.toLowerCase());
      if (known === undefined || GRAVITY[finding.severity] > known) aboutElements.push(finding);
    }
    let otherwise = false;
    for (const [key, count] of countKeys(findings, circuit.diagnostics)) {
      if (count > (this.counts.get(key) ?? 0)) otherwise = true;
    }
    return { aboutElements, otherwise };
  }
}

/** What a re-check brought that the original check did not have. */
export interface NewFindings {
  aboutElements: Finding[];
  /** A new finding with no element, or a new netlist diagnostic. */
  otherwise: boolean;
}

function elementNames(circuit: Circuit): Set<string> {
  return new Set(circuit.elements.map((element) => element.name.toLowerCase()));
}

/** The finding's element and the elements of the same letter that its message names. */
function groupOf(finding: Finding, names: ReadonlySet<string>): Set<string> {
  const own = finding.element!.toLowerCase();
  const group = new Set([own]);
  const letter = own.slice(own.lastIndexOf('.') + 1, own.lastIndexOf('.') + 2);
  for (const word of finding.message.toLowerCase().match(/[\w.]+/g) ?? []) {
    const name = word.replace(/\.+$/, '');
    if (names.has(name) && name.slice(name.lastIndexOf('.') + 1).startsWith(letter)) group.add(name);
  }
  return group;
}

/** Findings with no element, and netlist diagnostics, by key. */
function countKeys(findings: readonly Finding[], diagnostics: readonly NetlistDiagnostic[]): Map<string, number> {
  const counts = new Map<string, number>();
  const add = (key: string) => counts.set(key, (counts.get(key) ?? 0) + 1);
  for (const finding of findings) if (finding.element === undefined) add(findingKey(finding));
  for (const diagnostic of diagnostics) add(`netlist:${findingKey({ rule: diagnostic.code, severity: diagnostic.severity, message: diagnostic.message })}`);
  return counts;
}
