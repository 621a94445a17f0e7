// Hover cards (markdown) for nets and devices: state in each phase with the witness, the
// capacitance breakdown, leakage by contributor at each corner, retention, each droop mechanism
// against the budget, critical charge and the remedy. Pure: from an analysis result.

import type { AnalysisResult, CircuitAnalysis } from '../engine';
import type { Target } from './locate';
import { formatEng, formatRatio } from '../circuit/numbers';
import { interpretElement } from '../circuit/elements';
import type { Range } from '../core/source';
import { overpowersDriver, tooStrong, type HolderSuggestion, type KeeperSuggestion } from '../analysis/electrical/keeper';

function sameRange(a: Range, b: Range): boolean {
  return a.start.line === b.start.line && a.start.character === b.start.character && a.end.line === b.end.line && a.end.character === b.end.character;
}

/** The flat nets a word stands for (one per instance of its subcircuit). */
export function netsFor(result: AnalysisResult, file: string, target: Extract<Target, { kind: 'net' }>): Array<{ a: CircuitAnalysis; net: number }> {
  const out: Array<{ a: CircuitAnalysis; net: number }> = [];
  for (const a of result.circuits) {
    const c = a.circuit;
    if (target.subckt === null || (c.standalone && c.name === target.subckt)) {
      const id = c.netByName.get(target.name);
      if (id !== undefined) out.push({ a, net: id });
      continue;
    }
    // a net defined inside this subcircuit: one flat net per instance
    const seen = new Set<number>();
    c.nets.forEach((n, id) => {
      if (n.origin.subckt === target.subckt && n.origin.local === target.name && !seen.has(id)) {
        seen.add(id);
        out.push({ a, net: id });
      }
    });
    // a port: what the MOSFETs written on this line connect to, in each instance
    if (seen.size === 0 && target.statement && target.index !== undefined && target.index < 4) {
      for (const m of c.mosfets) {
        if (m.origin.file !== file || !sameRange(m.origin.range, target.statement.range)) continue;
        const id = [m.d, m.g, m.s, m.b][target.index]!;
        if (!seen.has(id)) {
          seen.add(id);
          out.push({ a, net: id });
        }
      }
    }
  }
  return out;
}


const STATE_WORDS: Record<string, string> = {
  driven: 'driven',
  conditional: 'floats for some inputs',
  floating: 'floats',
  kept: 'held by its keeper',
  contention: 'drivers can fight',
  undriven: 'no driver at all',
};

function when(w: Record<string, 0 | 1> | undefined): string {
  if (!w || Object.keys(w).length === 0) return '';
  return Object.entries(w)
    .map(([k, v]) => `${k}=${v}`)
    .join(' ');
}

export function netHover(result: AnalysisResult, file: string, target: Extract<Target, { kind: 'net' }>): string | undefined {
  const nets = netsFor(result, file, target);
  if (nets.length === 0) return undefined;
  const { a, net } = nets[0]!;
  const c = a.circuit;
  const n = c.nets[net]!;
  const cl = a.classification;
  const lines: string[] = [];
  const role = cl.network.role[net] !== 0 ? (n.kind === 'signal' ? 'driven input or clock' : n.kind) : cl.storage[net] ? 'storage node' : 'internal node';
  lines.push(`**${n.name}** — ${role}${nets.length > 1 ? ` (${nets.length} instances; figures for this one)` : ''}`);
  if (cl.network.role[net] !== 0) return lines.join('\n\n');
  lines.push('| phase | state | when |\n| --- | --- | --- |\n' + a.plan.phases.map((p, i) => {
    const r = cl.perPhase[i]!.get(net);
    const st = r?.state ?? 'driven';
    // a node whose drivers can fight may also float for other inputs (a tri-state bus): both shown
    const floatsToo = r?.state === 'contention' && (r.floatCover?.length ?? 0) > 0;
    const also = floatsToo ? (r!.when ? ', and floats for some inputs' : ', and floats') : '';
    const w = r?.state === 'contention' ? (floatsToo && r.when ? `${when(r.contentionWhen)} (fight); ${when(r.when)} (float)` : when(r.contentionWhen)) : when(r?.when);
    return `| ${p.name} | ${STATE_WORDS[st] ?? st}${also}${r && !r.exact ? ' (not verified)' : ''} | ${w} |`;
  }).join('\n'));
  const e = a.estimates?.get(net);
  if (e) {
    const ctx = a.electrical!;
    const k = e.capacitance;
    lines.push(`**Capacitance** ${formatEng(k.totalF, 'F')}: gate ${formatEng(k.gateF, 'F')}, diffusion ${formatEng(k.diffusionF, 'F')}, overlap ${formatEng(k.overlapF, 'F')}, explicit ${formatEng(k.explicitF, 'F')}${k.couplingF ? ` (coupling ${formatEng(k.couplingF, 'F')})` : ''}`);
    for (const s of e.stored) {
      const rows = s.corners.map((x) => {
        // the few that matter: a contributor a hundred times below the total changes no figure
        const top = significant(x.contributors, x.leakageA).slice(0, 3).map((y) => `${c.mosfets[e.devices[y.pos]!]!.name} ${y.mechanism} ${formatEng(y.currentA, 'A')}`).join(', ');
        const ret = x.held ? 'held' : x.retentionS === null ? '—' : formatEng(x.retentionS, 's');
        return `| ${x.tempC} C | ${formatEng(x.leakageA, 'A')} | ${ret} | ${top} |`;
      });
      lines.push(`**Holding ${s.level}** (${s.volts} V, phase ${s.phase})\n\n| corner | leakage | retention | main contributors |\n| --- | --- | --- | --- |\n${rows.join('\n')}`);
    }
    const budget = formatEng(ctx.budgetV, 'V');
    const droops: string[] = [];
    const primary = e.stored.find((s) => s.level === e.primaryLevel)!;
    const hot = primary.corners.reduce((x, y) => (y.tempC > x.tempC ? y : x));
    if (e.floatWindowS !== null) droops.push(`float window ${Number.isFinite(e.floatWindowS) ? formatEng(e.floatWindowS, 's') : 'unbounded (never restored)'}${hot.retentionS !== null ? `, retention at ${hot.tempC} C ${formatEng(hot.retentionS, 's')}` : ''}`);
    if (e.chargeSharing && e.chargeSharing.droopV > 0) droops.push(`charge sharing ${formatEng(e.chargeSharing.droopV, 'V')} when ${when(e.chargeSharing.when)}`);
    if (e.coupling.droopV > 0) droops.push(`coupling ${formatEng(e.coupling.droopV, 'V')} (${e.coupling.aggressors.slice(0, 3).map((x) => x.net).join(', ')})`);
    lines.push(`**Droop against the ${budget} budget**: ${droops.join('; ') || 'none'}`);
    lines.push(`**Critical charge** ${formatEng(e.qcritC, 'C')}${e.minClockHz ? ` · minimum clock ${formatEng(e.minClockHz, 'Hz')}` : ''}`);
    if (e.keeper) lines.push(`**Keeper** ${e.keeper.devices.map((i) => c.mosfets[i]!.name).join(', ')}: supplies ${formatEng(e.keeper.holdCurrentA, 'A')} at the budget droop against ${formatEng(e.keeper.hotLeakageA, 'A')} hot leakage; ${formatRatio(e.keeper.ratio)}x the pull-down`);
    if (e.suggestedKeeper) {
      const s = e.suggestedKeeper;
      lines.push(`**Remedy**: a ${s.polarity === 'p' ? 'p' : 'n'}-channel keeper W=${formatEng(s.wM, 'm')} L=${formatEng(s.lM, 'm')} (${s.model})${s.inverter.existingOutput ? `, gate on ${s.inverter.existingOutput}` : ', with a new inverter'} — ${s.reasoning.join('; ')}.${remedyEnd(s, 'evaluation')}`);
    }
    // nothing to insert (a memory cell, a node that holds data with no holder sized): what holding it would take
    const window = e.floatWindowS;
    if (!e.keeper && !e.suggestedKeeper && !e.suggestedHolder && hot.retentionS !== null && window !== null && hot.retentionS < window) {
      const restore = `restore (refresh) it at least every ${formatEng(hot.retentionS, 's')}`;
      // retention grows in proportion to the capacitance at the same leakage
      lines.push(Number.isFinite(window)
        ? `**To hold it** through its ${formatEng(window, 's')} float window at ${hot.tempC} C: about ${formatEng((e.capacitance.totalF * window) / hot.retentionS, 'F')} of capacitance (it has ${formatEng(e.capacitance.totalF, 'F')}), or ${restore}`
        : `**To hold it**: it is never restored; ${restore} at ${hot.tempC} C`);
    }
    if (e.suggestedHolder) {
      const h = e.suggestedHolder;
      const what = h.kind === 'feedback' ? `a weak feedback inverter from ${h.forward.existingOutput}` : 'a bus holder (a new inverter and a weak one back)';
      lines.push(`**Remedy**: the node holds data, so it needs both levels held: ${what}, P W=${formatEng(h.pullUp.wM, 'm')} L=${formatEng(h.pullUp.lM, 'm')} (${formatEng(h.pullUp.holdCurrentA, 'A')} at the budget droop), N W=${formatEng(h.pullDown.wM, 'm')} L=${formatEng(h.pullDown.lM, 'm')} (${formatEng(h.pullDown.holdCurrentA, 'A')}); ${formatRatio(h.pullUp.strengthRatio)}/${formatRatio(h.pullDown.strengthRatio)}x the drivers they fight.${remedyEnd(h, 'a write')}`);
    }
    if (e.notes.length) lines.push(`_${e.notes.join('; ')}_`);
  }
  lines.push('_Tidemark estimates are a screening aid, not sign-off._');
  return lines.join('\n\n');
}

/**
 * The end of a remedy: whether the quick fix inserts it, and for a suggestion left too strong
 * at the longest size tried, what that means (`what`: the operation the driver must still win).
 */
function remedyEnd(s: KeeperSuggestion | HolderSuggestion, what: string): string {
  const strong = tooStrong(s);
  if (!strong) return ' The quick fix inserts it.';
  const parts = `${strong[0]!.toUpperCase()}${strong.slice(1)} even at the longest size tried`;
  if (overpowersDriver(s)) return ` ${parts}, so ${what} would fail: strengthen the driver (no quick fix is offered).`;
  return ` ${parts}: check that ${what} still wins, or strengthen the driver. The quick fix inserts it.`;
}

/** A contributor under this share of its node's leakage is not listed (it changes no figure shown). */
const SIGNIFICANT = 0.01;
/** Rows of a device's leakage table. */
const MAX_LEAK_ROWS = 8;

/** Whether a contribution is at least SIGNIFICANT of its node's leakage. */
function isSignificant(currentA: number, totalA: number): boolean {
  return Math.abs(currentA) >= SIGNIFICANT * Math.abs(totalA);
}

/** The contributors at least SIGNIFICANT of the total (the largest always), in their order. */
function significant<T extends { currentA: number }>(list: readonly T[], totalA: number): T[] {
  return list.filter((y, i) => i === 0 || isSignificant(y.currentA, totalA));
}

export function deviceHover(result: AnalysisResult, file: string, target: Extract<Target, { kind: 'device' }>): string | undefined {
  for (const a of result.circuits) {
    const c = a.circuit;
    const m = c.mosfets.find((x) => x.origin.file === file && sameRange(x.origin.range, target.statement.range));
    if (!m) continue;
    const lines = [`**${m.name}** — ${m.polarity}-channel, W=${formatEng(m.wM, 'm')} L=${formatEng(m.lM, 'm')}${m.m !== 1 ? ` m=${m.m}` : ''}${m.nf !== 1 ? ` nf=${m.nf}` : ''}, model ${m.card?.name ?? `${m.model} (no card: fallback profile)`}`];
    const values = a.classification.phaseValues;
    const rows = a.plan.phases.map((p, i) => {
      const g = values[i]![m.g]!;
      const on = g === 2 ? 'depends on its gate' : (m.polarity === 'n') === (g === 1) ? 'on' : 'off';
      return `| ${p.name} | ${c.nets[m.g]!.name} = ${g === 2 ? 'free' : g} | ${on} |`;
    });
    lines.push('| phase | gate | channel |\n| --- | --- | --- |\n' + rows.join('\n'));
    const idx = c.mosfets.indexOf(m);
    // what it leaks from each node it bounds, where that is at least a hundredth of the node's leakage
    const leaks: Array<{ currentA: number; row: string }> = [];
    let slight = 0;
    for (const [node, e] of a.estimates ?? []) {
      for (const s of e.stored) {
        for (const k of s.corners) {
          for (const x of k.contributors) {
            if (e.devices[x.pos] !== idx) continue;
            if (!isSignificant(x.currentA, k.leakageA)) slight++;
            else leaks.push({ currentA: Math.abs(x.currentA), row: `| ${c.nets[node]!.name} | ${s.level} | ${k.tempC} C | ${x.mechanism} | ${formatEng(x.currentA, 'A')} |` });
          }
        }
      }
    }
    if (leaks.length) {
      leaks.sort((x, y) => y.currentA - x.currentA);
      const shown = leaks.slice(0, MAX_LEAK_ROWS);
      const more = leaks.length - shown.length;
      lines.push(`**Leakage** it draws from the floating nodes it touches\n\n| node | holding | corner | mechanism | current |\n| --- | --- | --- | --- | --- |\n${shown.map((x) => x.row).join('\n')}${more > 0 ? `\n\n_${more} more, smaller_` : ''}`);
    }
    if (slight) lines.push(`_${slight} smaller contribution${slight === 1 ? '' : 's'} (under 1% of a node's leakage) not listed_`);
    lines.push('_Tidemark estimates are a screening aid, not sign-off._');
    return lines.join('\n\n');
  }
  const el = interpretElement(target.statement);
  return el ? `**${target.name}** (${el.kind})` : undefined;
}
