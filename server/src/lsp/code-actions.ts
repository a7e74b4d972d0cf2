// Code actions: each finding's fixes (verified by re-simulation in the analysis' second
// phase, which a request waits for a little) as quick fixes, one ignore directive for the
// finding's line and one for the whole file, and `source.fixAll.pnlint` applying every
// preferred fix at once.
import type { TextDocument } from 'vscode-languageserver-textdocument';
import {
  CodeActionKind,
  type CodeAction,
  type CodeActionParams,
  type Diagnostic,
  type TextEdit as LspTextEdit,
  type WorkspaceEdit,
} from 'vscode-languageserver';
import type { Finding, Fix } from '../findings.js';
import type { Checked } from './checking.js';
import type { FeatureContext } from './context.js';
import { isFindingReference, SOURCE, type FindingReference } from './diagnostics.js';
import { toLspRange } from './positions.js';
import { forEachStatement } from './syntax.js';
import { uriKey } from './workspace.js';

export const FIX_ALL_KIND = `${CodeActionKind.SourceFixAll}.pnlint`;

/** Rules that a directive cannot silence: a line that does not parse is not checked at all. */
const UNIGNORABLE_RULES = new Set(['syntax']);

/**
 * How long a code-action request waits for the fixes still being built (ours: the fixes'
 * own budget, FIX_BUDGET_MILLISECONDS = 1.5 s in server/src/fixes, and some room for a
 * loaded machine). After that it answers with what there is.
 */
export const FIXES_WAIT_MILLISECONDS = 2_000;

/** An ignore directive's insertion (`*pnlint: ignore <rule>`; not `ignore-file`). */
const IGNORE_DIRECTIVE = /^[ \t]*\*pnlint:[ \t]*ignore[ \t]/i;

/** A fix whose every edit inserts an ignore directive: the fixes module's own ignore fix. */
export function isIgnoreFix(fix: Fix): boolean {
  return fix.edits.length > 0 && fix.edits.every((edit) => IGNORE_DIRECTIVE.test(edit.newText));
}

export interface CodeActionOptions {
  /** The client accepts `documentChanges` with versions (so that a stale edit is refused). */
  versionedEdits: boolean;
}

/** Resolves when every check's fixes are in, or after the wait, whichever is first. */
async function fixesOf(checks: Iterable<Checked>, waitMilliseconds: number): Promise<void> {
  const waiting = [...new Set(checks)].filter((checked) => !checked.fixesReady).map((checked) => checked.fixesSettled);
  if (waiting.length === 0) return;
  let timer: NodeJS.Timeout | undefined;
  const timeout = new Promise<void>((resolve) => (timer = setTimeout(resolve, waitMilliseconds)));
  await Promise.race([Promise.all(waiting), timeout]);
  clearTimeout(timer);
}

export async function codeActions(context: FeatureContext, params: CodeActionParams, options: CodeActionOptions): Promise<CodeAction[]> {
  const wanted = params.context.only;
  const wants = (kind: string) => !wanted || wanted.some((only) => kind === only || kind.startsWith(`${only}.`));
  const quickFixes = wants(CodeActionKind.QuickFix) ? params.context.diagnostics.filter((d) => d.source === SOURCE && isFindingReference(d.data)) : [];
  const fixAll = wants(FIX_ALL_KIND);

  // The fixes of the checks these diagnostics came from may still be in the making: wait for them a little.
  const open = context.documents.get(params.textDocument.uri);
  const checks: Checked[] = [];
  for (const diagnostic of quickFixes) {
    const reference = diagnostic.data as FindingReference;
    const checked = context.checker.latest(reference.analyzed);
    if (checked && checked.version === reference.version) checks.push(checked);
  }
  const own = open && fixAll ? context.current(open) : undefined;
  if (own) checks.push(own);
  await fixesOf(checks, FIXES_WAIT_MILLISECONDS);

  // Read everything again after the wait: the text may have changed meanwhile.
  const document = context.documents.get(params.textDocument.uri);
  if (!document) return [];
  const actions: CodeAction[] = [];
  for (const diagnostic of quickFixes) {
    const reference = diagnostic.data as FindingReference;
    const checked = context.checker.latest(reference.analyzed);
    // Edits are placed by the text they were computed from: none from an older text.
    if (!checked || checked.version !== reference.version || !isCurrent(context, checked)) continue;
    const finding = checked.findings[reference.index];
    if (!finding) continue;
    for (const fix of finding.fixes) {
      actions.push({
        title: fix.title,
        kind: CodeActionKind.QuickFix,
        diagnostics: [diagnostic],
        isPreferred: fix.preferred,
        edit: workspaceEdit(context, fix.edits.map(toLspEdit), options),
      });
    }
    actions.push(...ignoreActions(context, document, finding, diagnostic, options));
  }

  if (fixAll) {
    const action = fixAllAction(context, document, options);
    if (action) actions.push(action);
  }
  return actions;
}

/** True when every file the analysis read from an editor still has the version it read. */
function isCurrent(context: FeatureContext, checked: Checked): boolean {
  for (const [uri, version] of checked.versionsRead) {
    if (context.workspace.openDocument(uri)?.version !== version) return false;
  }
  const main = context.documents.get(checked.uri);
  return main?.version === checked.version;
}

function toLspEdit(edit: { uri: string; range: Parameters<typeof toLspRange>[0]; newText: string }): LspTextEdit & { uri: string } {
  return { uri: edit.uri, range: toLspRange(edit.range), newText: edit.newText };
}

function workspaceEdit(context: FeatureContext, edits: (LspTextEdit & { uri: string })[], options: CodeActionOptions): WorkspaceEdit {
  const byUri = new Map<string, LspTextEdit[]>();
  for (const { uri, range, newText } of edits) {
    const target = context.workspace.openDocument(uri)?.uri ?? uri;
    let list = byUri.get(target);
    if (!list) byUri.set(target, (list = []));
    list.push({ range, newText });
  }
  if (options.versionedEdits) {
    return {
      documentChanges: [...byUri].map(([uri, list]) => ({
        textDocument: { uri, version: context.workspace.openDocument(uri)?.version ?? null },
        edits: list,
      })),
    };
  }
  return { changes: Object.fromEntries(byUri) };
}

/** The end-of-line the document already uses. */
function lineEnding(document: TextDocument): string {
  return document.getText().includes('\r\n') ? '\r\n' : '\n';
}

function ignoreActions(context: FeatureContext, document: TextDocument, finding: Finding, diagnostic: Diagnostic, options: CodeActionOptions): CodeAction[] {
  if (UNIGNORABLE_RULES.has(finding.rule)) return [];
  const open = context.workspace.openDocument(finding.location.uri);
  const findingDocument = open ? context.documents.get(open.uri) : undefined;
  // A directive goes into the file the finding is in; it can only be written there if it is open.
  if (!findingDocument) return [];
  const eol = lineEnding(findingDocument);
  const actions: CodeAction[] = [];
  const isAnalysed = uriKey(findingDocument.uri) === uriKey(document.uri);
  // The fixes module's ignore fix, when it offered one, is the finding's line ignore: offer one, not two.
  const elementLine = finding.fixes.some(isIgnoreFix) ? undefined : elementLineAt(context, findingDocument, isAnalysed, finding.location.range.start.line);
  if (elementLine !== undefined) {
    const text = findingDocument.getText({ start: { line: elementLine, character: 0 }, end: { line: elementLine + 1, character: 0 } });
    const indentation = /^[ \t]*/.exec(text)![0];
    actions.push({
      title: `Ignore ${finding.rule} on this line (add a pnlint directive above it)`,
      kind: CodeActionKind.QuickFix,
      diagnostics: [diagnostic],
      edit: workspaceEdit(
        context,
        [{ uri: findingDocument.uri, range: { start: { line: elementLine, character: 0 }, end: { line: elementLine, character: 0 } }, newText: `${indentation}*pnlint: ignore ${finding.rule} -- ${eol}` }],
        options,
      ),
    });
  }
  // A netlist's first line is its title, so the directive goes below it; a library has no title.
  const fileLine = isAnalysed && !context.checker.isLibrary(findingDocument.uri) && findingDocument.lineCount > 1 ? 1 : 0;
  actions.push({
    title: `Ignore ${finding.rule} in this whole file`,
    kind: CodeActionKind.QuickFix,
    diagnostics: [diagnostic],
    edit: workspaceEdit(
      context,
      [{ uri: findingDocument.uri, range: { start: { line: fileLine, character: 0 }, end: { line: fileLine, character: 0 } }, newText: `*pnlint: ignore-file ${finding.rule} -- ${eol}` }],
      options,
    ),
  });
  return actions;
}

/** The first line of the element statement covering `line`, if an element is written there. */
function elementLineAt(context: FeatureContext, document: TextDocument, isAnalysed: boolean, line: number): number | undefined {
  const syntax = isAnalysed ? context.syntax(document) : context.includedSyntax.get(document.uri, document.getText());
  let found: number | undefined;
  forEachStatement(syntax.statements, (statement) => {
    if (found !== undefined || statement.kind !== 'element') return;
    const first = syntax.lines.lineOf(statement.span.start);
    if (first <= line && syntax.lines.lineOf(statement.span.end) >= line) found = first;
  });
  return found;
}

/**
 * Every preferred fix of the document's findings at once, as the analysis verified them
 * together (server/src/fixes/combined.ts): none that overlaps another, and none that a
 * re-check of the combination turned down.
 */
function fixAllAction(context: FeatureContext, document: TextDocument, options: CodeActionOptions): CodeAction | undefined {
  const checked = context.current(document);
  if (!checked || !checked.fixAll || !isCurrent(context, checked)) return undefined;
  const fixes = checked.fixAll.titles.length;
  if (fixes === 0) return undefined;
  return { title: `Apply all ${fixes} preferred pnlint fix${fixes === 1 ? '' : 'es'}`, kind: FIX_ALL_KIND, edit: workspaceEdit(context, checked.fixAll.edits.map(toLspEdit), options) };
}

