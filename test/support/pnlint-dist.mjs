// @ts-check
// pnlint's pipeline from the built server/dist (what users run), for the
// benchmarks: elaborate → compile → DC operating point. The tests use the
// TypeScript sources instead (pnlint-solver.ts).
import { existsSync } from 'node:fs';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { diskReader } from './disk-reader.mjs';

const DIST = fileURLToPath(new URL('../../server/dist/', import.meta.url));

/**
 * @returns {Promise<{ available: true, elaborate: (uri: string, text: string) => any, compile: (circuit: any) => any, solve: (compiled: any) => any }
 *   | { available: false, reason: string }>}
 */
export async function loadBuiltSolver() {
  const netlistPath = `${DIST}netlist/index.js`;
  const simPath = `${DIST}sim/index.js`;
  for (const path of [netlistPath, simPath]) {
    if (!existsSync(path)) return { available: false, reason: `not available yet (${path} missing: the module is not written or not built; run npx tsc -b)` };
  }
  try {
    const netlist = await import(pathToFileURL(netlistPath).href);
    const sim = await import(pathToFileURL(simPath).href);
    return {
      available: true,
      elaborate: (uri, text) => netlist.elaborate(uri, text, diskReader),
      compile: (circuit) => sim.compileCircuit(circuit),
      solve: (compiled) => sim.solveOperatingPoint(compiled),
    };
  } catch (error) {
    return { available: false, reason: `could not load the built solver: ${/** @type {Error} */ (error).message.split('\n')[0]}` };
  }
}
