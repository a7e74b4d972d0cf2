// The diode checks: from an elaborated circuit to findings, with each diode's kind,
// ratings and operating point at every corner. Pure; the solver is the project's own.
import type { Circuit, Diode, Element, NetlistDiagnostic, SourceLocation } from '../netlist/circuit.js';
import type { Finding, Fix } from '../findings.js';
import { effectiveSettings, type WorkspaceConfig } from '../config.js';
import type { Settings } from '../settings.js';
import type { Corner, DiodeOperatingPoint, SolveOptions, SolveResult } from '../sim/types.js';
import { hazardCautions } from './cautions.js';
import { solveWithHeldCharge } from './held-charge.js';
import { classifyDiode, probeForwardVoltage, type Classification } from './classify.js';
import { atCorner, probeSource, THEVENIN_PROBE_STEP, type CheckContext, type CheckedDiode, type DiodeAtCorner } from './context.js';
import { cornerPlanning, type CornerPlan, type SupplyLimits } from './corners.js';
import { readDirectives, type Directives } from './directives.js';
import { defaultSolver } from './engine.js';
import { makeFinding } from './finding.js';
import type { FixProvider, FixRequest, TheveninView } from './fix-request.js';
import { declaredKind, describeRating, diodeRatings, partsInParallel, resistorRatings, type ResistorRatings } from './ratings.js';
import { RULES } from './rules/index.js';
import type { Solver } from './solver.js';
import { applySuppressions } from './suppression.js';
import { tellOnce } from './told-once.js';
import { buildRegions, localCircuit, localCorner, takenNames } from './regions.js';
import { buildTopology, nodesWithinRails } from './topology.js';
import { RATING_SYMBOLS, type DiodeKind, type DiodeRatingKey } from './vocabulary.js';
import type { ValueSource } from './provenance.js';

export type { FixProvider, FixRequest, TheveninView } from './fix-request.js';
export type { CornerPlan } from './corners.js';
export type { DiodeKind } from './vocabulary.js';

export interface CheckOptions extends SolveOptions {
  /** Turns each finding's fix request into verified fixes (server/src/fixes). None: findings carry no fixes. */
  fixProvider?: FixProvider;
}

export interface RatingReport {
  key: DiodeRatingKey;
  /** The datasheet symbol: VRRM, IF, … */
  symbol: string;
  value: number;
  unit: string;
  source: ValueSource;
  /** "VRRM 25 V from directive on line 3". */
  text: string;
}

export interface MarginReport {
  key: DiodeRatingKey;
  /** What the diode sees (V, A or W). */
  used: number;
  limit: number;
  /** used / limit. */
  fraction: number;
}

export interface DiodeCornerReport {
  corner: string;
  description: string;
  quasiStatic: boolean;
  /** Undefined when the circuit did not solve at this corner. */
  point: DiodeOperatingPoint | undefined;
  margins: MarginReport[];
}

export interface DiodeReport {
  element: string;
  model: string;
  location: SourceLocation;
  kind: DiodeKind;
  kindReason: string;
  ratings: RatingReport[];
  corners: DiodeCornerReport[];
  /** The quasi-static corners again, with the capacitors beside diodes holding their charge (empty when none). */
  heldCharge: DiodeCornerReport[];
  /** Why it could not be checked, when it could not. */
  unchecked?: string;
}

export interface CheckResult {
  /** Rules, directive diagnostics, honesty diagnostics and cautions, after suppression and severity settings. */
  findings: Finding[];
  diodes: DiodeReport[];
  corners: Corner[];
  /** How each corner is described in messages, in the order of `corners`. */
  cornerPlans: CornerPlan[];
  solves: SolveResult[];
  /** Each finding's fix request, for the fixes module and code actions. */
  fixRequests: { finding: Finding; request: FixRequest }[];
}

/** Wall-clock budget for all counterfactual solves of one check (ours: keeps an edit-time check responsive). */
export const COUNTERFACTUAL_BUDGET_MILLISECONDS = 3000;
/**
 * Wall-clock budget for solving all the corners of one check, on top of each corner's own
 * budget (ours: two corners' worth of the solver's 10 s default, so that 96 corners of a hard
 * circuit cannot hold a check for minutes).
 */
export const CORNER_SOLVES_BUDGET_MILLISECONDS = 20_000;

/** Diagnostics of the netlist and the solver that say what could not be checked (passed through). */
const HONESTY_CODES: ReadonlySet<string> = new Set(['unknown-model', 'unmodeled-element', 'floating-node', 'unsolved-circuit']);

export function checkCircuit(
  circuit: Circuit,
  baseSettings: Settings,
  config: WorkspaceConfig | undefined,
  options?: CheckOptions,
): CheckResult {
  return checkWith(defaultSolver, circuit, baseSettings, config, options);
}

/** The same check with a given solver (the engine is injected so that this module does not own device physics). */
export function checkWith(
  solve: Solver,
  circuit: Circuit,
  baseSettings: Settings,
  config: WorkspaceConfig | undefined,
  options: CheckOptions = {},
): CheckResult {
  const settings = effectiveSettings(baseSettings, config);
  const directives = readDirectives(circuit);
  const findings: Finding[] = [...directives.findings];

  const resistors = new Map<string, ResistorRatings>();
  const resistorTolerances = new Map<string, number>();
  for (const element of circuit.elements) {
    if (element.type !== 'R') continue;
    const ratings = resistorRatings(element, settings, directives, config);
    resistors.set(element.name, ratings);
    if (ratings.tolerance && ratings.tolerance.value > 0) resistorTolerances.set(element.name, ratings.tolerance.value);
  }
  const { plans, leftOut } = cornerPlanning(circuit, settings, supplyLimits(circuit, directives, config), resistorTolerances);
  if (leftOut > 0 && circuit.elements[0]) {
    findings.push(
      makeFinding(
        'unsolved-circuit',
        'info',
        `${leftOut} combinations of source extremes, resistor tolerances and temperatures were left out: only ${plans.length} corners are solved per check.`,
        { uri: circuit.uri, range: circuit.elements[0].location.range },
      ),
    );
  }
  const solveOptions: SolveOptions = {};
  if (options.budgetMilliseconds !== undefined) solveOptions.budgetMilliseconds = options.budgetMilliseconds;
  if (options.iterationLimit !== undefined) solveOptions.iterationLimit = options.iterationLimit;
  if (options.cancellation !== undefined) solveOptions.cancellation = options.cancellation;
  // The corners move supplies by a few per cent from nominal: each starts from the nominal solution.
  const solves = solve(
    circuit,
    plans.map((plan) => plan.corner),
    { ...solveOptions, startFromFirstCorner: true, totalBudgetMilliseconds: Math.min(options.totalBudgetMilliseconds ?? Number.POSITIVE_INFINITY, CORNER_SOLVES_BUDGET_MILLISECONDS) },
  );

  findings.push(...honestyFindings(circuit, solves));
  const topology = buildTopology(circuit);
  const diodes = checkedDiodes(circuit, plans, solves, directives, config, topology, solve, solveOptions);
  const diodesByElement = new Map<Element, CheckedDiode>(diodes.map((diode) => [diode.element, diode]));
  const elementsByName = new Map<string, Element>();
  for (const element of circuit.elements) if (!elementsByName.has(element.name)) elementsByName.set(element.name, element);
  const regions = buildRegions(circuit, topology);
  const taken = takenNames(circuit);
  const held = solveWithHeldCharge(circuit, topology, plans, solves, solve, solveOptions);
  if (held) {
    for (const diode of diodes) {
      held.results.forEach((result, index) => {
        const point = result.ok ? result.point.diodes[diode.element.name] : undefined;
        if (point) diode.heldCharge.push({ plan: held.plans[index]!, point });
      });
    }
  }
  for (const diode of diodes) {
    if (diode.unchecked) {
      const rule = diode.uncheckedRule ?? 'unsolved-circuit';
      findings.push(makeFinding(rule, 'info', `${diode.element.name} was not checked: ${diode.unchecked}.`, diode.element.location, { element: diode.element.name }));
    }
  }

  // Counterfactual solves (a diode flipped, a probe in its place) share one budget, so that a
  // netlist with thousands of suspects still finishes; what the budget leaves out is reported.
  const counterfactualStarted = performance.now();
  let counterfactualsSkipped = 0;
  const remainingBudget = () => COUNTERFACTUAL_BUDGET_MILLISECONDS - (performance.now() - counterfactualStarted);
  const withinBudget = () => {
    const inBudget = remainingBudget() > 0 && !options.cancellation?.isCancellationRequested;
    if (!inBudget) counterfactualsSkipped++;
    return inBudget;
  };
  /** Solve options whose per-corner budget cannot overrun what is left of the counterfactual budget. */
  const counterfactualOptions = (corners: number): SolveOptions => {
    const share = Math.max(1, remainingBudget() / Math.max(1, corners));
    return { ...solveOptions, budgetMilliseconds: Math.min(solveOptions.budgetMilliseconds ?? Number.POSITIVE_INFINITY, share) };
  };
  const fixRequests: { finding: Finding; request: FixRequest }[] = [];
  const solveWithReplacements = (replacements: ReadonlyMap<Element, Element>, corners: readonly { plan: number; corner: Corner }[]): (SolveResult | undefined)[] => {
    if (!withinBudget()) return [];
    if (!regions) {
      const variant = { ...circuit, elements: circuit.elements.map((element) => replacements.get(element) ?? element) };
      return solve(variant, corners.map((each) => each.corner), counterfactualOptions(corners.length));
    }
    // Only the regions that the replaced elements reach, with their rails held as solved at each corner.
    const local = localCircuit(circuit, regions, replacements, taken);
    const localCorners = corners.map((each) => {
      const base = solves[each.plan];
      return base ? localCorner(each.corner, local.rails, base) : undefined;
    });
    const wanted = localCorners.filter((corner): corner is Corner => corner !== undefined);
    // A change in one place moves the solution little elsewhere: start from the base corner's solution.
    const firstBase = solves[corners[localCorners.findIndex((corner) => corner !== undefined)]?.plan ?? -1];
    const variantOptions: SolveOptions = { ...counterfactualOptions(wanted.length), startFromFirstCorner: true };
    if (firstBase?.ok) variantOptions.initialGuess = firstBase.point.nodes;
    const results = wanted.length > 0 ? solve(local.circuit, wanted, variantOptions) : [];
    let next = 0;
    return localCorners.map((corner) => (corner ? results[next++] : undefined));
  };
  const context: CheckContext = {
    circuit,
    settings,
    plans,
    solves,
    diodes,
    resistors,
    topology,
    hasReactiveElements: circuit.elements.some((element) => element.type === 'C' || element.type === 'L'),
    heldCapacitors: (held?.capacitors ?? []).map(({ capacitor, voltage }) => ({ name: capacitor.name, voltage })),
    solveVariant: (variant, variantPlans) =>
      withinBudget() ? solve(variant, variantPlans.map((plan) => plan.corner), counterfactualOptions(variantPlans.length)) : [],
    solveWithReplacements,
    theveninView: (diode, at) => theveninView(circuit, diode, at, plans.indexOf(at.plan), taken, solveWithReplacements),
    fixesFor: (request, finding): Fix[] => {
      fixRequests.push({ finding, request });
      if (!options.fixProvider) return [];
      try {
        return options.fixProvider(request, finding, { circuit, settings, plans });
      } catch {
        return []; // a fix that cannot be built is not offered; the finding stands
      }
    },
    elementNamed: (name) => elementsByName.get(name),
    diodeOf: (element) => diodesByElement.get(element),
    resistorTolerances,
    regions,
    takenNames: taken,
  };
  for (const rule of RULES) {
    if (options.cancellation?.isCancellationRequested) break;
    findings.push(...rule.check(context));
  }
  if (counterfactualsSkipped > 0 && circuit.elements[0]) {
    findings.push(
      makeFinding(
        'unsolved-circuit',
        'info',
        `${counterfactualsSkipped} counterfactual solves (a diode turned around, or probed for its current limit) were left out: they took longer than ${COUNTERFACTUAL_BUDGET_MILLISECONDS / 1000} s in all. ` +
          'Some reversed or unlimited diodes may not be reported.',
        { uri: circuit.uri, range: circuit.elements[0].location.range },
      ),
    );
  }
  if (held && !held.settled && !options.cancellation?.isCancellationRequested) {
    const first = held.capacitors[0]?.capacitor ?? circuit.elements[0];
    if (first) {
      findings.push(
        makeFinding(
          'unsolved-circuit',
          'info',
          'The charge that capacitors hold between waveform peaks did not settle within the solve limits: reverse voltages that depend on it ' +
            '(rectifiers with reservoir capacitors, voltage multipliers) may read low.',
          first.location,
        ),
      );
    }
  }
  findings.push(...hazardCautions(circuit, solves));

  const shown = applySuppressions(findings, circuit, directives, config)
    .map((finding) => withSeverity(finding, settings))
    .filter((finding): finding is Finding => finding !== undefined);
  const isLed = (name: string) => {
    const element = elementsByName.get(name);
    return element !== undefined && diodesByElement.get(element)?.kind === 'led';
  };
  const told = tellOnce(shown, fixRequests.filter((entry) => shown.includes(entry.finding)), (name) => elementsByName.get(name), isLed);
  return {
    findings: told.findings,
    diodes: diodes.map((diode) => diodeReport(diode, plans, solves)),
    corners: plans.map((plan) => plan.corner),
    cornerPlans: plans,
    solves,
    fixRequests: told.fixRequests,
  };
}

function supplyLimits(circuit: Circuit, directives: Directives, config: WorkspaceConfig | undefined): SupplyLimits[] {
  const limits: SupplyLimits[] = [];
  const names = new Set(circuit.elements.filter((element) => element.type === 'V' || element.type === 'I').map((element) => element.name.toLowerCase()));
  for (const supply of [...(config?.supplies ?? []), ...directives.supplies]) {
    if (!names.has(supply.source.toLowerCase())) continue;
    const entry: SupplyLimits = { source: supply.source, description: supply.origin.description };
    if (supply.min !== undefined) entry.min = supply.min;
    if (supply.max !== undefined) entry.max = supply.max;
    if (supply.tolerance !== undefined) entry.tolerance = supply.tolerance;
    // A later range for the same source replaces the earlier one (directives over pnlint.json).
    const existing = limits.findIndex((each) => each.source.toLowerCase() === supply.source.toLowerCase());
    if (existing >= 0) limits.splice(existing, 1);
    limits.push(entry);
  }
  return limits;
}

/** An element line's place, for matching a diagnostic to the elements written there. */
const placeOf = (location: SourceLocation) => `${location.range.start.offset}|${location.uri}`;

function honestyFindings(circuit: Circuit, solves: readonly SolveResult[]): Finding[] {
  const seen = new Set<string>();
  const findings: Finding[] = [];
  // The solver's unmodeled-element diagnostics name no element: find it by its line and name.
  let elementsAt: Map<string, Element[]> | undefined; // built when first needed: most circuits have no such diagnostic
  const elementOf = (diagnostic: NetlistDiagnostic): Element | undefined => {
    if (!elementsAt) {
      elementsAt = new Map();
      for (const element of circuit.elements) {
        const place = placeOf(element.location);
        const list = elementsAt.get(place);
        if (list) list.push(element);
        else elementsAt.set(place, [element]);
      }
    }
    const candidates = elementsAt.get(placeOf(diagnostic.location));
    if (!candidates || candidates.length === 1) return candidates?.[0];
    return candidates.find((element) => diagnostic.message.startsWith(`${element.name} `));
  };
  const add = (diagnostic: NetlistDiagnostic, corner: string | undefined) => {
    if (!HONESTY_CODES.has(diagnostic.code)) return;
    let element = diagnostic.element;
    if (diagnostic.code === 'unmodeled-element' && element === undefined) {
      const found = elementOf(diagnostic);
      // A model or subcircuit defined nowhere: its unknown-model diagnostic already says it all.
      if (found?.type === 'unmodeled' && found.missingDefinition !== undefined) return;
      element = found?.name;
    }
    const key = `${diagnostic.code}|${diagnostic.message}|${diagnostic.location.uri}|${diagnostic.location.range.start.offset}`;
    if (seen.has(key)) return;
    seen.add(key);
    const severity = diagnostic.severity;
    const message = corner && corner !== 'nominal' ? `${diagnostic.message} (corner ${corner})` : diagnostic.message;
    findings.push(makeFinding(diagnostic.code, severity, message, diagnostic.location, { related: diagnostic.related ?? [], ...(element !== undefined ? { element } : {}) }));
  };
  for (const diagnostic of circuit.diagnostics) add(diagnostic, undefined);
  for (const result of solves) {
    for (const diagnostic of result.diagnostics) add(diagnostic, result.ok ? result.point.corner : result.corner);
  }
  return findings;
}

function checkedDiodes(
  circuit: Circuit,
  plans: readonly CornerPlan[],
  solves: readonly SolveResult[],
  directives: Directives,
  config: WorkspaceConfig | undefined,
  topology: ReturnType<typeof buildTopology>,
  solve: Solver,
  options: SolveOptions,
): CheckedDiode[] {
  // Nodes that an unmodeled element can move: the checks there would rest on a wrong number.
  const tainted = new Map<string, Element>();
  const reportedUnmodeled = [...circuit.diagnostics, ...solves.flatMap((result) => result.diagnostics)].filter(
    (diagnostic) => diagnostic.code === 'unmodeled-element',
  );
  const unmodeledPlaces = new Set(reportedUnmodeled.map((diagnostic) => placeOf(diagnostic.location)));
  for (const element of circuit.elements) {
    const unmodeled = element.type === 'unmodeled' || (unmodeledPlaces.size > 0 && unmodeledPlaces.has(placeOf(element.location)));
    if (!unmodeled) continue;
    for (const node of element.nodes) for (const reached of nodesWithinRails(topology, node)) tainted.set(reached, element);
  }
  const forwardVoltages = new Map<string, number | undefined>();
  const classifications = new Map<string, Classification>();
  const modelIds = new Map<Diode['model'], number>();
  const diodes: CheckedDiode[] = [];
  for (const element of circuit.elements) {
    if (element.type !== 'D') continue;
    const corners: DiodeAtCorner[] = [];
    plans.forEach((plan, index) => {
      const result = solves[index];
      const point = result?.ok ? result.point.diodes[element.name] : undefined;
      if (point) corners.push({ plan, point });
    });
    const declared = declaredKind(circuit, element, directives, config);
    let kind: DiodeKind;
    let kindReason: string;
    let kindSource: ValueSource;
    if (declared) {
      kind = declared.value;
      kindReason = declared.source.description;
      kindSource = declared.source;
    } else {
      // By the model itself: two subcircuit instances may each hold a model of the same name.
      let modelId = modelIds.get(element.model);
      if (modelId === undefined) modelIds.set(element.model, (modelId = modelIds.size));
      const probeKey = `${modelId}|${element.area / partsInParallel(element)}|${element.temperature ?? ''}`;
      // Cancelled: the check's result is thrown away, so the probe solve is not worth starting.
      if (!forwardVoltages.has(probeKey) && !options.cancellation?.isCancellationRequested) {
        forwardVoltages.set(probeKey, probeForwardVoltage(circuit, element, solve, options));
      }
      const usedInBreakdown = corners.some((each) => each.point.region === 'breakdown');
      // Diodes of one model, area and temperature used alike are classified alike.
      const classificationKey = `${probeKey}|${usedInBreakdown}`;
      let classification = classifications.get(classificationKey);
      if (!classification) classifications.set(classificationKey, (classification = classifyDiode(element, forwardVoltages.get(probeKey), usedInBreakdown)));
      kind = classification.kind;
      kindReason = classification.reason;
      kindSource = { origin: 'classification', description: classification.reason };
    }
    const diode: CheckedDiode = { element, kind, kindReason, kindSource, ratings: diodeRatings(circuit, element, kind, directives, config), corners, heldCharge: [] };
    const taintedBy = element.nodes.map((node) => tainted.get(node)).find((each) => each !== undefined);
    if (taintedBy?.type === 'unmodeled' && taintedBy.missingDefinition !== undefined) {
      const what = taintedBy.letter.toUpperCase() === 'X' ? 'subcircuit' : 'model';
      diode.unchecked = `its part of the circuit includes ${taintedBy.name}, whose ${what} ${taintedBy.missingDefinition} is not defined`;
      diode.uncheckedRule = 'unknown-model';
    } else if (taintedBy) {
      diode.unchecked = `its part of the circuit includes the unmodeled element ${taintedBy.name}`;
      diode.uncheckedRule = 'unmodeled-element';
    } else if (corners.length === 0) {
      diode.unchecked = 'the circuit did not solve at any corner';
      diode.uncheckedRule = 'unsolved-circuit';
    }
    diodes.push(diode);
  }
  return diodes;
}

/** Replaces the diode by a voltage source at its own voltage and at a step below, and reads the change in current. */
function theveninView(
  circuit: Circuit,
  diode: CheckedDiode,
  at: DiodeAtCorner,
  planIndex: number,
  taken: ReadonlySet<string>,
  solveWithReplacements: CheckContext['solveWithReplacements'],
): TheveninView | undefined {
  if (planIndex < 0) return undefined; // not a corner of this check's plans
  const source = probeSource(circuit, diode.element as Diode, at.point.voltage, taken);
  const base = at.plan.corner;
  const corners: Corner[] = [at.point.voltage, at.point.voltage - THEVENIN_PROBE_STEP].map((voltage, index) => ({
    ...base,
    name: `${base.name} probe ${index}`,
    sources: { ...(base.sources ?? {}), [source.name]: voltage },
  }));
  const [atVoltage, belowVoltage] = solveWithReplacements(
    new Map([[diode.element, source]]),
    corners.map((corner) => ({ plan: planIndex, corner })),
  );
  if (!atVoltage?.ok || !belowVoltage?.ok) {
    // The probe closes a loop of ideal voltage sources: an ideal source holds the diode's terminals.
    const loop = [atVoltage, belowVoltage].some((result) => result && !result.ok && result.diagnostics.some((each) => each.code === 'unsolved-circuit'));
    return loop ? { voltage: at.point.voltage, resistance: 0, corner: base.name } : undefined;
  }
  const current = atVoltage.point.branches[source.name];
  const currentBelow = belowVoltage.point.branches[source.name];
  if (current === undefined || currentBelow === undefined) return undefined;
  const change = currentBelow - current;
  const resistance = change > 0 ? THEVENIN_PROBE_STEP / change : Number.POSITIVE_INFINITY;
  return { voltage: at.point.voltage + current * (Number.isFinite(resistance) ? resistance : 0), resistance, corner: base.name };
}

function withSeverity(finding: Finding, settings: Settings): Finding | undefined {
  const override = settings.severities[finding.rule];
  if (override === 'off') return undefined;
  if (override) return { ...finding, severity: override };
  return finding;
}

function diodeReport(diode: CheckedDiode, plans: readonly CornerPlan[], solves: readonly SolveResult[]): DiodeReport {
  const ratings: RatingReport[] = (Object.entries(diode.ratings) as [DiodeRatingKey, { value: number; source: ValueSource }][]).map(([key, rated]) => ({
    key,
    symbol: RATING_SYMBOLS[key].symbol,
    value: rated.value,
    unit: RATING_SYMBOLS[key].unit,
    source: rated.source,
    text: describeRating(key, rated),
  }));
  const corners: DiodeCornerReport[] = plans.map((plan, index) => {
    const result = solves[index];
    const point = result?.ok ? result.point.diodes[diode.element.name] : undefined;
    return { corner: plan.corner.name, description: atCorner(plan), quasiStatic: plan.quasiStatic, point, margins: point ? margins(diode, point) : [] };
  });
  const report: DiodeReport = {
    element: diode.element.name,
    model: diode.element.model.name,
    location: diode.element.location,
    kind: diode.kind,
    kindReason: diode.kindReason,
    ratings,
    corners,
    heldCharge: diode.heldCharge.map((at) => ({
      corner: at.plan.corner.name,
      description: atCorner(at.plan),
      quasiStatic: true,
      point: at.point,
      margins: margins(diode, at.point),
    })),
  };
  if (diode.unchecked) report.unchecked = diode.unchecked;
  return report;
}

/** How much of each rating the diode uses at one operating point (currents and powers per part, for `m=` parts in parallel). */
function margins(diode: CheckedDiode, point: DiodeOperatingPoint): MarginReport[] {
  const result: MarginReport[] = [];
  const add = (key: DiodeRatingKey, used: number) => {
    const limit = diode.ratings[key]?.value;
    if (limit !== undefined && limit > 0) result.push({ key, used, limit, fraction: used / limit });
  };
  const parts = partsInParallel(diode.element);
  if (point.current > 0) add('if', point.current / parts);
  if (point.voltage < 0 && diode.kind !== 'zener') add('vrrm', -point.voltage);
  if (diode.kind === 'zener' && point.current < 0) add('izm', -point.current / parts);
  add('pd', Math.abs(point.power) / parts);
  return result;
}
