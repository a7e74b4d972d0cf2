// Language-server latency over stdio: didChange → publishDiagnostics for a generated
// 200-element netlist (p50 and p95 over a few hundred edits) and a 2,000-diode one,
// and server start to first diagnostics. Reported, not a timed test. The debounce is
// set to 0 ms so that the figure is the server's own work, not the typing pause.
import { spawn } from 'node:child_process';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { createProtocolConnection, StreamMessageReader, StreamMessageWriter } from 'vscode-languageserver-protocol/node.js';

const SERVER_ENTRY = fileURLToPath(new URL('../../server/dist/lsp/entry.js', import.meta.url));
/** Extra node flags for the server, to profile it: PNLINT_BENCH_SERVER_FLAGS='--cpu-prof --cpu-prof-dir=/tmp/prof'. */
const SERVER_FLAGS = (process.env['PNLINT_BENCH_SERVER_FLAGS'] ?? '').split(/\s+/).filter(Boolean);
const SETTINGS = { debounceMilliseconds: 0 };
const EDITS_SMALL = 300;
const EDITS_LARGE = 20;
/** Waiting longer than this for one publish means the server is stuck: stop the bench. */
const PUBLISH_TIMEOUT_MILLISECONDS = 60_000;

/** An invented indicator panel: one supply, LED branches each with a resistor. */
function ledPanel(branches) {
  const lines = ['generated indicator panel', 'V1 vcc 0 DC 5', '.model DRED D(IS=1e-20 N=1.9 RS=2)'];
  for (let i = 1; i <= branches; i++) lines.push(`R${i} vcc n${i} 330`, `D${i} n${i} 0 DRED`);
  lines.push('.end', '');
  return lines.join('\n');
}

function percentile(sorted, fraction) {
  return sorted[Math.min(sorted.length - 1, Math.floor(fraction * sorted.length))];
}

async function startServer() {
  const started = performance.now();
  const child = spawn(process.execPath, [...SERVER_FLAGS, SERVER_ENTRY, '--stdio'], { stdio: 'pipe' });
  const connection = createProtocolConnection(new StreamMessageReader(child.stdout), new StreamMessageWriter(child.stdin));
  const waiting = new Map();
  connection.onNotification('textDocument/publishDiagnostics', (params) => {
    const key = `${params.uri}@${params.version}`;
    waiting.get(key)?.();
    waiting.delete(key);
  });
  connection.onRequest('workspace/configuration', (params) => params.items.map(() => SETTINGS));
  connection.onRequest('client/registerCapability', () => null);
  connection.listen();
  await connection.sendRequest('initialize', {
    processId: process.pid,
    rootUri: null,
    workspaceFolders: null,
    capabilities: { workspace: { configuration: true } },
    initializationOptions: { settings: SETTINGS },
  });
  const initialized = performance.now() - started;
  void connection.sendNotification('initialized', {});
  const published = (uri, version) =>
    new Promise((resolve, reject) => {
      const timer = setTimeout(() => reject(new Error(`no diagnostics for version ${version} within ${PUBLISH_TIMEOUT_MILLISECONDS} ms`)), PUBLISH_TIMEOUT_MILLISECONDS);
      waiting.set(`${uri}@${version}`, () => {
        clearTimeout(timer);
        resolve();
      });
    });
  const stop = async () => {
    await connection.sendRequest('shutdown');
    void connection.sendNotification('exit');
    await new Promise((resolve) => child.once('exit', resolve));
    connection.dispose();
  };
  return { connection, published, stop, started, initialized };
}

async function measure(name, branches, edits) {
  const server = await startServer();
  const uri = pathToFileURL(`/tmp/pnlint-bench-${name}.cir`).href;
  const text = ledPanel(branches);
  const first = server.published(uri, 1);
  void server.connection.sendNotification('textDocument/didOpen', { textDocument: { uri, languageId: 'spice-netlist', version: 1, text } });
  await first;
  const startup = performance.now() - server.started;
  // Each edit changes the value of R1 (line 3, "330" at columns 11..14) back and forth.
  const times = [];
  for (let version = 2; version < edits + 2; version++) {
    const value = version % 2 === 0 ? '390' : '330';
    const done = server.published(uri, version);
    const sent = performance.now();
    void server.connection.sendNotification('textDocument/didChange', {
      textDocument: { uri, version },
      contentChanges: [{ range: { start: { line: 3, character: 11 }, end: { line: 3, character: 14 } }, text: value }],
    });
    await done;
    times.push(performance.now() - sent);
  }
  await server.stop();
  times.sort((a, b) => a - b);
  return { initialized: server.initialized, startup, p50: percentile(times, 0.5), p95: percentile(times, 0.95), edits };
}

const small = await measure('200', 100, EDITS_SMALL);
console.log(`lsp-start: ${small.initialized.toFixed(0)} ms from spawn to initialize answered, ${small.startup.toFixed(0)} ms to first diagnostics (201 elements)`);
console.log(`lsp-200: p50 ${small.p50.toFixed(1)} ms, p95 ${small.p95.toFixed(1)} ms (${small.edits} edits, 201 elements)`);
const large = await measure('2000', 2000, EDITS_LARGE);
console.log(`lsp-2000-diodes: p50 ${large.p50.toFixed(1)} ms, p95 ${large.p95.toFixed(1)} ms (${large.edits} edits, 4,001 elements), start ${large.startup.toFixed(0)} ms`);
