// Quick fixes as plain text edits (the server turns them into LSP edits): insert a sized keeper
// (and its inverter), a bus holder or a precharge, resize an existing keeper, correct a misspelt
// net name, declare a clock, accept a finding with a reason. Every fix declares the rule codes it
// answers, and every edit leaves a netlist that still parses and simulates.

import type { AnalysisResult } from '../engine';
import type { Diagnostic } from '../core/diagnostics';
import type { RuleCode } from '../findings/catalogue';
import type { Range } from '../core/source';
import type { AssignItem, SyntaxFile, Statement, WordItem } from '../syntax/tree';
import { interpretElement } from '../circuit/elements';
import { formatEng } from '../circuit/numbers';
import type { Circuit } from '../circuit/circuit';
import { overpowersDriver, sizeKeeper, sizingBasis, tooStrong } from '../analysis/electrical/keeper';
import { isKeeperSharingFinding, KEEPER_WEAK_MARGIN } from '../findings/electricalFindings';
import { netReferenceWords } from './outline';

export interface TextEdit {
  file: string;
  range: Range;
  newText: string;
}

export interface QuickFix {
  title: string;
  fixes: RuleCode[];
  edits: TextEdit[];
  preferred?: boolean;
}

// not coupling-noise: a keeper restores the level slowly, after the glitch has already reached the gates it drives
// nor charge-sharing: the charge is lost at once; precharging the internal node answers it
export const KEEPER_FIX_RULES: RuleCode[] = ['floating-node', 'retention-short', 'combined-droop'];
export const ACCEPTABLE_RULES: RuleCode[] = ['floating-node', 'retention-short', 'charge-sharing', 'coupling-noise', 'combined-droop', 'contention', 'keeper-weak', 'keeper-strong', 'undriven-net'];

/** The circuits holding the finding's node, with the node's net id, in order. */
function* circuitsWithNode(result: AnalysisResult, d: Diagnostic): Generator<{ a: AnalysisResult['circuits'][number]; c: Circuit; id: number }> {
  for (const a of result.circuits) {
    const id = a.circuit.netByName.get(d.node!);
    if (id !== undefined) yield { a, c: a.circuit, id };
  }
}

function at(line: number): Range {
  return { start: { line, character: 0 }, end: { line, character: 0 } };
}

/** A SPICE number with a scale factor, 3 significant digits (0.12u, 45n). */
export function spiceNumber(v: number): string {
  const units: Array<[number, string]> = [[1, ''], [1e-3, 'm'], [1e-6, 'u'], [1e-9, 'n'], [1e-12, 'p'], [1e-15, 'f']];
  for (const [f, s] of units) if (Math.abs(v) >= f * 0.9995) return `${Number((v / f).toPrecision(3))}${s}`;
  return v.toExponential(2);
}

function statementAt(f: SyntaxFile, line: number): Statement | undefined {
  return f.statements.find((s) => s.range.start.line <= line && s.range.end.line >= line);
}

export function quickFixes(result: AnalysisResult, d: Diagnostic): QuickFix[] {
  const out: QuickFix[] = [];
  const file = result.deck.files.find((f) => f.file === d.file);
  if (!file) return out;
  if (d.rule === 'clock-unknown' && d.node) {
    const insertLine = file.title !== undefined ? 1 : 0;
    // the timing of a clock the circuit already has (the fastest), else 1 ns: a placeholder either way
    const known = result.circuits.flatMap((a) => a.plan.clocks).reduce<{ periodS: number; name: string } | undefined>((x, k) => (!x || k.periodS < x.periodS ? { periodS: k.periodS, name: k.name } : x), undefined);
    const period = known ? spiceNumber(known.periodS) : '1n';
    const high = known ? spiceNumber(known.periodS / 2) : '0.5n';
    out.push({
      title: `Declare ${d.node} as a clock (period ${period}, high ${high}${known ? `, as ${known.name}` : ''}; edit to the real figures)`,
      fixes: ['clock-unknown'],
      edits: [{ file: d.file, range: at(insertLine), newText: `* tidemark: clock ${d.node} period=${period} high=${high}\n` }],
    });
  }
  if (d.node && !d.accepted && ACCEPTABLE_RULES.includes(d.rule)) {
    const stmt = statementAt(file, d.range.start.line);
    const line = stmt ? stmt.range.start.line : d.range.start.line;
    // inside a subcircuit the directive names the cell's own node and covers every instance
    const origin = netOrigin(result, d.node);
    const inCell = origin && origin.subckt !== null && origin.file === d.file;
    const name = inCell ? origin.local : d.node;
    out.push({
      title: `Accept ${d.rule} on ${name}${inCell ? ` in every ${origin.subckt}` : ''} (reviewed; edit the reason)`,
      fixes: [d.rule],
      edits: [{ file: d.file, range: at(line), newText: `* tidemark: accept ${name} ${d.rule} reason="reviewed: state why this is safe"\n` }],
    });
  }
  // a keeper that cannot stop charge sharing: the precharge answers that finding too
  const sharingKeeper = isKeeperSharingFinding(d);
  if (d.node && (d.rule === 'charge-sharing' || d.rule === 'combined-droop' || sharingKeeper)) {
    const p = prechargeFix(result, d, file);
    if (p) out.unshift(sharingKeeper ? { ...p, fixes: [...p.fixes, 'keeper-weak'] } : p);
  }
  if (d.node && KEEPER_FIX_RULES.includes(d.rule)) {
    const k = keeperFix(result, d, file) ?? holderFix(result, d, file);
    if (k) out.unshift(k);
  }
  if (d.node && (d.rule === 'keeper-weak' || d.rule === 'keeper-strong')) {
    const r = resizeKeeperFix(result, d);
    if (r) out.unshift(r);
  }
  if (d.node && d.rule === 'undriven-net') out.unshift(...misspeltNetFixes(result, d));
  return out;
}

/** Nets offered for an undriven name, nearest first. */
const MAX_NAME_CANDIDATES = 2;

/**
 * An undriven net whose name is a few letters from a driven net of the same scope (`selx` for
 * `sel`): every use of the name in its scope changed to that net's, as it is written there. A
 * candidate must be a signal that something drives, within two edits (a letter put in, taken
 * out, changed, or two swapped) and less than half the shorter name, so `a1` is never offered
 * for `a2`.
 */
function misspeltNetFixes(result: AnalysisResult, d: Diagnostic): QuickFix[] {
  for (const { a, c, id } of circuitsWithNode(result, d)) {
    const origin = c.nets[id]!.origin;
    const file = result.deck.files.find((f) => f.file === origin.file);
    if (!file) return [];
    const network = a.classification.network;
    const seen = new Set<string>([origin.local]);
    const candidates: Array<{ local: string; distance: number; x: number }> = [];
    for (let x = 0; x < c.nets.length; x++) {
      const n = c.nets[x]!;
      const o = n.origin;
      if (o.subckt !== origin.subckt || o.file !== origin.file || seen.has(o.local)) continue;
      seen.add(o.local);
      if (n.kind !== 'signal' || network.unreachable[x]) continue;
      const distance = editDistance(origin.local, o.local, 2);
      if (distance <= 2 && distance < Math.min(origin.local.length, o.local.length) / 2) candidates.push({ local: o.local, distance, x });
    }
    // only the nearest: among numbered names (n25000, n15000) a second distance says nothing
    const best = Math.min(...candidates.map((x) => x.distance));
    const nearest = candidates.filter((x) => x.distance === best).sort((x, y) => (x.local < y.local ? -1 : 1));
    if (!nearest.length) return [];
    const uses = netReferenceWords(file, origin.subckt, origin.local);
    if (!uses.length) return [];
    const where = origin.subckt !== null ? ` in ${origin.subckt}` : '';
    return nearest.slice(0, MAX_NAME_CANDIDATES).flatMap(({ local, x }) => {
      const written = writtenAt(file, c.nets[x]!.origin.range) ?? local;
      return [{
        title: `Change ${uses[0]!.text} to ${written}${where} (${uses.length} use${uses.length === 1 ? '' : 's'})`,
        fixes: ['undriven-net'] as RuleCode[],
        edits: uses.map((w) => ({ file: file.file, range: w.range, newText: written })),
      }];
    });
  }
  return [];
}

/** The word written at `range` (a net's first use), as the file has it. */
function writtenAt(file: SyntaxFile, range: Range): string | undefined {
  const stmt = statementAt(file, range.start.line);
  const same = (w: WordItem) => w.range.start.line === range.start.line && w.range.start.character === range.start.character;
  for (const x of stmt?.items ?? []) if (x.kind === 'word' && same(x)) return x.text;
  return undefined;
}

/** Edits between two names (optimal string alignment: a swap of neighbours is one), or limit + 1 when more. */
function editDistance(a: string, b: string, limit: number): number {
  if (Math.abs(a.length - b.length) > limit) return limit + 1;
  const width = b.length + 1;
  if (rowsBuffer.length < 3 * width) rowsBuffer = new Int32Array(6 * width);
  // three rows in one buffer: two back, one back, this one
  const rows = rowsBuffer;
  let back2 = 0;
  let back1 = width;
  let here = 2 * width;
  for (let j = 0; j < width; j++) rows[back1 + j] = j;
  for (let i = 1; i <= a.length; i++) {
    rows[here] = i;
    let least = i;
    for (let j = 1; j < width; j++) {
      const cost = a.charCodeAt(i - 1) === b.charCodeAt(j - 1) ? 0 : 1;
      let v = Math.min(rows[back1 + j]! + 1, rows[here + j - 1]! + 1, rows[back1 + j - 1]! + cost);
      if (i > 1 && j > 1 && a.charCodeAt(i - 1) === b.charCodeAt(j - 2) && a.charCodeAt(i - 2) === b.charCodeAt(j - 1)) v = Math.min(v, rows[back2 + j - 2]! + 1);
      rows[here + j] = v;
      if (v < least) least = v;
    }
    // every later row is at least this row's least
    if (least > limit) return limit + 1;
    const t = back2;
    back2 = back1;
    back1 = here;
    here = t;
  }
  return rows[back1 + b.length]!;
}
let rowsBuffer = new Int32Array(96);

/**
 * An existing keeper too weak for the hot-corner leakage, or too strong against the pull-down:
 * the W and L on its line replaced by the sizes a keeper of its own card gets (sizeKeeper: 10x
 * the leakage held, 0.1-0.3 of the pull-down), in every instance of its cell. Offered only when
 * those sizes meet both targets, and when the line writes W and L as plain numbers with no
 * multiplier or fingers. Not for a keeper that cannot stop charge sharing: no keeper size
 * answers that (the precharge fix does).
 */
function resizeKeeperFix(result: AnalysisResult, d: Diagnostic): QuickFix | undefined {
  for (const { a, c, id } of circuitsWithNode(result, d)) {
    const e = a.estimates?.get(id);
    const k = e?.keeper;
    const ctx = a.electrical;
    if (!k || !ctx || k.devices.length !== 1) continue;
    if (d.rule === 'keeper-weak' && (k.holdCurrentA >= KEEPER_WEAK_MARGIN * k.hotLeakageA || isKeeperSharingFinding(d))) return undefined;
    const m = c.mosfets[k.devices[0]!]!;
    if (m.m !== 1 || m.nf !== 1) return undefined;
    const file = result.deck.files.find((f) => f.file === m.origin.file);
    const written = file && writtenMos(file, m);
    if (!file || !written) return undefined;
    const param = (name: string) => written.params.find((p) => p.name.text.toLowerCase() === name);
    const w = param('w');
    const l = param('l');
    // a size written as an expression or a parameter stays the designer's
    const wv = w?.value;
    const lv = l?.value;
    if (wv?.kind !== 'word' || lv?.kind !== 'word' || !/^[\d.]/.test(wv.text) || !/^[\d.]/.test(lv.text)) return undefined;
    const hot = ctx.corners.reduce((x, y) => (y.tempK > x.tempK ? y : x));
    const s = sizeKeeper(ctx, id, m.polarity === 'p' ? 1 : 0, k.hotLeakageA, hot.tempK, m);
    if (!s || !s.meetsHold || !s.meetsRatio) return undefined;
    const dim = dimensionIn(result);
    if (dim(s.wM) === wv.text && dim(s.lM) === lv.text) return undefined;
    const where = m.origin.subckt !== null ? ` in every ${m.origin.subckt}` : '';
    return {
      title: `Resize the keeper ${m.origin.local} to W=${dim(s.wM)} L=${dim(s.lM)}${where}`,
      fixes: [d.rule],
      preferred: true,
      edits: [
        { file: file.file, range: wv.range, newText: dim(s.wM) },
        { file: file.file, range: lv.range, newText: dim(s.lM) },
      ],
    };
  }
  return undefined;
}

/** A transistor's statement as written: its terminal words (d, g, s, b), model name and parameters. */
function writtenMos(file: SyntaxFile, m: Circuit['mosfets'][number]): { words: WordItem[]; model: string | undefined; params: AssignItem[] } | undefined {
  if (m.origin.file !== file.file) return undefined;
  const stmt = file.statements.find((s) => s.range.start.line === m.origin.range.start.line && s.range.start.character === m.origin.range.start.character);
  const el = stmt ? interpretElement(stmt) : undefined;
  if (!el || el.kind !== 'mos') return undefined;
  return { words: el.nodes as WordItem[], model: el.model?.text, params: el.params };
}

function netOrigin(result: AnalysisResult, node: string) {
  for (const a of result.circuits) {
    const id = a.circuit.netByName.get(node);
    if (id !== undefined) return a.circuit.nets[id]!.origin;
  }
  return undefined;
}

/** Local names (as written in the defining subcircuit) of the rails and models around a node. */
function localContext(c: Circuit, file: SyntaxFile, subckt: string | null): { vdd?: string; vddBulk?: string; gnd?: string; gndBulk?: string; pModel?: string; nModel?: string } {
  const ctx: ReturnType<typeof localContext> = {};
  for (const m of c.mosfets) {
    if (m.origin.subckt !== subckt) continue;
    const w = writtenMos(file, m);
    if (!w || w.words.length < 4) continue;
    const words = w.words;
    const terms = [m.d, m.g, m.s, m.b];
    for (let t = 0; t < 4; t++) {
      const kind = c.nets[terms[t]!]!.kind;
      if (t === 3) {
        if (m.polarity === 'p' && kind === 'supply') ctx.vddBulk ??= words[3]!.text;
        if (m.polarity === 'n' && kind === 'ground') ctx.gndBulk ??= words[3]!.text;
        continue;
      }
      if (kind === 'supply') ctx.vdd ??= words[t]!.text;
      if (kind === 'ground') ctx.gnd ??= words[t]!.text;
    }
    if (m.polarity === 'p') ctx.pModel ??= w.model;
    else ctx.nModel ??= w.model;
    if (ctx.vdd && ctx.gnd && ctx.pModel && ctx.nModel && ctx.vddBulk && ctx.gndBulk) break;
  }
  return ctx;
}

/** A length or width as the netlist writes it: SPICE suffixes in metres, or plain numbers under a scale. */
function dimensionIn(result: AnalysisResult): (m: number) => string {
  const scale = result.design.geometryScale.value;
  return (m: number) => (scale === 1 ? spiceNumber(m) : String(Number((m / scale).toPrecision(3))));
}

/** Where a fix for a net goes and how its sizes are written. */
function placement(result: AnalysisResult, c: Circuit, file: SyntaxFile, id: number) {
  const net = c.nets[id]!;
  const dim = dimensionIn(result);
  const stmt = statementAt(file, net.origin.range.start.line);
  const insertLine = (stmt ? stmt.range.end.line : net.origin.range.start.line) + 1;
  const local = net.origin.local;
  return { local, safe: local.replace(/[^a-z0-9_]/gi, '_'), dim, insertLine, lc: localContext(c, file, net.origin.subckt) };
}

/**
 * A bus holder (a new inverter and a weak one back) or, for a latch whose node already drives an
 * inverter, the weak feedback inverter alone. Either holds both levels, unlike a keeper.
 */
function holderFix(result: AnalysisResult, d: Diagnostic, file: SyntaxFile): QuickFix | undefined {
  for (const { a, c, id } of circuitsWithNode(result, d)) {
    const h = a.estimates?.get(id)?.suggestedHolder;
    if (!h) continue;
    // a half stronger than the driver it fights would stop the write: nothing to offer (the hover says why)
    if (overpowersDriver(h)) return undefined;
    const { local, safe, dim, insertLine, lc } = placement(result, c, file, id);
    if (!lc.gnd || !lc.vdd || !lc.nModel || !lc.pModel) return undefined;
    const vb = lc.vddBulk ?? lc.vdd;
    const gb = lc.gndBulk ?? lc.gnd;
    const what = h.kind === 'feedback' ? 'weak feedback inverter' : 'bus holder';
    const lines: string[] = [`* tidemark ${what} for ${local}: holds a 1 (${h.pullUp.reasoning.join('; ')}); holds a 0 (${h.pullDown.reasoning.join('; ')})`];
    let back = h.kind === 'feedback' ? localOutput(c, file, id) : undefined;
    if (!back) {
      back = `${safe}_hb`;
      const wn = h.forward.newWnM ?? h.pullDown.wM;
      const wp = h.forward.newWpM ?? 2 * wn;
      const l = h.forward.newLM ?? h.pullDown.lM;
      lines.push(`Mhold_fp_${safe} ${back} ${local} ${lc.vdd} ${vb} ${lc.pModel} w=${dim(wp)} l=${dim(l)}`);
      lines.push(`Mhold_fn_${safe} ${back} ${local} ${lc.gnd} ${gb} ${lc.nModel} w=${dim(wn)} l=${dim(l)}`);
    }
    lines.push(`Mhold_bp_${safe} ${local} ${back} ${lc.vdd} ${vb} ${lc.pModel} w=${dim(h.pullUp.wM)} l=${dim(h.pullUp.lM)}`);
    lines.push(`Mhold_bn_${safe} ${local} ${back} ${lc.gnd} ${gb} ${lc.nModel} w=${dim(h.pullDown.wM)} l=${dim(h.pullDown.lM)}`);
    // a half that stays too strong even at the longest size tried may stop a write: said, and not preferred
    const strong = tooStrong(h);
    return {
      title: (h.kind === 'feedback'
        ? `Insert a weak feedback inverter on ${local} from ${back}: P W=${dim(h.pullUp.wM)} L=${dim(h.pullUp.lM)}, N W=${dim(h.pullDown.wM)} L=${dim(h.pullDown.lM)}`
        : `Insert a bus holder on ${local}: weak P W=${dim(h.pullUp.wM)} L=${dim(h.pullUp.lM)}, N W=${dim(h.pullDown.wM)} L=${dim(h.pullDown.lM)}`) + (strong ? ` (${strong}: check the write)` : ''),
      fixes: KEEPER_FIX_RULES,
      preferred: !strong,
      edits: [{ file: file.file, range: at(afterFirstUses(c, file, id, lines, insertLine)), newText: lines.join('\n') + '\n' }],
    };
  }
  return undefined;
}

/**
 * Charge sharing: precharge each internal node the evaluation joins to the dynamic node, with a
 * device like the node's own precharge device (same clock, same rail, minimum size), so the
 * joined capacitance already sits at the stored level and takes no charge from the node.
 */
function prechargeFix(result: AnalysisResult, d: Diagnostic, file: SyntaxFile): QuickFix | undefined {
  for (const { a, c, id } of circuitsWithNode(result, d)) {
    const cs = a.estimates?.get(id)?.chargeSharing;
    if (!cs || cs.droopV <= 0 || cs.joined.length === 0) return undefined;
    const { dim, insertLine, local } = placement(result, c, file, id);
    const subckt = c.nets[id]!.origin.subckt;
    // the node's precharge device: a channel from the node to a rail, gated by a clock if any is
    const toRail = c.mosfets.map((m, i) => ({ m, i })).filter(({ m }) => (m.d === id || m.s === id) && m.origin.subckt === subckt && ['supply', 'ground'].includes(c.nets[m.d === id ? m.s : m.d]!.kind));
    const clocked = toRail.find(({ m }) => a.plan.phases.some((ph) => ph.clocks.has(m.g)));
    const preIndex = (clocked ?? toRail[0])?.i;
    if (preIndex === undefined) return undefined;
    const pm = c.mosfets[preIndex]!;
    const written = writtenMos(file, pm);
    const model = written?.model;
    if (!written || written.words.length < 4 || !model) return undefined;
    const [drainWord, gateWord, sourceWord, bulkWord] = written.words as [WordItem, WordItem, WordItem, WordItem];
    const railWord = pm.d === id ? sourceWord : drainWord;
    const wMin = sizingBasis(c)[pm.polarity]!.wMin;
    const lines = [`* tidemark precharge for the internal nodes of ${local}: they joined ${formatEng(cs.sharedF, 'F')} to it and drooped it by ${formatEng(cs.droopV, 'V')}`];
    const names: string[] = [];
    for (const j of cs.joined) {
      const o = c.nets[j]!.origin;
      if (o.subckt !== subckt) continue;
      const jl = o.local;
      names.push(jl);
      lines.push(`Mpre_${jl.replace(/[^a-z0-9_]/gi, '_')} ${jl} ${gateWord.text} ${railWord.text} ${bulkWord.text} ${model} w=${dim(wMin)} l=${dim(pm.lM)}`);
    }
    if (!names.length) return undefined;
    return {
      title: `Precharge ${names.join(', ')} with ${gateWord.text} to stop charge sharing on ${local}`,
      fixes: ['charge-sharing', 'combined-droop'],
      edits: [{ file: file.file, range: at(afterFirstUses(c, file, id, lines, insertLine)), newText: lines.join('\n') + '\n' }],
    };
  }
  return undefined;
}

function keeperFix(result: AnalysisResult, d: Diagnostic, file: SyntaxFile): QuickFix | undefined {
  for (const { a, c, id } of circuitsWithNode(result, d)) {
    const e = a.estimates?.get(id);
    const s = e?.suggestedKeeper;
    if (!s) continue;
    if (overpowersDriver(s)) return undefined;
    const { local, safe, dim, insertLine, lc } = placement(result, c, file, id);
    const vdd = s.polarity === 'p' ? lc.vdd : lc.gnd;
    const bulk = s.polarity === 'p' ? (lc.vddBulk ?? lc.vdd) : (lc.gndBulk ?? lc.gnd);
    const model = s.polarity === 'p' ? lc.pModel : lc.nModel;
    if (!vdd || !bulk || !model || !lc.gnd || !lc.vdd || !lc.nModel || !lc.pModel) return undefined;
    const lines: string[] = [`* tidemark keeper for ${local}: ${s.reasoning.join('; ')}`];
    let gate = s.inverter.existingOutput ? localOutput(c, file, id) : undefined;
    if (!gate) {
      gate = `${safe}_kb`;
      const wn = s.inverter.newWnM ?? s.wM;
      const wp = s.inverter.newWpM ?? 2 * wn;
      const l = s.inverter.newLM ?? s.lM;
      lines.push(`Mkinv_p_${safe} ${gate} ${local} ${lc.vdd} ${lc.vddBulk ?? lc.vdd} ${lc.pModel} w=${dim(wp)} l=${dim(l)}`);
      lines.push(`Mkinv_n_${safe} ${gate} ${local} ${lc.gnd} ${lc.gndBulk ?? lc.gnd} ${lc.nModel} w=${dim(wn)} l=${dim(l)}`);
    }
    lines.push(`Mkeep_${safe} ${local} ${gate} ${vdd} ${bulk} ${model} w=${dim(s.wM)} l=${dim(s.lM)}`);
    const strong = tooStrong(s);
    return {
      title: `Insert a keeper on ${local}: W=${dim(s.wM)} L=${dim(s.lM)}${s.inverter.existingOutput ? '' : ' and its inverter'}${strong ? ` (${strong}: check the evaluation)` : ''}`,
      fixes: KEEPER_FIX_RULES,
      preferred: !strong,
      edits: [{ file: file.file, range: at(afterFirstUses(c, file, id, lines, insertLine)), newText: lines.join('\n') + '\n' }],
    };
  }
  return undefined;
}

/**
 * Where new device lines go: at `insertLine` (after the node's first use), or later in the
 * scope when a net the lines name is first used further down, so every net the scope had keeps
 * its place in the order of first use (and the editor's next analysis can start from the last
 * one, see circuit/newNets: names new to the scope may go anywhere).
 */
function afterFirstUses(c: Circuit, file: SyntaxFile, node: number, lines: readonly string[], insertLine: number): number {
  const scope = c.nets[node]!.origin.subckt;
  const named = new Set<string>();
  for (const l of lines) if (/^m/i.test(l)) for (const w of l.split(/\s+/).slice(1, 5)) named.add(w.toLowerCase());
  let line = insertLine;
  for (const n of c.nets) {
    const o = n.origin;
    if (n.global || o.subckt !== scope || o.file !== file.file || !named.has(o.local)) continue;
    const stmt = statementAt(file, o.range.start.line);
    line = Math.max(line, (stmt ? stmt.range.end.line : o.range.start.line) + 1);
  }
  return line;
}

/** The name, as written in the node's own scope, of the output of the inverter the node drives. */
function localOutput(c: Circuit, file: SyntaxFile, node: number): string | undefined {
  for (const m of c.mosfets) {
    if (m.g !== node || m.polarity !== 'p') continue;
    const w = writtenMos(file, m);
    if (!w) continue;
    const [dw, , sw] = w.words;
    if (c.nets[m.s]!.kind === 'supply') return dw!.text;
    if (c.nets[m.d]!.kind === 'supply') return sw!.text;
  }
  return undefined;
}
