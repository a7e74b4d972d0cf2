// The expression evaluator on hand-built syntax trees (no parser needed).
// Expected values: ngspice 39 where its `.param` evaluation was run on the same
// expression (`.param x={…}` printed through a voltage source), otherwise
// mathematical identities.
import { describe, expect, test } from 'vitest';
import { LineIndex, type Expr, type Span } from '@pnlint/grammar';
import { DiagnosticSink, evaluateExpression, ParameterEvaluation, ParameterScope } from '../../server/src/netlist/index.js';

const at = (column: number, width = 1): Span => ({ start: column, end: column + width });
const R = at(0);
const num = (value: number, text = String(value), span = R): Expr => ({ kind: 'num', value, text, span });
const id = (name: string, span = R): Expr => ({ kind: 'ident', name, span });
const bin = (op: Extract<Expr, { kind: 'binary' }>['op'], left: Expr, right: Expr, span = R): Expr => ({ kind: 'binary', op, left, right, span });
const call = (name: string, ...args: Expr[]): Expr => ({ kind: 'call', name, args, span: R });
const neg = (operand: Expr): Expr => ({ kind: 'unary', op: '-', operand, span: R });

function setup() {
  // The trees stand on one line of 80 columns: a span's offsets are its columns.
  const line = new LineIndex(' '.repeat(80));
  const sink = new DiagnosticSink(() => line);
  const numbers: string[] = [];
  const scope = new ParameterScope(undefined, new ParameterEvaluation(sink, (_uri, text) => numbers.push(text)));
  const evaluate = (expr: Expr, within = scope) => evaluateExpression(expr, { scope: within, uri: 'test.cir', sink });
  return { sink, scope, evaluate, numbers };
}

describe('functions and operators', () => {
  const { evaluate } = setup();
  // ngspice 39, run on `.param` with the same expression.
  test.each([
    ['log(100) is the natural logarithm', call('log', num(100)), 4.605170185988093],
    ['nint(2.5) rounds half to even', call('nint', num(2.5)), 2],
    ['nint(-2.5) rounds half to even', call('nint', num(-2.5)), -2],
    ['nint(3.5) rounds half to even', call('nint', num(3.5)), 4],
    ['int(-2.7) truncates', call('int', num(-2.7)), -2],
    ['pwr(-2, 2) is |x|^y', call('pwr', num(-2), num(2)), 4],
    ['pwr(-8, 0.5) is |x|^y', call('pwr', num(-8), num(0.5)), 2.82842712474619],
    ['pow(-2, 3)', call('pow', num(-2), num(3)), -8],
    ['7 % 3', bin('%', num(7), num(3)), 1],
    ['atan(0.5)', call('atan', num(0.5)), 0.4636476090008061],
    ['sgn(-3)', call('sgn', num(-3)), -1],
    ['max(1,2) + min(3,4)', bin('+', call('max', num(1), num(2)), call('min', num(3), num(4))), 5],
    ['2 ** 3', bin('**', num(2), num(3)), 8],
    ['1 == 1', bin('==', num(1), num(1)), 1],
  ])('%s (ngspice 39)', (_what, expr, expected) => {
    expect(evaluate(expr)).toBeCloseTo(expected, 12);
  });

  // Mathematical identities.
  test.each([
    ['sqrt(16)', call('sqrt', num(16)), 4],
    ['exp(0)', call('exp', num(0)), 1],
    ['ln(exp(2))', call('ln', call('exp', num(2))), 2],
    ['log10(1000)', call('log10', num(1000)), 3],
    ['atan2(1, 1) = pi/4', call('atan2', num(1), num(1)), Math.PI / 4],
    ['sin(pi/2)', call('sin', bin('/', id('pi'), num(2))), 1],
    ['cosh(0)', call('cosh', num(0)), 1],
    ['floor(-1.5)', call('floor', num(-1.5)), -2],
    ['ceil(1.2)', call('ceil', num(1.2)), 2],
    ['abs(-3)', call('abs', num(-3)), 3],
    ['2^10', bin('^', num(2), num(10)), 1024],
    ['-(3)', neg(num(3)), -3],
    ['1 < 2 && 2 <= 2', bin('&&', bin('<', num(1), num(2)), bin('<=', num(2), num(2))), 1],
    ['0 || 0', bin('||', num(0), num(0)), 0],
  ])('%s (identity)', (_what, expr, expected) => {
    expect(evaluate(expr)).toBeCloseTo(expected, 12);
  });

  // The unit step u(x): 1 for x > 0, 0 otherwise (ngspice manual, B source functions).
  test('u(x) is the unit step', () => {
    expect(evaluate(call('u', num(2)))).toBe(1);
    expect(evaluate(call('u', num(0)))).toBe(0);
    expect(evaluate(call('u', num(-1)))).toBe(0);
  });

  // limit(x, lo, hi) clamps x into [lo, hi] (the definition this project uses; see the elements notes).
  test('limit clamps', () => {
    expect(evaluate(call('limit', num(5), num(1), num(3)))).toBe(3);
    expect(evaluate(call('limit', num(0), num(1), num(3)))).toBe(1);
    expect(evaluate(call('limit', num(2), num(1), num(3)))).toBe(2);
  });

  test('if(c, a, b) and the ternary evaluate only the taken side', () => {
    const { evaluate, sink } = setup();
    // The untaken side divides by zero: no diagnostic may come from it.
    expect(evaluate(call('if', num(1), num(7), bin('/', num(1), num(0))))).toBe(7);
    expect(evaluate({ kind: 'ternary', condition: num(0), whenTrue: bin('/', num(1), num(0)), whenFalse: num(9), span: R })).toBe(9);
    expect(sink.diagnostics).toEqual([]);
  });
});

describe('failures are diagnostics at their span, never exceptions', () => {
  test('an unknown name is reported at its own range', () => {
    const { evaluate, sink } = setup();
    expect(evaluate(bin('+', num(1), id('rload', at(4, 5)), at(0, 9)))).toBeUndefined();
    expect(sink.diagnostics).toHaveLength(1);
    expect(sink.diagnostics[0]!.message).toMatch(/unknown parameter rload/);
    expect(sink.diagnostics[0]!.location.range).toEqual({ start: { line: 0, column: 4, offset: 4 }, end: { line: 0, column: 9, offset: 9 } });
  });

  test('division by zero, a wrong argument count and an unknown function', () => {
    const { evaluate, sink } = setup();
    expect(evaluate(bin('/', num(1), num(0)))).toBeUndefined();
    expect(evaluate(call('sqrt', num(1), num(2)))).toBeUndefined();
    expect(evaluate(call('frobnicate', num(1)))).toBeUndefined();
    expect(evaluate(call('sqrt', num(-1)))).toBeUndefined();
    expect(sink.diagnostics.map((d) => d.message)).toEqual([
      'division by zero',
      'sqrt takes 1 argument(s), not 2',
      'unknown function frobnicate',
      'sqrt(-1) is not a real number',
    ]);
  });

  test('one failure gives one diagnostic, not one per enclosing operator', () => {
    const { evaluate, sink } = setup();
    expect(evaluate(bin('*', bin('+', id('missing'), num(1)), num(2)))).toBeUndefined();
    expect(sink.diagnostics).toHaveLength(1);
  });

  test('a very deep tree is refused, not a stack overflow', () => {
    const { evaluate, sink } = setup();
    let expr: Expr = num(1);
    for (let i = 0; i < 100_000; i++) expr = neg(expr);
    expect(evaluate(expr)).toBeUndefined();
    expect(sink.diagnostics[0]!.message).toMatch(/nested too deeply/);
  });
});

describe('parameters and user functions', () => {
  test('parameters evaluate in dependency order, whatever order they are written in', () => {
    const { scope, evaluate } = setup();
    // .param total={half*2} half={base/2} base=10
    scope.define('total', { kind: 'expression', text: '{half*2}', expr: bin('*', id('half'), num(2)), span: R }, 'test.cir', R);
    scope.define('half', { kind: 'expression', text: '{base/2}', expr: bin('/', id('base'), num(2)), span: R }, 'test.cir', R);
    scope.define('base', { kind: 'number', text: '10', value: 10, span: R }, 'test.cir', R);
    expect(evaluate(id('total'))).toBe(10);
  });

  test('a cycle is reported once, at the .param where it closes, and names the chain', () => {
    const { scope, sink, evaluate } = setup();
    const aRange = at(7, 5);
    scope.define('a', { kind: 'expression', text: '{b+1}', expr: bin('+', id('b'), num(1)), span: R }, 'test.cir', aRange);
    scope.define('b', { kind: 'expression', text: '{a*2}', expr: bin('*', id('a'), num(2)), span: R }, 'test.cir', at(20, 5));
    expect(evaluate(id('a'))).toBeUndefined();
    expect(evaluate(id('b'))).toBeUndefined();
    expect(sink.diagnostics).toHaveLength(1);
    expect(sink.diagnostics[0]!.message).toBe('parameter a depends on itself: a → b → a');
    expect(sink.diagnostics[0]!.location.range).toEqual({ start: { line: 0, column: 7, offset: 7 }, end: { line: 0, column: 12, offset: 12 } });
  });

  test('an inner scope sees its own values first, then its parent', () => {
    const { scope, evaluate } = setup();
    scope.setValue('r', 1000, 'test.cir', R);
    scope.setValue('k', 2, 'test.cir', R);
    const inner = scope.child();
    inner.setValue('r', 47, 'test.cir', R);
    expect(evaluate(bin('*', id('R'), id('k')), inner)).toBe(94);
    expect(evaluate(id('r'), scope)).toBe(1000);
  });

  test('.func: arguments shadow parameters, and a recursive function is stopped', () => {
    const { scope, sink, evaluate } = setup();
    scope.setValue('x', 100, 'test.cir', R);
    // .func twice(x) = {2*x}
    scope.defineFunction({ name: 'twice', parameters: ['x'], body: bin('*', num(2), id('x')), uri: 'test.cir', scope });
    expect(evaluate(call('twice', num(3)))).toBe(6);
    // .func forever(x) = {forever(x)}
    scope.defineFunction({ name: 'forever', parameters: ['x'], body: call('forever', id('x')), uri: 'test.cir', scope });
    expect(evaluate(call('forever', num(1)))).toBeUndefined();
    expect(sink.diagnostics[0]!.message).toMatch(/calls itself too deeply/);
  });

  test('pi is a constant unless a parameter takes the name', () => {
    const { scope, evaluate } = setup();
    expect(evaluate(id('PI'))).toBeCloseTo(Math.PI, 15);
    scope.setValue('pi', 3, 'test.cir', R);
    expect(evaluate(id('pi'))).toBe(3);
  });

  test('number literals are handed to the ambiguity check', () => {
    const { scope, numbers } = setup();
    scope.evaluateField({ kind: 'expression', text: '{4k7*2}', expr: bin('*', num(4000, '4k7'), num(2)), span: R }, 'test.cir');
    expect(numbers).toEqual(['4k7', '2']);
  });
});
