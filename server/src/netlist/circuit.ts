// The elaborated circuit: subcircuits flattened, parameters evaluated, includes
// resolved. This is what the solver and the checks read. Every element keeps
// where it was written, so that findings point at the user's own lines.
import type { ParseResult, Range, Severity } from '@pnlint/grammar';

/** A place in a file. `uri` is whatever the caller's file reader understands (a path or a URI). */
export interface SourceLocation {
  uri: string;
  range: Range;
}

/** A problem found while elaborating (or parsing) one file of the netlist. */
export interface NetlistDiagnostic {
  severity: Severity;
  /** Rule id: `syntax`, `netlist`, `ambiguous-value`, `unknown-model`, `unmodeled-element`, … */
  code: string;
  message: string;
  location: SourceLocation;
  related?: { location: SourceLocation; message: string }[];
  /** Text edits that would resolve it (e.g. the exact reading of an ambiguous value). */
  suggestions?: { title: string; edits: { location: SourceLocation; newText: string }[] }[];
  /** The element it is about (hierarchical name), when there is one: the checks' findings carry it. */
  element?: string;
}

/** Ground is always the node named `0`; `gnd` (any case) is folded into it. */
export const GROUND = '0';

/** An independent source's time behaviour, with SPICE3 defaults already filled in. */
export type Waveform =
  | { shape: 'dc'; value: number }
  | { shape: 'sin'; offset: number; amplitude: number; frequency: number; delay: number; damping: number; phase: number }
  | { shape: 'pulse'; initial: number; pulsed: number; delay: number; rise: number; fall: number; width: number; period: number }
  | { shape: 'pwl'; points: { time: number; value: number }[] }
  | { shape: 'exp'; initial: number; pulsed: number; riseDelay: number; riseTau: number; fallDelay: number; fallTau: number }
  | { shape: 'sffm'; offset: number; amplitude: number; carrier: number; modulationIndex: number; signal: number };

/** A `.model` card. Parameter names are lower-cased; values are evaluated numbers. */
export interface Model {
  name: string;
  /** Upper-cased: D, NPN, PNP, NMOS, PMOS, NJF, PJF, SW, CSW, R, C, L, … */
  type: string;
  params: Record<string, number>;
  location: SourceLocation;
}

interface ElementBase {
  /** Hierarchical name as written: `D1`, `X2.D1`, `X2.X1.R3`. */
  name: string;
  /** Node names, hierarchical inside subcircuits (`X2.a`); ground is `0`. */
  nodes: string[];
  /** The element line. */
  location: SourceLocation;
  /** The subcircuit instance lines that placed it, outermost first (empty at top level). */
  instances: SourceLocation[];
}

export interface Resistor extends ElementBase { type: 'R'; resistance: number }
export interface Capacitor extends ElementBase {
  type: 'C';
  capacitance: number;
  /** `ic=`: the initial voltage for a transient that skips the operating point (V). */
  initialCondition?: number;
}
export interface Inductor extends ElementBase {
  type: 'L';
  inductance: number;
  /** `ic=`: the initial current for a transient that skips the operating point (A). */
  initialCondition?: number;
}
export interface VoltageSource extends ElementBase {
  type: 'V';
  /** The DC value (what `.op` uses): the `DC` value, else the waveform's value at t = 0. */
  dc: number;
  waveform: Waveform | undefined;
}
export interface CurrentSource extends ElementBase {
  type: 'I';
  dc: number;
  waveform: Waveform | undefined;
}
/** E: v(n+, n-) = gain · v(nc+, nc-). nodes = [n+, n-, nc+, nc-]. */
export interface Vcvs extends ElementBase { type: 'E'; gain: number }
/** G: i(n+ → n-) = gain · v(nc+, nc-). nodes = [n+, n-, nc+, nc-]. */
export interface Vccs extends ElementBase { type: 'G'; gain: number }
/** F: i(n+ → n-) = gain · i(controlSource). nodes = [n+, n-]. */
export interface Cccs extends ElementBase { type: 'F'; gain: number; controlSource: string }
/** H: v(n+, n-) = gain · i(controlSource). nodes = [n+, n-]. */
export interface Ccvs extends ElementBase { type: 'H'; gain: number; controlSource: string }
/** S: voltage-controlled switch, nodes = [n+, n-, nc+, nc-]. */
export interface VoltageSwitch extends ElementBase { type: 'S'; model: Model; initiallyOn: boolean | undefined }
/** W: current-controlled switch, nodes = [n+, n-], controlled by the current of a voltage source. */
export interface CurrentSwitch extends ElementBase { type: 'W'; model: Model; controlSource: string; initiallyOn: boolean | undefined }
/** D: nodes = [anode, cathode]. */
export interface Diode extends ElementBase {
  type: 'D';
  model: Model;
  /** Area factor, with `m=` (devices in parallel) folded in: at DC, m diodes in parallel are one diode of m times the area. */
  area: number;
  /**
   * `m=`: how many parts in parallel this one line stands for (undefined: 1). Already folded
   * into `area` for the solver; the checks divide current and power by it, since a part's
   * ratings apply to each part.
   */
  multiplier?: number;
  off: boolean;
  /** Instance temperature in °C, when given (`temp=`, or `dtemp=` added to the circuit's). */
  temperature: number | undefined;
  /** `ic=`: the initial junction voltage for a transient that skips the operating point (V). */
  initialCondition?: number;
}
/** Q: nodes = [collector, base, emitter] (a fourth substrate node is kept but not simulated). */
export interface Bjt extends ElementBase { type: 'Q'; model: Model; area: number; off: boolean }
/** M: nodes = [drain, gate, source, bulk]. Lengths in metres. */
export interface Mosfet extends ElementBase { type: 'M'; model: Model; width: number; length: number; multiplier: number; off: boolean }
/** K: mutual inductance; no effect at DC. */
export interface Coupling extends ElementBase { type: 'K'; inductors: string[]; coefficient: number }
/**
 * Anything the solver does not simulate (JFET, transmission line, behavioural source, code model, …),
 * and an element or subcircuit instance whose model or subcircuit is defined nowhere.
 */
export interface UnmodeledElement extends ElementBase {
  type: 'unmodeled';
  /** `X` for a subcircuit instance. */
  letter: string;
  reason: string;
  /** The model or subcircuit name that is not defined, when that is why (an `unknown-model` diagnostic says so). */
  missingDefinition?: string;
}

export type Element =
  | Resistor
  | Capacitor
  | Inductor
  | VoltageSource
  | CurrentSource
  | Vcvs
  | Vccs
  | Cccs
  | Ccvs
  | VoltageSwitch
  | CurrentSwitch
  | Diode
  | Bjt
  | Mosfet
  | Coupling
  | UnmodeledElement;

/**
 * A `*pnlint: …` comment (or an inline `; pnlint: …`), as found, for the checks to read.
 * `text` is everything after `pnlint:`.
 */
export interface DirectiveComment {
  text: string;
  location: SourceLocation;
  /** True for an inline `; pnlint:` comment: it applies to its own line's element. */
  inline: boolean;
  /** The hierarchical name of the element on the next element line (or its own line when inline). */
  nextElement: string | undefined;
  /** The subcircuit instance prefix it was written under (`X2.`), empty at top level. */
  scope: string;
}

export interface Circuit {
  /** The top-level file. */
  uri: string;
  title: string | undefined;
  elements: Element[];
  /** Every `.model`, keyed by lower-cased name (subcircuit-local ones as `x2.name`). */
  models: Map<string, Model>;
  /** All node names, ground first. */
  nodes: string[];
  /** Circuit temperature in °C (`.temp`, default 27). */
  temperature: number;
  /** `.options` values, lower-cased keys (e.g. `tnom`, `gmin`, `reltol`). */
  options: Record<string, number>;
  directives: DirectiveComment[];
  /** Global `.param` values by lower-cased name (for hovers and fixes). */
  parameters?: Map<string, number>;
  /** Every file read, with its text, so that fixes can edit and re-elaborate. */
  files: Map<string, string>;
  /** The syntax tree of each file read, as elaboration parsed it (the others need not parse it again). */
  syntax?: Map<string, ParseResult>;
  diagnostics: NetlistDiagnostic[];
}

/** How the core reaches other files. Injected: the core itself does no I/O. */
export interface FileReader {
  /** The text of a file; undefined when it does not exist or cannot be read. */
  read(uri: string): string | undefined;
  /** The uri of `path` as written in an `.include` of `fromUri` (relative to the including file). */
  resolve(fromUri: string, path: string): string;
}
