// Clock waveforms: from periodic sources (PULSE with a period, PWL with r=), from `clock`
// directives and from settings. Each becomes the set of intervals within its period where the
// clock is logic 1, with edges at the 50% crossings.

import type { Circuit, Waveform } from '../circuit/circuit';
import type { DirectiveSet } from '../circuit/directives';
import { diag, type Diagnostic } from '../core/diagnostics';
import { DEFAULT_CLOCK_PATTERN, type EngineOptions } from '../core/options';

export interface Clock {
  net: number;
  name: string;
  periodS: number;
  /** Intervals [start, end) within [0, periodS) where the clock is 1, sorted, not wrapping. */
  high: Array<[number, number]>;
  from: 'source' | 'directive' | 'setting';
  /** Set for a clock declared as the complement of another. */
  inverseOf?: number;
}

function wrapIntervals(start: number, length: number, period: number): Array<[number, number]> {
  if (length >= period) return [[0, period]];
  if (length <= 0) return [];
  const s = ((start % period) + period) % period;
  const e = s + length;
  return e <= period ? [[s, e]] : [[0, e - period], [s, period]];
}

function complement(high: Array<[number, number]>, period: number): Array<[number, number]> {
  const out: Array<[number, number]> = [];
  let t = 0;
  for (const [s, e] of high) {
    if (s > t) out.push([t, s]);
    t = e;
  }
  if (t < period) out.push([t, period]);
  return out;
}

/** The logic-1 intervals of a periodic waveform, or undefined if it does not repeat. */
export function periodicHigh(w: Waveform): { periodS: number; high: Array<[number, number]> } | undefined {
  if (w.kind === 'pulse') {
    const per = w.periodS;
    if (!Number.isFinite(per) || per <= 0 || w.v1 === w.v2) return undefined;
    const pulseLen = w.riseS / 2 + Math.min(w.widthS, per) + w.fallS / 2;
    const pulse = wrapIntervals(w.delayS + w.riseS / 2, pulseLen, per);
    return { periodS: per, high: w.v2 > w.v1 ? pulse : complement(pulse, per) };
  }
  if (w.kind === 'pwl' && w.repeatFromS !== undefined && w.points.length >= 2) {
    const pts = w.points.filter(([t]) => t >= w.repeatFromS!);
    const last = w.points[w.points.length - 1]![0];
    const per = last - w.repeatFromS;
    if (per <= 0 || pts.length < 2) return undefined;
    const vs = w.points.map((p) => p[1]);
    const mid = (Math.min(...vs) + Math.max(...vs)) / 2;
    const crossings: Array<[number, 0 | 1]> = [];
    for (let i = 1; i < pts.length; i++) {
      const [t0, v0] = pts[i - 1]!;
      const [t1, v1] = pts[i]!;
      if ((v0 - mid) * (v1 - mid) < 0 || (v0 === mid) !== (v1 === mid)) {
        const tc = v1 === v0 ? t0 : t0 + ((mid - v0) / (v1 - v0)) * (t1 - t0);
        crossings.push([tc - w.repeatFromS, v1 > v0 ? 1 : 0]);
      }
    }
    if (crossings.length === 0) return undefined;
    const startHigh = pts[0]![1] > mid;
    const high: Array<[number, number]> = [];
    let open: number | undefined = startHigh ? 0 : undefined;
    for (const [t, up] of crossings) {
      if (up && open === undefined) open = t;
      else if (!up && open !== undefined) {
        if (t > open) high.push([open, t]);
        open = undefined;
      }
    }
    if (open !== undefined) high.push([open, per]);
    return { periodS: per, high };
  }
  return undefined;
}

export interface ClockSet {
  clocks: Clock[];
  diagnostics: Diagnostic[];
}

/** True when the net's leaf name reads as a clock by the name rule. */
export function clockNamed(name: string, pattern = DEFAULT_CLOCK_PATTERN): boolean {
  const leaf = name.slice(name.lastIndexOf('.') + 1);
  return new RegExp(pattern, 'i').test(leaf);
}

export function findClocks(c: Circuit, directives: DirectiveSet, options: EngineOptions): ClockSet {
  const diagnostics: Diagnostic[] = [];
  const clocks: Clock[] = [];
  const byNet = new Map<number, Clock>();
  const pattern = options.clockNamePattern ?? DEFAULT_CLOCK_PATTERN;
  const add = (k: Clock) => {
    if (byNet.has(k.net)) return;
    byNet.set(k.net, k);
    clocks.push(k);
  };
  const declared = [
    ...directives.clocks.map((d) => ({ ...d, from: 'directive' as const })),
    ...(options.clocks ?? []).map((d) => ({ ...d, file: undefined, range: undefined, from: 'setting' as const })),
  ];
  const inverses: typeof declared = [];
  for (const d of declared) {
    const net = c.netByName.get(d.net.toLowerCase());
    if (net === undefined) {
      if (d.file && d.range) diagnostics.push(diag('directive', d.file, d.range, `clock '${d.net}' is not a net of ${c.name}`, 'info'));
      continue;
    }
    if (d.inverseOf) {
      inverses.push(d);
      continue;
    }
    const periodS = d.periodS!;
    const highS = d.highS ?? (('duty' in d && typeof d.duty === 'number' ? d.duty : 0.5) * periodS);
    add({ net, name: c.nets[net]!.name, periodS, high: wrapIntervals(d.delayS ?? 0, highS, periodS), from: d.from });
  }
  // Periodic voltage sources on nets named like clocks; other periodic stimuli stay data inputs.
  for (const s of c.sources) {
    if (s.letter !== 'v' || c.nets[s.n]!.kind !== 'ground') continue;
    const name = c.nets[s.p]!.name;
    const p = periodicHigh(s.waveform);
    if (!p || !clockNamed(name, pattern)) continue;
    add({ net: s.p, name, periodS: p.periodS, high: p.high, from: 'source' });
  }
  for (const d of inverses) {
    const net = c.netByName.get(d.net.toLowerCase())!;
    const of = c.netByName.get(d.inverseOf!.toLowerCase());
    const base = of === undefined ? undefined : byNet.get(of);
    if (!base) {
      if (d.file && d.range) diagnostics.push(diag('directive', d.file, d.range, `clock ${d.net} is declared as the inverse of '${d.inverseOf}', which is not a clock`));
      continue;
    }
    add({ net, name: c.nets[net]!.name, periodS: base.periodS, high: complement(base.high, base.periodS), from: d.from, inverseOf: base.net });
  }
  return { clocks, diagnostics };
}
