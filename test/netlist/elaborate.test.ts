// Elaboration of whole netlists (parsed by the grammar package). Circuits are
// scenarios of our own; expected values name their source beside each check.
import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { element, elaborateText, memoryReader, problems, spanOf, TOP, where } from './helpers.js';
import { elaborate } from '../../server/src/netlist/index.js';

describe('flat circuits', () => {
  const text = [
    'indicator board',
    'V1 VCC 0 DC 5',
    'R1 vcc Mid 4.7k',
    'R2 mid GND r=10k',
    'R3 mid 0 1k m=2',
    'C1 MID 0 100n ic=2.5',
    'L1 vcc out 10uH',
    'RLOAD out gnd 1Meg',
    '.end',
  ].join('\n');
  const circuit = elaborateText(text);

  test('title, values with scale factors and units (SPICE3 user manual, Quarles 1989: k, Meg, n, u)', () => {
    expect(circuit.title).toBe('indicator board');
    expect(element(circuit, 'R1', 'R').resistance).toBe(4700);
    expect(element(circuit, 'R2', 'R').resistance).toBe(10_000);
    expect(element(circuit, 'C1', 'C').capacitance).toBeCloseTo(100e-9, 20);
    expect(element(circuit, 'C1', 'C').initialCondition).toBe(2.5);
    expect(element(circuit, 'L1', 'L').inductance).toBeCloseTo(10e-6, 20);
    expect(element(circuit, 'RLOAD', 'R').resistance).toBe(1e6);
    expect(problems(circuit)).toEqual([]);
  });

  // m= is that many elements in parallel: R/m (ngspice 39 manual, resistor instance parameters).
  test('m= multiplier on a resistor', () => {
    expect(element(circuit, 'R3', 'R').resistance).toBe(500);
  });

  // SPICE node names are case-insensitive; ground is 0, gnd its other name (product contract, circuit.ts).
  test('nodes compare case-insensitively, shown as first written; gnd is ground', () => {
    expect(circuit.nodes).toEqual(['0', 'VCC', 'Mid', 'out']);
    expect(element(circuit, 'R1').nodes).toEqual(['VCC', 'Mid']);
    expect(element(circuit, 'R2').nodes).toEqual(['Mid', '0']);
    expect(element(circuit, 'RLOAD').nodes).toEqual(['out', '0']);
  });

  test('every element keeps its line', () => {
    const r2 = element(circuit, 'R2');
    expect(r2.location.uri).toBe(TOP);
    expect(r2.location.range.start.line).toBe(3);
    expect(r2.instances).toEqual([]);
  });
});

describe('independent sources', () => {
  const text = [
    'sources',
    'V1 a 0 DC 5',
    'V2 b 0 3.3',
    'V3 c 0 dc 12 ac 1',
    'V4 d 0 AC 1',
    'V5 e 0 SIN(1.5 2 1k 0 0 90)',
    'V6 f 0 PULSE 0.7 5 1m',
    'V7 g 0 PWL(1m 2.5 2m 3)',
    'V8 h 0 EXP(0.3 4 1m)',
    'V9 i 0 SFFM(0.9 1)',
    'V10 j 0 DC 3 SIN(1.5 2 1k)',
    'I1 k 0 2m',
    'V11 l 0 SIN(1.5, 2, 1k, 1m, 0, 30)',
    '.tran 10u 20m',
    '.end',
  ].join('\n');
  const circuit = elaborateText(text);
  const dc = (name: string) => element(circuit, name, name.startsWith('I') ? 'I' : 'V').dc;

  test('DC values as written', () => {
    expect(dc('V1')).toBe(5);
    expect(dc('V2')).toBe(3.3);
    expect(dc('V3')).toBe(12);
    expect(dc('I1')).toBeCloseTo(2e-3, 15);
  });

  // ngspice 39, `.op` of this very deck: a source with only a time behaviour is
  // taken at its value at t = 0; AC alone is DC 0; a DC value wins over the waveform.
  test('the operating-point value of each source is what ngspice 39 uses', () => {
    expect(dc('V4')).toBe(0);
    expect(dc('V5')).toBeCloseTo(3.5, 12);
    expect(dc('V6')).toBeCloseTo(0.7, 12);
    expect(dc('V7')).toBeCloseTo(2.5, 12);
    expect(dc('V8')).toBeCloseTo(0.3, 12);
    expect(dc('V9')).toBeCloseTo(0.9, 12);
    expect(dc('V10')).toBe(3);
    expect(dc('V11')).toBeCloseTo(2.5, 12);
  });

  // Missing arguments take SPICE3's defaults (SPICE3 user's manual, Quarles 1989;
  // ngspice 39 manual): PULSE TR = TF = TSTEP, PW = PER = TSTOP; EXP TAU1 = TSTEP,
  // TD2 = TD1 + TSTEP, TAU2 = TSTEP; SFFM FC = FS = 1/TSTOP; SIN TD = THETA = 0.
  test('waveform defaults from .tran 10u 20m', () => {
    const close = (expected: Record<string, number | string>, actual: unknown) => {
      for (const [key, value] of Object.entries(expected)) {
        const got = (actual as Record<string, number | string>)[key];
        if (typeof value === 'number') expect(got, key).toBeCloseTo(value, 15);
        else expect(got, key).toBe(value);
      }
    };
    close({ shape: 'pulse', initial: 0.7, pulsed: 5, delay: 1e-3, rise: 10e-6, fall: 10e-6, width: 20e-3, period: 20e-3 }, element(circuit, 'V6', 'V').waveform);
    close({ shape: 'exp', initial: 0.3, pulsed: 4, riseDelay: 1e-3, riseTau: 10e-6, fallDelay: 1e-3 + 10e-6, fallTau: 10e-6 }, element(circuit, 'V8', 'V').waveform);
    const sffm = element(circuit, 'V9', 'V').waveform;
    expect(sffm).toMatchObject({ shape: 'sffm', offset: 0.9, amplitude: 1, modulationIndex: 0 });
    if (sffm?.shape !== 'sffm') throw new Error('not sffm');
    expect(sffm.carrier).toBeCloseTo(50, 9);
    expect(sffm.signal).toBeCloseTo(50, 9);
    expect(element(circuit, 'V5', 'V').waveform).toEqual({ shape: 'sin', offset: 1.5, amplitude: 2, frequency: 1000, delay: 0, damping: 0, phase: 90 });
    expect(element(circuit, 'V7', 'V').waveform).toEqual({ shape: 'pwl', points: [{ time: 1e-3, value: 2.5 }, { time: 2e-3, value: 3 }] });
  });

  test('no value at all: DC 0, with a note (ngspice 39 says "has no value, DC 0 assumed")', () => {
    const bare = elaborateText('t\nV1 a 0\nR1 a 0 1k\n');
    expect(element(bare, 'V1', 'V').dc).toBe(0);
    expect(bare.diagnostics.map((d) => d.message)).toEqual(['V1 has no value; SPICE engines assume DC 0']);
  });
});

describe('models', () => {
  const text = [
    'models',
    '.model DRED d(IS=1e-20 N=1.8 RS=2 CJ0=10p BV=5 IBV=10u iave=20m mfg=SomeMaker)',
    '.model dred D(is=1e-9)',
    '.model QN NPN(BF=200 VAF=100 frob=3)',
    '.model SWX SW(ron=1 roff=1Meg vt=2.5 vh=0.1)',
    'D1 a 0 dred',
    'D2 a 0 DRED 2 m=3 off',
    'Q1 c b 0 qn',
    'Q2 c b 0 sub1 QN 4',
    'S1 a 0 c 0 SWX on',
    'V1 a 0 1',
    '.end',
  ].join('\n');
  const circuit = elaborateText(text);

  test('names are case-insensitive; parameters lower-cased, aliases folded (cj0 → cjo)', () => {
    const d1 = element(circuit, 'D1', 'D');
    expect(d1.model.name).toBe('DRED');
    expect(d1.model.type).toBe('D');
    expect(Object.keys(d1.model.params).sort()).toEqual(['bv', 'cjo', 'iave', 'ibv', 'is', 'n', 'rs']);
    expect(d1.model.params['cjo']).toBeCloseTo(10e-12, 25);
    expect(d1.model.params['ibv']).toBeCloseTo(10e-6, 20);
    expect(d1.model.params['is']).toBe(1e-20);
    expect(circuit.models.get('dred')).toBe(d1.model);
  });

  // SPICE engines keep the first of two models of one name (ngspice 39, run here).
  test('a duplicate .model is a warning at the second, and the first is kept', () => {
    const duplicate = problems(circuit).filter((d) => d.message.startsWith('duplicate model'));
    expect(duplicate).toHaveLength(1);
    expect(where(duplicate[0]!)).toEqual(spanOf(text, 'dred', 0));
    expect(element(circuit, 'D1', 'D').model.params['is']).toBe(1e-20);
  });

  test('an unknown model parameter is a warning at that parameter', () => {
    const unknown = problems(circuit).filter((d) => d.message.includes('frob'));
    expect(unknown.map((d) => d.message)).toEqual(['frob is not a bipolar transistor model parameter; it is ignored']);
    expect(where(unknown[0]!)).toEqual(spanOf(text, 'frob'));
    expect(problems(circuit)).toHaveLength(3); // and the bare diode area below
  });

  test('instance fields: area, m, off; a 4th bipolar word is the substrate unless it names a model', () => {
    const d2 = element(circuit, 'D2', 'D');
    expect(d2.area).toBe(6); // area 2 × m 3: ngspice 39 reports @d[area] = 6 for area=2 m=3
    // …and m alone is kept, since a part's ratings apply to each of the m parts in parallel.
    expect(d2.multiplier).toBe(3);
    expect(element(circuit, 'D1', 'D').multiplier).toBeUndefined();
    // ngspice 39 stops on the bare area ("could not find a valid modelname"): a warning says so.
    expect(problems(circuit).map((d) => d.message)).toContain('ngspice does not accept a bare area on a diode line; write area=2');
    expect(d2.off).toBe(true);
    expect(element(circuit, 'Q1', 'Q').nodes).toEqual(['c', 'b', '0']);
    const q2 = element(circuit, 'Q2', 'Q');
    expect(q2.nodes).toEqual(['c', 'b', '0', 'sub1']);
    expect(q2.area).toBe(4);
    const s1 = element(circuit, 'S1', 'S');
    expect(s1.model.params).toEqual({ ron: 1, roff: 1e6, vt: 2.5, vh: 0.1 });
    expect(s1.initiallyOn).toBe(true);
  });

  test('a missing model: unknown-model warning, and the element is not simulated', () => {
    const missing = elaborateText('t\nD1 a 0 DLAMP\nV1 a 0 1\n');
    const [d] = problems(missing, 'unknown-model');
    expect(d!.message).toBe('model DLAMP not found: D1 is not checked');
    expect(d!.severity).toBe('warning');
    expect(where(d!)).toEqual([1, 7, 1, 12]);
    expect(element(missing, 'D1', 'unmodeled').reason).toBe('model DLAMP not found');
    // The checks match the diagnostic to its element, and know that a definition is missing.
    expect(d!.element).toBe('D1');
    expect(element(missing, 'D1', 'unmodeled').missingDefinition).toBe('DLAMP');
  });

  test('MOSFET defaults and levels', () => {
    const mos = elaborateText(
      't\n.model NCH NMOS(level=1 vto=1.5 kp=50u)\n.model BIG NMOS(level=54 toxe=2n)\nM1 d g 0 0 NCH w=10u\nM2 d g 0 0 BIG\n',
    );
    const m1 = element(mos, 'M1', 'M');
    expect(m1.width).toBeCloseTo(10e-6, 18);
    expect(m1.length).toBeCloseTo(100e-6, 18); // ngspice DEFL default, 100 µm
    expect(element(mos, 'M2', 'unmodeled').reason).toMatch(/level 54.*level 1 only/);
    expect(problems(mos)).toEqual([]); // level 54 parameters are not checked against the level 1–3 list
  });
});

describe('subcircuits', () => {
  const text = [
    'status lamps',
    '.global vbus',
    'V1 vbus 0 12',
    'XA in gnd lamp rs=2k',
    'XB in 0 lamp',
    'XC out 0 driver gain=3',
    '.subckt lamp top bottom rs=1k',
    'R1 top mid {rs}',
    'D1 mid bottom DLOCAL',
    'R9 vbus Top 10k',
    '.model DLOCAL D(is={rs*1e-24})',
    '.ends lamp',
    '.subckt driver p q gain=1',
    'X1 p n1 stage',
    'R3 n1 q {gain*100}',
    '.subckt stage a b',
    'R3 a b {gain*10}',
    '.ends',
    '.ends driver',
    '.end',
  ].join('\n');
  const circuit = elaborateText(text);

  test('hierarchical names: X2.D1, internal node X2.a, nested X2.X1.R3', () => {
    expect(circuit.elements.map((e) => e.name)).toEqual(['V1', 'XA.R1', 'XA.D1', 'XA.R9', 'XB.R1', 'XB.D1', 'XB.R9', 'XC.X1.R3', 'XC.R3']);
    expect(element(circuit, 'XA.R1').nodes).toEqual(['in', 'XA.mid']);
    expect(element(circuit, 'XA.D1').nodes).toEqual(['XA.mid', '0']);
    expect(element(circuit, 'XC.X1.R3').nodes).toEqual(['out', 'XC.n1']);
  });

  test('ports map to the caller; ground and .global nodes are never prefixed', () => {
    expect(element(circuit, 'XA.R9').nodes).toEqual(['vbus', 'in']);
    expect(element(circuit, 'XB.D1').nodes).toEqual(['XB.mid', '0']);
  });

  test('instance parameters override defaults; nested definitions see the enclosing instance', () => {
    expect(element(circuit, 'XA.R1', 'R').resistance).toBe(2000);
    expect(element(circuit, 'XB.R1', 'R').resistance).toBe(1000);
    expect(element(circuit, 'XC.R3', 'R').resistance).toBe(300);
    expect(element(circuit, 'XC.X1.R3', 'R').resistance).toBe(30);
  });

  test('local models are evaluated per instance and keyed by the instance', () => {
    expect(element(circuit, 'XA.D1', 'D').model.params['is']).toBeCloseTo(2e-21, 30);
    expect(element(circuit, 'XB.D1', 'D').model.params['is']).toBeCloseTo(1e-21, 30);
    expect(circuit.models.has('xa.dlocal')).toBe(true);
    expect(circuit.models.has('xb.dlocal')).toBe(true);
  });

  test('instances record the X lines that placed each element, outermost first', () => {
    const r3 = element(circuit, 'XC.X1.R3');
    expect(r3.instances.map((l) => l.range.start.line)).toEqual([5, 13]);
    expect(problems(circuit)).toEqual([]);
  });

  test('params: keyword, and an override the subcircuit does not declare', () => {
    const text = 't\nX1 a 0 pad params: r=220 tol=5\n.subckt pad p q r=1k\nR1 p q {r}\n.ends\n';
    const c = elaborateText(text);
    expect(element(c, 'X1.R1', 'R').resistance).toBe(220);
    const [d] = problems(c);
    expect(d!.message).toBe('subcircuit pad declares no parameter tol; it is ignored');
    expect(where(d!)).toEqual(spanOf(text, 'tol'));
  });

  test('recursion is a diagnostic, not a stack overflow', () => {
    const looped = elaborateText('t\nX1 a 0 ping\n.subckt ping p q\nX2 p q pong\n.ends\n.subckt pong p q\nX3 p q ping\n.ends\n');
    const [d] = problems(looped);
    expect(d!.message).toBe('subcircuit ping contains itself (X1 → X1.X2 → X1.X2.X3); it is not expanded');
    expect(d!.location.range.start.line).toBe(6);
  });

  test('a missing subcircuit and a wrong port count', () => {
    const bad = elaborateText('t\nX1 a 0 nothere\nX2 a b c pair\n.subckt pair p q\nR1 p q 1k\n.ends\n');
    const messages = problems(bad).map((d) => d.message);
    expect(messages).toEqual([
      'subcircuit nothere not found: X1 is not checked',
      'X2 connects 3 nodes, but subcircuit pair has 2 ports (p q)',
    ]);
    expect(where(problems(bad)[0]!)).toEqual([1, 7, 1, 14]);
    // product.md: unknown-model is a model or subcircuit that is not defined.
    expect(problems(bad)[0]!.code).toBe('unknown-model');
    expect(problems(bad)[0]!.element).toBe('X1');
    // Kept as an element the solver leaves open, on the nodes it was given, so the checks can skip what it touches.
    const kept = element(bad, 'X1', 'unmodeled');
    expect(kept.nodes).toEqual(['a', '0']);
    expect(kept.letter).toBe('X');
    expect(kept.missingDefinition).toBe('nothere');
  });

  test('a missing subcircuit inside a subcircuit keeps the hierarchical name and nodes', () => {
    const nested = elaborateText('t\nX1 in 0 outer\n.subckt outer p q\nXU p mid q inner\nR1 mid q 1k\n.ends\n');
    const [d] = problems(nested, 'unknown-model');
    expect(d!.message).toBe('subcircuit inner not found: X1.XU is not checked');
    expect(element(nested, 'X1.XU', 'unmodeled').nodes).toEqual(['in', 'X1.mid', '0']);
  });

  test('a directive inside a subcircuit body gives one entry per instance', () => {
    const c = elaborateText('t\nX1 a 0 cell\nX2 b 0 cell\n.subckt cell p q\n*pnlint: rating D1 kind=led\nD1 p q DX\n.ends\n.model DX D\n');
    expect(c.directives.map((d) => [d.scope, d.nextElement, d.text])).toEqual([
      ['X1.', 'X1.D1', 'rating D1 kind=led'],
      ['X2.', 'X2.D1', 'rating D1 kind=led'],
    ]);
  });
});

describe('parameters and conditionals', () => {
  test('.param in dependency order, expressions in values, .func', () => {
    const c = elaborateText('t\n.param rtotal={rhalf*2} rhalf=2.35k\n.func par(x,y) = {x*y/(x+y)}\nR1 a 0 {rtotal}\nR2 a 0 {par(1k, 1k)}\n');
    expect(element(c, 'R1', 'R').resistance).toBeCloseTo(4700, 9);
    expect(element(c, 'R2', 'R').resistance).toBeCloseTo(500, 9);
    expect(c.parameters?.get('rhalf')).toBe(2350);
  });

  test('a parameter cycle is one error at the first .param of the cycle', () => {
    const text = 't\n.param a={b+1}\n.param b={2*a}\nR1 x 0 {a}\n';
    const c = elaborateText(text);
    const [d] = problems(c);
    expect(problems(c)).toHaveLength(1);
    expect(d!.message).toBe('parameter a depends on itself: a → b → a');
    expect(where(d!)).toEqual(spanOf(text, 'a={b+1}'));
  });

  test('an unknown parameter is an error at its name', () => {
    const text = 't\nR1 x 0 {rled*2}\n';
    const [d] = problems(elaborateText(text));
    expect(d!.message).toBe('unknown parameter rled');
    expect(where(d!)).toEqual(spanOf(text, 'rled'));
  });

  test('.if/.elseif/.else: only the taken branch is read', () => {
    const text = ['t', '.param variant=2', '.if (variant == 1)', 'R1 a 0 1k', '.elseif (variant == 2)', 'R1 a 0 2k', '.else', 'R1 a 0 3k', '.endif'].join('\n');
    const c = elaborateText(text);
    expect(c.elements.map((e) => [e.name, (e as { resistance: number }).resistance])).toEqual([['R1', 2000]]);
    expect(problems(c)).toEqual([]);
  });

  test('.temp, .options', () => {
    const c = elaborateText('t\n.temp 85 100\n.options RELTOL=1e-4 gmin=1e-12 noacct\n');
    expect(c.temperature).toBe(85);
    expect(c.options).toEqual({ reltol: 1e-4, gmin: 1e-12 });
    expect(elaborateText('t\n').temperature).toBe(27); // SPICE default, 27 °C (SPICE3 user's manual)
  });
});

describe('includes and libraries', () => {
  const files = {
    '/project/models/leds.lib': ['* led library', '.lib typ', '.model DRED D(is=1e-20 n=1.8)', '.endl', '.lib worst', '.model DRED D(is=1e-19 n=1.9)', '.endl'].join('\n'),
    '/project/parts.inc': ['* parts', '.include models/more.inc', 'R7 a 0 {bogus}'].join('\n'),
    '/project/models/more.inc': '.model DGREEN D(is=1e-22)\n',
    '/project/loop1.inc': '.include loop2.inc\n',
    '/project/loop2.inc': '.include loop1.inc\n',
    '/outside/secret.inc': '.model DX D\n',
  };

  test('.include relative to the including file; .lib file section takes that section only', () => {
    const reader = memoryReader(files);
    const c = elaborate(TOP, 't\n.lib models/leds.lib worst\n.include parts.inc\nD1 a 0 DRED\nD2 a 0 dgreen\n', reader);
    expect(element(c, 'D1', 'D').model.params).toEqual({ is: 1e-19, n: 1.9 });
    expect(element(c, 'D2', 'D').model.location.uri).toBe('/project/models/more.inc');
    expect([...c.files.keys()].sort()).toEqual(['/project/models/leds.lib', '/project/models/more.inc', '/project/parts.inc', TOP]);
    // A diagnostic inside an included file carries that file's uri.
    const [d] = problems(c);
    expect(d!.message).toBe('unknown parameter bogus');
    expect(d!.location.uri).toBe('/project/parts.inc');
    expect(d!.location.range.start.line).toBe(2);
  });

  test('a missing include is an error at the include line', () => {
    const text = 't\nR1 a 0 1k\n.include nothere.inc\n';
    const [d] = problems(elaborateText(text, files));
    expect(d!.message).toBe('cannot read nothere.inc (looked for /project/nothere.inc)');
    expect(d!.location.range.start.line).toBe(2);
    expect(d!.location.uri).toBe(TOP);
  });

  test('an include cycle is an error at the include line that closes it, and stops', () => {
    const c = elaborateText('t\n.include loop1.inc\n', files);
    const [d] = problems(c);
    expect(problems(c)).toHaveLength(1);
    expect(d!.message).toBe('include cycle: loop1.inc is already being read (loop1.inc → loop2.inc → loop1.inc)');
    expect(d!.location.uri).toBe('/project/loop2.inc');
  });

  test('an include in a branch not taken is not read', () => {
    const reader = memoryReader(files);
    const c = elaborate(TOP, 't\n.param board=1\n.if (board == 2)\n.include nothere.inc\n.else\n.include parts.inc\n.endif\n', reader);
    expect(reader.reads).not.toContain('/project/nothere.inc');
    expect(problems(c).map((d) => d.message)).toEqual(['unknown parameter bogus']);
  });

  test('a .lib section that pulls in itself is a cycle', () => {
    const c = elaborateText('t\n.lib self.lib a\n', { '/project/self.lib': '.lib a\n.lib self.lib a\n.endl\n' });
    expect(problems(c).map((d) => d.message)).toEqual(['include cycle: section a of self.lib is already being read (self.lib#a → self.lib#a)']);
  });

  test('a missing .lib section names the sections there are', () => {
    const [d] = problems(elaborateText('t\n.lib models/leds.lib fast\n', files));
    expect(d!.message).toBe('models/leds.lib has no section fast (it has typ, worst)');
  });

  test('restricted: a file outside the workspace is not read, and the message says why', () => {
    const reader = memoryReader(files);
    const c = elaborate(TOP, 't\n.include ../outside/secret.inc\n.include parts.inc\n', reader, { restricted: true, workspaceRoot: '/project' });
    expect(reader.reads).not.toContain('/outside/secret.inc');
    expect(reader.reads).toContain('/project/parts.inc');
    expect(problems(c)[0]!.message).toMatch(/not read: it lies outside the workspace.*untrusted/);
  });
});

describe('diagnostics a user should get', () => {
  test('wrong node count, no value, duplicate element', () => {
    const text = ['t', 'R1 a', 'R2 a b', 'C1 a 0', 'R3 a 0 1k', 'r3 b 0 2k', 'D1 a', 'E1 a 0 b 2'].join('\n');
    const c = elaborateText(text);
    const found = problems(c).map((d) => [d.message, d.location.range.start.line]);
    expect(found).toEqual([
      ['R1 has 1 node where 2 are needed (two nodes and a value: R1 a b 1k)', 1],
      ['R2 has no resistance value; SPICE engines substitute a tiny default (1 mΩ in ngspice)', 2],
      ['C1 has no capacitance value; SPICE engines substitute 0 F', 3],
      ['duplicate element name r3: SPICE engines reject it; this line is not read', 5],
      ['D1 has 1 node where 2 are needed (D1 anode cathode MODEL [area])', 6],
      ['E1 has no gain (E1 out+ out- in+ in- gain)', 7],
    ]);
    // ngspice 39 runs R2 at 1 mΩ (its warning: "resistance to low, set to 1 mOhm").
    expect(element(c, 'R2', 'R').resistance).toBe(1e-3);
    expect(where(problems(c)[3]!)).toEqual(spanOf(text, 'r3'));
  });

  test('ambiguous values: the engine reading and the IEC 60062 marking-code reading, with exact rewrites', () => {
    const text = 't\nR1 a 0 4k7\nC1 a 0 4n7\nR2 a 0 2R2\nR3 a 0 22x0k\nV1 a 0 3V3\nR4 a 0 10kOhm\n';
    const c = elaborateText(text);
    const ambiguous = problems(c, 'ambiguous-value');
    expect(ambiguous.map((d) => d.message)).toEqual([
      // SPICE reads the leading number and scale factor and ignores the rest (SPICE3 user's manual);
      // IEC 60062: the letter stands where the decimal point goes.
      '4k7 is read as 4 kΩ by SPICE engines (the 7 is ignored); as a marking code (IEC 60062) it means 4.7 kΩ',
      '4n7 is read as 4 nF by SPICE engines (the 7 is ignored); as a marking code (IEC 60062) it means 4.7 nF',
      '2R2 is read as 2 Ω by SPICE engines (the R2 is ignored); as a marking code (IEC 60062) it means 2.2 Ω',
      '22x0k is read as 22 Ω by SPICE engines (the x0k is ignored)',
      // 3V3 for 3.3 V: rail naming, common practice, no source.
      '3V3 is read as 3 V by SPICE engines (the V3 is ignored); written as a rail name it means 3.3 V',
    ]);
    expect(where(ambiguous[0]!)).toEqual(spanOf(text, '4k7'));
    expect(ambiguous[0]!.suggestions!.map((s) => s.edits[0]!.newText)).toEqual(['4.7k', '4k']);
    expect(ambiguous[3]!.suggestions!.map((s) => s.edits[0]!.newText)).toEqual(['22']);
    expect(element(c, 'R1', 'R').resistance).toBe(4000); // the engines' reading is what is simulated
  });

  // ngspice 39 (run here): `.param rpull=4k7` stops it with "Misplaced operator" (and so does
  // `{2*4k7}`, which the grammar already reports as a syntax error).
  test('an ambiguous number in a .param value is an error', () => {
    const text = 't\n.param rpull=4k7\nR2 a 0 {rpull}\n';
    const ambiguous = problems(elaborateText(text), 'ambiguous-value');
    expect(ambiguous.map((d) => [d.severity, d.message, where(d)])).toEqual([
      ['error', '4k7 is not a number in an expression or .param value: ngspice stops with "Misplaced operator" (pnlint reads 4k, ignoring the 7); as a resistor marking code (IEC 60062) it means 4.7k', spanOf(text, '4k7')],
    ]);
    expect(ambiguous[0]!.suggestions![0]!.edits[0]!.newText).toBe('4.7k');
  });

  test('a line with a syntax error gets that one diagnostic, not more from the element reader', () => {
    const c = elaborateText('t\nR1 a 0 {2*(}\nR2 a 0 1k\n');
    expect(problems(c).map((d) => d.code)).toEqual(['syntax']);
    expect(c.elements.map((e) => e.name)).toEqual(['R2']);
  });

  test('parse diagnostics are copied with their file', () => {
    const c = elaborateText('t\n.subckt open a b\nR1 a b 1k\n');
    expect(c.diagnostics.some((d) => d.code === 'syntax' && d.location.uri === TOP)).toBe(true);
  });
});

describe('controlled sources, switches, coupling', () => {
  const text = [
    't',
    'V1 in 0 5',
    'VSENSE in mid 0',
    'R1 mid 0 1k',
    'E1 o1 0 in 0 2',
    'G1 o2 0 in 0 1m',
    'F1 o3 0 vsense 10',
    'H1 o4 0 VSense 100',
    'E2 o5 0 POLY(1) in 0 0 1',
    'W1 o6 0 vsense CS off',
    '.model CS CSW(it=1m ih=0.1m ron=1 roff=1Meg)',
    'L1 a 0 1m',
    'L2 b 0 1m',
    'K1 L1 l2 0.98',
    'F2 o7 0 VNOPE 1',
    'J1 d g s JMOD',
  ].join('\n');
  const c = elaborateText(text);

  test('gains and controlling sources by their names as first written', () => {
    expect(element(c, 'E1', 'E')).toMatchObject({ nodes: ['o1', '0', 'in', '0'], gain: 2 });
    expect(element(c, 'G1', 'G').gain).toBeCloseTo(1e-3, 15);
    expect(element(c, 'F1', 'F')).toMatchObject({ nodes: ['o3', '0'], gain: 10, controlSource: 'VSENSE' });
    expect(element(c, 'H1', 'H').controlSource).toBe('VSENSE');
    expect(element(c, 'W1', 'W')).toMatchObject({ controlSource: 'VSENSE', initiallyOn: false });
    expect(element(c, 'K1', 'K')).toMatchObject({ inductors: ['L1', 'L2'], coefficient: 0.98 });
  });

  test('POLY, JFETs and a missing controlling source are not simulated, with reasons', () => {
    expect(element(c, 'E2', 'unmodeled').reason).toBe('POLY controlled sources are not simulated');
    expect(element(c, 'J1', 'unmodeled').reason).toMatch(/junction field-effect transistors/);
    expect(element(c, 'F2', 'unmodeled').reason).toBe('its controlling source VNOPE does not exist');
    expect(problems(c).map((d) => d.message)).toEqual(['F2 is controlled by the current of VNOPE, which is not a voltage source in this circuit']);
  });
});

describe('directives', () => {
  test('*pnlint: lines and inline ; pnlint: comments, with the element they apply to', () => {
    const text = ['t', '*pnlint: rating DRED kind=led if=20m', '.model DRED D', '* a plain comment', 'D1 a 0 DRED', 'R1 a b 220 ; pnlint: ignore overdissipation', '*pnlint: ignore-file zener-forward'].join('\n');
    const c = elaborateText(text);
    expect(c.directives.map((d) => ({ text: d.text, inline: d.inline, next: d.nextElement, line: d.location.range.start.line }))).toEqual([
      { text: 'rating DRED kind=led if=20m', inline: false, next: 'D1', line: 1 },
      { text: 'ignore overdissipation', inline: true, next: 'R1', line: 5 },
      { text: 'ignore-file zener-forward', inline: false, next: undefined, line: 6 },
    ]);
  });
});

describe('never throws', () => {
  test('garbage in, diagnostics out', () => {
    const inputs = ['', '\n\n', 'x\n.subckt\n.ends\nX1\n', 't\n.param a={', 't\nR1 a b {1/0}\nV1 a 0 SIN(', 't\n.include\n.lib\nK1\nQ1 a\nM1 a b\n', 't\n.if (\nR1 a 0 1\n'];
    for (const input of inputs) expect(() => elaborateText(input)).not.toThrow();
  });

  // Property: mutations of a valid netlist (characters dropped, inserted or replaced) never throw nor hit an internal error.
  test('mutated netlists never throw', () => {
    const seed = 't\n.param r={2*k} k=1k\n.subckt cell p q rv=1\nR1 p q {rv}\nX9 p q cell\n.ends\nX1 a 0 cell rv=3\nV1 a 0 SIN(0 1 1k)\nD1 a 0 DX\n.model DX D(is=1e-14)\n.if (r > 1)\n.include x.inc\n.endif\n';
    const alphabet = [...'{}()=.+*/-,;$ \nRXVD0a1k'];
    fc.assert(
      fc.property(fc.array(fc.tuple(fc.nat(seed.length), fc.constantFrom(...alphabet), fc.nat(2)), { maxLength: 12 }), (edits) => {
        let text = seed;
        for (const [at, char, kind] of edits) {
          const i = at % (text.length + 1);
          text = kind === 0 ? text.slice(0, i) + text.slice(i + 1) : kind === 1 ? text.slice(0, i) + char + text.slice(i) : text.slice(0, i) + char + text.slice(i + 1);
        }
        const started = performance.now();
        const c = elaborateText(text, { '/project/x.inc': '.include top.cir\n' });
        // elaborate() turns a bug of ours into an "internal error" diagnostic: none may appear.
        const internal = c.diagnostics.filter((d) => /internal error|parser failed/.test(d.message));
        expect(internal.map((d) => d.message)).toEqual([]);
        return performance.now() - started < 2000;
      }),
      { numRuns: 300 },
    );
  });

  test('a reader that throws is a missing file', () => {
    const reader = { read: () => { throw new Error('disk on fire'); }, resolve: (_from: string, path: string) => `/x/${path}` };
    const c = elaborate(TOP, 't\n.include a.inc\n', reader);
    expect(problems(c)[0]!.message).toMatch(/cannot read a.inc/);
  });
});
