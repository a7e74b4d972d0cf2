// The two ways into the fixes: a FixProvider that checkCircuit calls for each finding's
// request while it checks, and attachVerifiedFixes, which takes a finished check and gives
// its findings their fixes afterwards (cheaper: the finished check is the baseline, fixes
// are built only for findings that survived suppression, and every finding about an
// element gets its ignore fix). Both build the same fixes the same way.
import type { CheckResult, CornerPlan, FixProvider, FixRequest } from '../checks/index.js';
import { checkCircuit } from '../checks/index.js';
import type { Circuit, FileReader } from '../netlist/circuit.js';
import type { WorkspaceConfig } from '../config.js';
import type { Finding, Fix } from '../findings.js';
import type { Settings } from '../settings.js';
import { flipDiodeCandidate } from './flip-diode.js';
import { guardDiodeCandidate } from './guard-diode.js';
import { ignoreFix, verifiedIgnore, verifiedIgnoreFixes } from './ignore.js';
import { currentLimitFixes, SeriesResistorSearch } from './series-resistor.js';
import { SinkResistorSearch } from './sink-resistor.js';
import { verifyIndependent, type FixCandidate } from './together.js';
import { FixSession, type FixOptions, type FixStatistics, type Verdict, type Verified } from './verify.js';
import { zenerWindowFixes, ZenerWindowSearch } from './zener-resistor.js';

/** Most urgent first. */
const SEVERITIES: readonly Finding['severity'][] = ['error', 'warning', 'info'];

export interface RequestedFixes {
  fixes: Fix[];
  /** A sentence for the finding's message when no fix can exist (a zener with no window). */
  note?: string;
}

/** The verified fixes for one request (at most one of each kind; none that failed its re-check). */
export function fixesForRequest(session: FixSession, request: FixRequest, finding: Finding, plans: readonly CornerPlan[]): RequestedFixes {
  if (!session.canVerify() && request.kind !== 'ignore') {
    session.statistics.skipped++;
    return { fixes: [] };
  }
  switch (request.kind) {
    case 'limit-current':
      return { fixes: currentLimitFixes(session, request, finding, plans) };
    case 'zener-window':
      return zenerWindowFixes(session, request, finding, plans);
    case 'flip-diode':
    case 'anti-parallel-diode': {
      const candidate = request.kind === 'flip-diode' ? flipDiodeCandidate(session, request, finding) : guardDiodeCandidate(session, request, finding);
      if (!candidate) return { fixes: [] };
      const verdict = session.verify(candidate.edits, finding);
      if (verdict.ok) return { fixes: [candidate.titled(verdict.verified)] };
      const note = verdict.reason === 'new-finding' && verdict.rechecked ? withheldNote(session, verdict.rechecked, request.kind) : undefined;
      return note ? { fixes: [], note } : { fixes: [] };
    }
    case 'ignore': {
      const fix = ignoreFix(session, finding, request.rule, request.element);
      return { fixes: fix && verifiedIgnore(session, fix, finding) ? [fix] : [] };
    }
  }
}

/** A fix searched value by value: the next candidate to re-check, then its verdict, until there is none. */
interface ValueSearch {
  next(): FixCandidate | undefined;
  take(verdict: Verdict): void;
}

/** Runs searches round by round: each round re-checks one candidate of every search still going, together where they are independent. */
function searchTogether(session: FixSession, searches: readonly ValueSearch[]): void {
  for (;;) {
    const round = searches.flatMap((search) => {
      const candidate = search.next();
      return candidate ? [{ search, candidate }] : [];
    });
    if (round.length === 0) return;
    const verdicts = verifyIndependent(
      session,
      round.map((each) => each.candidate),
    );
    round.forEach(({ search }, index) => search.take(verdicts[index]!));
  }
}

/**
 * Why the obvious fix is not offered, when its re-check brought a new problem: the user would
 * otherwise wonder why a reversed part gets no turn-around fix.
 */
function withheldNote(session: FixSession, rechecked: Verified, kind: 'flip-diode' | 'anti-parallel-diode'): string | undefined {
  const found = session.newFindings(rechecked).aboutElements[0];
  if (!found) return undefined;
  const what = kind === 'flip-diode' ? 'Turning it around' : 'A guard diode across it';
  return ` ${what} is not offered as a fix: the re-check then reports ${found.rule} for ${found.element}.`;
}

/** Exactly one preferred fix when any real fix exists: the first; the ignore fix never is. */
function ranked(fixes: Fix[]): Fix[] {
  let preferredTaken = false;
  return fixes.map((fix) => {
    const preferred = fix.preferred && !preferredTaken;
    if (preferred) preferredTaken = true;
    return fix.preferred === preferred ? fix : { ...fix, preferred };
  });
}

export type StatisticsProvider = FixProvider & { readonly statistics: FixStatistics };

/**
 * A FixProvider for `checkCircuit(circuit, settings, config, { fixProvider })`. The first call
 * for a circuit checks it once without fixes, as the baseline that re-checks are compared with.
 * When no fix can exist it adds the reason to the finding's message. The budget in `options`
 * covers every call of this provider: make one per analysis.
 */
export function createFixProvider(reader: FileReader, config: WorkspaceConfig | undefined, options: FixOptions = {}): StatisticsProvider {
  const sessions = new WeakMap<Circuit, FixSession>();
  const statistics: FixStatistics = { verifications: 0, rejected: 0, skipped: 0, milliseconds: 0 };
  const provider = (request: FixRequest, finding: Finding, context: { circuit: Circuit; settings: Settings; plans: readonly CornerPlan[] }): Fix[] => {
    let session = sessions.get(context.circuit);
    if (!session) {
      const started = performance.now();
      const baseline = checkCircuit(context.circuit, context.settings, config, options.cancellation ? { cancellation: options.cancellation } : {});
      statistics.milliseconds += performance.now() - started;
      session = new FixSession(context.circuit, baseline.findings, reader, context.settings, config, options, statistics);
      sessions.set(context.circuit, session);
    }
    const result = fixesForRequest(session, request, finding, context.plans);
    if (result.note) finding.message += result.note;
    const fixes = [...result.fixes];
    if (request.kind !== 'ignore') {
      const ignore = ignoreFix(session, finding);
      if (ignore && verifiedIgnore(session, ignore, finding)) fixes.push(ignore);
    }
    return ranked(fixes);
  };
  return Object.assign(provider, { statistics });
}

export interface AttachedFixes {
  /** The check's findings, in order, each with its verified fixes (and any note in its message). */
  findings: Finding[];
  statistics: FixStatistics;
}

/**
 * Gives a finished check's findings their verified fixes: each recorded request's fixes,
 * then an ignore fix for every finding about an element. `settings` are the ones the check
 * ran with; `circuit` is the circuit it checked (its `files` hold every text read).
 */
export function attachVerifiedFixes(
  check: CheckResult,
  circuit: Circuit,
  reader: FileReader,
  settings: Settings,
  config: WorkspaceConfig | undefined,
  options: FixOptions = {},
): AttachedFixes {
  const session = new FixSession(circuit, check.findings, reader, settings, config, options);
  const requests = new Map<Finding, FixRequest[]>();
  for (const { finding, request } of check.fixRequests) {
    const list = requests.get(finding) ?? [];
    list.push(request);
    requests.set(finding, list);
  }
  // Errors first, so that a spent budget leaves the lesser findings without fixes rather than the worst.
  const built = new Map<Finding, RequestedFixes[]>();
  for (const severity of SEVERITIES) {
    // Flips and guard diodes first: built, then verified together where they cannot affect
    // each other (together.ts), a few re-checks for any number of them. Then the requests
    // whose values are searched re-check by re-check, one at a time.
    const waiting: { slot: RequestedFixes; candidate: FixCandidate; kind: 'flip-diode' | 'anti-parallel-diode' }[] = [];
    const searched: { slot: RequestedFixes; request: FixRequest; finding: Finding }[] = [];
    for (const finding of check.findings) {
      if (finding.severity !== severity) continue;
      const slots = (requests.get(finding) ?? []).map((request) => {
        const slot: RequestedFixes = { fixes: [] };
        if (request.kind !== 'flip-diode' && request.kind !== 'anti-parallel-diode') searched.push({ slot, request, finding });
        else if (!session.canVerify()) session.statistics.skipped++;
        else {
          const candidate = request.kind === 'flip-diode' ? flipDiodeCandidate(session, request, finding) : guardDiodeCandidate(session, request, finding);
          if (candidate) waiting.push({ slot, candidate, kind: request.kind });
        }
        return slot;
      });
      built.set(finding, slots);
    }
    const verdicts = verifyIndependent(
      session,
      waiting.map((each) => each.candidate),
    );
    waiting.forEach(({ slot, candidate, kind }, index) => {
      const verdict = verdicts[index]!;
      if (verdict.ok) slot.fixes.push(candidate.titled(verdict.verified));
      else if (verdict.reason === 'new-finding' && verdict.rechecked) slot.note = withheldNote(session, verdict.rechecked, kind);
    });
    // Series, sink and zener feed resistors are searched value by value; the searches share their
    // re-checks, one candidate from each per round, where their regions cannot see each other.
    const searches: { search: ValueSearch; settle: () => void }[] = [];
    for (const { slot, request, finding } of searched) {
      if (request.kind === 'limit-current' && session.canVerify()) {
        // A current sink sets the current: its own resistor is the one to change (sink-resistor.ts).
        const search = request.currentSetter ? SinkResistorSearch.start(session, request, finding, check.cornerPlans) : SeriesResistorSearch.start(session, request, finding, check.cornerPlans);
        if (search) searches.push({ search, settle: () => slot.fixes.push(...search.fixes()) });
      } else if (request.kind === 'zener-window' && session.canVerify()) {
        const started = ZenerWindowSearch.start(session, request, finding, check.cornerPlans);
        if (started instanceof ZenerWindowSearch) searches.push({ search: started, settle: () => Object.assign(slot, started.result()) });
        else Object.assign(slot, started);
      } else Object.assign(slot, fixesForRequest(session, request, finding, check.cornerPlans));
    }
    searchTogether(session, searches.map((each) => each.search));
    for (const { settle } of searches) settle();
  }
  const findings = check.findings.map((finding) => {
    const results = built.get(finding) ?? [];
    const message = finding.message + results.map((result) => result.note ?? '').join('');
    return { ...finding, message, fixes: [...finding.fixes, ...results.flatMap((result) => result.fixes)] };
  });
  // The ignore fixes need no re-simulation (one elaboration for all): past the budget too, but not once cancelled.
  const ignores = options.cancellation?.isCancellationRequested ? [] : verifiedIgnoreFixes(session, check.findings);
  return {
    findings: findings.map((finding, index) => {
      const ignore = ignores[index];
      return { ...finding, fixes: ranked(ignore ? [...finding.fixes, ignore] : finding.fixes) };
    }),
    statistics: session.statistics,
  };
}
