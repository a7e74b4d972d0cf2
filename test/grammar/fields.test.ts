// Element fields and dot commands. Expected forms are the netlist syntax of the SPICE3
// user's manual (Quarles, 1989) and of ngspice 39; positions are counted in each input.
import { describe, expect, test } from 'vitest';
import { parse, type ElementStatement, type Field, type Statement } from '@pnlint/grammar';
import { covered } from './helpers.js';

function only<K extends Statement['kind']>(text: string, kind: K): Extract<Statement, { kind: K }> {
  const result = parse(text);
  expect(result.diagnostics).toEqual([]);
  const found = result.statements.filter((statement) => statement.kind === kind);
  expect(found).toHaveLength(1);
  return found[0] as Extract<Statement, { kind: K }>;
}

/** A compact view of a field: `word`, `1.5(number text)`, `key=…`, `name(…)`, `{expression}`. */
function shape(field: Field): string {
  switch (field.kind) {
    case 'word':
      return field.text;
    case 'number':
      return `#${field.text}`;
    case 'expression':
      return `expr:${field.text}`;
    case 'assign':
      return `${field.key.text}=${shape(field.value)}`;
    case 'group':
      return `${field.name?.text ?? ''}(${field.items.map(shape).join(' ')})`;
  }
}

describe('words and numbers', () => {
  test('a word that begins like a number is a number, its text as written (SPICE3 user\'s manual, Quarles 1989)', () => {
    const r1 = only('title\nR1 0 12 4k7\n', 'element');
    expect(r1.fields.map(shape)).toEqual(['#0', '#12', '#4k7']);
    const all = parse('title\nC1 a 0 1uF\nR2 a 0 10kOhm\nR3 a 0 22x0k\nV1 a 0 -5\nV2 a 0 1e-3\n').statements as ElementStatement[];
    const values = all.slice(1).map((statement) => statement.fields[2]);
    // Values as a SPICE engine reads them (SPICE3 user's manual, Quarles 1989; ngspice 39 for 22x0k).
    expect(values.map((field) => field?.kind === 'number' && field.value)).toEqual([1e-6, 10e3, 22, -5, 1e-3]);
  });

  test('node names are permissive words (ngspice 39 accepts them)', () => {
    const d1 = only('title\nD1 out+ n1.x DLED\n', 'element');
    expect(d1.fields.map(shape)).toEqual(['out+', 'n1.x', 'DLED']);
    const r1 = only('title\nR1 net:a vcc_3v3 #1 2\n', 'element');
    expect(r1.fields.map(shape)).toEqual(['net:a', 'vcc_3v3', '#1', '#2']);
  });

  test('the element letter is the name\'s first letter, upper-cased', () => {
    const result = parse('title\nd1 a k dmod\nxamp in out opamp\n');
    expect(result.statements.slice(1).map((statement) => (statement as ElementStatement).letter)).toEqual(['D', 'X']);
  });
});

describe('groups and key=value', () => {
  test('source functions with and without commas (SPICE3 user\'s manual, Quarles 1989)', () => {
    const result = parse(
      'title\nV1 a 0 DC 0 AC 1 SIN(0 1 1k)\nV2 b 0 PULSE(0, 5, 0, 1n, 1n, 1u, 2u)\nV3 c 0 PWL(0 0 1m 5)\nV4 d 0 SIN (0 1 1k)\nV5 e 0 EXP(0 1 1n 1n)\n',
    );
    expect(result.diagnostics).toEqual([]);
    const [v1, v2, v3, v4, v5] = result.statements.slice(1) as ElementStatement[];
    expect(v1!.fields.map(shape)).toEqual(['a', '#0', 'DC', '#0', 'AC', '#1', 'SIN(#0 #1 #1k)']);
    expect(v2!.fields.map(shape)).toEqual(['b', '#0', 'PULSE(#0 #5 #0 #1n #1n #1u #2u)']);
    expect(v3!.fields.map(shape)).toEqual(['c', '#0', 'PWL(#0 #0 #1m #5)']);
    expect(v4!.fields.map(shape)).toEqual(['d', '#0', 'SIN(#0 #1 #1k)']);
    expect(v5!.fields.map(shape)).toEqual(['e', '#0', 'EXP(#0 #1 #1n #1n)']);
  });

  test('a group\'s range runs from its name to its closing parenthesis', () => {
    const text = 'title\nV1 a 0 SIN(0 1\n+ 1k)\n';
    const v1 = only(text, 'element');
    expect(covered(text, v1.fields[2]!.span)).toBe('SIN(0 1\n+ 1k)');
  });

  test('key=value, with white space around = too, and lists such as ic=1,2', () => {
    const text = 'title\nD1 a k DMOD area = 2 off ic=0.6\nL1 a b 1u ic=1,2 m=2\n';
    const result = parse(text);
    expect(result.diagnostics).toEqual([]);
    const [d1, l1] = result.statements.slice(1) as ElementStatement[];
    expect(d1!.fields.map(shape)).toEqual(['a', 'k', 'DMOD', 'area=#2', 'off', 'ic=#0.6']);
    expect(l1!.fields.map(shape)).toEqual(['a', 'b', '#1u', 'ic=(#1 #2)', 'm=#2']);
    expect(covered(text, d1!.fields[3]!.span)).toBe('area = 2');
  });

  test('.model with and without parentheses (SPICE3 user\'s manual, Quarles 1989)', () => {
    const withParens = only('title\n.model DLED D(IS=1e-18 N=1.8, RS=2)\n', 'model');
    const without = only('title\n.model DLED D IS=1e-18 N=1.8 RS=2\n', 'model');
    const spaced = only('title\n.model DLED D (IS=1e-18 N=1.8 RS=2)\n', 'model');
    for (const model of [withParens, without, spaced]) {
      expect(model.name.text).toBe('DLED');
      expect(model.type.text).toBe('D');
      expect(model.params.map(shape)).toEqual(['IS=#1e-18', 'N=#1.8', 'RS=#2']);
      expect(model.extra).toEqual([]);
    }
  });

  test('a model named like a number keeps its name as a word', () => {
    const model = only('title\n.model 1N4148X D(IS=2.5n)\n', 'model');
    expect(model.name).toMatchObject({ kind: 'word', text: '1N4148X' });
  });

  test('code-model lines with brackets and behavioural sources read without error (ngspice 39 syntax)', () => {
    const result = parse('title\nA1 [in1 in2] out gate\n.model gate d_and(rise_delay=1n)\nB1 out 0 V={v(a)*2}\nB2 o2 0 I=\'v(a) > 1 ? 1m : 0\'\n');
    expect(result.diagnostics).toEqual([]);
    const [a1, , b1] = result.statements.slice(1) as ElementStatement[];
    expect(a1!.fields.map(shape)).toEqual(['[in1', 'in2]', 'out', 'gate']);
    expect(b1!.fields.map(shape)).toEqual(['out', '#0', 'V=expr:{v(a)*2}']);
  });

  test('instance parameters: m=, temp=, and a subcircuit call with params: (ngspice 39)', () => {
    const x1 = only('title\nX1 in out chan params: rload=22k gain={2*g}\n', 'element');
    expect(x1.fields.map(shape)).toEqual(['in', 'out', 'chan', 'params:', 'rload=#22k', 'gain=expr:{2*g}']);
    const q1 = only('title\nQ1 c b e QN area=2 m=4 temp=50\n', 'element');
    expect(q1.fields.map(shape)).toEqual(['c', 'b', 'e', 'QN', 'area=#2', 'm=#4', 'temp=#50']);
  });

  test('.ic v(out)=1: a group may be the key', () => {
    const ic = only('title\n.ic v(out)=1 v(in)=0\n', 'dot');
    expect(ic.command).toBe('ic');
    expect(ic.fields.map(shape)).toEqual(['v(out)=#1', 'v(in)=#0']);
    expect(ic.fields[0]).toMatchObject({ kind: 'assign', keyGroup: { kind: 'group', name: { text: 'v' } } });
  });
});

describe('dot commands', () => {
  test('.subckt with ports, params:, nested subcircuits, and .ends', () => {
    const text = 'title\n.subckt outer a b params: r=1k\n.subckt inner x y\nR1 x y {r}\n.ends inner\nX1 a b inner\n.ends outer\n';
    const outer = only(text, 'subckt');
    expect(outer.name.text).toBe('outer');
    expect(outer.ports.map((port) => port.text)).toEqual(['a', 'b']);
    expect(outer.params.map(shape)).toEqual(['r=#1k']);
    expect(outer.body.map((statement) => statement.kind)).toEqual(['subckt', 'element']);
    const inner = outer.body[0]!;
    expect(inner.kind === 'subckt' && inner.body.map((statement) => statement.kind)).toEqual(['element']);
    expect(covered(text, outer.ends!)).toBe('.ends outer');
    expect(covered(text, outer.span)).toBe(text.slice(text.indexOf('.subckt outer'), text.length - 1));
  });

  test('.subckt defaults without params:, and params:r=1k written without a space', () => {
    expect(only('title\n.subckt cell a b r=1k\n.ends\n', 'subckt').params.map(shape)).toEqual(['r=#1k']);
    expect(only('title\n.subckt cell a b params:r=1k\n.ends\n', 'subckt').params.map(shape)).toEqual(['r=#1k']);
  });

  test('.param with braces, without braces and with spaces', () => {
    const text = 'title\n.param a = 2*b c={x+1} d=1k e = 3 * f, g=\'a/2\'\n';
    const param = only(text, 'param');
    expect(param.assigns.map(shape)).toEqual(['a=expr:2*b', 'c=expr:{x+1}', 'd=#1k', 'e=expr:3 * f', 'g=expr:\'a/2\'']);
    const a = param.assigns[0]!.value;
    expect(a.kind === 'expression' && a.expr).toMatchObject({ kind: 'binary', op: '*' });
    expect(covered(text, param.assigns[3]!.value.span)).toBe('3 * f');
  });

  test('.param a = x == y keeps == inside the expression', () => {
    const param = only('title\n.param a = x == y b = 2\n', 'param');
    expect(param.assigns.map(shape)).toEqual(['a=expr:x == y', 'b=#2']);
  });

  test('.func with braces and with =', () => {
    const braces = only('title\n.func half(x) {x/2}\n', 'func');
    const equals = only('title\n.func mix(a, b) = a*0.3 + b*0.7\n', 'func');
    expect(braces.name.text).toBe('half');
    expect(braces.args.map((arg) => arg.text)).toEqual(['x']);
    expect(braces.body?.expr).toMatchObject({ kind: 'binary', op: '/' });
    expect(equals.args.map((arg) => arg.text)).toEqual(['a', 'b']);
    expect(equals.body?.text).toBe('a*0.3 + b*0.7');
  });

  test('.include and .inc, quoted or bare; the path range excludes the quotes', () => {
    const text = 'title\n.include "models/leds.lib"\n.inc ../common/diodes.inc\n';
    const result = parse(text);
    expect(result.diagnostics).toEqual([]);
    const [quoted, bare] = result.statements.slice(1);
    expect(quoted).toMatchObject({ kind: 'include', path: 'models/leds.lib' });
    expect(bare).toMatchObject({ kind: 'include', path: '../common/diodes.inc' });
    expect(covered(text, quoted!.kind === 'include' ? quoted!.pathSpan : quoted!.span)).toBe('models/leds.lib');
  });

  test('.lib path section is a reference; .lib section … .endl is a definition', () => {
    const reference = only('title\n.lib "corners.lib" slow\n', 'libReference');
    expect(reference.path).toBe('corners.lib');
    expect(reference.section.text).toBe('slow');
    const text = '.lib slow\n.model DSLOW D(IS=1e-15)\n.endl slow\n';
    const section = parse(text, { isInclude: true });
    expect(section.diagnostics).toEqual([]);
    const definition = section.statements[0]!;
    expect(definition).toMatchObject({ kind: 'libSection', name: { text: 'slow' } });
    expect(definition.kind === 'libSection' && definition.body.map((statement) => statement.kind)).toEqual(['model']);
    expect(definition.kind === 'libSection' && covered(text, definition.endl!)).toBe('.endl slow');
  });

  test('.global', () => {
    expect(only('title\n.global vcc gnd 5\n', 'global').nodes.map((node) => node.text)).toEqual(['vcc', 'gnd', '5']);
  });

  test('.if / .elseif / .else / .endif, nested, with bodies', () => {
    const text =
      'title\n.if (corner == 1)\nR1 a b 1k\n.if (fast)\nR9 a b 9\n.endif\n.elseif (corner == 2)\nR1 a b 2k\n.else\nR1 a b 3k\n.endif\n';
    const block = only(text, 'if');
    expect(block.branches).toHaveLength(3);
    expect(block.branches.map((branch) => branch.condition?.text)).toEqual(['corner == 1', 'corner == 2', undefined]);
    expect(block.branches[0]!.body.map((statement) => statement.kind)).toEqual(['element', 'if']);
    expect(block.branches[0]!.condition?.expr).toMatchObject({ kind: 'binary', op: '==' });
    expect(covered(text, block.endif!)).toBe('.endif');
    expect(covered(text, block.span)).toBe(text.slice(text.indexOf('.if'), text.length - 1));
  });

  test('.control … .endc is opaque: its lines are not circuit', () => {
    const text = "title\nR1 a 0 1k\n.control\nlet x = 'unclosed\nR5 a b {\n.endc\nR2 a 0 2k\n";
    const result = parse(text);
    expect(result.diagnostics).toEqual([]);
    expect(result.statements.map((statement) => statement.kind)).toEqual(['title', 'element', 'control', 'element']);
    const control = result.statements[2]!;
    expect(control.kind === 'control' && control.text).toBe("let x = 'unclosed\nR5 a b {\n");
    expect(covered(text, control.span)).toBe(".control\nlet x = 'unclosed\nR5 a b {\n.endc");
  });

  test('known commands fold their aliases (ngspice 39 command set)', () => {
    const result = parse(
      'title\n.options reltol=1e-4\n.option gmin=1e-12\n.opt abstol=1e-12\n.temp 27\n.nodeset v(a)=1\n.op\n.dc V1 0 5 0.1\n.ac dec 10 1 1meg\n.tran 1u 1m\n.meas tran vmax MAX v(out)\n.measure tran vmin MIN v(out)\n.save v(out) @d1[id]\n.print tran v(out)\n.plot dc v(out)\n.noise v(out) V1 dec 10 1 1k\n.tf v(out) V1\n.sens v(out)\n.pz a 0 b 0 vol pz\n.disto dec 10 1k 1meg\n.four 1k v(out)\n.probe v(out)\n.width out=80\n.csparam k=2\n',
    );
    expect(result.diagnostics).toEqual([]);
    const commands = result.statements.slice(1).map((statement) => statement.kind === 'dot' && `${statement.command}:${statement.known}`);
    expect(commands).toEqual([
      'options:true', 'options:true', 'options:true', 'temp:true', 'nodeset:true', 'op:true', 'dc:true', 'ac:true',
      'tran:true', 'meas:true', 'meas:true', 'save:true', 'print:true', 'plot:true', 'noise:true', 'tf:true',
      'sens:true', 'pz:true', 'disto:true', 'four:true', 'probe:true', 'width:true', 'csparam:true',
    ]);
  });

  test('an unknown dot command is a warning, never an error', () => {
    const text = "title\n.frobnicate all 'the things\n";
    const result = parse(text);
    expect(result.diagnostics).toHaveLength(1);
    expect(result.diagnostics[0]).toMatchObject({ severity: 'warning', code: 'unknown-command' });
    expect(covered(text, result.diagnostics[0]!.range)).toBe('.frobnicate');
    expect(result.statements[1]).toMatchObject({ kind: 'dot', command: 'frobnicate', known: false });
  });

  test('.title keeps its text whole, apostrophes included', () => {
    const title = only("title\n.title the bench's supply\n", 'dot');
    expect(title.fields.map(shape)).toEqual(["the bench's supply"]);
  });
});

describe('ngspice 39 forms with an expression key', () => {
  test('E source TABLE {expr} = (x,y) …: the expression is the key', () => {
    const e1 = only('title\nE2 e2 0 TABLE {v(vcc)} = (0,0) (10,1)\n', 'element');
    expect(e1.fields.map(shape)).toEqual(['e2', '#0', 'TABLE', '{v(vcc)}=(#0 #0)', '(#10 #1)']);
    expect(e1.fields[3]).toMatchObject({ kind: 'assign', keyExpression: { kind: 'expression', expr: { kind: 'call', name: 'v' } } });
  });
});

describe('behavioural sources', () => {
  test('V= and I= take an expression with or without braces, up to the next key= (ngspice 39 reads both)', () => {
    const text = 'title\nB3 b3 0 V=(v(vcc)==5) ? 3 : 0 tc1=0.001\n';
    const b3 = only(text, 'element');
    expect(b3.fields.map(shape)).toEqual(['b3', '#0', 'V=expr:(v(vcc)==5) ? 3 : 0', 'tc1=#0.001']);
    const value = b3.fields[2]!;
    expect(value.kind === 'assign' && value.value.kind === 'expression' && value.value.expr).toMatchObject({ kind: 'ternary' });
  });
});
