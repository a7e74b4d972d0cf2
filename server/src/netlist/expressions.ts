// Our own evaluator for SPICE expressions (`{…}`, `'…'`, `.param`, `.func`, `.if`).
// No `eval`: it walks the typed tree. It never throws; every failure is reported
// once, at the span where it happens, and the value is then undefined.
import type { Expr, Span } from '@pnlint/grammar';
import type { DiagnosticSink } from './diagnostics.js';

/** A parameter that exists but could not be evaluated (already reported): callers stay silent. */
export const FAILED = Symbol('failed');

export interface UserFunction {
  /** As written. */
  name: string;
  /** Lower-cased argument names. */
  parameters: string[];
  body: Expr;
  /** The file the `.func` is written in. */
  uri: string;
  /** What the body sees besides its arguments: the scope the `.func` was written in. */
  scope: ExpressionScope;
}

export interface ExpressionScope {
  /** A parameter's value by lower-cased name; undefined when no such parameter exists. */
  parameter(name: string): number | typeof FAILED | undefined;
  /** A `.func` by lower-cased name. */
  userFunction(name: string): UserFunction | undefined;
}

export interface EvaluationContext {
  scope: ExpressionScope;
  /** The file the expression is written in: diagnostics carry it. */
  uri: string;
  sink: DiagnosticSink;
  /** Called for each number literal, so that ambiguous values (`4k7`) are reported wherever they appear. */
  onNumber?: (text: string, span: Span) => void;
}

/** Deeper trees than this are reported instead of risking the call stack. */
const MAXIMUM_NESTING = 400;
/** A `.func` calling itself (directly or not) is stopped at this depth. */
const MAXIMUM_CALL_DEPTH = 64;

const CONSTANTS: Readonly<Record<string, number>> = { pi: Math.PI };

type Builtin = { arity: number; apply: (args: number[]) => number };

// ngspice 39, checked by running it: `log` is the natural logarithm, `nint` rounds
// half to even, `int` truncates toward zero, `pwr(x, y)` is |x|^y.
function roundHalfToEven(x: number): number {
  const floor = Math.floor(x);
  const difference = x - floor;
  if (difference > 0.5) return floor + 1;
  if (difference < 0.5) return floor;
  return floor % 2 === 0 ? floor : floor + 1;
}

const BUILTINS: Readonly<Record<string, Builtin>> = {
  abs: { arity: 1, apply: ([x]) => Math.abs(x!) },
  sqrt: { arity: 1, apply: ([x]) => Math.sqrt(x!) },
  exp: { arity: 1, apply: ([x]) => Math.exp(x!) },
  ln: { arity: 1, apply: ([x]) => Math.log(x!) },
  log: { arity: 1, apply: ([x]) => Math.log(x!) },
  log10: { arity: 1, apply: ([x]) => Math.log10(x!) },
  sin: { arity: 1, apply: ([x]) => Math.sin(x!) },
  cos: { arity: 1, apply: ([x]) => Math.cos(x!) },
  tan: { arity: 1, apply: ([x]) => Math.tan(x!) },
  asin: { arity: 1, apply: ([x]) => Math.asin(x!) },
  acos: { arity: 1, apply: ([x]) => Math.acos(x!) },
  atan: { arity: 1, apply: ([x]) => Math.atan(x!) },
  atan2: { arity: 2, apply: ([y, x]) => Math.atan2(y!, x!) },
  sinh: { arity: 1, apply: ([x]) => Math.sinh(x!) },
  cosh: { arity: 1, apply: ([x]) => Math.cosh(x!) },
  tanh: { arity: 1, apply: ([x]) => Math.tanh(x!) },
  pow: { arity: 2, apply: ([x, y]) => Math.pow(x!, y!) },
  pwr: { arity: 2, apply: ([x, y]) => Math.pow(Math.abs(x!), y!) },
  min: { arity: 2, apply: ([a, b]) => Math.min(a!, b!) },
  max: { arity: 2, apply: ([a, b]) => Math.max(a!, b!) },
  floor: { arity: 1, apply: ([x]) => Math.floor(x!) },
  ceil: { arity: 1, apply: ([x]) => Math.ceil(x!) },
  int: { arity: 1, apply: ([x]) => Math.trunc(x!) },
  nint: { arity: 1, apply: ([x]) => roundHalfToEven(x!) },
  sgn: { arity: 1, apply: ([x]) => Math.sign(x!) },
  // Unit step: 1 for positive x, else 0 (ngspice manual, B source functions).
  u: { arity: 1, apply: ([x]) => (x! > 0 ? 1 : 0) },
  limit: { arity: 3, apply: ([x, low, high]) => Math.min(Math.max(x!, low!), high!) },
};

/** Names the evaluator knows as functions, for completion and hover. */
export const BUILTIN_FUNCTIONS: readonly string[] = [...Object.keys(BUILTINS), 'if'];

function fail(context: EvaluationContext, span: Span, message: string): undefined {
  context.sink.error(context.uri, span, message);
  return undefined;
}

function finite(context: EvaluationContext, span: Span, value: number, what: string): number | undefined {
  if (Number.isFinite(value)) return value;
  return fail(context, span, `${what} is ${Number.isNaN(value) ? 'not a real number' : 'infinite'}`);
}

/** The value of `expr`, or undefined after reporting why there is none. */
export function evaluateExpression(expr: Expr, context: EvaluationContext): number | undefined {
  return evaluate(expr, context, 0, 0);
}

function evaluate(expr: Expr, context: EvaluationContext, nesting: number, calls: number): number | undefined {
  if (nesting > MAXIMUM_NESTING) return fail(context, expr.span, 'expression is nested too deeply to evaluate');
  const next = (e: Expr) => evaluate(e, context, nesting + 1, calls);
  switch (expr.kind) {
    case 'num':
      context.onNumber?.(expr.text, expr.span);
      return expr.value;
    case 'ident': {
      const name = expr.name.toLowerCase();
      const value = context.scope.parameter(name);
      if (value === FAILED) return undefined;
      if (value !== undefined) return value;
      const constant = CONSTANTS[name];
      if (constant !== undefined) return constant;
      return fail(context, expr.span, `unknown parameter ${expr.name}`);
    }
    case 'unary': {
      const operand = next(expr.operand);
      if (operand === undefined) return undefined;
      if (expr.op === '-') return -operand;
      if (expr.op === '!') return operand === 0 ? 1 : 0;
      return operand;
    }
    case 'ternary': {
      const condition = next(expr.condition);
      if (condition === undefined) return undefined;
      return next(condition !== 0 ? expr.whenTrue : expr.whenFalse);
    }
    case 'binary': {
      // Both sides are evaluated (no short-circuit) so that every error is shown.
      const left = next(expr.left);
      const right = next(expr.right);
      if (left === undefined || right === undefined) return undefined;
      switch (expr.op) {
        case '+':
          return finite(context, expr.span, left + right, 'the sum');
        case '-':
          return finite(context, expr.span, left - right, 'the difference');
        case '*':
          return finite(context, expr.span, left * right, 'the product');
        case '/':
          if (right === 0) return fail(context, expr.span, 'division by zero');
          return finite(context, expr.span, left / right, 'the quotient');
        case '%':
          if (right === 0) return fail(context, expr.span, 'remainder of a division by zero');
          return left % right;
        case '^':
        case '**':
          return finite(context, expr.span, Math.pow(left, right), 'the power');
        case '==':
          return left === right ? 1 : 0;
        case '!=':
          return left !== right ? 1 : 0;
        case '<':
          return left < right ? 1 : 0;
        case '<=':
          return left <= right ? 1 : 0;
        case '>':
          return left > right ? 1 : 0;
        case '>=':
          return left >= right ? 1 : 0;
        case '&&':
          return left !== 0 && right !== 0 ? 1 : 0;
        case '||':
          return left !== 0 || right !== 0 ? 1 : 0;
      }
      return undefined;
    }
    case 'call':
      return call(expr, context, nesting, calls);
  }
}

function call(
  expr: Extract<Expr, { kind: 'call' }>,
  context: EvaluationContext,
  nesting: number,
  calls: number,
): number | undefined {
  const name = expr.name.toLowerCase();
  const next = (e: Expr) => evaluate(e, context, nesting + 1, calls);
  const user = context.scope.userFunction(name);
  if (user) {
    if (expr.args.length !== user.parameters.length) {
      return fail(context, expr.span, `${user.name} takes ${user.parameters.length} argument(s), not ${expr.args.length}`);
    }
    if (calls >= MAXIMUM_CALL_DEPTH) return fail(context, expr.span, `${user.name} calls itself too deeply to evaluate`);
    const values: number[] = [];
    for (const arg of expr.args) {
      const value = next(arg);
      if (value === undefined) return undefined;
      values.push(value);
    }
    const argumentsScope: ExpressionScope = {
      parameter: (n) => {
        const index = user.parameters.indexOf(n);
        return index >= 0 ? values[index] : user.scope.parameter(n);
      },
      userFunction: (n) => user.scope.userFunction(n),
    };
    const bodyContext: EvaluationContext = { ...context, scope: argumentsScope, uri: user.uri };
    return evaluate(user.body, bodyContext, nesting + 1, calls + 1);
  }
  if (name === 'if') {
    if (expr.args.length !== 3) return fail(context, expr.span, `if takes 3 arguments (condition, then, else), not ${expr.args.length}`);
    const condition = next(expr.args[0]!);
    if (condition === undefined) return undefined;
    return next(condition !== 0 ? expr.args[1]! : expr.args[2]!);
  }
  const builtin = BUILTINS[name];
  if (!builtin) return fail(context, expr.span, `unknown function ${expr.name}`);
  if (expr.args.length !== builtin.arity) {
    return fail(context, expr.span, `${name} takes ${builtin.arity} argument(s), not ${expr.args.length}`);
  }
  const values: number[] = [];
  for (const arg of expr.args) {
    const value = next(arg);
    if (value === undefined) return undefined;
    values.push(value);
  }
  return finite(context, expr.span, builtin.apply(values), `${name}(${values.join(', ')})`);
}
