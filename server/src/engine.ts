// The engine's front door: text in, findings out, through pure stages. The CLI and the language
// server call only this module. Parse results are cached by (file, content) so an edit re-parses
// only the file that changed.

import type { Diagnostic } from './core/diagnostics';
import type { FileHost } from './core/host';
import type { EngineOptions } from './core/options';
import { loadDeck, type Deck } from './circuit/deck';
import { elaborateSteps } from './circuit/elaborate';
import type { Circuit, Design } from './circuit/circuit';
import { findClocks } from './phases/clocks';
import { buildPhases, phaseCorrespondence, sameClockNets, widenPlan, type PhasePlan } from './phases/phases';
import { buildSwitchNetworkSteps, patchSwitchNetwork, widenNetwork, type NetworkPatch } from './analysis/switchNetwork';
import { classifySteps, countFlags, reclassify, renameStates, renumberDevices, widenClassification, type Classification } from './analysis/classify';
import { classificationFindings, reviseClassificationFindings, widenClassificationFacts } from './findings/classificationFindings';
import { applyAccepts } from './findings/accepts';
import { buildContextSteps, railVoltsOf, renumberedContext, rewiredContext, widenedContext, type ContextOptions, type ElectricalContext } from './analysis/electrical/context';
import { estimateNodeSteps, nodesAround, nodesReading, reestimate, renameEstimates, renumberEstimates, updateEstimates, widenEstimates, type NodeEstimate } from './analysis/electrical/estimate';
import { patchSizes, type SizePatch } from './circuit/patch';
import { reelaborateValues } from './circuit/valueEdit';
import { acceptEdit, layoutEdit } from './circuit/acceptEdit';
import { inertEdit } from './circuit/inertEdit';
import { electricalDirectiveLines, electricalEdit } from './circuit/electricalEdit';
import { renameNets, type NetRename } from './circuit/rename';
import { rewireNets, type Rewiring } from './circuit/rewire';
import { shiftDiagnostics, shiftedDesign, spliceDevices, type DeviceSplice, type LineShift } from './circuit/splice';
import { sameRange } from './syntax/compare';
import type { Range } from './core/source';
import { runToEnd, type Steps } from './core/steps';
import type { NetRenumbering } from './core/renumber';
import { DEFAULT_BUDGET_FRACTION, receiverBudget } from './analysis/electrical/budget';
import { carrySizingBasis, existingInverter, sameSizingBasis, sameSizingBasisRenumbered } from './analysis/electrical/keeper';
import { FALLBACK_PROFILE_NAME, FALLBACK_SUPPLY_V } from './analysis/devices/catalogue';
import { electricalFindings, reviseElectricalFindings, widenElectricalEmissions } from './findings/electricalFindings';
import { celsiusToKelvin } from './analysis/devices/physics';
import { diag } from './core/diagnostics';
import { parseNetlist } from './syntax/parser';
import type { SyntaxFile } from './syntax/tree';

export interface CircuitAnalysis {
  circuit: Circuit;
  plan: PhasePlan;
  classification: Classification;
  /** Absent when estimates were skipped. */
  electrical?: ElectricalContext;
  estimates?: Map<number, NodeEstimate>;
  /** This circuit's findings by stage, kept so an edit can redo only the stages it reaches. */
  findings: { phases: Diagnostic[]; classification: Diagnostic[]; electrical: Diagnostic[]; models: Diagnostic[] };
}

export const DEFAULT_TEMPS_C = [25, 110];

export interface AnalysisResult {
  deck: Deck;
  design: Design;
  /** One per circuit of the design, in the same order. */
  circuits: CircuitAnalysis[];
  /** Every finding of every stage, in file order. */
  diagnostics: Diagnostic[];
  /** The front end's findings (parse, includes, elaboration), kept for edits that reuse them. */
  frontEnd: Diagnostic[];
}

const parseCache = new Map<string, { text: string; result: SyntaxFile }>();
const PARSE_CACHE_LIMIT = 2000;

/**
 * Parses with a cache keyed by path, title mode and exact content. A new text of a cached file
 * is parsed from the old parse: its unchanged chunks are taken as they are.
 */
export function parseCached(file: string, text: string, hasTitle: boolean): SyntaxFile {
  const key = `${hasTitle ? 'T' : 'I'}:${file}`;
  const hit = parseCache.get(key);
  if (hit && hit.text === text) return hit.result;
  const result = parseNetlist(file, text, { hasTitle }, hit?.result);
  if (parseCache.size >= PARSE_CACHE_LIMIT) parseCache.clear();
  parseCache.set(key, { text, result });
  return result;
}

/** The front end alone: the netlist and its includes, parsed (cached per file text). */
export function readDeck(host: FileHost, file: string, options: EngineOptions = {}): Deck {
  const roots = [{ file, text: host.readFile(file) ?? '' }];
  const hostWithPaths: FileHost = options.includePaths?.length ? { ...host, includePaths: [...(host.includePaths ?? []), ...options.includePaths] } : host;
  return loadDeck(hostWithPaths, roots, parseCached);
}

/** Analyses one top-level netlist (and what it includes), read through `host`. */
export function analyse(host: FileHost, file: string, options: EngineOptions = {}): AnalysisResult {
  return runToEnd(analyseSteps(host, file, options));
}

/**
 * `analyse` in slices: it yields between stages and inside the long ones, so the language
 * server can answer requests meanwhile and abandon the run when a newer edit arrives. The
 * host is read only before the first yield, so the result belongs to one set of texts.
 */
export function* analyseSteps(host: FileHost, file: string, options: EngineOptions = {}): Steps<AnalysisResult> {
  const deck = readDeck(host, file, options);
  yield;
  const { design, diagnostics } = yield* elaborateSteps(deck, options);
  yield;
  return yield* analyseDesignSteps({ deck, design, frontEnd: [...deck.diagnostics, ...diagnostics] }, options);
}

/** A deck and its elaboration, with the front end's findings (parse, includes, elaboration). */
export interface Elaborated {
  deck: Deck;
  design: Design;
  frontEnd: Diagnostic[];
  /**
   * Each circuit's earlier analysis, when the edit changed only the values of sources or
   * electrical directives (every net, device, connection and rail stands): with the same clock
   * nets its switch network stands, and so do its results for each set of clock values it had.
   */
  earlier?: CircuitAnalysis[];
}

/** The stages after elaboration, in slices (see `analyseSteps`, `reelaborate`). */
export function* analyseDesignSteps(elaborated: Elaborated, options: EngineOptions = {}): Steps<AnalysisResult> {
  const { deck, design, frontEnd } = elaborated;
  const circuits: CircuitAnalysis[] = [];
  if (options.frontEndOnly !== true) {
    for (const [i, circuit] of design.circuits.entries()) {
      const clocks = findClocks(circuit, design.directives, options);
      const plan = buildPhases(circuit, clocks.clocks, design.directives, options);
      const earlier = elaborated.earlier?.[i];
      const stands = earlier !== undefined && sameClockNets(earlier.plan, plan);
      const network = stands ? { ...earlier.classification.network, circuit } : yield* buildSwitchNetworkSteps(circuit, clocks.clocks);
      yield;
      // a phase whose clock values the earlier analysis had takes its results (classify reads only those)
      const classification = yield* classifySteps(network, plan, {}, stands ? earlier.classification : undefined);
      const analysis: CircuitAnalysis = { circuit, plan, classification, findings: { phases: [...clocks.diagnostics, ...plan.diagnostics], classification: classificationFindings(circuit, classification, options), electrical: [], models: [] } };
      circuits.push(analysis);
      if (options.skipEstimates !== true) {
        yield;
        const ctx = yield* electricalContext(circuit, design, plan, classification, options);
        analysis.electrical = ctx;
        analysis.estimates = yield* estimateNodeSteps(ctx);
        analysis.findings.electrical = electricalFindings(ctx, analysis.estimates);
        analysis.findings.models = modelNotes(circuit);
      }
    }
  }
  return finish(deck, design, circuits, frontEnd, options);
}

/**
 * When `reanalyse` declines an edit whose design it could build, the new design is still built
 * from the previous one, in a fraction of an elaboration's time: the caller runs the later
 * stages on it (`analyseDesignSteps`). That is a reconnection or added or deleted devices that
 * reach too much of the circuit (a cell with thousands of copies), and a source's values or an
 * electrical directive that change the phases' pattern (a clock at another period, a clock or
 * standby line that brings new clock values). Equal to elaborating `deck` afresh (the tests
 * hold it); undefined for an edit of another kind, or one whose front-end findings may change.
 */
export function reelaborate(previous: AnalysisResult, deck: Deck, options: EngineOptions = {}): Elaborated | undefined {
  if (options.frontEndOnly === true) return undefined;
  const earlier = previous.circuits.length === previous.design.circuits.length ? previous.circuits : undefined;
  const lines = electricalDirectiveLines(previous.deck, previous.design, deck, previous.frontEnd);
  if (lines) return { deck, design: lines.design, frontEnd: lines.frontEnd, ...(earlier ? { earlier } : {}) };
  const electrical = electricalEdit(previous.deck, previous.design, deck, previous.frontEnd);
  if (electrical) return { deck, design: electrical.design, frontEnd: previous.frontEnd, ...(earlier ? { earlier } : {}) };
  const noLimit = () => Infinity;
  const rewired = rewireNets(previous.deck, previous.design, deck, noLimit, options);
  if (rewired) {
    if (previous.frontEnd.some((d) => onEditedLine(d, rewired.moved))) return undefined;
    // nets left unused are taken out, as afterRewire takes them out
    const design = rewired.narrowed.some((x) => x) ? { ...rewired.design, circuits: rewired.design.circuits.map((c, i) => rewired.narrowed[i]?.circuit ?? c) } : rewired.design;
    return { deck, design, frontEnd: previous.frontEnd };
  }
  const sp = spliceDevices(previous.deck, previous.design, deck, noLimit, options);
  return sp && splicedFrontEnd(previous, deck, sp) ? { deck, design: sp.design, frontEnd: shiftDiagnostics(previous.frontEnd, sp.shift) } : undefined;
}

/**
 * Whether the previous front-end findings carry over a splice, moved with their lines; and which
 * findings stood on a deleted line. Findings that count devices, quote line numbers or stand on
 * a deleted line are not moved (undefined), nor are the parse's when they differ from the moved ones.
 */
function splicedFrontEnd(previous: AnalysisResult, deck: Deck, sp: DeviceSplice, parseChecked = false): { onRemoved(d: Diagnostic): boolean } | undefined {
  const gone = sp.removedLines;
  const onRemoved = (d: Diagnostic) => gone !== undefined && d.file === gone.file && d.range.start.line >= gone.from && d.range.start.line <= gone.to;
  if (previous.frontEnd.some((d) => onRemoved(d) || d.rule === 'duplicate-definition' || d.rule === 'geometry-scale')) return undefined;
  // (a caller that worked out the new parse's findings itself has compared the rest)
  if (!parseChecked && JSON.stringify(shiftDiagnostics(previous.deck.diagnostics, sp.shift)) !== JSON.stringify(deck.diagnostics)) return undefined;
  return { onRemoved };
}

/**
 * The analysis after an edit, from the previous one, when the edit only renamed nets (see
 * circuit/rename.ts: everything stands with the new names) or only changed device sizes written
 * as plain numbers (circuit/patch.ts: nets, connections, phases and the classification stay; the
 * estimates of the nodes that read a changed device are redone and every other node keeps its
 * figures). Equal to `analyse` on the new text (the tests hold it); undefined when the edit is
 * of another kind, and the caller analyses afresh. `deck` is the new text's (`readDeck`).
 */
export function reanalyse(previous: AnalysisResult, deck: Deck, options: EngineOptions = {}): AnalysisResult | undefined {
  if (!patchable(previous, options)) return undefined;
  // comment or blank lines put in or taken out at one place: every result stands, moved
  const layout = layoutEdit(previous.deck, deck);
  if (layout) return afterSplice(previous, deck, { design: shiftedDesign(previous.design, layout.shift), renumbering: previous.circuits.map(() => undefined), shift: layout.shift, removedLines: undefined, widened: [] }, options);
  // accept directives alone: the same results, marked again
  const accepted = acceptEdit(previous.deck, previous.design, deck, previous.frontEnd);
  if (accepted) return afterSplice(previous, deck, { design: accepted.design, renumbering: previous.circuits.map(() => undefined), shift: accepted.shift, removedLines: undefined, widened: [] }, options, accepted.frontEnd);
  // a line being typed that adds nothing yet (too few nodes, no model, unreadable): its findings alone
  const typing = inertEdit(previous.deck, previous.design, deck, previous.frontEnd, options);
  if (typing) return afterSplice(previous, deck, { design: shiftedDesign(previous.design, typing.shift), renumbering: previous.circuits.map(() => undefined), shift: typing.shift, removedLines: undefined, widened: [] }, options, typing.frontEnd, true);
  // a budget, corners, clock or standby line put in or taken out
  const lines = electricalDirectiveLines(previous.deck, previous.design, deck, previous.frontEnd);
  if (lines) return afterElectrical(previous, deck, lines.design, options, lines.shift, lines.frontEnd);
  const renamed = renameNets(previous.deck, previous.design, deck, options);
  if (renamed) return afterRename(previous, deck, renamed, options);
  const patch = patchSizes(previous.deck, previous.design, deck);
  if (!patch) {
    const electrical = electricalEdit(previous.deck, previous.design, deck, previous.frontEnd);
    if (electrical) return afterElectrical(previous, deck, electrical.design, options);
    const limit = (i: number) => rewireLimit(previous.circuits[i]!.classification.network.components.length);
    const rewired = rewireNets(previous.deck, previous.design, deck, limit, options);
    if (rewired) return afterRewire(previous, deck, rewired, options);
    const spliced = spliceDevices(previous.deck, previous.design, deck, limit, options);
    if (spliced) return afterSplice(previous, deck, spliced, options);
    const values = reelaborateValues(previous.deck, previous.design, deck, previous.frontEnd, options);
    return values && afterSizes(previous, deck, { design: values.design, changed: values.changed, moved: values.moved ?? [] }, values.frontEnd, options);
  }
  // a front-end finding on an edited line may change with it (a parameter, a bin, the scale)
  if (previous.frontEnd.some((d) => onEditedLine(d, patch.moved))) return undefined;
  return afterSizes(previous, deck, patch, previous.frontEnd, options);
}

/**
 * Whether an analysis under `options` can be patched at all: a whole one (every circuit with its
 * estimates) and no receiver budget, which reads the first storage node's inverter sizes.
 */
function patchable(previous: AnalysisResult, options: EngineOptions): boolean {
  if (options.frontEndOnly === true || options.skipEstimates === true) return false;
  if (previous.circuits.length !== previous.design.circuits.length || previous.circuits.some((a) => !a.electrical || !a.estimates)) return false;
  return !previous.design.directives.budget?.receiver && !options.budget?.receiver;
}

/** The settings an analysis may take anew without elaborating again: the corners and the droop budget. */
const ELECTRICAL_OPTIONS = new Set<keyof EngineOptions>(['tempsC', 'budget']);

/**
 * The analysis of the same text under new settings, from the previous one, when only the
 * temperature corners or the droop budget changed (`before` and `after`: the two settings): the
 * phases and classification stand, every estimate is worked out again (afterElectrical). A
 * directive in the netlist still wins over the setting. Equal to `analyse` with `after` (the
 * tests hold it); undefined for any other change, and for a budget set by the receiving gate.
 */
export function reanalyseOptions(previous: AnalysisResult, before: EngineOptions, after: EngineOptions): AnalysisResult | undefined {
  if (!patchable(previous, before) || !patchable(previous, after)) return undefined;
  const keys = new Set([...Object.keys(before), ...Object.keys(after)] as Array<keyof EngineOptions>);
  for (const k of keys) if (!ELECTRICAL_OPTIONS.has(k) && JSON.stringify(before[k]) !== JSON.stringify(after[k])) return undefined;
  return afterElectrical(previous, previous.deck, previous.design, after);
}

/**
 * After devices took new sizes, models or cards (`patch`: the same nets and connections): the
 * phases and classification stand, the estimates of the nodes that read a changed device are
 * redone. `frontEnd`: the new text's front-end findings.
 */
function afterSizes(previous: AnalysisResult, deck: Deck, patch: SizePatch, frontEnd: Diagnostic[], options: EngineOptions): AnalysisResult {
  const move = (list: Diagnostic[]) => moveEditedRanges(list, patch.moved);
  const circuits = previous.circuits.map((a, i): CircuitAnalysis => {
    const changed = patch.changed[i]!;
    if (changed.length === 0) return a;
    const circuit = patch.design.circuits[i]!;
    const network = { ...a.classification.network, circuit };
    const classification = { ...a.classification, network };
    const ctx: ElectricalContext = { ...a.electrical!, circuit, network, classification };
    const affected = nodesReading(ctx, changed);
    // keeper sizing reads the circuit's smallest devices: when those moved, every sized keeper is redone
    if (!sameSizingBasis(a.circuit, circuit, changed)) for (const [n, e] of a.estimates!) if (e.suggestedKeeper || e.suggestedHolder) affected.add(n);
    const redo = [...affected].sort((x, y) => x - y);
    const estimates = updateEstimates(ctx, a.estimates!, redo);
    return { circuit, plan: a.plan, classification, electrical: ctx, estimates, findings: {
        phases: move(a.findings.phases),
        classification: move(a.findings.classification),
        electrical: reviseElectricalFindings(ctx, estimates, a.estimates!, redo),
        // the notes name cards Tidemark cannot evaluate: the same unless an edited device has or had one
        models: changed.some((k) => a.circuit.mosfets[k]!.card?.family === 'unsupported' || circuit.mosfets[k]!.card?.family === 'unsupported') ? modelNotes(circuit) : move(a.findings.models),
      },
    };
  });
  // (the value path's front end is worked out again, on the edited lines' old extent)
  return finish(deck, patch.design, circuits, move(frontEnd), options);
}

/**
 * After an edit of what the estimates read for the whole circuit (circuit/electricalEdit.ts: a
 * supply's volts, a clock's timing, the budget, the corners): when every circuit runs the same
 * clocks and each of its new phases has clock values an old phase had (only their times moved,
 * or some combinations are no longer run), the switch network and the classification stand,
 * each phase with the results of its values. The context takes the new supply, corners and
 * budget, and every estimate is worked out again, one solve per family of nodes that shared one
 * (estimate updateEstimates; a node that floated only in a combination no longer run loses its
 * estimate); the findings are written again (the classification's from the same results, with
 * the phases' new times, those of the nodes in the dropped combinations worked out again).
 * `shift`: the lines a directive line put in or taken out moved, with `frontEnd` the new text's
 * front-end findings.
 */
function afterElectrical(previous: AnalysisResult, deck: Deck, design: Design, options: EngineOptions, shift?: LineShift, frontEnd = previous.frontEnd): AnalysisResult | undefined {
  const circuits: CircuitAnalysis[] = [];
  for (let i = 0; i < previous.circuits.length; i++) {
    const a = previous.circuits[i]!;
    const circuit = design.circuits[i]!;
    const clocks = findClocks(circuit, design.directives, options);
    const plan = buildPhases(circuit, clocks.clocks, design.directives, options);
    // each new phase takes the results of the old one with its clock values
    const taken = phaseCorrespondence(a.plan, plan);
    if (!taken) return undefined;
    const { at, dropped } = taken;
    const network = { ...a.classification.network, circuit };
    const classification = phasesTaken(a.classification, at, network, plan);
    // the classification's findings of a node in a phase no longer run are worked out again
    const touched = new Set<number>();
    for (const k of dropped) for (const n of a.classification.perPhase[k]!.keys()) touched.add(n);
    const settings = electricalSettings(circuit, design, options);
    const ctx: ElectricalContext = { ...a.electrical!, circuit, network, plan, classification, ...settings, railVolts: railVoltsOf(circuit, network, settings.vddV) };
    const estimates = updateEstimates(ctx, a.estimates!, 'all');
    circuits.push({
      circuit,
      plan,
      classification,
      electrical: ctx,
      estimates,
      findings: { phases: [...clocks.diagnostics, ...plan.diagnostics], classification: reviseClassificationFindings(circuit, classification, a.classification, touched, options), electrical: electricalFindings(ctx, estimates), models: shift ? shiftDiagnostics(a.findings.models, shift) : a.findings.models },
    });
  }
  return finish(deck, design, circuits, frontEnd, options);
}

/** A classification's results laid out for another plan: phase i of it takes phase at[i]'s. */
function phasesTaken(cl: Classification, at: number[], network: Classification['network'], plan: PhasePlan): Classification {
  if (at.length === cl.perPhase.length && at.every((k, i) => k === i)) return { ...cl, network, plan };
  const pick = <T>(list: readonly T[]) => at.map((k) => list[k]!);
  const out: Classification = { ...cl, network, plan, perPhase: pick(cl.perPhase), phaseValues: pick(cl.phaseValues), componentFlags: pick(cl.componentFlags), ...(cl.groupsRead ? { groupsRead: pick(cl.groupsRead) } : {}) };
  // wide or unchecked in a phase no longer run: counted no more
  countFlags(out);
  return out;
}

/**
 * After a rename (circuit/rename.ts): the same graph, so phases, classification and estimates
 * stand with the new names put in; the findings are written again (they quote names).
 */
function afterRename(previous: AnalysisResult, deck: Deck, renamed: NetRename, options: EngineOptions): AnalysisResult | undefined {
  if (previous.frontEnd.some((d) => onEditedLine(d, renamed.moved))) return undefined;
  const names = renamed.names;
  const circuits = previous.circuits.map((a, i): CircuitAnalysis => {
    const circuit = renamed.design.circuits[i]!;
    const network = { ...a.classification.network, circuit };
    const classification: Classification = { ...a.classification, network, perPhase: a.classification.perPhase.map((m) => renameStates(m, names)) };
    const electrical = a.electrical && { ...a.electrical, circuit, network, classification };
    const estimates = a.estimates && renameEstimates(a.estimates, names);
    const findings = { phases: moveEditedRanges(a.findings.phases, renamed.moved), classification: classificationFindings(circuit, classification, options), electrical: electrical && estimates ? electricalFindings(electrical, estimates) : [], models: moveEditedRanges(a.findings.models, renamed.moved) };
    return { circuit, plan: a.plan, classification, ...(electrical ? { electrical } : {}), ...(estimates ? { estimates } : {}), findings };
  });
  return finish(deck, renamed.design, circuits, previous.frontEnd, options);
}

/**
 * Groups a reconnection may rebuild (and copies of the edited lines it may rewire) before a
 * fresh analysis is the faster way: a fiftieth of the circuit's groups, at least 256 (measured
 * on the benchmark's 100k netlist: an edit in a leaf cell used 2,100 times is slower patched).
 */
function rewireLimit(groups: number): number {
  return Math.max(256, groups / 50);
}

/**
 * After a reconnection (circuit/rewire.ts): the same nets, some devices on other ones. The
 * network is rebuilt around the moved devices, the values and the classification around the
 * groups that changed, and the estimates of the nodes near anything that changed; the findings
 * of the nets whose results or estimates changed are worked out again and merged with the
 * rest. Undefined when a stage cannot be patched (the caller analyses afresh).
 */
function afterRewire(previous: AnalysisResult, deck: Deck, rewired: Rewiring, options: EngineOptions): AnalysisResult | undefined {
  if (previous.frontEnd.some((d) => onEditedLine(d, rewired.moved))) return undefined;
  const move = (list: Diagnostic[]) => moveEditedRanges(list, rewired.moved);
  const circuits: CircuitAnalysis[] = [];
  for (let i = 0; i < previous.circuits.length; i++) {
    const wide = rewired.widened[i];
    // new nets: the previous results under the new net numbers first, the new nets on nothing yet
    const a = wide ? widenAnalysis(previous.circuits[i]!, wide.circuit, wide.nets) : previous.circuits[i]!;
    const circuit = rewired.design.circuits[i]!;
    if (circuit === a.circuit) {
      // the edited definition is not used in this circuit: its findings stand where they are
      circuits.push({ ...a, findings: { phases: move(a.findings.phases), classification: move(a.findings.classification), electrical: move(a.findings.electrical), models: move(a.findings.models) } });
      continue;
    }
    const changed = rewired.changed[i]!;
    // switch indices: MOSFETs first, then resistors, then inductors (as the network lists them)
    const nm = circuit.mosfets.length;
    const switches = [...changed.mosfets, ...changed.resistors.map((k) => nm + k), ...changed.inductors.map((k) => nm + circuit.resistors.length + k)];
    // keeper sizing reads device sizes only, which a reconnection keeps
    carrySizingBasis(a.circuit, circuit);
    const patched = regroup(a, patchSwitchNetwork(a.classification.network, circuit, switches), a, options, {
      contextFor: (network, classification) => rewiredContext(a.electrical!, circuit, network, classification, changed),
      // the moved devices' gate loads, and the moved capacitors' nets
      gates: changed.mosfets.flatMap((k) => [a.circuit.mosfets[k]!.g, circuit.mosfets[k]!.g]),
      seeds: changed.capacitors.flatMap((k) => [a.circuit, circuit].flatMap((c) => [c.capacitors[k]!.a, c.capacitors[k]!.b])),
    });
    if (!patched) return undefined;
    const done: CircuitAnalysis = { circuit, plan: a.plan, ...patched, findings: { phases: move(a.findings.phases), ...patched.findings, models: move(a.findings.models) } };
    // nets left unused: the patched results under the numbers without them (nothing read them)
    const narrow = rewired.narrowed[i];
    circuits.push(narrow ? widenAnalysis(done, narrow.circuit, narrow.nets) : done);
  }
  const design = rewired.narrowed.some((x) => x) ? { ...rewired.design, circuits: circuits.map((x) => x.circuit) } : rewired.design;
  return finish(deck, design, circuits, previous.frontEnd, options);
}

/**
 * A circuit's analysis with nets put in (`circuit`: the previous circuit with them, nothing on
 * them yet; circuit/newNets): every stage's results under the new net numbers, each new net an
 * undriven group of its own, as an analysis of that circuit finds them. The edit that wires
 * them is patched onto this. Also the other way: nets with nothing on them taken out.
 */
function widenAnalysis(a: CircuitAnalysis, circuit: Circuit, ins: NetRenumbering): CircuitAnalysis {
  const plan = widenPlan(a.plan, ins);
  const network = widenNetwork(a.classification.network, circuit, ins);
  const classification = widenClassification(a.classification, network, plan, ins);
  widenClassificationFacts(a.classification, classification, ins);
  const electrical = widenedContext(a.electrical!, circuit, network, plan, classification, ins);
  const estimates = widenEstimates(a.estimates!, ins);
  widenElectricalEmissions(a.estimates!, estimates, ins);
  carrySizingBasis(a.circuit, circuit);
  return { circuit, plan, classification, electrical, estimates, findings: a.findings };
}

/**
 * After transistor lines were added or deleted (circuit/splice.ts): the same nets, devices put
 * in or taken out, the MOSFETs after them renumbered and every line after the edit moved. The
 * previous results are renumbered, then patched as after a reconnection: the network around
 * the added and deleted devices, the classification around the groups that changed, the
 * estimates of the nodes near anything that changed, the findings of those nodes. Undefined
 * when a stage cannot be patched (the caller analyses afresh). Also the answer to an edit of
 * accept directives alone (circuit/acceptEdit.ts): no device comes or goes, and `frontEnd` is
 * the new text's front-end findings.
 */
function afterSplice(previous: AnalysisResult, deck: Deck, sp: DeviceSplice, options: EngineOptions, frontEnd?: Diagnostic[], parseChecked = false): AnalysisResult | undefined {
  const carried = splicedFrontEnd(previous, deck, sp, parseChecked);
  if (!carried) return undefined;
  const { onRemoved } = carried;
  const move = (list: Diagnostic[]) => shiftDiagnostics(list, sp.shift);
  const circuits: CircuitAnalysis[] = [];
  for (let i = 0; i < previous.circuits.length; i++) {
    const wide = sp.widened[i];
    const a = wide ? widenAnalysis(previous.circuits[i]!, wide.circuit, wide.nets) : previous.circuits[i]!;
    const circuit = sp.design.circuits[i]!;
    const r = sp.renumbering[i];
    if (a.findings.phases.some(onRemoved) || a.findings.models.some(onRemoved)) return undefined;
    if (!r) {
      // no device came or went here: the same results, on lines that may have moved
      const network = { ...a.classification.network, circuit };
      const classification = { ...a.classification, network };
      const ctx: ElectricalContext = { ...a.electrical!, circuit, network, classification };
      carrySizingBasis(a.circuit, circuit);
      const findings = { phases: move(a.findings.phases), classification: reviseClassificationFindings(circuit, classification, a.classification, [], options), electrical: reviseElectricalFindings(ctx, a.estimates!, a.estimates!, []), models: move(a.findings.models) };
      circuits.push({ circuit, plan: a.plan, classification, electrical: ctx, estimates: a.estimates!, findings });
      continue;
    }
    const devices = [...r.added.map((k) => circuit.mosfets[k]!), ...r.deleted.map((k) => a.circuit.mosfets[k]!)];
    const patched = regroup(a, patchSwitchNetwork(a.classification.network, circuit, [], r), { classification: renumberDevices(a.classification, r.oldToNew), estimates: renumberEstimates(a.estimates!, r.oldToNew) }, options, {
      contextFor: (network, classification) => renumberedContext(a.electrical!, circuit, network, classification, r),
      // the added and deleted devices' gate loads and terminals
      gates: devices.map((m) => m.g),
      seeds: devices.flatMap((m) => [m.d, m.s, m.b]),
      // keeper sizing reads the circuit's smallest devices: when those changed, every sized keeper is redone
      alsoRedo: () => (sameSizingBasisRenumbered(a.circuit, circuit, r) ? [] : [...a.estimates!].filter(([, e]) => e.suggestedKeeper || e.suggestedHolder).map(([n]) => n)),
    });
    if (!patched) return undefined;
    const unsupported = devices.some((m) => m.card?.family === 'unsupported');
    circuits.push({ circuit, plan: a.plan, ...patched, findings: { phases: move(a.findings.phases), ...patched.findings, models: unsupported ? modelNotes(circuit) : move(a.findings.models) } });
  }
  return finish(deck, sp.design, circuits, frontEnd ?? move(previous.frontEnd), options);
}

/**
 * One circuit's later stages after an edit regrouped part of its network (`patch`): the
 * classification again around the rebuilt groups, the estimates of the nodes near anything
 * that changed (`nodesAround`), and the findings of the nets and nodes reached. `from` holds the
 * earlier results under the new circuit's device numbers; `a` is the earlier analysis, whose
 * findings' facts are revised. `gates` are nets whose gate loads changed (their findings and
 * estimates are redone), `seeds` other nets whose estimates are. Undefined when a stage cannot
 * be patched or the edit reaches too much of the circuit (a fresh analysis is faster).
 */
function regroup(
  a: CircuitAnalysis,
  patch: NetworkPatch,
  from: { classification: Classification; estimates?: ReadonlyMap<number, NodeEstimate> },
  options: EngineOptions,
  edit: { contextFor(network: NetworkPatch['network'], classification: Classification): ElectricalContext; gates: Iterable<number>; seeds: Iterable<number>; alsoRedo?(): Iterable<number> },
): { classification: Classification; electrical: ElectricalContext; estimates: Map<number, NodeEstimate>; findings: { classification: Diagnostic[]; electrical: Diagnostic[] } } | undefined {
  const { network, rebuilt, previousId } = patch;
  // an edit in a cell used everywhere touches most of the circuit: a fresh analysis is faster
  if (rebuilt.length > rewireLimit(network.components.length)) return undefined;
  const reclassified = reclassify(from.classification, network, rebuilt, previousId);
  if (!reclassified) return undefined;
  const { classification } = reclassified;
  const ctx = edit.contextFor(network, classification);
  // what the classification's findings read that changed: every net whose value, storage flag
  // or results changed, and the changed gate loads
  const touched = new Set<number>(reclassified.changedNets);
  for (const g of edit.gates) touched.add(g);
  // what the estimates read that changed: that, the rebuilt groups and the other seeds
  const seeds = new Set<number>(touched);
  for (const id of rebuilt) for (const x of network.components[id]!.nodes) seeds.add(x);
  for (const x of edit.seeds) seeds.add(x);
  let redo = nodesAround(ctx, seeds);
  const also = [...(edit.alsoRedo?.() ?? [])];
  if (also.length) redo = [...new Set([...redo, ...also])].sort((x, y) => x - y);
  const estimates = reestimate(ctx, from.estimates ?? a.estimates!, redo);
  return {
    classification,
    electrical: ctx,
    estimates,
    findings: { classification: reviseClassificationFindings(ctx.circuit, classification, a.classification, touched, options), electrical: reviseElectricalFindings(ctx, estimates, a.estimates!, redo) },
  };
}

function onEditedLine(d: Diagnostic, moved: ReadonlyArray<{ file: string; from: Range }>): boolean {
  return moved.some((m) => m.file === d.file && d.range.start.line >= m.from.start.line && d.range.start.line <= m.from.end.line);
}

/** Findings kept across a size edit that point at an edited line take its new extent. */
function moveEditedRanges(list: Diagnostic[], moved: Array<{ file: string; from: Range; to: Range }>): Diagnostic[] {
  const to = (file: string, r: Range): Range => moved.find((m) => m.file === file && sameRange(m.from, r, 0))?.to ?? r;
  return list.map((d) => {
    const range = to(d.file, d.range);
    const related = d.related?.map((x) => ({ ...x, range: to(x.file, x.range) }));
    return range === d.range && !related?.some((x, k) => x.range !== d.related![k]!.range) ? d : { ...d, range, ...(related ? { related } : {}) };
  });
}

/** All findings in file order, once each, with the accept directives applied. */
function finish(deck: Deck, design: Design, circuits: CircuitAnalysis[], frontEnd: Diagnostic[], options: EngineOptions): AnalysisResult {
  const all = [...frontEnd];
  for (const a of circuits) all.push(...a.findings.phases, ...a.findings.classification, ...a.findings.electrical, ...a.findings.models);
  const byPlace = (a: Diagnostic, b: Diagnostic) => (a.file < b.file ? -1 : a.file > b.file ? 1 : a.range.start.line - b.range.start.line || a.range.start.character - b.range.start.character);
  all.sort(byPlace);
  // stale accepts are reported where they are written, in order with the rest
  const findings = options.frontEndOnly === true ? dedupe(all) : applyAccepts(dedupe(all), design.circuits, design.directives.accepts).sort(byPlace);
  return { deck, design, circuits, diagnostics: findings, frontEnd };
}

/** Supply, corners and budget: directives win over settings, settings over defaults. The budget set by a receiver is left to electricalContext. */
function electricalSettings(circuit: Circuit, design: Design, options: EngineOptions): ContextOptions {
  const known = circuit.supplies.map((s) => s.volts).filter((v): v is number => v !== null && v > 0);
  const vddV = known.length ? Math.max(...known) : (options.defaultSupplyVolts ?? FALLBACK_SUPPLY_V);
  const vddFrom = known.length ? 'netlist' : options.defaultSupplyVolts !== undefined ? 'setting' : 'fallback';
  const temps = design.directives.tempsC?.values ?? options.tempsC ?? DEFAULT_TEMPS_C;
  const corners = temps.map((t) => ({ tempC: t, tempK: celsiusToKelvin(t) }));
  const b = design.directives.budget ?? options.budget ?? {};
  const budgetV = b.volts ?? (b.fraction !== undefined ? b.fraction * vddV : DEFAULT_BUDGET_FRACTION * vddV);
  return { vddV, vddFrom, corners, budgetV };
}

function* electricalContext(circuit: Circuit, design: Design, plan: PhasePlan, classification: Classification, options: EngineOptions): Steps<ElectricalContext> {
  const settings = electricalSettings(circuit, design, options);
  const { vddV, corners } = settings;
  const b = design.directives.budget ?? options.budget ?? {};
  const base = yield* buildContextSteps(circuit, buildNetworkOf(classification), plan, classification, { ...settings, budgetV: DEFAULT_BUDGET_FRACTION * vddV });
  let budgetV = settings.budgetV;
  if (b.receiver) {
    // the first storage node's receiving inverter sets the threshold
    for (let n = 0; n < circuit.nets.length; n++) {
      if (!classification.storage[n] || !classification.perPhase.some((m) => m.has(n))) continue;
      const out = existingInverter(base, n);
      if (out === undefined) continue;
      const gated = base.gateOf(n).map((i) => circuit.mosfets[i]!).filter((m) => m.d === out || m.s === out);
      const nm = gated.find((m) => m.polarity === 'n');
      const pm = gated.find((m) => m.polarity === 'p');
      if (nm && pm) {
        budgetV = receiverBudget(vddV, { m: nm, model: base.model(nm) }, { m: pm, model: base.model(pm) }, corners[0]!.tempK);
        break;
      }
    }
  }
  return { ...base, budgetV };
}

function buildNetworkOf(cl: Classification) {
  return cl.network;
}

/** One note per model card Tidemark cannot evaluate, and when the fallback supply is assumed. */
function modelNotes(circuit: Circuit): Diagnostic[] {
  const out: Diagnostic[] = [];
  const seen = new Set<string>();
  for (const m of circuit.mosfets) {
    const card = m.card;
    if (!card || card.family !== 'unsupported' || seen.has(card.name)) continue;
    seen.add(card.name);
    out.push(diag('unknown-model', card.file, card.range, `model '${card.name}' is level ${card.level}, which Tidemark does not evaluate: its devices use the ${FALLBACK_PROFILE_NAME}`));
  }
  return out;
}

/** Directive notes about nets are raised per circuit; a cell library would repeat them. */
function dedupe(list: Diagnostic[]): Diagnostic[] {
  const seen = new Set<string>();
  return list.filter((d) => {
    const k = `${d.rule}|${d.file}|${d.range.start.line}|${d.range.start.character}|${d.message}`;
    if (seen.has(k)) return false;
    seen.add(k);
    return true;
  });
}
