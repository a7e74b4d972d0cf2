// A rule is one file: what it reads from the solved circuit, when it fires, its message,
// and the fixes it asks for. Adding a rule touches no other rule: list it in rules/index.ts.
import type { Finding } from '../../findings.js';
import type { CheckContext } from '../context.js';

export interface Rule {
  id: string;
  check(context: CheckContext): Finding[];
}
