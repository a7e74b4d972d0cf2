// Units and meanings of SPICE model parameters, for the model hover. Names, units
// and meanings from the SPICE3 user's manual (Quarles, 1989), device chapters;
// the switch models as the ngspice manual describes them.

export interface ParameterDescription {
  unit: string;
  meaning: string;
}

const DIODE: Record<string, ParameterDescription> = {
  is: { unit: 'A', meaning: 'saturation current' },
  n: { unit: '', meaning: 'emission coefficient' },
  rs: { unit: 'Ω', meaning: 'series (ohmic) resistance' },
  bv: { unit: 'V', meaning: 'reverse breakdown voltage' },
  ibv: { unit: 'A', meaning: 'current at breakdown voltage' },
  cjo: { unit: 'F', meaning: 'zero-bias junction capacitance' },
  cj0: { unit: 'F', meaning: 'zero-bias junction capacitance' },
  vj: { unit: 'V', meaning: 'junction potential' },
  m: { unit: '', meaning: 'grading coefficient' },
  tt: { unit: 's', meaning: 'transit time' },
  eg: { unit: 'eV', meaning: 'activation energy (band gap)' },
  xti: { unit: '', meaning: 'saturation-current temperature exponent' },
  fc: { unit: '', meaning: 'forward-bias depletion capacitance coefficient' },
  kf: { unit: '', meaning: 'flicker noise coefficient' },
  af: { unit: '', meaning: 'flicker noise exponent' },
  tnom: { unit: '°C', meaning: 'parameter measurement temperature' },
};

const BIPOLAR: Record<string, ParameterDescription> = {
  is: { unit: 'A', meaning: 'transport saturation current' },
  bf: { unit: '', meaning: 'ideal maximum forward beta' },
  nf: { unit: '', meaning: 'forward current emission coefficient' },
  vaf: { unit: 'V', meaning: 'forward Early voltage' },
  va: { unit: 'V', meaning: 'forward Early voltage' },
  ikf: { unit: 'A', meaning: 'corner for forward beta high-current roll-off' },
  ise: { unit: 'A', meaning: 'base-emitter leakage saturation current' },
  ne: { unit: '', meaning: 'base-emitter leakage emission coefficient' },
  br: { unit: '', meaning: 'ideal maximum reverse beta' },
  nr: { unit: '', meaning: 'reverse current emission coefficient' },
  var: { unit: 'V', meaning: 'reverse Early voltage' },
  vb: { unit: 'V', meaning: 'reverse Early voltage' },
  ikr: { unit: 'A', meaning: 'corner for reverse beta high-current roll-off' },
  isc: { unit: 'A', meaning: 'base-collector leakage saturation current' },
  nc: { unit: '', meaning: 'base-collector leakage emission coefficient' },
  rb: { unit: 'Ω', meaning: 'zero-bias base resistance' },
  irb: { unit: 'A', meaning: 'current where base resistance falls halfway to its minimum' },
  rbm: { unit: 'Ω', meaning: 'minimum base resistance at high currents' },
  re: { unit: 'Ω', meaning: 'emitter resistance' },
  rc: { unit: 'Ω', meaning: 'collector resistance' },
  cje: { unit: 'F', meaning: 'base-emitter zero-bias depletion capacitance' },
  vje: { unit: 'V', meaning: 'base-emitter built-in potential' },
  mje: { unit: '', meaning: 'base-emitter junction grading factor' },
  tf: { unit: 's', meaning: 'ideal forward transit time' },
  cjc: { unit: 'F', meaning: 'base-collector zero-bias depletion capacitance' },
  vjc: { unit: 'V', meaning: 'base-collector built-in potential' },
  mjc: { unit: '', meaning: 'base-collector junction grading factor' },
  tr: { unit: 's', meaning: 'ideal reverse transit time' },
  eg: { unit: 'eV', meaning: 'energy gap' },
  xti: { unit: '', meaning: 'saturation-current temperature exponent' },
  xtb: { unit: '', meaning: 'forward and reverse beta temperature exponent' },
  tnom: { unit: '°C', meaning: 'parameter measurement temperature' },
};

const MOSFET: Record<string, ParameterDescription> = {
  level: { unit: '', meaning: 'model index' },
  vto: { unit: 'V', meaning: 'zero-bias threshold voltage' },
  kp: { unit: 'A/V²', meaning: 'transconductance parameter' },
  gamma: { unit: 'V^½', meaning: 'bulk threshold parameter' },
  phi: { unit: 'V', meaning: 'surface potential' },
  lambda: { unit: '1/V', meaning: 'channel-length modulation' },
  rd: { unit: 'Ω', meaning: 'drain ohmic resistance' },
  rs: { unit: 'Ω', meaning: 'source ohmic resistance' },
  cbd: { unit: 'F', meaning: 'zero-bias bulk-drain junction capacitance' },
  cbs: { unit: 'F', meaning: 'zero-bias bulk-source junction capacitance' },
  is: { unit: 'A', meaning: 'bulk junction saturation current' },
  tox: { unit: 'm', meaning: 'oxide thickness' },
  ld: { unit: 'm', meaning: 'lateral diffusion' },
  uo: { unit: 'cm²/V·s', meaning: 'surface mobility' },
  u0: { unit: 'cm²/V·s', meaning: 'surface mobility' },
  tnom: { unit: '°C', meaning: 'parameter measurement temperature' },
};

const VOLTAGE_SWITCH: Record<string, ParameterDescription> = {
  vt: { unit: 'V', meaning: 'threshold voltage' },
  vh: { unit: 'V', meaning: 'hysteresis voltage' },
  ron: { unit: 'Ω', meaning: 'on resistance' },
  roff: { unit: 'Ω', meaning: 'off resistance' },
};

const CURRENT_SWITCH: Record<string, ParameterDescription> = {
  it: { unit: 'A', meaning: 'threshold current' },
  ih: { unit: 'A', meaning: 'hysteresis current' },
  ron: { unit: 'Ω', meaning: 'on resistance' },
  roff: { unit: 'Ω', meaning: 'off resistance' },
};

const RESISTOR: Record<string, ParameterDescription> = {
  r: { unit: '', meaning: 'resistance multiplier' },
  tc1: { unit: '1/°C', meaning: 'first-order temperature coefficient' },
  tc2: { unit: '1/°C²', meaning: 'second-order temperature coefficient' },
  rsh: { unit: 'Ω', meaning: 'sheet resistance' },
  tnom: { unit: '°C', meaning: 'parameter measurement temperature' },
};

const BY_TYPE: Record<string, { device: string; parameters: Record<string, ParameterDescription> }> = {
  D: { device: 'diode', parameters: DIODE },
  NPN: { device: 'NPN bipolar transistor', parameters: BIPOLAR },
  PNP: { device: 'PNP bipolar transistor', parameters: BIPOLAR },
  NMOS: { device: 'N-channel MOSFET', parameters: MOSFET },
  PMOS: { device: 'P-channel MOSFET', parameters: MOSFET },
  SW: { device: 'voltage-controlled switch', parameters: VOLTAGE_SWITCH },
  CSW: { device: 'current-controlled switch', parameters: CURRENT_SWITCH },
  R: { device: 'resistor', parameters: RESISTOR },
  RES: { device: 'resistor', parameters: RESISTOR },
};

/** The device a model type describes, or undefined for a type without a table here. */
export function deviceOfModelType(type: string): string | undefined {
  return BY_TYPE[type.toUpperCase()]?.device;
}

export function describeModelParameter(type: string, parameter: string): ParameterDescription | undefined {
  return BY_TYPE[type.toUpperCase()]?.parameters[parameter.toLowerCase()];
}

/** The parameters a model type defines, with their units and meanings. */
export function parametersOfModelType(type: string): [string, ParameterDescription][] {
  return Object.entries(BY_TYPE[type.toUpperCase()]?.parameters ?? {});
}

/** Every model type with a table here, and its device. */
export const MODEL_TYPES: readonly [string, string][] = Object.entries(BY_TYPE).map(([type, entry]) => [type, entry.device]);
