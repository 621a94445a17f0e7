// Phases: the intervals of the (hyper)period in which every clock is constant, gaps between
// non-overlapping clocks included, plus standby scenarios in which a clock is held for a long
// time. A circuit without clocks has one steady phase.

import type { Circuit } from '../circuit/circuit';
import type { DirectiveSet } from '../circuit/directives';
import { diag, type Diagnostic } from '../core/diagnostics';
import type { EngineOptions } from '../core/options';
import type { Clock } from './clocks';
import type { NetRenumbering } from '../core/renumber';

export interface Phase {
  name: string;
  /** Start within the hyperperiod; null for standby and steady phases. */
  startS: number | null;
  /** Null for the steady phase of a circuit without clocks (it lasts indefinitely). */
  durationS: number | null;
  /** Clock net -> constant value in this phase; clocks not listed are free (standby). */
  clocks: Map<number, 0 | 1>;
  standby: boolean;
}

export interface PhasePlan {
  phases: Phase[];
  /** Normal (non-standby) phases in time order, which wrap around. */
  cycle: Phase[];
  hyperperiodS: number | null;
  capped: boolean;
  clocks: Clock[];
  diagnostics: Diagnostic[];
}

const FS = 1e-15;
/** Longest hyperperiod considered, in multiples of the longest clock period. */
const MAX_PERIODS = 64;
const MAX_PHASES = 4096;

function gcd(a: number, b: number): number {
  while (b) [a, b] = [b, a % b];
  return a;
}

function valueAt(k: Clock, t: number): 0 | 1 {
  const x = ((t % k.periodS) + k.periodS) % k.periodS;
  for (const [s, e] of k.high) if (x >= s && x < e) return 1;
  return 0;
}

function phaseName(c: Circuit, clocks: Map<number, 0 | 1>): string {
  return [...clocks]
    .map(([net, v]) => [c.nets[net]!.name, v] as const)
    .sort((a, b) => (a[0] < b[0] ? -1 : 1))
    .map(([n, v]) => `${n}=${v}`)
    .join(' ');
}

export function buildPhases(c: Circuit, clocks: Clock[], directives: DirectiveSet, options: EngineOptions): PhasePlan {
  const diagnostics: Diagnostic[] = [];
  const phases: Phase[] = [];
  let hyperperiodS: number | null = null;
  let capped = false;
  let cycle: Phase[] = [];

  if (clocks.length === 0) {
    const steady: Phase = { name: 'steady', startS: null, durationS: null, clocks: new Map(), standby: false };
    cycle = [steady];
    phases.push(steady);
  } else {
    // Hyperperiod: lcm of the periods in whole femtoseconds, capped.
    const periodsFs = clocks.map((k) => Math.max(1, Math.round(k.periodS / FS)));
    const longest = Math.max(...periodsFs);
    let h = periodsFs[0]!;
    for (const p of periodsFs.slice(1)) {
      h = (h / gcd(h, p)) * p;
      if (h > longest * MAX_PERIODS || !Number.isSafeInteger(h)) {
        capped = true;
        break;
      }
    }
    if (capped) h = longest * MAX_PERIODS;
    const H = h * FS;
    hyperperiodS = H;
    const edges = new Set<number>([0]);
    for (const k of clocks) {
      const reps = Math.ceil(H / k.periodS);
      for (let r = 0; r < reps && edges.size <= MAX_PHASES; r++) {
        for (const [s, e] of k.high) {
          for (const t of [s, e]) {
            const at = Math.round((r * k.periodS + t) / FS) * FS;
            if (at < H) edges.add(at);
          }
        }
      }
    }
    if (edges.size > MAX_PHASES) capped = true;
    const times = [...edges].sort((a, b) => a - b).slice(0, MAX_PHASES);
    if (capped) {
      const first = clocks[0]!;
      const src = c.sources.find((s) => s.p === first.net);
      const where = src?.origin ?? c.nets[first.net]!.origin;
      diagnostics.push(
        diag('hyperperiod-capped', where.file, where.range, `the clocks' common period is longer than ${MAX_PERIODS} periods of the slowest clock; phases are built over ${(H * 1e9).toPrecision(3)} ns only`, 'info'),
      );
    }
    // Intervals between edges; adjacent ones with the same clock values merge (wrap included).
    const raw: Phase[] = [];
    for (let i = 0; i < times.length; i++) {
      const start = times[i]!;
      const end = i + 1 < times.length ? times[i + 1]! : H;
      if (end - start <= 0) continue;
      const mid = (start + end) / 2;
      const values = new Map<number, 0 | 1>();
      for (const k of clocks) values.set(k.net, valueAt(k, mid));
      const prev = raw[raw.length - 1];
      if (prev && sameValues(prev.clocks, values)) prev.durationS! += end - start;
      else raw.push({ name: '', startS: start, durationS: end - start, clocks: values, standby: false });
    }
    if (raw.length > 1 && sameValues(raw[0]!.clocks, raw[raw.length - 1]!.clocks)) {
      const last = raw.pop()!;
      raw[0]!.startS = last.startS;
      raw[0]!.durationS! += last.durationS!;
      raw.push(raw.shift()!);
    }
    const seen = new Map<string, number>();
    for (const p of raw) {
      const base = phaseName(c, p.clocks);
      const n = (seen.get(base) ?? 0) + 1;
      seen.set(base, n);
      p.name = n === 1 ? base : `${base} #${n}`;
    }
    for (const p of raw) {
      // whole femtoseconds, so reports do not show float noise (7.300000000000001e-10)
      p.startS = Math.round(p.startS! / FS) / 1e15;
      p.durationS = Math.round(p.durationS! / FS) / 1e15;
    }
    cycle = raw;
    phases.push(...raw);
  }

  // Standby scenarios: the named clock (and its declared inverses) held; other clocks run free.
  const standby = [...directives.standby.map((s) => ({ ...s })), ...(options.standby ?? []).map((s) => ({ ...s, file: undefined, range: undefined }))];
  for (const s of standby) {
    const net = c.netByName.get(s.net.toLowerCase());
    if (net === undefined) {
      if (s.file && s.range) diagnostics.push(diag('directive', s.file, s.range, `standby names '${s.net}', which is not a net of ${c.name}`, 'info'));
      continue;
    }
    const values = new Map<number, 0 | 1>([[net, s.level]]);
    for (const k of clocks) if (k.inverseOf === net) values.set(k.net, s.level === 1 ? 0 : 1);
    const base = clocks.find((k) => k.net === net);
    if (base?.inverseOf !== undefined) values.set(base.inverseOf, s.level === 1 ? 0 : 1);
    phases.push({ name: `standby ${c.nets[net]!.name}=${s.level}`, startS: null, durationS: s.forS, clocks: values, standby: true });
  }
  return { phases, cycle, hyperperiodS, capped, clocks, diagnostics };
}

/** The same clock nets, in the same order, each the inverse of the same one (the switch network reads only which nets are clocks). */
export function sameClockNets(a: PhasePlan, b: PhasePlan): boolean {
  return a.clocks.length === b.clocks.length && a.clocks.every((k, i) => k.net === b.clocks[i]!.net && k.inverseOf === b.clocks[i]!.inverseOf);
}

/** The index of a phase of `plan` with the clock values of `phase`, or -1. */
export function phaseWithValues(plan: PhasePlan, phase: Phase): number {
  return plan.phases.findIndex((p) => sameValues(p.clocks, phase.clocks));
}

/**
 * For each phase, the first phase with the same clock values (itself when none comes before):
 * a phase's classification reads only its clock values, so one done is one done for each.
 */
export function firstWithSameValues(plan: PhasePlan): number[] {
  return plan.phases.map((q) => phaseWithValues(plan, q));
}

function sameValues(a: Map<number, 0 | 1>, b: Map<number, 0 | 1>): boolean {
  if (a.size !== b.size) return false;
  for (const [k, v] of a) if (b.get(k) !== v) return false;
  return true;
}

/**
 * The longest contiguous time, wrapping around the cycle, over phases where `floats(i)`;
 * Infinity when it floats in every phase of the cycle (it is never restored).
 */
export function floatWindow(plan: PhasePlan, floatsIn: (p: Phase) => boolean): number | null {
  let best = 0;
  const cyc = plan.cycle;
  const f = cyc.map(floatsIn);
  if (f.length > 0 && f.every(Boolean)) best = Infinity;
  else {
    // walk twice around so a run that wraps is counted whole
    let run = 0;
    for (let i = 0; i < 2 * f.length; i++) {
      const k = i % f.length;
      if (f[k]) {
        run += cyc[k]!.durationS ?? Infinity;
        best = Math.max(best, run);
      } else run = 0;
    }
  }
  for (const p of plan.phases) if (p.standby && floatsIn(p)) best = Math.max(best, p.durationS ?? Infinity);
  return best > 0 ? best : null;
}

/**
 * How a classification made under plan `a` serves plan `b`: for each phase of `b`, a phase of
 * `a` with the same clock values. A phase's classification reads nothing of the plan but those
 * values, so this holds when `b` runs the same clocks and every clock-value combination of `b`
 * is one of `a`'s; its phases may be more or fewer, renamed, re-timed, standby or not (a standby
 * line for a clock and its inverse repeats a combination the cycle has). `dropped`: the phases
 * of `a` whose combination `b` does not have (a node floating only there no longer floats).
 * Undefined when the clocks differ or `b` has a combination `a` has not.
 */
export function phaseCorrespondence(a: PhasePlan, b: PhasePlan): { at: number[]; dropped: number[] } | undefined {
  if (!sameClockNets(a, b)) return undefined;
  const at = b.phases.map((q) => phaseWithValues(a, q));
  if (at.includes(-1)) return undefined;
  const dropped: number[] = [];
  a.phases.forEach((p, k) => phaseWithValues(b, p) >= 0 || dropped.push(k));
  return { at, dropped };
}

/** The plan with its clock nets under a net insertion (core/renumber): the same phases and times. */
export function widenPlan(plan: PhasePlan, ins: NetRenumbering): PhasePlan {
  const at = (x: number) => ins.oldToNew[x]!;
  const phaseOf = new Map<Phase, Phase>();
  const phases = plan.phases.map((p) => {
    const q: Phase = { ...p, clocks: new Map([...p.clocks].map(([k, v]) => [at(k), v])) };
    phaseOf.set(p, q);
    return q;
  });
  const clocks = plan.clocks.map((k) => ({ ...k, net: at(k.net), ...(k.inverseOf !== undefined ? { inverseOf: at(k.inverseOf) } : {}) }));
  return { ...plan, phases, cycle: plan.cycle.map((p) => phaseOf.get(p) ?? p), clocks };
}
