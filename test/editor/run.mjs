// `npm run test:editor`: the extension in a real VS Code workbench (code-server,
// shown by Debian's Chromium through playwright-core). Two parts:
//  1. the extension-host suite (suite/*.ts, Mocha) through the payload URL route;
//  2. a person's view: squiggle, Problems panel, hover, quick fix through the UI,
//     with a screenshot at each step into test/artifacts/editor/.
// Everything is time-bounded, and code-server's whole process group is ended at
// the end, on failure too. Exit code 0 only when every check passed.
//   --update-media  also copy the squiggle, hover and quick-fix pictures to client/media/
//   --keep          keep the run folder under .cache/editor/runs/ for inspection
import { copyFileSync, existsSync, mkdirSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { chromium } from 'playwright-core';
import {
  bundleSuite,
  cacheFolder,
  chromiumPath,
  endProcessGroup,
  endProcessGroupNow,
  ensureCodeServer,
  ensureDebianPackages,
  ensureNode24,
  installExtension,
  isolatedEnvironment,
  layOutWorkspace,
  log,
  packageVsixIfMissing,
  repositoryRoot,
  startCodeServer,
} from './setup.mjs';
import { checkGrammar } from './grammar-check.mjs';
import { checkRestrictedMode, driveWorkbench } from './workbench.mjs';

/** The whole run, installs included, must end within this (a fresh install takes about 2 minutes). */
const RUN_BUDGET_MILLISECONDS = 20 * 60_000;
/** The extension-host suite's own budget: it runs in about 10 s, but with a broken server every test waits its full timeout. */
const SUITE_BUDGET_MILLISECONDS = 10 * 60_000;
/** Failed runs' folders kept for inspection; older ones are removed. */
const FAILED_RUNS_KEPT = 3;
/** Workbench log lines that say nothing about the suite (kept in suite.log, not printed); the gallery is unreachable here. */
const WORKBENCH_NOISE = /ENOTFOUND|AccountPolicyGate|AgentHost|Creating a socket|connection token|reconnection-grace-time|builtin extensions cache|Service Worker|\[lifecycle\]/;
const EXTENSION_FOLDER_NAME = 'pnlint.pnlint-0.1.0';

const options = new Set(process.argv.slice(2));
const artifacts = join(repositoryRoot, 'test/artifacts/editor');
let codeServer;
let browser;
let runFolder;
let temporaryFolder;
/** Removed only after code-server has ended, since it writes there until then. */
let removeRunFolder = false;

process.on('exit', () => endProcessGroupNow(codeServer?.processGroup));
for (const signal of ['SIGINT', 'SIGTERM', 'SIGHUP']) {
  process.on(signal, () => {
    log(`${signal}: ending code-server`);
    endProcessGroupNow(codeServer?.processGroup);
    process.exit(1);
  });
}
const overallTimer = setTimeout(() => {
  log(`the run took longer than ${RUN_BUDGET_MILLISECONDS / 60_000} minutes: stopping`);
  endProcessGroupNow(codeServer?.processGroup);
  process.exit(1);
}, RUN_BUDGET_MILLISECONDS);

/** console.log's formatting of `%s`/`%d` placeholders, enough for Mocha's spec reporter. */
function formatConsoleArguments(values) {
  if (values.length === 0) return '';
  const [first, ...rest] = values.map((value) => (typeof value === 'string' ? value : JSON.stringify(value) ?? String(value)));
  const text = first.replace(/%[sdifoOj%]/g, (placeholder) => (placeholder === '%%' ? '%' : rest.length > 0 ? rest.shift() : placeholder));
  return [text, ...rest].join(' ');
}

function remoteUri(server, path) {
  // The authority is the page's host and port, not "remote": otherwise files open under another URI.
  return `vscode-remote://127.0.0.1:${server.port}${path}`;
}

async function runExtensionHostSuite(context, server, { extensionPath, suitePath, workspace }) {
  const page = await context.newPage();
  const lines = [];
  let settle;
  const exitCode = new Promise((resolve) => {
    settle = resolve;
  });
  // The workbench calls it with the level ('info', 'error') and console.log's arguments.
  await page.exposeFunction('codeAutomationLog', (level, ...message) => {
    const text = `${formatConsoleArguments(message.flat())}${level === 'error' ? ' [error]' : ''}`;
    lines.push(text);
    if (!WORKBENCH_NOISE.test(text)) process.stdout.write(`  | ${text}\n`);
  });
  await page.exposeFunction('codeAutomationExit', (code) => settle(Number(code)));
  const payload = JSON.stringify([
    ['extensionDevelopmentPath', remoteUri(server, extensionPath)],
    ['extensionTestsPath', remoteUri(server, suitePath)],
  ]);
  const url = `${server.origin}/?folder=${encodeURIComponent(workspace)}&payload=${encodeURIComponent(payload)}`;
  await page.goto(url, { waitUntil: 'domcontentloaded', timeout: 60_000 });
  const timeout = new Promise((resolve) => setTimeout(() => resolve('timeout'), SUITE_BUDGET_MILLISECONDS));
  const outcome = await Promise.race([exitCode, timeout]);
  await page.screenshot({ path: join(artifacts, '00-extension-host-suite.png') }).catch(() => {});
  await page.close().catch(() => {});
  if (outcome === 'timeout') throw new Error(`the extension-host suite did not finish within ${SUITE_BUDGET_MILLISECONDS / 1000} s`);
  const pendingTests = lines.filter((line) => line.includes('PENDING:'));
  return { exitCode: outcome, pendingTests, lines };
}

function removeOldRuns(runs) {
  const names = existsSync(runs) ? readdirSync(runs).sort() : [];
  for (const name of names.slice(0, Math.max(0, names.length - FAILED_RUNS_KEPT))) rmSync(join(runs, name), { recursive: true, force: true });
}

async function main() {
  const started = Date.now();
  ensureDebianPackages();
  ensureNode24();
  ensureCodeServer();
  packageVsixIfMissing();
  await checkGrammar();

  removeOldRuns(join(cacheFolder, 'runs'));
  runFolder = join(cacheFolder, 'runs', new Date().toISOString().replace(/[:.]/g, '-'));
  mkdirSync(runFolder, { recursive: true });
  rmSync(artifacts, { recursive: true, force: true });
  mkdirSync(artifacts, { recursive: true });
  const suiteWorkspace = layOutWorkspace(runFolder, 'workspace-suite');
  const uiWorkspace = layOutWorkspace(runFolder, 'workspace-ui');
  const untrustedWorkspace = layOutWorkspace(runFolder, 'workspace-untrusted');
  const suiteFolder = join(runFolder, 'suite');
  await bundleSuite(suiteFolder);

  const environment = isolatedEnvironment(runFolder);
  temporaryFolder = environment.TMPDIR;
  const extensionsFolder = installExtension(runFolder, environment);
  codeServer = await startCodeServer({ runFolder, environment, folder: uiWorkspace });
  log(`code-server ${codeServer.origin} (process group ${codeServer.processGroup})`);

  const context = await chromium.launchPersistentContext(join(runFolder, 'chromium'), {
    executablePath: chromiumPath,
    headless: true,
    viewport: { width: 1280, height: 800 },
    timeout: 60_000,
    args: [
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
    env: environment,
  });
  browser = context;

  log('part 1: the extension-host suite');
  const suite = await runExtensionHostSuite(context, codeServer, {
    // The installed .vsix itself, so that the suite checks what users install.
    extensionPath: join(extensionsFolder, EXTENSION_FOLDER_NAME),
    suitePath: join(suiteFolder, 'index.js'),
    workspace: suiteWorkspace,
  });

  log('part 2: the workbench as a person uses it');
  const ui = await driveWorkbench(context, codeServer, {
    workspace: uiWorkspace,
    artifacts,
    netlist: 'led-without-resistor.cir',
    remoteUri: (path) => remoteUri(codeServer, path),
  });

  log('part 3: an untrusted workspace (Restricted Mode)');
  await endProcessGroup(codeServer.processGroup);
  codeServer = await startCodeServer({ runFolder, environment, folder: untrustedWorkspace, trusted: false });
  const restricted = await checkRestrictedMode(context, codeServer, {
    workspace: untrustedWorkspace,
    artifacts,
    netlist: 'led-with-outside-models.cir',
    remoteUri: (path) => remoteUri(codeServer, path),
  });
  ui.passed.push(...restricted.passed);
  ui.failures.push(...restricted.failures);

  if (options.has('--update-media')) {
    const media = join(repositoryRoot, 'client/media');
    mkdirSync(media, { recursive: true });
    for (const [from, to] of [
      ['squiggle-editor.png', 'squiggle.png'],
      ['hover-editor.png', 'hover.png'],
      ['quick-fix-editor.png', 'quick-fix.png'],
    ]) {
      copyFileSync(join(artifacts, from), join(media, to));
    }
    log(`updated ${media}`);
  }

  const seconds = ((Date.now() - started) / 1000).toFixed(1);
  const pendingSteps = [...suite.pendingTests, ...ui.pending.map((reason) => `PENDING: workbench: ${reason}`)];
  writeFileSync(join(artifacts, 'suite.log'), `${suite.lines.join('\n')}\n`);
  for (const line of pendingSteps) log(line.slice(line.indexOf('PENDING:')));
  const passed = suite.exitCode === 0 && ui.failures.length === 0;
  for (const failure of ui.failures) log(`FAILED: workbench: ${failure}`);
  log(`extension-host suite: ${suite.exitCode === 0 ? 'passed' : `FAILED (exit ${suite.exitCode})`}; workbench steps: ${ui.passed.length} passed, ${ui.failures.length} failed; ${pendingSteps.length} pending; ${seconds} s`);
  // One plain closing line that counts both parts (Mocha's own lines are above).
  const count = (word) => Number(suite.lines.map((line) => new RegExp(`^\\s*(\\d+) ${word}\\b`).exec(line)?.[1]).find(Boolean) ?? 0);
  const failedCount = count('failing') + ui.failures.length + (suite.exitCode !== 0 && count('failing') === 0 ? 1 : 0);
  process.stdout.write(`editor: ${count('passing') + ui.passed.length} passed, ${failedCount} failed, ${count('pending') + ui.pending.length} skipped\n`);
  removeRunFolder = !options.has('--keep') && passed;
  if (!removeRunFolder) log(`run folder kept: ${runFolder}`);
  return passed ? 0 : 1;
}

let exitCode = 1;
try {
  exitCode = await main();
} catch (error) {
  log(`FAILED: ${error instanceof Error ? error.stack ?? error.message : String(error)}`);
  if (codeServer) log(`code-server log: ${codeServer.logPath}`);
} finally {
  await browser?.close().catch(() => {});
  await endProcessGroup(codeServer?.processGroup);
  if (removeRunFolder && runFolder) rmSync(runFolder, { recursive: true, force: true });
  if (temporaryFolder) rmSync(temporaryFolder, { recursive: true, force: true });
  clearTimeout(overallTimer);
}
process.exit(exitCode);
