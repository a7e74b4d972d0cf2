// Language-server latency over stdio: didChange → publishDiagnostics for a generated
// 200-element netlist (p50 and p95 over a few hundred edits), the same with LEDs that
// need fixes (so that the second phase, the verified fixes, runs behind every edit, and
// the time until a quick fix is ready), a 2,000-diode netlist, and server start to first
// diagnostics. Reported, not a timed test. The debounce is set to 0 ms so that the figure
// is the server's own work, not the typing pause. Each line also gives the server's CPU
// time (all its threads, from /proc on Linux) and the machine's load average, since the
// wall-clock figures depend on what else runs.
// PNLINT_SERVER_ENTRY=<script> measures another build (e.g. the extension's bundle);
// PNLINT_BENCH_SERVER_FLAGS='--cpu-prof --cpu-prof-dir=/tmp/prof' profiles the server.
import { spawn } from 'node:child_process';
import { existsSync, readFileSync } from 'node:fs';
import { loadavg } from 'node:os';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { createProtocolConnection, StreamMessageReader, StreamMessageWriter } from 'vscode-languageserver-protocol/node.js';

// By default the single-file bundle that `pnlint lsp --stdio` runs (npm run build makes it).
const BUNDLED_ENTRY = fileURLToPath(new URL('../../server/dist/bundle/lsp.mjs', import.meta.url));
const SERVER_ENTRY =
  process.env['PNLINT_SERVER_ENTRY'] ?? (existsSync(BUNDLED_ENTRY) ? BUNDLED_ENTRY : fileURLToPath(new URL('../../server/dist/lsp/entry.js', import.meta.url)));
/** Extra node flags for the server, to profile it. */
const SERVER_FLAGS = (process.env['PNLINT_BENCH_SERVER_FLAGS'] ?? '').split(/\s+/).filter(Boolean);
const SETTINGS = { debounceMilliseconds: 0 };
const EDITS_SMALL = 300;
const EDITS_WITH_FIXES = 100;
/** Edits after which the time to a ready quick fix is measured (each waits for the whole second phase). */
const EDITS_UNTIL_FIXES = 10;
const EDITS_LARGE = 20;
/** LEDs with no resistor in the "with fixes" netlist: each finding's fix is re-simulated. */
const BARE_LEDS = 3;
/** Waiting longer than this for one publish means the server is stuck: stop the bench. */
const PUBLISH_TIMEOUT_MILLISECONDS = 60_000;
/** /proc reports CPU time in USER_HZ ticks, 100 per second on Linux. */
const TICKS_PER_SECOND = 100;

/** An invented indicator panel: one supply, LED branches each with a resistor, and optionally LEDs without one (at the end). */
function ledPanel(branches, bare = 0) {
  const lines = ['generated indicator panel', 'V1 vcc 0 DC 5', '.model DRED D(IS=1e-20 N=1.9 RS=2)'];
  for (let i = 1; i <= branches; i++) lines.push(`R${i} vcc n${i} 330`, `D${i} n${i} 0 DRED`);
  for (let i = 1; i <= bare; i++) lines.push(`DBARE${i} vcc 0 DRED`);
  lines.push('.end', '');
  return lines.join('\n');
}

function percentile(sorted, fraction) {
  return sorted[Math.min(sorted.length - 1, Math.floor(fraction * sorted.length))];
}

/** CPU milliseconds the process has used so far (user + system, every thread); undefined off Linux. */
function cpuMilliseconds(pid) {
  try {
    const fields = readFileSync(`/proc/${pid}/stat`, 'utf8').replace(/^.*\) /, '').split(' ');
    // After the command name: state is field 3, utime field 14, stime field 15 (proc(5)).
    return ((Number(fields[11]) + Number(fields[12])) * 1000) / TICKS_PER_SECOND;
  } catch {
    return undefined;
  }
}

const load = () => loadavg()[0].toFixed(1);
const cpu = (value) => (value === undefined ? 'n/a' : `${value.toFixed(0)} ms`);

async function startServer() {
  const started = performance.now();
  const child = spawn(process.execPath, [...SERVER_FLAGS, SERVER_ENTRY, '--stdio'], { stdio: 'pipe' });
  const connection = createProtocolConnection(new StreamMessageReader(child.stdout), new StreamMessageWriter(child.stdin));
  const waiting = new Map();
  const latest = new Map();
  connection.onNotification('textDocument/publishDiagnostics', (params) => {
    latest.set(params.uri, params);
    const key = `${params.uri}@${params.version}`;
    waiting.get(key)?.(params);
    waiting.delete(key);
  });
  connection.onRequest('workspace/configuration', (params) => params.items.map(() => SETTINGS));
  connection.onRequest('client/registerCapability', () => null);
  connection.listen();
  await connection.sendRequest('initialize', {
    processId: process.pid,
    rootUri: null,
    workspaceFolders: null,
    capabilities: { workspace: { configuration: true }, textDocument: { publishDiagnostics: { versionSupport: true, dataSupport: true } } },
    initializationOptions: { settings: SETTINGS },
  });
  const initialized = performance.now() - started;
  void connection.sendNotification('initialized', {});
  const published = (uri, version) =>
    new Promise((resolve, reject) => {
      const timer = setTimeout(() => reject(new Error(`no diagnostics for version ${version} within ${PUBLISH_TIMEOUT_MILLISECONDS} ms`)), PUBLISH_TIMEOUT_MILLISECONDS);
      waiting.set(`${uri}@${version}`, (params) => {
        clearTimeout(timer);
        resolve(params);
      });
    });
  const stop = async () => {
    await connection.sendRequest('shutdown');
    void connection.sendNotification('exit');
    await new Promise((resolve) => child.once('exit', resolve));
    connection.dispose();
  };
  return { connection, published, stop, started, initialized, pid: child.pid };
}

/** The edit of R1's value (line 3, "330" at columns 11..14), back and forth. */
function editR1(server, uri, version) {
  void server.connection.sendNotification('textDocument/didChange', {
    textDocument: { uri, version },
    contentChanges: [{ range: { start: { line: 3, character: 11 }, end: { line: 3, character: 14 } }, text: version % 2 === 0 ? '390' : '330' }],
  });
}

async function measure(name, text, edits, options = {}) {
  const server = await startServer();
  const uri = pathToFileURL(`/tmp/pnlint-bench-${name}.cir`).href;
  const first = server.published(uri, 1);
  void server.connection.sendNotification('textDocument/didOpen', { textDocument: { uri, languageId: 'spice-netlist', version: 1, text } });
  await first;
  const startup = performance.now() - server.started;
  const startupCpu = cpuMilliseconds(server.pid);
  const times = [];
  const cpuBefore = cpuMilliseconds(server.pid);
  let version = 2;
  for (; version < edits + 2; version++) {
    const done = server.published(uri, version);
    const sent = performance.now();
    editR1(server, uri, version);
    await done;
    times.push(performance.now() - sent);
  }
  const cpuAfter = cpuMilliseconds(server.pid);
  // The time from an edit until its quick fix is ready: the code action waits for the second phase.
  const fixTimes = [];
  for (let i = 0; i < (options.untilFixes ?? 0); i++, version++) {
    const done = server.published(uri, version);
    const sent = performance.now();
    editR1(server, uri, version);
    const { diagnostics } = await done;
    const unlimited = diagnostics.filter((d) => d.code === 'led-current-unlimited');
    const actions = await server.connection.sendRequest('textDocument/codeAction', { textDocument: { uri }, range: unlimited[0].range, context: { diagnostics: unlimited } });
    if (!actions.some((action) => action.isPreferred)) throw new Error(`no preferred fix after edit ${version}: ${actions.map((a) => a.title).join(' | ')}`);
    fixTimes.push(performance.now() - sent);
  }
  await server.stop();
  times.sort((a, b) => a - b);
  fixTimes.sort((a, b) => a - b);
  const perEdit = cpuBefore !== undefined && cpuAfter !== undefined ? (cpuAfter - cpuBefore) / edits : undefined;
  return { initialized: server.initialized, startup, startupCpu, p50: percentile(times, 0.5), p95: percentile(times, 0.95), edits, perEdit, fixTimes };
}

console.log(`lsp bench: ${SERVER_ENTRY}, load average ${load()} (1 min) at the start`);
const small = await measure('200', ledPanel(100), EDITS_SMALL);
console.log(`lsp-start: ${small.initialized.toFixed(0)} ms from spawn to initialize answered, ${small.startup.toFixed(0)} ms to first diagnostics (201 elements), server CPU ${cpu(small.startupCpu)} by then; load ${load()}`);
console.log(`lsp-200: p50 ${small.p50.toFixed(1)} ms, p95 ${small.p95.toFixed(1)} ms (${small.edits} edits, 201 elements), server CPU ${cpu(small.perEdit)} per edit; load ${load()}`);
const withFixes = await measure('200-fixes', ledPanel(100 - BARE_LEDS, BARE_LEDS), EDITS_WITH_FIXES, { untilFixes: EDITS_UNTIL_FIXES });
console.log(
  `lsp-200-with-fixes: p50 ${withFixes.p50.toFixed(1)} ms, p95 ${withFixes.p95.toFixed(1)} ms (${withFixes.edits} edits, ${BARE_LEDS} LEDs needing fixes), server CPU ${cpu(withFixes.perEdit)} per edit; ` +
    `edit to quick fix ready p50 ${percentile(withFixes.fixTimes, 0.5).toFixed(0)} ms (${withFixes.fixTimes.length} edits); load ${load()}`,
);
const large = await measure('2000', ledPanel(2000), EDITS_LARGE);
console.log(`lsp-2000-diodes: p50 ${large.p50.toFixed(1)} ms, p95 ${large.p95.toFixed(1)} ms (${large.edits} edits, 4,001 elements), start ${large.startup.toFixed(0)} ms, server CPU ${cpu(large.perEdit)} per edit; load ${load()}`);
