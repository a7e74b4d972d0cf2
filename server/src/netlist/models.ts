// `.model` cards: the parameters each model type defines, and reading a card
// into a Model with evaluated values. Names are case-insensitive.
import type { ModelStatement } from '@pnlint/grammar';
import type { Model } from './circuit.js';
import type { DiagnosticSink } from './diagnostics.js';
import type { ParameterScope } from './parameters.js';

interface ModelType {
  /** What the type is, for messages. */
  description: string;
  parameters: ReadonlySet<string>;
  /** Alternative spellings, folded to one name so that the solver reads one key. */
  aliases: Readonly<Record<string, string>>;
  /** Keys that published part models carry for documentation; accepted without a warning, words allowed. */
  informational: ReadonlySet<string>;
}

const words = (text: string): ReadonlySet<string> => new Set(text.trim().split(/\s+/));

// Keys that vendors' part models carry as documentation (common practice in published part models).
const PART_INFORMATION = 'mfg type iave ipk vpk vrrm icrating vceo vbr vf if pd rating datasheet';

// Diode: the ngspice manual's diode model parameters (ngspice 39 manual, "Diode model parameters").
const DIODE: ModelType = {
  description: 'diode',
  parameters: words(`level is jsw isw rs trs trs2 n ns tt ttt1 ttt2 cjo cp vj m tm1 tm2 cjp php mjsw ikf ikr nbv
    area pj tlev tlevc cta ctp tcv bv ibv ibvl nbvl tbv1 tbv2 tpb tphp eg xti kf af fc fcs isr nr tnom
    gap1 gap2 xom xoi lm lp wm wp xm xp dres dcap jtun jtunsw ntun xtitun keg tunnel bv_max id_max pd_max te_max rth cth`),
  aliases: { js: 'is', cj0: 'cjo', cj: 'cjo', pb: 'vj', mj: 'm', ik: 'ikf', tref: 'tnom', trs1: 'trs', ctc: 'cta', cjsw: 'cjp' },
  informational: words(PART_INFORMATION),
};

// Bipolar transistor: SPICE Gummel–Poon parameters (SPICE3 user's manual, Quarles 1989; ngspice 39 manual, BJT level 1).
const BIPOLAR: ModelType = {
  description: 'bipolar transistor',
  parameters: words(`level subs is ibe ibc iss bf nf vaf ikf nkf ise ne br nr var ikr isc nc rb irb rbm re rc
    cje vje mje tf xtf vtf itf ptf cjc vjc mjc xcjc tr cjs vjs mjs xtb eg xti kf af fc tnom ns
    tlev tlevc tre1 tre2 trc1 trc2 trb1 trb2 trbm1 trbm2 tbf1 tbf2 tbr1 tbr2 tikf1 tikf2 tikr1 tikr2
    tirb1 tirb2 tnc1 tnc2 tne1 tne2 tnf1 tnf2 tnr1 tnr2 tvaf1 tvaf2 tvar1 tvar2 titf1 titf2 ttf1 ttf2
    ttr1 ttr2 tmje1 tmje2 tmjc1 tmjc2 tmjs1 tmjs2 tns1 tns2 nkf quasimod rco vo gamma qco vg cn d
    vbe_max vbc_max vce_max ic_max ib_max pd_max te_max rth cth`),
  aliases: { va: 'vaf', vb: 'var', ik: 'ikf', c2: 'ise', c4: 'isc', pe: 'vje', me: 'mje', pc: 'vjc', mc: 'mjc', ccs: 'cjs', ps: 'vjs', ms: 'mjs', tref: 'tnom' },
  informational: words(`${PART_INFORMATION} bvcbo bvebo bvceo`),
};

// MOSFET levels 1–3 (SPICE3 user's manual, Quarles 1989; ngspice 39 manual, MOSFET levels 1–3).
const MOSFET: ModelType = {
  description: 'MOSFET',
  parameters: words(`level vto kp gamma phi lambda rd rs cbd cbs is pb cgso cgdo cgbo rsh cj mj cjsw mjsw js
    tox nsub nss nfs tpg xj ld uo ucrit uexp utra vmax neff kf af fc delta theta eta kappa tnom
    lmin lmax wmin wmax xl xw wd nlev gdsnoi vds_max vgs_max vgd_max vgb_max vbs_max vbd_max`),
  aliases: { vt0: 'vto', u0: 'uo', tref: 'tnom' },
  informational: words(`${PART_INFORMATION} version`),
};

// JFET level 1 (ngspice 39 manual, JFET models).
const JFET: ModelType = {
  description: 'JFET',
  parameters: words('level vto beta lambda rd rs cgs cgd pb is b kf af fc tnom n isr nr alpha vk m xti vtotc betatce'),
  aliases: { vt0: 'vto', tref: 'tnom' },
  informational: words(PART_INFORMATION),
};

// Switches (ngspice 39 manual, switch models).
const VOLTAGE_SWITCH: ModelType = {
  description: 'voltage-controlled switch',
  parameters: words('ron roff vt vh'),
  aliases: {},
  informational: words(PART_INFORMATION),
};
const CURRENT_SWITCH: ModelType = {
  description: 'current-controlled switch',
  parameters: words('ron roff it ih'),
  aliases: {},
  informational: words(PART_INFORMATION),
};

// Passive element models (ngspice 39 manual, semiconductor resistor and capacitor, inductor model).
const RESISTOR: ModelType = {
  description: 'resistor',
  parameters: words('rsh narrow short tc1 tc2 tce defw kf af r lf wf ef tnom bv_max'),
  aliases: { res: 'r', tref: 'tnom' },
  informational: words(PART_INFORMATION),
};
const CAPACITOR: ModelType = {
  description: 'capacitor',
  parameters: words('cap cj cjsw defw defl narrow short del tc1 tc2 tnom di thick bv_max'),
  aliases: { c: 'cap', tref: 'tnom' },
  informational: words(PART_INFORMATION),
};
const INDUCTOR: ModelType = {
  description: 'inductor',
  parameters: words('ind csect length nt mu tc1 tc2 tnom dia'),
  aliases: { l: 'ind', tref: 'tnom' },
  informational: words(PART_INFORMATION),
};

const MODEL_TYPES: Readonly<Record<string, ModelType>> = {
  D: DIODE,
  NPN: BIPOLAR,
  PNP: BIPOLAR,
  NMOS: MOSFET,
  PMOS: MOSFET,
  NJF: JFET,
  PJF: JFET,
  SW: VOLTAGE_SWITCH,
  CSW: CURRENT_SWITCH,
  R: RESISTOR,
  RES: RESISTOR,
  C: CAPACITOR,
  L: INDUCTOR,
};

/** The MOSFET level whose equations the solver implements. */
export const SIMULATED_MOSFET_LEVEL = 1;
/** MOSFET levels whose parameter lists are checked; other levels are accepted as they are. */
const CHECKED_MOSFET_LEVELS = new Set([1, 2, 3]);

/** Which model types each element letter uses. */
export const MODEL_TYPES_BY_LETTER: Readonly<Record<string, readonly string[]>> = {
  D: ['D'],
  Q: ['NPN', 'PNP'],
  M: ['NMOS', 'PMOS'],
  J: ['NJF', 'PJF'],
  S: ['SW'],
  W: ['CSW'],
  R: ['R', 'RES'],
  C: ['C'],
  L: ['L'],
};

export function describeModelType(type: string): string {
  return MODEL_TYPES[type]?.description ?? `${type} model`;
}

/** Reads one `.model` card; parameter values are evaluated in `scope`. */
export function readModel(statement: ModelStatement, uri: string, scope: ParameterScope, sink: DiagnosticSink): Model {
  const type = statement.type.text.toUpperCase();
  const known = MODEL_TYPES[type];
  const params: Record<string, number> = {};
  // Levels other than the checked ones have parameter lists of their own: accept them as written.
  const levelField = statement.params.find((p) => p.key.text.toLowerCase() === 'level');
  const level = levelField ? scope.evaluateField(levelField.value, uri) : undefined;
  const checkNames = known !== undefined && !(known === MOSFET && level !== undefined && !CHECKED_MOSFET_LEVELS.has(level));
  for (const assign of statement.params) {
    const written = assign.key.text.toLowerCase();
    const key = known?.aliases[written] ?? written;
    if (known?.informational.has(written)) {
      // Documentation keys: keep a number when there is one, accept words silently.
      const value = assign.value.kind === 'number' ? assign.value.value : undefined;
      if (value !== undefined) params[key] = value;
      continue;
    }
    if (checkNames && !known.parameters.has(key)) {
      sink.warning(uri, assign.key.span, `${assign.key.text} is not a ${known.description} model parameter; it is ignored`);
      continue;
    }
    const value = scope.evaluateField(assign.value, uri);
    if (value !== undefined) params[key] = value;
  }
  if (known === MOSFET && level !== undefined && level !== SIMULATED_MOSFET_LEVEL) {
    sink.info(
      uri,
      statement.name.span,
      `${statement.name.text} is a level ${level} MOSFET model; pnlint simulates level ${SIMULATED_MOSFET_LEVEL} only, so the transistors that use it are not checked`,
    );
  }
  return { name: statement.name.text, type, params, location: sink.location(uri, statement.span) };
}

/** True when the solver has equations for elements using this model. */
export function isSimulatedModel(model: Model): boolean {
  if (model.type === 'NMOS' || model.type === 'PMOS') return (model.params['level'] ?? 1) === SIMULATED_MOSFET_LEVEL;
  return model.type in MODEL_TYPES && model.type !== 'NJF' && model.type !== 'PJF';
}
