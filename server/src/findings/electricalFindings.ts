// Findings with numbers: retention-short, charge-sharing, coupling-noise, combined-droop,
// keeper-weak, keeper-strong. Severity follows the margin. One finding per defining line.

import type { Circuit } from '../circuit/circuit';
import { formatEng, formatRatio } from '../circuit/numbers';
import { diag, type Diagnostic } from '../core/diagnostics';
import type { NodeEstimate } from '../analysis/electrical/estimate';
import type { ElectricalContext } from '../analysis/electrical/context';
import { KEEPER_RATIO_MAX } from '../analysis/electrical/keeper';
import { originKey, revisedNodes } from './perNode';
import { movedNets, type NetRenumbering } from '../core/renumber';

/** A keeper supplying less than this many times the hot-corner leakage is weak (common practice). */
export const KEEPER_WEAK_MARGIN = 2;

/** The words that tell a keeper-weak finding about charge sharing from one about leakage (its quick fixes differ). */
export const KEEPER_SHARING_WORDS = 'cannot stop charge sharing';

export function isKeeperSharingFinding(d: Pick<Diagnostic, 'rule' | 'message'>): boolean {
  return d.rule === 'keeper-weak' && d.message.includes(KEEPER_SHARING_WORDS);
}

/** One finding a node raises, before findings of the same defining line are merged. */
interface Emission {
  /** Tells apart two findings of one rule on one node (keeper-weak: leakage, sharing). */
  variant: string;
  rule: Diagnostic['rule'];
  severity: Diagnostic['severity'];
  message: string;
}

/**
 * What each node raises (nodes that raise nothing are left out), and those nodes in node order
 * (the order the estimates are kept in): kept with each estimate map so an edit that estimated a
 * few nodes again revises only theirs.
 */
interface NodeEmissions {
  byNode: Map<number, Emission[]>;
  listed: number[];
  budgetV: number;
  vddV: number;
}
const emissionsOf = new WeakMap<ReadonlyMap<number, NodeEstimate>, NodeEmissions>();

export function electricalFindings(ctx: ElectricalContext, estimates: Map<number, NodeEstimate>): Diagnostic[] {
  const byNode = new Map<number, Emission[]>();
  const listed: number[] = [];
  const b = formatEng(ctx.budgetV, 'V');
  for (const e of estimates.values()) {
    const list = nodeEmissions(ctx, e, b);
    if (!list) continue;
    byNode.set(e.node, list);
    listed.push(e.node);
  }
  const state: NodeEmissions = { byNode, listed, budgetV: ctx.budgetV, vddV: ctx.vddV };
  emissionsOf.set(estimates, state);
  return render(ctx.circuit, state);
}

/**
 * The findings of `estimates` from those of `previous`, the estimates before an edit that
 * estimated again the nodes `touched` only, every other node keeping its estimate object. Equal to `electricalFindings` on `estimates` (the tests hold it).
 */
export function reviseElectricalFindings(ctx: ElectricalContext, estimates: Map<number, NodeEstimate>, previous: ReadonlyMap<number, NodeEstimate>, touched: Iterable<number>): Diagnostic[] {
  const before = emissionsOf.get(previous);
  if (!before || before.budgetV !== ctx.budgetV || before.vddV !== ctx.vddV) return electricalFindings(ctx, estimates);
  const byNode = new Map(before.byNode);
  const added: number[] = [];
  const b = formatEng(ctx.budgetV, 'V');
  for (const n of touched) {
    const e = estimates.get(n);
    const list = e && nodeEmissions(ctx, e, b);
    if (list) {
      if (!byNode.has(n)) added.push(n);
      byNode.set(n, list);
    } else byNode.delete(n);
  }
  added.sort((x, y) => x - y);
  const state: NodeEmissions = { byNode, listed: revisedNodes(before.listed, added, (n) => byNode.has(n)), budgetV: before.budgetV, vddV: before.vddV };
  emissionsOf.set(estimates, state);
  return render(ctx.circuit, state);
}

/** One finding per rule and defining line, placed on its first node, with the count of the rest. */
function render(c: Circuit, state: NodeEmissions): Diagnostic[] {
  const out: Diagnostic[] = [];
  const seen = new Map<string, { d: Diagnostic; count: number }>();
  for (const n of state.listed) {
    const line = originKey(c.nets[n]!.origin);
    for (const x of state.byNode.get(n)!) {
      const key = `${x.rule}|${x.variant}|${line}`;
      const prior = seen.get(key);
      if (prior) {
        prior.count++;
        continue;
      }
      const o = c.nets[n]!.origin;
      const d = diag(x.rule, o.file, o.range, x.message, x.severity);
      d.node = c.nets[n]!.name;
      seen.set(key, { d, count: 1 });
      out.push(d);
    }
  }
  for (const { d, count } of seen.values()) if (count > 1) d.message += ` (${count} instances)`;
  return out;
}

/** The findings one node's estimate raises, or undefined for none (`b`: the budget, as text). */
function nodeEmissions(ctx: ElectricalContext, e: NodeEstimate, b: string): Emission[] | undefined {
  if (!e.storage) return undefined;
  const c = ctx.circuit;
  let out: Emission[] | undefined;
  const emit = (rule: Diagnostic['rule'], severity: Diagnostic['severity'], message: string, variant = '') => {
    (out ??= []).push({ variant, rule, severity, message });
  };
  const budget = ctx.budgetV;
  const name = c.nets[e.node]!.name;
  const primary = e.stored.find((s) => s.level === e.primaryLevel)!;
  const window = e.floatWindowS;
  // formatted only for a node that has a finding (most have none)
  let capText: string | undefined;
  const capOf = () => (capText ??= formatEng(e.capacitance.totalF, 'F'));
  // retention against the float window
  if (window !== null) {
    for (const k of primary.corners) {
      if (k.retentionS === null) continue;
      const ratio = k.retentionS / window;
      if (ratio < 3) {
        const top = k.contributors[0];
        const who = top ? `, mostly ${c.mosfets[e.devices[top.pos]!]!.name} (${top.mechanism})` : '';
        const w = Number.isFinite(window) ? `its float window of ${formatEng(window, 's')}` : 'the time it floats (it is never restored)';
        emit(
          'retention-short',
          ratio < 1 ? 'error' : 'warning',
          `${name} holding ${e.primaryLevel}: at ${k.tempC} C it leaks ${formatEng(k.leakageA, 'A')}${who} and droops by the ${b} budget in ${formatEng(k.retentionS, 's')}, ${ratio < 1 ? 'shorter than' : 'less than 3x'} ${w} (C = ${capOf()}; phase ${primary.phase})`,
        );
        break;
      }
    }
  }
  const share = e.chargeSharing?.droopV ?? 0;
  if (share > budget) {
    const when = Object.entries(e.chargeSharing!.when).map(([k, v]) => `${k}=${v}`).join(' ');
    emit('charge-sharing', share > 2 * budget ? 'error' : 'warning', `${name}: charge sharing with ${e.chargeSharing!.joined.map((j) => c.nets[j]!.name).join(', ')} (${formatEng(e.chargeSharing!.sharedF, 'F')} against ${capOf()}) when ${when} droops it by ${formatEng(share, 'V')}, over the ${b} budget`);
  }
  const coup = e.coupling.droopV;
  if (coup > budget) {
    const top = e.coupling.aggressors.slice(0, 3).map((a) => `${a.net} (${formatEng(a.capacitanceF, 'F')}, ${a.via})`).join(', ');
    emit('coupling-noise', coup > 2 * budget ? 'error' : 'warning', `${name}: coupling from ${top} can move it by ${formatEng(coup, 'V')}, over the ${b} budget`);
  }
  // all mechanisms together, over the float window at the hot corner
  const hot = primary.corners.reduce((x, y) => (y.tempC > x.tempC ? y : x));
  const leakDroop = window !== null && Number.isFinite(window) && hot.leakageA > 0 ? Math.min((hot.leakageA * window) / e.capacitance.totalF, ctx.vddV) : 0;
  const total = leakDroop + share + coup;
  if (total > budget && leakDroop <= budget && share <= budget && coup <= budget && !(hot.retentionS !== null && window !== null && hot.retentionS < window)) {
    const parts = [leakDroop > 0 ? `leakage (${formatEng(leakDroop, 'V')} over ${formatEng(window ?? 0, 's')} at ${hot.tempC} C)` : '', share > 0 ? `charge sharing (${formatEng(share, 'V')})` : '', coup > 0 ? `coupling (${formatEng(coup, 'V')})` : ''].filter(Boolean);
    emit('combined-droop', 'warning', `${name}: ${parts.join(', ')} together move it by ${formatEng(total, 'V')}, over the ${b} budget`);
  }
  if (e.keeper) {
    const k = e.keeper;
    const kname = c.mosfets[k.devices[0]!]!.name;
    if (k.holdCurrentA < KEEPER_WEAK_MARGIN * k.hotLeakageA) {
      emit('keeper-weak', k.holdCurrentA < k.hotLeakageA ? 'error' : 'warning', `${name}: keeper ${kname} supplies ${formatEng(k.holdCurrentA, 'A')} at the ${b} droop, against ${formatEng(k.hotLeakageA, 'A')} of hot-corner leakage (want at least ${KEEPER_WEAK_MARGIN}x)`);
    }
    if (share > budget) {
      emit('keeper-weak', 'warning', `${name}: keeper ${kname} ${KEEPER_SHARING_WORDS} with ${e.chargeSharing!.joined.map((j) => c.nets[j]!.name).join(', ')} from drooping it by ${formatEng(share, 'V')} (budget ${b}); precharge the internal node or reorder the stack`, 'sharing');
    }
    if (k.ratio > KEEPER_RATIO_MAX) {
      emit('keeper-strong', k.ratio > 2 * KEEPER_RATIO_MAX ? 'error' : 'warning', `${name}: keeper ${kname} is ${formatRatio(k.ratio)}x as strong as ${k.against.map((i) => c.mosfets[i]!.name).join(' + ')} (common practice at most ${KEEPER_RATIO_MAX})`);
    }
  }
  return out;
}

/** Carries the emissions of `previous` to `next`, the same estimates under a net insertion. */
export function widenElectricalEmissions(previous: ReadonlyMap<number, NodeEstimate>, next: ReadonlyMap<number, NodeEstimate>, ins: NetRenumbering): void {
  const before = emissionsOf.get(previous);
  if (!before) return;
  const byNode = new Map<number, Emission[]>();
  for (const [n, list] of before.byNode) byNode.set(ins.oldToNew[n]!, list);
  emissionsOf.set(next, { byNode, listed: movedNets(before.listed, ins), budgetV: before.budgetV, vddV: before.vddV });
}
