// PLACEHOLDER until the Chevrotain parser lands: reads nothing.
import type { ParseOptions, ParseResult } from './ast.js';

export function parse(_text: string, _options: ParseOptions = {}): ParseResult {
  return { statements: [], diagnostics: [] };
}
