// The lexers and parsers in use skip Chevrotain's definition checks (a start-up cost):
// here they are built with the checks on, so that an ambiguous alternative, an unreachable
// token or a left-recursive rule fails the build of the test suite instead.
import { describe, expect, it } from 'vitest';
import { validateLexer } from '../../grammar/src/lexer.js';
import { validateFieldGrammar } from '../../grammar/src/fields.js';
import { validateExpressionGrammar } from '../../grammar/src/expression.js';

describe('grammar definitions', () => {
  it('the netlist lexer passes Chevrotain’s definition checks', () => {
    expect(() => validateLexer()).not.toThrow();
  });

  it('the field grammar passes Chevrotain’s grammar checks (LL(1), no ambiguity)', () => {
    expect(() => validateFieldGrammar()).not.toThrow();
  });

  it('the expression lexer and grammar pass Chevrotain’s checks', () => {
    expect(() => validateExpressionGrammar()).not.toThrow();
  });
});
