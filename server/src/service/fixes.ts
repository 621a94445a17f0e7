// Quick fixes as plain text edits (the server turns them into LSP edits): insert a sized keeper
// (and its inverter), declare a clock, accept a finding with a reason. Every fix declares the
// rule codes it answers, and every edit leaves a netlist that still parses and simulates.

import type { AnalysisResult } from '../engine';
import type { Diagnostic } from '../core/diagnostics';
import type { RuleCode } from '../findings/catalogue';
import type { Range } from '../core/source';
import type { SyntaxFile, Statement, WordItem } from '../syntax/tree';
import { interpretElement } from '../circuit/elements';
import type { Circuit } from '../circuit/circuit';

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

export const KEEPER_FIX_RULES: RuleCode[] = ['floating-node', 'retention-short', 'charge-sharing', 'combined-droop', 'coupling-noise'];
export const ACCEPTABLE_RULES: RuleCode[] = ['floating-node', 'retention-short', 'charge-sharing', 'coupling-noise', 'combined-droop', 'contention', 'keeper-weak', 'keeper-strong', 'undriven-net'];

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
    out.push({
      title: `Declare ${d.node} as a clock (period 1n, high 0.5n; edit to the real figures)`,
      fixes: ['clock-unknown'],
      edits: [{ file: d.file, range: at(insertLine), newText: `* tidemark: clock ${d.node} period=1n high=0.5n\n` }],
    });
  }
  if (d.node && ACCEPTABLE_RULES.includes(d.rule)) {
    const stmt = statementAt(file, d.range.start.line);
    const line = stmt ? stmt.range.start.line : d.range.start.line;
    out.push({
      title: `Accept ${d.rule} on ${d.node} (reviewed; edit the reason)`,
      fixes: [d.rule],
      edits: [{ file: d.file, range: at(line), newText: `* tidemark: accept ${d.node} ${d.rule} reason="reviewed: state why this is safe"\n` }],
    });
  }
  if (d.node && KEEPER_FIX_RULES.includes(d.rule)) {
    const k = keeperFix(result, d, file);
    if (k) out.unshift(k);
  }
  return out;
}

/** Local names (as written in the defining subcircuit) of the rails and models around a node. */
function localContext(c: Circuit, file: SyntaxFile, subckt: string | null): { vdd?: string; vddBulk?: string; gnd?: string; gndBulk?: string; pModel?: string; nModel?: string } {
  const ctx: ReturnType<typeof localContext> = {};
  for (const m of c.mosfets) {
    if (m.origin.subckt !== subckt || m.origin.file !== file.file) continue;
    const stmt = file.statements.find((s) => s.range.start.line === m.origin.range.start.line && s.range.start.character === m.origin.range.start.character);
    if (!stmt) continue;
    const el = interpretElement(stmt);
    if (!el || el.kind !== 'mos' || el.nodes.length < 4) continue;
    const words = el.nodes as WordItem[];
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
    if (m.polarity === 'p') ctx.pModel ??= el.model?.text;
    else ctx.nModel ??= el.model?.text;
    if (ctx.vdd && ctx.gnd && ctx.pModel && ctx.nModel && ctx.vddBulk && ctx.gndBulk) break;
  }
  return ctx;
}

function keeperFix(result: AnalysisResult, d: Diagnostic, file: SyntaxFile): QuickFix | undefined {
  for (const a of result.circuits) {
    const c = a.circuit;
    const id = c.netByName.get(d.node!);
    if (id === undefined) continue;
    const e = a.estimates?.get(id);
    const s = e?.suggestedKeeper;
    if (!s) continue;
    const net = c.nets[id]!;
    const local = net.origin.local;
    const lc = localContext(c, file, net.origin.subckt);
    const vdd = s.polarity === 'p' ? lc.vdd : lc.gnd;
    const bulk = s.polarity === 'p' ? (lc.vddBulk ?? lc.vdd) : (lc.gndBulk ?? lc.gnd);
    const model = s.polarity === 'p' ? lc.pModel : lc.nModel;
    if (!vdd || !bulk || !model || !lc.gnd || !lc.vdd || !lc.nModel || !lc.pModel) return undefined;
    const scale = result.design.geometryScale.value;
    // in the netlist's own units: SPICE suffixes in metres, or plain numbers under a scale
    const dim = (m: number) => (scale === 1 ? spiceNumber(m) : String(Number((m / scale).toPrecision(3))));
    const stmt = statementAt(file, net.origin.range.start.line);
    const insertLine = (stmt ? stmt.range.end.line : net.origin.range.start.line) + 1;
    const safe = local.replace(/[^a-z0-9_]/gi, '_');
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
    return {
      title: `Insert a keeper on ${local}: W=${dim(s.wM)} L=${dim(s.lM)}${s.inverter.existingOutput ? '' : ' and its inverter'}`,
      fixes: KEEPER_FIX_RULES,
      preferred: true,
      edits: [{ file: file.file, range: at(insertLine), newText: lines.join('\n') + '\n' }],
    };
  }
  return undefined;
}

/** The name, as written in the node's own scope, of the output of the inverter the node drives. */
function localOutput(c: Circuit, file: SyntaxFile, node: number): string | undefined {
  for (const m of c.mosfets) {
    if (m.g !== node || m.polarity !== 'p') continue;
    const stmt = file.statements.find((s) => s.range.start.line === m.origin.range.start.line && s.range.start.character === m.origin.range.start.character);
    if (!stmt) continue;
    const el = interpretElement(stmt);
    if (!el || el.kind !== 'mos') continue;
    const [dw, , sw] = el.nodes as WordItem[];
    if (c.nets[m.s]!.kind === 'supply') return dw!.text;
    if (c.nets[m.d]!.kind === 'supply') return sw!.text;
  }
  return undefined;
}
