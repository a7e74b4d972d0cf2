// `npm run test:vscode`: the same extension-host suite as `npm run test:editor`,
// in a desktop VS Code that @vscode/test-electron downloads (into .cache/vscode-test).
// For machines that can reach VS Code's download site; these machines cannot,
// and run the suite in code-server instead (run.mjs).
//   PNLINT_VSCODE_VERSION=1.82.0 npm run test:vscode   (default: the latest stable release)
import { runTests } from '@vscode/test-electron';
import { mkdirSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { bundleSuite, layOutWorkspace, log, repositoryRoot } from './setup.mjs';

/** A download and a suite run together (common practice, no source). */
const DOWNLOAD_TIMEOUT_MILLISECONDS = 5 * 60_000;

const runFolder = join(repositoryRoot, '.cache', 'vscode-test', 'run');
rmSync(runFolder, { recursive: true, force: true });
const suiteFolder = join(runFolder, 'suite');
mkdirSync(runFolder, { recursive: true });
const workspace = layOutWorkspace(runFolder, 'workspace');
await bundleSuite(suiteFolder);

let exitCode = 1;
try {
  exitCode = await runTests({
    version: process.env.PNLINT_VSCODE_VERSION ?? 'stable',
    cachePath: join(repositoryRoot, '.cache', 'vscode-test'),
    timeout: DOWNLOAD_TIMEOUT_MILLISECONDS,
    // The extension folder itself (npm run package bundled it into client/out/).
    extensionDevelopmentPath: join(repositoryRoot, 'client'),
    extensionTestsPath: join(suiteFolder, 'index.js'),
    launchArgs: [
      workspace,
      '--disable-extensions',
      '--disable-workspace-trust',
      '--user-data-dir', join(runFolder, 'user-data'),
      '--extensions-dir', join(runFolder, 'extensions'),
    ],
  });
} catch (error) {
  log(`FAILED: ${error instanceof Error ? error.message : String(error)}`);
  exitCode = 1;
}
log(exitCode === 0 ? 'desktop VS Code suite passed' : `desktop VS Code suite FAILED (exit ${exitCode})`);
process.exit(exitCode);
