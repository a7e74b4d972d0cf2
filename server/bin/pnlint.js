#!/usr/bin/env node
// A committed launcher, so that npm links the `pnlint` command at install time,
// before the TypeScript build has produced dist/.
import '../dist/cli/main.js';
