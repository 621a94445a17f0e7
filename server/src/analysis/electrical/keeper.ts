// Keepers (DOMAIN 7): the strength of an existing keeper against the node's hot leakage and
// against the pull-down it fights, and the sizing of a new one. A keeper must supply the
// hot-corner leakage with margin when the node has drooped by the budget, yet stay weak enough
// that evaluation wins: a keeper-to-pull-down current ratio of about 0.1 to 0.3 is common
// practice (no source). Minimum width and a longer-than-minimum length make it weak.

import type { MosfetRenumbering } from '../../circuit/splice';
import type { Circuit, Mosfet, Polarity } from '../../circuit/circuit';
import { NetRole } from '../switchNetwork';
import { channelCurrent } from './leakage';
import type { ElectricalContext } from './context';
import { formatEng, formatRatio } from '../../circuit/numbers';

/** Common-practice bounds (no source): keeper/pull-down ratio, and the hold margin over leakage. */
export const KEEPER_RATIO_MIN = 0.1;
export const KEEPER_RATIO_MAX = 0.3;
export const HOLD_MARGIN = 10;
/**
 * Channel lengths (x the minimum) tried at the minimum width when no size of the grid is weak
 * enough against the driver it fights: common practice for weak keepers and bus holders (no
 * source), up to about a micrometre in a 45 nm process.
 */
const LONG_KEEPER_L_FACTORS = [12, 16, 24];

export interface KeeperSuggestion {
  polarity: Polarity;
  wM: number;
  lM: number;
  model: string;
  /** The keeper's gate: the node's existing inverter output, or a new inverter to add. */
  inverter: { existingOutput?: string; newWnM?: number; newWpM?: number; newLM?: number };
  holdCurrentA: number;
  strengthRatio: number;
  fightsDevice?: string;
  meetsHold: boolean;
  meetsRatio: boolean;
  reasoning: string[];
}

/** Current an on keeper supplies with the node drooped by `budgetV` from `storedLevel`. */
export function keeperHoldCurrent(ctx: ElectricalContext, m: Pick<Mosfet, 'polarity' | 'wM' | 'lM' | 'm' | 'nf' | 'card' | 'model'>, storedLevel: 0 | 1, budgetV: number, tempK: number): number {
  const dev = asDevice(m);
  const vdd = ctx.vddV;
  if (storedLevel === 1) return Math.abs(channelCurrent(ctx, dev, vdd - budgetV, 0, vdd, vdd, tempK));
  return Math.abs(channelCurrent(ctx, dev, budgetV, vdd, 0, 0, tempK));
}

/** Fighting current (half the supply across it, gate fully on). */
function fightCurrent(ctx: ElectricalContext, m: Pick<Mosfet, 'polarity' | 'wM' | 'lM' | 'm' | 'nf' | 'card' | 'model'>, tempK: number): number {
  const dev = asDevice(m);
  const vdd = ctx.vddV;
  if (m.polarity === 'p') return Math.abs(channelCurrent(ctx, dev, vdd / 2, 0, vdd, vdd, tempK));
  return Math.abs(channelCurrent(ctx, dev, vdd / 2, vdd, 0, 0, tempK));
}

function asDevice(m: Pick<Mosfet, 'polarity' | 'wM' | 'lM' | 'm' | 'nf' | 'card' | 'model'>): Mosfet {
  return { name: 'keeper', d: 0, g: 0, s: 0, b: 0, origin: { file: '', range: { start: { line: 0, character: 0 }, end: { line: 0, character: 0 } }, subckt: null, local: '' }, ...m } as Mosfet;
}

/**
 * The strongest evaluation path from the node to the rail opposite its stored level, as a
 * current: devices in series combine like conductances (1/I = sum 1/I_i).
 */
export function pullStrength(ctx: ElectricalContext, node: number, storedLevel: 0 | 1, tempK: number): { currentA: number; devices: number[] } {
  const c = ctx.circuit;
  const want: Polarity = storedLevel === 1 ? 'n' : 'p';
  const targetRail = storedLevel === 1 ? NetRole.Rail0 : NetRole.Rail1;
  let best = { currentA: 0, devices: [] as number[] };
  const walk = (n: number, path: number[], seen: Set<number>) => {
    if (path.length > 6) return;
    for (const i of ctx.channelOf(n)) {
      if (path.includes(i)) continue;
      const m = c.mosfets[i]!;
      if (m.polarity !== want) continue;
      const other = m.d === n ? m.s : m.d;
      if (ctx.network.role[other] === targetRail) {
        const devs = [...path, i];
        const inv = devs.reduce((s, k) => s + 1 / Math.max(fightCurrent(ctx, c.mosfets[k]!, tempK), 1e-30), 0);
        const cur = 1 / inv;
        if (cur > best.currentA) best = { currentA: cur, devices: devs };
      } else if (ctx.network.role[other] === NetRole.Internal && !seen.has(other)) {
        seen.add(other);
        walk(other, [...path, i], seen);
        seen.delete(other);
      }
    }
  };
  walk(node, [], new Set([node]));
  return best;
}

/** Ratio of an existing keeper's fighting current to the node's strongest pull path. */
export function keeperRatio(ctx: ElectricalContext, keeper: Mosfet, node: number, storedLevel: 0 | 1, tempK: number): { ratio: number; against: number[] } {
  const pull = pullStrength(ctx, node, storedLevel, tempK);
  if (pull.currentA === 0) return { ratio: 0, against: [] };
  return { ratio: fightCurrent(ctx, keeper, tempK) / pull.currentA, against: pull.devices };
}

/** Finds a static inverter the node drives (a p and an n device gated by it, output shared). */
export function existingInverter(ctx: ElectricalContext, node: number): number | undefined {
  const c = ctx.circuit;
  const gated = ctx.gateOf(node).map((i) => c.mosfets[i]!);
  for (const p of gated.filter((m) => m.polarity === 'p')) {
    const outP = ctx.network.role[p.d] === NetRole.Rail1 ? p.s : ctx.network.role[p.s] === NetRole.Rail1 ? p.d : undefined;
    if (outP === undefined) continue;
    const n = gated.find((m) => m.polarity === 'n' && ((m.d === outP && ctx.network.role[m.s] === NetRole.Rail0) || (m.s === outP && ctx.network.role[m.d] === NetRole.Rail0)));
    if (n) return outP;
  }
  return undefined;
}

/** What keeper sizing reads from the whole circuit: per polarity, the smallest sizes and the first device. */
export interface SizingBasis {
  n: PolarityBasis | undefined;
  p: PolarityBasis | undefined;
}
interface PolarityBasis {
  /** Smallest width per finger and smallest length (m). */
  wMin: number;
  lMin: number;
  /** The first device of the polarity: the template when none sits on the node. */
  first: number;
}

const bases = new WeakMap<Circuit, SizingBasis>();

export function sizingBasis(c: Circuit): SizingBasis {
  let b = bases.get(c);
  if (b) return b;
  b = { n: undefined, p: undefined };
  for (let i = 0; i < c.mosfets.length; i++) takeIn(b, c.mosfets[i]!, i);
  bases.set(c, b);
  return b;
}

/** A basis with device `i` taken in: its sizes among the smallest, its index among the first. */
function takeIn(b: SizingBasis, m: Mosfet, i: number): void {
  const k = b[m.polarity];
  if (!k) b[m.polarity] = { wMin: m.wM / m.nf, lMin: m.lM, first: i };
  else {
    k.wMin = Math.min(k.wMin, m.wM / m.nf);
    k.lMin = Math.min(k.lMin, m.lM);
    k.first = Math.min(k.first, i);
  }
}

/** `b`'s sizing basis is `a`'s (an edit that moved connections and kept every size): noted without a scan. */
export function carrySizingBasis(a: Circuit, b: Circuit): void {
  if (!bases.has(b)) bases.set(b, sizingBasis(a));
}

/**
 * True when `b` (which is `a` with the devices `changed` re-sized) gives every keeper the same
 * sizing basis. When no changed device was or becomes a smallest one, `b`'s basis is `a`'s and
 * is recorded without scanning every device again.
 */
export function sameSizingBasis(a: Circuit, b: Circuit, changed?: readonly number[]): boolean {
  const x = sizingBasis(a);
  if (changed && !bases.has(b)) {
    const untouched = changed.every((k) => {
      const before = a.mosfets[k]!;
      const after = b.mosfets[k]!;
      const base = x[before.polarity]!;
      const strictlyAbove = (m: Mosfet) => m.wM / m.nf > base.wMin && m.lM > base.lMin;
      return k !== base.first && strictlyAbove(before) && strictlyAbove(after);
    });
    if (untouched) {
      bases.set(b, x);
      return true;
    }
  }
  const y = sizingBasis(b);
  return (['n', 'p'] as const).every((pol) => {
    const s = x[pol];
    const t = y[pol];
    if (!s || !t) return s === t;
    const ms = a.mosfets[s.first]!;
    const mt = b.mosfets[t.first]!;
    return s.wMin === t.wMin && s.lMin === t.lMin && s.first === t.first && ms.card === mt.card && ms.model === mt.model;
  });
}

/**
 * A keeper for `node` holding `storedLevel`: the sizes on a grid from the minimum (W 1-4x, L 8x
 * down to 1x) that supply HOLD_MARGIN x the hot-corner leakage at the budget droop, nearest
 * KEEPER_RATIO_MIN of the pull-down without passing KEEPER_RATIO_MAX; when none is that weak,
 * the shortest of LONG_KEEPER_L_FACTORS at the minimum width that is and still holds.
 * `template`: the device whose card it takes (an existing keeper being resized); else a device
 * of the node's polarity.
 */
export function sizeKeeper(ctx: ElectricalContext, node: number, storedLevel: 0 | 1, hotLeakageA: number, hotTempK: number, template?: Mosfet): KeeperSuggestion | undefined {
  const c = ctx.circuit;
  const polarity: Polarity = storedLevel === 1 ? 'p' : 'n';
  const basis = sizingBasis(c);
  const own = basis[polarity];
  if (!own) return undefined;
  // a device of the node's own group sets the model (the first in circuit order), else the circuit's first
  const onNode = template ? undefined : ctx.channelOf(node).find((i) => c.mosfets[i]!.polarity === polarity);
  template ??= c.mosfets[onNode ?? own.first]!;
  const { wMin, lMin } = own;
  const pull = pullStrength(ctx, node, storedLevel, hotTempK);
  const reasoning: string[] = [];
  const base = { polarity, m: 1, nf: 1, card: template.card, model: template.model };
  let choice: { w: number; l: number; hold: number; ratio: number } | undefined;
  let fallbackChoice: typeof choice;
  const need = HOLD_MARGIN * Math.max(hotLeakageA, 0);
  for (const wf of [1, 1.5, 2, 3, 4]) {
    for (const lf of [8, 6, 4, 3, 2, 1.5, 1]) {
      const w = wMin * wf;
      const l = lMin * lf;
      const hold = keeperHoldCurrent(ctx, { ...base, wM: w, lM: l }, storedLevel, ctx.budgetV, hotTempK);
      const ratio = pull.currentA > 0 ? fightCurrent(ctx, { ...base, wM: w, lM: l }, hotTempK) / pull.currentA : 0;
      if (hold < need) continue;
      if (ratio <= KEEPER_RATIO_MAX && (!choice || Math.abs(ratio - KEEPER_RATIO_MIN) < Math.abs(choice.ratio - KEEPER_RATIO_MIN))) choice = { w, l, hold, ratio };
      if (!fallbackChoice || ratio < fallbackChoice.ratio) fallbackChoice = { w, l, hold, ratio };
    }
    if (choice && choice.ratio >= KEEPER_RATIO_MIN) break;
  }
  // every size on the grid fights too hard (a weak driver, as a tri-state bus's or a latch's
  // pass gate): longer channels at the minimum width, the shortest that stays weak enough, as
  // long as it still holds the node (a long keeper is common practice; so is a stack of shorter ones)
  for (const lf of choice ? [] : LONG_KEEPER_L_FACTORS) {
    const w = wMin;
    const l = lMin * lf;
    const hold = keeperHoldCurrent(ctx, { ...base, wM: w, lM: l }, storedLevel, ctx.budgetV, hotTempK);
    if (hold < need) break;
    const ratio = pull.currentA > 0 ? fightCurrent(ctx, { ...base, wM: w, lM: l }, hotTempK) / pull.currentA : 0;
    if (!fallbackChoice || ratio < fallbackChoice.ratio) fallbackChoice = { w, l, hold, ratio };
    if (ratio <= KEEPER_RATIO_MAX) {
      choice = { w, l, hold, ratio };
      break;
    }
  }
  const picked = choice ?? fallbackChoice;
  if (!picked) {
    reasoning.push(`no keeper up to 4x minimum width supplies ${HOLD_MARGIN}x the hot leakage (${formatEng(hotLeakageA, 'A')})`);
    return undefined;
  }
  const f = (x: number) => `${(x * 1e6).toPrecision(3)}u`;
  reasoning.push(`hot-corner leakage ${formatEng(hotLeakageA, 'A')}; the keeper supplies ${formatEng(picked.hold, 'A')} with the node ${formatEng(ctx.budgetV, 'V')} from its level (need ${HOLD_MARGIN}x, common practice)`);
  if (pull.currentA > 0) reasoning.push(`keeper/pull-down ratio ${formatRatio(picked.ratio)} against ${pull.devices.map((i) => c.mosfets[i]!.name).join(' + ')} (common practice ${KEEPER_RATIO_MIN}-${KEEPER_RATIO_MAX})`);
  reasoning.push(`W = ${f(picked.w)} (minimum ${f(wMin)}), L = ${f(picked.l)} (${(picked.l / lMin).toFixed(1)}x minimum) to stay weak`);
  const inv = existingInverter(ctx, node);
  const nBasis = basis.n;
  const inverter: KeeperSuggestion['inverter'] = inv !== undefined ? { existingOutput: c.nets[inv]!.name } : nBasis ? { newWnM: nBasis.wMin, newWpM: 2 * nBasis.wMin, newLM: nBasis.lMin } : { newWnM: Infinity, newWpM: Infinity, newLM: Infinity };
  if (inv === undefined) reasoning.push('the node drives no inverter: add one to drive the keeper gate');
  return {
    polarity,
    wM: picked.w,
    lM: picked.l,
    model: template.model,
    inverter,
    holdCurrentA: picked.hold,
    strengthRatio: picked.ratio,
    ...(pull.devices.length ? { fightsDevice: c.mosfets[pull.devices[0]!]!.name } : {}),
    meetsHold: picked.hold >= need,
    meetsRatio: picked.ratio <= KEEPER_RATIO_MAX,
    reasoning,
  };
}

/**
 * What a suggestion leaves too strong: the halves (or the keeper) whose strength ratio stays over
 * KEEPER_RATIO_MAX at the longest size tried, as words for a title or a card ('the N half 1.41x
 * the driver it fights'); undefined when every part meets the range.
 */
export function tooStrong(s: KeeperSuggestion | HolderSuggestion): string | undefined {
  const over = suggestionParts(s).filter(([, k]) => !k.meetsRatio).map(([what, k]) => `${what} ${formatRatio(k.strengthRatio)}x the driver it fights`);
  return over.length ? over.join(', ') : undefined;
}

/**
 * Whether a part of the suggestion is at least as strong as the driver it fights: then the
 * driver cannot overpower it (a write of the other level, or an evaluation, fails) and no
 * fix is offered. ngspice shows it on the flop sample (test/quickfixes.test.ts).
 */
export function overpowersDriver(s: KeeperSuggestion | HolderSuggestion): boolean {
  return suggestionParts(s).some(([, k]) => k.strengthRatio >= 1);
}

function suggestionParts(s: KeeperSuggestion | HolderSuggestion): ReadonlyArray<readonly [string, KeeperSuggestion]> {
  return 'pullUp' in s ? [['the P half', s.pullUp], ['the N half', s.pullDown]] : [['the keeper', s]];
}

export interface HolderSuggestion {
  kind: 'holder' | 'feedback';
  /** The weak feedback inverter's halves: the p half holds a 1, the n half holds a 0. */
  pullUp: KeeperSuggestion;
  pullDown: KeeperSuggestion;
  /** The forward inverter: the node's existing one, or a new minimum inverter to add. */
  forward: KeeperSuggestion['inverter'];
}

/**
 * A weak inverter pair for a node that stores either level: each half is sized like a keeper
 * for its level (hold margin over that level's hot leakage, weak against the driver it fights).
 */
export function sizeHolder(ctx: ElectricalContext, node: number, hotLeakage1A: number, hotLeakage0A: number, hotTempK: number): HolderSuggestion | undefined {
  const pullUp = sizeKeeper(ctx, node, 1, hotLeakage1A, hotTempK);
  const pullDown = sizeKeeper(ctx, node, 0, hotLeakage0A, hotTempK);
  if (!pullUp || !pullDown) return undefined;
  const forward = pullUp.inverter;
  return { kind: forward.existingOutput ? 'feedback' : 'holder', pullUp, pullDown, forward };
}

/**
 * True when `b` (which is `a` with devices put in or taken out, `r` renumbering the rest) gives
 * every keeper the same sizing basis: the same smallest sizes, and the same first device of each
 * polarity under its new number. Unless a deleted device was a smallest or a first one, `b`'s
 * basis is `a`'s renumbered with the added devices taken in, recorded without a scan.
 */
export function sameSizingBasisRenumbered(a: Circuit, b: Circuit, r: MosfetRenumbering): boolean {
  const x = sizingBasis(a);
  const above = (m: Mosfet, base: PolarityBasis) => m.wM / m.nf > base.wMin && m.lM > base.lMin;
  if (!bases.has(b) && r.deleted.every((k) => k !== x[a.mosfets[k]!.polarity]!.first && above(a.mosfets[k]!, x[a.mosfets[k]!.polarity]!))) {
    const y: SizingBasis = { n: x.n && { ...x.n, first: r.oldToNew[x.n.first]! }, p: x.p && { ...x.p, first: r.oldToNew[x.p.first]! } };
    for (const j of r.added) takeIn(y, b.mosfets[j]!, j);
    bases.set(b, y);
  }
  const y = sizingBasis(b);
  return (['n', 'p'] as const).every((pol) => {
    const s = x[pol];
    const t = y[pol];
    if (!s || !t) return s === t;
    return s.wMin === t.wMin && s.lMin === t.lMin && r.oldToNew[s.first] === t.first;
  });
}
