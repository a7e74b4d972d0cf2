// The two edits that put a resistor value into a netlist: a new resistor line inserted in
// series with a diode's anode (the anode renamed on the diode's line, the resistor joining
// the old node to the new one), and an existing resistor's value written anew. Values are
// written in SPICE notation (`2.2Meg`, never `2.2M`, which SPICE reads as milli).
import type { Field } from '@pnlint/grammar';
import type { Diode, Resistor } from '../netlist/circuit.js';
import { formatSpiceNumber } from '../netlist/index.js';
import type { TextEdit } from '../findings.js';
import { instancePrefix, leafName } from './names.js';
import { linesAfter, nodeFields, replaceEdit, type LocatedStatement } from './source-text.js';
import type { FixSession } from './verify.js';

export interface InsertedResistor {
  edits: TextEdit[];
  /** The new resistor's hierarchical name, as the re-check reports it. */
  name: string;
}

/** `R_D1 a D1_anode 150` after the diode's line, and the diode's anode renamed to `D1_anode`. */
export function insertSeriesResistor(session: FixSession, diode: Diode, value: number): InsertedResistor | undefined {
  const located = session.files.statementOf(diode);
  if (!located) return undefined;
  const nodes = nodeFields(located.statement, 2);
  if (!nodes) return undefined;
  const anode = nodes[0]!;
  const names = session.names.copy();
  const leaf = leafName(diode.name);
  const resistorName = names.fresh('element', `R_${leaf}`);
  const nodeName = names.fresh('node', `${leaf}_anode`);
  return {
    edits: [replaceEdit(located, anode.span, nodeName), linesAfter(located, [`${resistorName} ${anode.text} ${nodeName} ${formatSpiceNumber(value)}`])],
    name: instancePrefix(diode.name) + resistorName,
  };
}

/** The field holding a resistor's value, and the factor between the written value and the resistance (`m=` divides it). */
function valueField(session: FixSession, resistor: Resistor): { located: LocatedStatement; field: Field; writtenPerOhm: number } | undefined {
  const located = session.files.statementOf(resistor);
  if (!located) return undefined;
  const fields = located.statement.fields;
  const positional = fields.filter((field) => field.kind !== 'assign');
  const assigns = fields.filter((field): field is Field & { kind: 'assign' } => field.kind === 'assign');
  const multiplierField = assigns.find((field) => field.key.text.toLowerCase() === 'm');
  let writtenPerOhm = 1;
  if (multiplierField) {
    if (multiplierField.value.kind !== 'number' || !(multiplierField.value.value > 0)) return undefined; // a computed m: leave it to the user
    writtenPerOhm = multiplierField.value.value;
  }
  // A word naming a resistor model is not the value (`R1 a b RMOD 1k`).
  const isModel = (field: Field) => field.kind === 'word' && session.circuit.models.has(field.text.toLowerCase());
  const positionalValue = positional.slice(2).find((field) => field.kind !== 'group' && !isModel(field));
  if (positionalValue) return { located, field: positionalValue, writtenPerOhm };
  const keyed = assigns.find((field) => ['r', 'resistance'].includes(field.key.text.toLowerCase()));
  if (keyed) return { located, field: keyed.value, writtenPerOhm };
  return undefined; // the value comes from a model: changing it would change every resistor of that model
}

/** The resistor's value field replaced by `value` (Ω, as the resistance the circuit should have). */
export function changeResistorValue(session: FixSession, resistor: Resistor, value: number): TextEdit[] | undefined {
  const found = valueField(session, resistor);
  if (!found) return undefined;
  return [replaceEdit(found.located, found.field.span, formatSpiceNumber(value * found.writtenPerOhm))];
}
