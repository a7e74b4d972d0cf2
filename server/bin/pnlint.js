#!/usr/bin/env node
// A committed launcher, so that npm links the `pnlint` command at install time,
// before the build has produced dist/. It runs the single-file bundle when there
// is one (it starts faster), else the module-by-module build.
import { existsSync } from 'node:fs';

const bundle = new URL('../dist/bundle/pnlint.mjs', import.meta.url);
await import(existsSync(bundle) ? bundle.href : new URL('../dist/cli/main.js', import.meta.url).href);
