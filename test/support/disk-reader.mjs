// @ts-check
// A FileReader (server/src/netlist/circuit.ts) over the real file system, for
// the tests and benchmarks: paths are plain file paths, includes resolve
// relative to the including file, as SPICE engines resolve them.
import { readFileSync } from 'node:fs';
import { dirname, isAbsolute, resolve } from 'node:path';

/** @type {{ read(uri: string): string | undefined; resolve(fromUri: string, path: string): string }} */
export const diskReader = {
  read(uri) {
    try {
      return readFileSync(uri, 'utf8');
    } catch {
      return undefined;
    }
  },
  resolve(fromUri, path) {
    return isAbsolute(path) ? path : resolve(dirname(fromUri), path);
  },
};
