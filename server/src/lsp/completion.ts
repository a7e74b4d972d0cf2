// Completion, from the text before the cursor: dot commands and element letters at the
// start of a line, model and subcircuit names where an element takes one, source
// keywords, model parameters, and in a `*pnlint:` directive its keys, targets, rating
// keys, kinds and rule ids.
import { CompletionItemKind, type CompletionItem, type CompletionParams } from 'vscode-languageserver';
import { DIODE_KINDS, RATING_SYMBOLS } from '../checks/vocabulary.js';
import { RULES } from '../rule-ids.js';
import type { FeatureContext } from './context.js';
import { MODEL_TYPES_BY_LETTER } from '../netlist/models.js';
import { MODEL_TYPES, parametersOfModelType } from './model-parameters.js';
import { NODE_COUNT, type SyntaxIndex } from './syntax.js';

/** Dot commands a SPICE netlist may use (SPICE3 user's manual; `.lib`/`.endl` and `.if` as ngspice reads them). */
const DOT_COMMANDS: readonly [string, string][] = [
  ['model', 'device model: .model name type (parameters)'],
  ['subckt', 'subcircuit definition: .subckt name ports params: …'],
  ['ends', 'end of a subcircuit definition'],
  ['param', 'parameters: .param name=value …'],
  ['func', 'user function: .func name(args) {expression}'],
  ['include', 'include a file: .include path'],
  ['lib', 'a library section: .lib path section, or .lib section … .endl'],
  ['endl', 'end of a library section'],
  ['global', 'global nodes'],
  ['options', 'simulator options'],
  ['temp', 'circuit temperature in °C'],
  ['ic', 'initial conditions for the transient analysis'],
  ['nodeset', 'initial guesses for the operating point'],
  ['op', 'DC operating point analysis'],
  ['dc', 'DC sweep analysis'],
  ['ac', 'small-signal AC analysis'],
  ['tran', 'transient analysis'],
  ['meas', 'measurement'],
  ['save', 'vectors to save'],
  ['print', 'vectors to print'],
  ['plot', 'vectors to plot'],
  ['if', 'conditional block'],
  ['elseif', 'conditional block branch'],
  ['else', 'conditional block branch'],
  ['endif', 'end of a conditional block'],
  ['control', 'simulator script block, up to .endc'],
  ['endc', 'end of a simulator script block'],
  ['end', 'end of the netlist'],
];

/** Element letters and their lines' shape (SPICE3 user's manual). */
const ELEMENT_LETTERS: readonly [string, string][] = [
  ['R', 'resistor: Rname n+ n- value'],
  ['C', 'capacitor: Cname n+ n- value'],
  ['L', 'inductor: Lname n+ n- value'],
  ['K', 'coupled inductors: Kname L1 L2 coefficient'],
  ['V', 'voltage source: Vname n+ n- DC value'],
  ['I', 'current source: Iname n+ n- DC value'],
  ['D', 'diode: Dname anode cathode model'],
  ['Q', 'bipolar transistor: Qname collector base emitter model'],
  ['M', 'MOSFET: Mname drain gate source bulk model W= L='],
  ['J', 'JFET: Jname drain gate source model'],
  ['E', 'voltage-controlled voltage source: Ename n+ n- nc+ nc- gain'],
  ['G', 'voltage-controlled current source: Gname n+ n- nc+ nc- transconductance'],
  ['F', 'current-controlled current source: Fname n+ n- Vcontrol gain'],
  ['H', 'current-controlled voltage source: Hname n+ n- Vcontrol transresistance'],
  ['S', 'voltage-controlled switch: Sname n+ n- nc+ nc- model'],
  ['W', 'current-controlled switch: Wname n+ n- Vcontrol model'],
  ['B', 'behavioural source: Bname n+ n- V={expression}'],
  ['X', 'subcircuit instance: Xname nodes… subcircuit params: …'],
  ['T', 'transmission line: Tname n1 n2 n3 n4 Z0= TD='],
];

const SOURCE_KEYWORDS: readonly [string, string][] = [
  ['DC', 'DC value'],
  ['AC', 'AC magnitude and phase'],
  ['SIN', 'SIN(offset amplitude frequency delay damping phase)'],
  ['PULSE', 'PULSE(initial pulsed delay rise fall width period)'],
  ['PWL', 'PWL(time value …)'],
  ['EXP', 'EXP(initial pulsed rise-delay rise-tau fall-delay fall-tau)'],
  ['SFFM', 'SFFM(offset amplitude carrier modulation-index signal)'],
];

const DIRECTIVE_KEYS: readonly [string, string][] = [
  ['rating', 'ratings of a model or element: rating <name> kind=… vrrm=… if=… pd=…'],
  ['supply', "a supply's range: supply <source> min=… max=… (or tol=…%)"],
  ['ignore', 'ignore a rule on the next element line: ignore <rule> -- reason'],
  ['ignore-file', 'ignore a rule in the whole file: ignore-file <rule> -- reason'],
];

const SUPPLY_KEYS: readonly [string, string][] = [
  ['min', 'lowest value of the supply'],
  ['max', 'highest value of the supply'],
  ['tol', 'tolerance either side of its value, e.g. 5%'],
];

function items(entries: readonly [string, string][], kind: CompletionItemKind, suffix = ''): CompletionItem[] {
  return entries.map(([label, detail]) => ({ label: label + suffix, kind, detail }));
}

export function completion(context: FeatureContext, params: CompletionParams): CompletionItem[] {
  const document = context.documents.get(params.textDocument.uri);
  if (!document) return [];
  const before = document.getText({ start: { line: params.position.line, character: 0 }, end: params.position });
  const index = () => context.index(document);

  const directive = /(?:^\s*\*|;)\s*pnlint:(.*)$/i.exec(before);
  if (directive) return directiveCompletion(directive[1]!, index);
  if (/^\s*[*;]/.test(before) || /(;|\s\$)/.test(before)) return []; // inside a comment

  const dot = /^\s*\.(\w*)$/.exec(before);
  if (dot) return DOT_COMMANDS.map(([label, detail]) => ({ label: `.${label}`, filterText: `.${label}`, insertText: label, kind: CompletionItemKind.Keyword, detail }));
  if (/^\s*[A-Za-z]?$/.test(before)) return items(ELEMENT_LETTERS, CompletionItemKind.Keyword);

  const words = before.trimStart().split(/\s+/);
  const first = words[0]!.toLowerCase();
  const position = words.length - 1; // index of the word being typed; 0 is the element name

  if (first === '.model') {
    if (position === 2) return MODEL_TYPES.map(([type, device]) => ({ label: type, kind: CompletionItemKind.TypeParameter, detail: device }));
    if (position >= 3) {
      return parametersOfModelType(words[2]!.replace(/\(.*/, '')).map(([name, described]) => ({
        label: name.toUpperCase(),
        insertText: `${name.toUpperCase()}=`,
        kind: CompletionItemKind.Property,
        detail: `${described.meaning}${described.unit ? ` (${described.unit})` : ''}`,
      }));
    }
    return [];
  }
  if (first.startsWith('.') || first.startsWith('+')) return [];

  const letter = first[0]!.toUpperCase();
  if (letter === 'X' && position >= 2) {
    return [
      ...index().subcircuits.map((s) => ({ label: s.node.name.text, kind: CompletionItemKind.Module, detail: `.subckt ${s.node.ports.map((p) => p.text).join(' ')}` })),
      { label: 'params:', kind: CompletionItemKind.Keyword, detail: 'parameter values for this instance' },
    ];
  }
  const types = MODEL_TYPES_BY_LETTER[letter];
  if (types && position >= (NODE_COUNT[letter] ?? 2) + 1) {
    return index()
      .models.filter((model) => types.includes(model.node.type.text.toUpperCase()))
      .map((model) => ({ label: model.node.name.text, kind: CompletionItemKind.Class, detail: `.model ${model.node.type.text}` }));
  }
  if ((letter === 'V' || letter === 'I') && position >= 3) return items(SOURCE_KEYWORDS, CompletionItemKind.Keyword);
  return [];
}

function directiveCompletion(rest: string, index: () => SyntaxIndex): CompletionItem[] {
  const words = rest.trimStart().split(/\s+/);
  const keyword = words[0]!.toLowerCase();
  const position = words.length - 1;
  const typing = words[position]!.toLowerCase();
  if (position === 0) return items(DIRECTIVE_KEYS, CompletionItemKind.Keyword);
  if ((keyword === 'ignore' || keyword === 'ignore-file') && position === 1) {
    return RULES.map((rule) => ({ label: rule.id, kind: CompletionItemKind.EnumMember, detail: rule.summary }));
  }
  if (keyword === 'rating') {
    if (position === 1) {
      const found = index();
      return [
        ...found.models.filter((m) => m.node.type.text.toUpperCase() === 'D').map((m) => ({ label: m.node.name.text, kind: CompletionItemKind.Class, detail: '.model D' })),
        ...found.elements.filter((e) => e.node.letter === 'D' || e.node.letter === 'R').map((e) => ({ label: e.node.name.text, kind: CompletionItemKind.Field, detail: 'element' })),
      ];
    }
    if (typing.startsWith('kind=')) return DIODE_KINDS.map((kind) => ({ label: `kind=${kind}`, kind: CompletionItemKind.EnumMember }));
    return [
      { label: 'kind=', kind: CompletionItemKind.Property, detail: `one of ${DIODE_KINDS.join(', ')}` },
      ...Object.entries(RATING_SYMBOLS).map(([key, rating]) => ({
        label: `${key}=`,
        kind: CompletionItemKind.Property,
        detail: `${rating.symbol}: ${rating.meaning} (${rating.unit})`,
      })),
    ];
  }
  if (keyword === 'supply') {
    if (position === 1) {
      return index()
        .elements.filter((e) => e.node.letter === 'V' || e.node.letter === 'I')
        .map((e) => ({ label: e.node.name.text, kind: CompletionItemKind.Event, detail: 'independent source' }));
    }
    return items(SUPPLY_KEYS, CompletionItemKind.Property, '=');
  }
  return [];
}
