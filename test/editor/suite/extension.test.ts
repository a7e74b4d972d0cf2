// The extension inside a real VS Code: the workspace is a copy of
// test/editor/fixtures/ (netlists of this project's own invention), and every
// check goes through VS Code's public API, as another extension would see it.
import * as assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, realpathSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import * as vscode from 'vscode';

const EXTENSION_ID = 'pnlint.pnlint';
const LED_RULE = 'led-current-unlimited';
/** The LED's forward-current rating, from the fixture's own `*pnlint: rating ... if=20m` directive. */
const LED_RATING_AMPERES = 20e-3;
/** Below about 1 mA an indicator LED is barely visible (common practice, no source). */
const LED_VISIBLE_AMPERES = 1e-3;
/** How long to wait for the server's answer after opening or editing (generous: 2 shared cores). */
const ANALYSIS_WAIT_MILLISECONDS = 20_000;

interface PnlintApi {
  client(): { isRunning(): boolean } | undefined;
  status(uri: vscode.Uri): { errors: number; warnings: number; milliseconds: number } | undefined;
  statusBarText(): string;
}

function workspaceFile(name: string): vscode.Uri {
  const folder = vscode.workspace.workspaceFolders?.[0];
  assert.ok(folder, 'the editor test opens a workspace folder');
  return vscode.Uri.joinPath(folder.uri, name);
}

async function openNetlist(name: string): Promise<vscode.TextEditor> {
  const document = await vscode.workspace.openTextDocument(workspaceFile(name));
  return vscode.window.showTextDocument(document);
}

async function waitFor<T>(
  what: string,
  probe: () => T | undefined | false,
  milliseconds = ANALYSIS_WAIT_MILLISECONDS,
  seen: () => string = () => '',
): Promise<T> {
  const deadline = Date.now() + milliseconds;
  for (;;) {
    const value = probe();
    if (value !== undefined && value !== false) return value;
    if (Date.now() > deadline) throw new Error(`timed out after ${milliseconds} ms waiting for ${what}${seen() ? `; ${seen()}` : ''}`);
    await new Promise((resolve) => setTimeout(resolve, 50));
  }
}

function pnlintDiagnostics(uri: vscode.Uri): vscode.Diagnostic[] {
  return vscode.languages.getDiagnostics(uri).filter((diagnostic) => diagnostic.source === 'pnlint');
}

function ruleOf(diagnostic: vscode.Diagnostic): string {
  return String(typeof diagnostic.code === 'object' ? diagnostic.code.value : diagnostic.code);
}

/** The 0-based line of the first line of `document` that starts with `prefix` (as the fixture was written). */
function lineStartingWith(document: vscode.TextDocument, prefix: string): number {
  for (let line = 0; line < document.lineCount; line++) {
    if (document.lineAt(line).text.startsWith(prefix)) return line;
  }
  throw new Error(`no line starts with ${JSON.stringify(prefix)}`);
}

async function ledFinding(document: vscode.TextDocument): Promise<vscode.Diagnostic> {
  return waitFor(
    `a ${LED_RULE} diagnostic in ${document.uri.path}`,
    () => pnlintDiagnostics(document.uri).find((diagnostic) => ruleOf(diagnostic) === LED_RULE),
    ANALYSIS_WAIT_MILLISECONDS,
    () => `diagnostics seen: ${JSON.stringify(vscode.languages.getDiagnostics(document.uri).map((d) => `${d.source}/${ruleOf(d)}: ${d.message}`))}`,
  );
}

async function revert(editor: vscode.TextEditor): Promise<void> {
  await vscode.window.showTextDocument(editor.document);
  await vscode.commands.executeCommand('workbench.action.files.revert');
}

function hoverText(hovers: vscode.Hover[]): string {
  return hovers
    .flatMap((hover) => hover.contents)
    .map((content) => (typeof content === 'string' ? content : content.value))
    .join('\n');
}

/** Marks a test as waiting for a server feature that has not landed; the harness lists these. */
function pending(context: Mocha.Context, reason: string): never {
  console.log(`PENDING: ${context.test?.title ?? 'a test'}: ${reason}`);
  context.skip();
}

/** The current drawn from V1 in `netlistText`, solved by ngspice (the reference engine), or undefined without ngspice. */
function ngspiceSupplyCurrent(netlistText: string): number | undefined {
  const folder = mkdtempSync(join(tmpdir(), 'pnlint-editor-'));
  const file = join(folder, 'fixed.cir');
  const control = ['.control', 'op', 'echo @@BEGIN', 'print i(v1)', 'echo @@END', 'quit', '.endc'].join('\n');
  writeFileSync(file, netlistText.replace(/^\.end\s*$/im, `${control}\n.end`));
  const result = spawnSync('ngspice', ['-n', '-b', file], { encoding: 'utf8', env: { ...process.env, LC_ALL: 'C' }, timeout: 20_000 });
  if (result.error) return undefined;
  const between = /@@BEGIN([\s\S]*)@@END/.exec(result.stdout ?? '')?.[1] ?? '';
  const value = /i\(v1\)\s+=\s+(\S+)/i.exec(between)?.[1];
  assert.ok(value, `ngspice solved the fixed netlist:\n${result.stdout}\n${result.stderr}`);
  // A source's current is negative when it delivers power (ngspice 39).
  return -Number(value);
}

describe('pnlint in a real VS Code', () => {
  let api: PnlintApi;

  before(async () => {
    const extension = vscode.extensions.getExtension<PnlintApi>(EXTENSION_ID);
    assert.ok(extension, `the extension ${EXTENSION_ID} is installed`);
    await openNetlist('led-without-resistor.cir');
    api = await extension.activate();
  });

  it('reads .cir files as SPICE netlists and registers its commands', async () => {
    const editor = await openNetlist('led-without-resistor.cir');
    assert.equal(editor.document.languageId, 'spice-netlist');
    const commands = await vscode.commands.getCommands(true);
    for (const command of ['pnlint.showOperatingPoint', 'pnlint.fixAll', 'pnlint.restartServer', 'pnlint.openRulePage']) {
      assert.ok(commands.includes(command), `command ${command} is registered`);
    }
    assert.equal(api.client()?.isRunning(), true, 'the language server is running');
    const include = await vscode.workspace.openTextDocument(workspaceFile('indicator-parts.inc'));
    assert.equal(include.languageId, 'spice-netlist', 'product.md: .inc files open as netlists too');
  });

  it('validates pnlint.json against the schema it ships', async () => {
    const document = await vscode.workspace.openTextDocument(workspaceFile('json-schema/pnlint.json'));
    await vscode.window.showTextDocument(document);
    // "E7" is no IEC 60063 series: the schema allows only E6, E12, E24, E48, E96 and E192.
    const problem = await waitFor('a schema diagnostic on "E7"', () =>
      vscode.languages.getDiagnostics(document.uri).find((d) => document.getText(d.range).includes('E7')));
    assert.ok(problem.severity <= vscode.DiagnosticSeverity.Warning);
  });

  it('marks the LED that has no current limit, as an error on its line', async () => {
    const { document } = await openNetlist('led-without-resistor.cir');
    const finding = await ledFinding(document);
    assert.equal(finding.severity, vscode.DiagnosticSeverity.Error, 'product.md: led-current-unlimited is an error');
    assert.equal(finding.range.start.line, lineStartingWith(document, 'D1 '));
  });

  it('links the finding to its rule page shipped with the extension', async () => {
    const { document } = await openNetlist('led-without-resistor.cir');
    const finding = await ledFinding(document);
    const extension = vscode.extensions.getExtension(EXTENSION_ID)!;
    const page = vscode.Uri.joinPath(extension.extensionUri, 'docs', 'rules', `${LED_RULE}.md`);
    await vscode.workspace.fs.stat(page); // throws when the page was not shipped
    assert.ok(typeof finding.code === 'object', 'the diagnostic code carries a link');
    // The same file, however the extension folder is reached (the server resolves symbolic links).
    assert.equal(realpathSync((finding.code as { target: vscode.Uri }).target.fsPath), realpathSync(page.fsPath));
  });

  it('opens the rule page of the finding under the cursor', async () => {
    const editor = await openNetlist('led-without-resistor.cir');
    const finding = await ledFinding(editor.document);
    const extension = vscode.extensions.getExtension(EXTENSION_ID)!;
    const page = vscode.Uri.joinPath(extension.extensionUri, 'docs', 'rules', `${LED_RULE}.md`);
    await vscode.workspace.fs.stat(page); // throws when the page was not shipped
    editor.selection = new vscode.Selection(finding.range.start, finding.range.start);
    await vscode.commands.executeCommand('pnlint.openRulePage');
    await waitFor('a preview tab of the rule page', () =>
      vscode.window.tabGroups.all.flatMap((group) => group.tabs).find((tab) => tab.label.includes(LED_RULE)));
  });

  it('reports the findings count and the solve time for the status bar', async () => {
    const { document } = await openNetlist('led-without-resistor.cir');
    await ledFinding(document);
    const status = await waitFor('a pnlint/status notification', () => api.status(document.uri));
    assert.ok(status.errors >= 1, 'at least the LED error is counted');
    assert.ok(status.milliseconds >= 0);
    assert.match(api.statusBarText(), /pnlint [1-9]\d* errors?, \d+ warnings? · [\d.]+ ms/);
  });

  it('explains the LED on hover, with its rating from the directive', async () => {
    const { document } = await openNetlist('led-without-resistor.cir');
    await ledFinding(document);
    const position = new vscode.Position(lineStartingWith(document, 'D1 '), 1);
    const hovers = await vscode.commands.executeCommand<vscode.Hover[]>('vscode.executeHoverProvider', document.uri, position);
    // The file name (led-without-resistor.cir) must not count as naming the kind.
    const text = hoverText(hovers).replaceAll('led-without-resistor', '');
    assert.match(text, /\bLED\b/i, 'the hover names the kind');
    // 20 mA: the fixture's own `*pnlint: rating DSTATUS kind=led if=20m`.
    assert.match(text, /20\s*mA/);
  });

  it('offers an ignore directive that silences the finding', async () => {
    const editor = await openNetlist('led-without-resistor.cir');
    const { document } = editor;
    const finding = await ledFinding(document);
    const actions = await vscode.commands.executeCommand<vscode.CodeAction[]>(
      'vscode.executeCodeActionProvider', document.uri, finding.range, vscode.CodeActionKind.QuickFix.value);
    const ignore = actions.find((action) => /ignore/i.test(action.title) && action.edit);
    assert.ok(ignore, `an ignore action among: ${actions.map((action) => action.title).join(' | ')}`);
    const ledLine = lineStartingWith(document, 'D1 ');
    try {
      assert.ok(await vscode.workspace.applyEdit(ignore.edit!));
      // product.md: `*pnlint: ignore <rule>` applies to the next element line.
      assert.match(document.lineAt(ledLine).text, new RegExp(`^\\s*\\*pnlint: ignore ${LED_RULE}\\b`));
      assert.match(document.lineAt(ledLine + 1).text, /^D1 /);
      await waitFor('the LED finding to clear', () => !pnlintDiagnostics(document.uri).some((d) => ruleOf(d) === LED_RULE));
    } finally {
      await revert(editor);
    }
  });

  it('clears the finding when the user types in a series resistor', async () => {
    const editor = await openNetlist('led-without-resistor.cir');
    const { document } = editor;
    await ledFinding(document);
    const ledLine = lineStartingWith(document, 'D1 ');
    try {
      const edit = new vscode.WorkspaceEdit();
      edit.replace(document.uri, document.lineAt(ledLine).range, 'R1 vcc anode 220\nD1 anode 0 DSTATUS');
      assert.ok(await vscode.workspace.applyEdit(edit));
      await waitFor('the LED finding to clear after the edit', () => !pnlintDiagnostics(document.uri).some((d) => ruleOf(d) === LED_RULE));
    } finally {
      await revert(editor);
    }
    await ledFinding(document);
  });

  it('inserts a series resistor that limits the LED current (checked by ngspice)', async function () {
    const editor = await openNetlist('led-without-resistor.cir');
    const { document } = editor;
    const finding = await ledFinding(document);
    const actions = await vscode.commands.executeCommand<vscode.CodeAction[]>(
      'vscode.executeCodeActionProvider', document.uri, finding.range, vscode.CodeActionKind.QuickFix.value);
    const insert = actions.find((action) => /resistor/i.test(action.title) && action.edit);
    if (!insert) pending(this, `no series-resistor fix is offered yet (actions: ${actions.map((action) => action.title).join(' | ')})`);
    assert.equal(insert.isPreferred, true, 'the resistor is the preferred fix');
    const before = document.lineCount;
    try {
      assert.ok(await vscode.workspace.applyEdit(insert.edit!));
      assert.ok(document.lineCount > before, 'a resistor line was inserted');
      await waitFor('the LED finding to clear after the fix', () => !pnlintDiagnostics(document.uri).some((d) => ruleOf(d) === LED_RULE));
      const current = ngspiceSupplyCurrent(document.getText());
      if (current !== undefined) {
        // The fix must bring the LED (the only load on V1) under its rating yet keep it lit.
        assert.ok(current <= LED_RATING_AMPERES, `LED current ${current} A within the 20 mA rating (ngspice 39)`);
        assert.ok(current >= LED_VISIBLE_AMPERES, `LED current ${current} A still lights it (ngspice 39)`);
      }
    } finally {
      await revert(editor);
    }
  });

  it('applies every preferred fix with the "Apply All Fixes" command', async function () {
    const editor = await openNetlist('led-without-resistor.cir');
    const { document } = editor;
    await ledFinding(document);
    const whole = new vscode.Range(0, 0, document.lineCount, 0);
    const fixAll = await vscode.commands.executeCommand<vscode.CodeAction[]>(
      'vscode.executeCodeActionProvider', document.uri, whole, 'source.fixAll.pnlint');
    if (!fixAll.some((action) => action.edit && action.edit.size > 0)) pending(this, 'source.fixAll.pnlint carries no edit yet');
    try {
      await vscode.commands.executeCommand('pnlint.fixAll');
      await waitFor('the LED finding to clear after fix-all', () => !pnlintDiagnostics(document.uri).some((d) => ruleOf(d) === LED_RULE));
    } finally {
      await revert(editor);
    }
  });

  it('keeps quiet on the same LED with a 220 ohm resistor', async () => {
    const { document } = await openNetlist('led-with-resistor.cir');
    await waitFor('a pnlint/status notification for the clean netlist', () => api.status(document.uri));
    // (5.25 V − about 2 V) / 220 Ω ≈ 15 mA at the high corner: within the 20 mA rating (ngspice 39 gives 13.8 mA at 5 V).
    const loud = pnlintDiagnostics(document.uri).filter((d) => d.severity <= vscode.DiagnosticSeverity.Warning);
    assert.deepEqual(loud.map((d) => `${ruleOf(d)}: ${d.message}`), []);
  });

  it('reads an include from outside the workspace when the workspace is trusted', async () => {
    assert.equal(vscode.workspace.isTrusted, true, 'the suite runs in a trusted workspace');
    const { document } = await openNetlist('led-with-outside-models.cir');
    await waitFor('a pnlint/status notification for the netlist with the outside include', () => api.status(document.uri));
    // The model and the rating come from ../outside/status-led-models.inc: the same clean LED as above.
    const loud = pnlintDiagnostics(document.uri).filter((d) => d.severity <= vscode.DiagnosticSeverity.Warning);
    assert.deepEqual(loud.map((d) => `${ruleOf(d)}: ${d.message}`), []);
  });

  it('shows the operating point, matching ngspice', async () => {
    await openNetlist('led-with-resistor.cir');
    await vscode.commands.executeCommand('pnlint.showOperatingPoint');
    const report = await waitFor('the operating-point report', () =>
      vscode.workspace.textDocuments.find((d) => d.uri.scheme === 'pnlint-operating-point' && d.uri.query.endsWith('led-with-resistor.cir')));
    const text = await waitFor('report text', () => report.getText().trim() || undefined);
    const anodeLine = text.split('\n').find((line) => /\banode\b/i.test(line));
    assert.ok(anodeLine, `the report names the node "anode"; it reads: ${JSON.stringify(text.slice(0, 300))}`);
    const volts = /(-?\d+(?:\.\d+)?)\s*V\b/.exec(anodeLine)?.[1];
    assert.ok(volts, `a voltage on the anode line: ${anodeLine}`);
    // ngspice 39: v(anode) = 1.967016 V for this netlist; the report rounds to a few digits.
    assert.ok(Math.abs(Number(volts) - 1.967016) < 5e-3, `anode at ${volts} V`);
  });

  it('survives a file that is not a netlist', async () => {
    const { document } = await openNetlist('garbage.cir');
    await waitFor('a pnlint/status notification for the garbage file', () => api.status(document.uri));
    const codes = pnlintDiagnostics(document.uri).map(ruleOf);
    assert.ok(codes.length > 0, 'the garbage gets diagnostics');
    assert.equal(api.client()?.isRunning(), true, 'the server still runs');
    const { document: led } = await openNetlist('led-without-resistor.cir');
    await ledFinding(led);
  });

  it('restarts the server and checks the open netlists again', async () => {
    const { document } = await openNetlist('led-without-resistor.cir');
    await vscode.commands.executeCommand('pnlint.restartServer');
    assert.equal(api.client()?.isRunning(), true);
    await waitFor('the status after the restart', () => api.status(document.uri));
    await ledFinding(document);
  });
});
