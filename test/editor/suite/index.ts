// The extension-host entry of the editor suite: VS Code (desktop through
// @vscode/test-electron, or code-server's workbench through the payload route)
// loads this file and calls run(); the promise's outcome is the suite's result.
import * as path from 'node:path';
import * as fs from 'node:fs';

// Mocha is not bundled (it loads its reporters dynamically); it resolves from
// the repository's node_modules, above the folder this bundle is written to.
// eslint-disable-next-line @typescript-eslint/no-require-imports
const Mocha = require('mocha') as typeof import('mocha');

/** Longest a single test may take: the first analysis starts the server (common practice, no source). */
const TEST_TIMEOUT_MILLISECONDS = 60_000;

export function run(): Promise<void> {
  const mocha = new Mocha({ ui: 'bdd', timeout: TEST_TIMEOUT_MILLISECONDS, color: false, reporter: 'spec' });
  const here = __dirname;
  for (const file of fs.readdirSync(here).filter((name) => name.endsWith('.test.js')).sort()) {
    mocha.addFile(path.join(here, file));
  }
  return new Promise((resolve, reject) => {
    try {
      mocha.run((failures) => {
        if (failures > 0) reject(new Error(`${failures} editor test(s) failed`));
        else resolve();
      });
    } catch (error) {
      reject(error instanceof Error ? error : new Error(String(error)));
    }
  });
}
