// Runs every benchmark script in this folder (other than this one), one after
// another, each in its own Node process so that one's heap and JIT state do
// not colour the next, and prints their lines. Reported figures, not a timed
// test: `npm run bench` (which builds first: the benches import server/dist).
import { spawnSync } from 'node:child_process';
import { readdirSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

/** A bench that runs longer than this is stopped, so that `npm run bench` always ends. */
const BENCH_TIME_LIMIT_MILLISECONDS = 10 * 60_000;

const folder = dirname(fileURLToPath(import.meta.url));
const self = basename(fileURLToPath(import.meta.url));
const scripts = readdirSync(folder)
  .filter((name) => name.endsWith('.mjs') && name !== self)
  .sort();

let failures = 0;
for (const script of scripts) {
  const started = performance.now();
  // --expose-gc lets a bench settle the heap before it measures memory.
  const child = spawnSync(process.execPath, ['--expose-gc', join(folder, script)], {
    cwd: join(folder, '..', '..'),
    encoding: 'utf8',
    stdio: ['ignore', 'pipe', 'pipe'],
    timeout: BENCH_TIME_LIMIT_MILLISECONDS,
    maxBuffer: 64 * 1024 * 1024,
  });
  const seconds = ((performance.now() - started) / 1000).toFixed(1);
  const output = (child.stdout ?? '').trimEnd();
  if (output) console.log(output);
  if (child.error || child.signal || child.status !== 0) {
    failures++;
    const why = child.error?.message ?? (child.signal ? `stopped by ${child.signal}` : `exit status ${child.status}`);
    console.log(`${script}: FAILED (${why}) after ${seconds} s`);
    const errors = (child.stderr ?? '').trim();
    if (errors) console.log(errors.split('\n').slice(-20).map((line) => `  ${line}`).join('\n'));
  } else {
    console.log(`${script}: done in ${seconds} s`);
  }
}
process.exitCode = failures > 0 ? 1 : 0;
