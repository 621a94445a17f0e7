// Classification against an open dataset: the SKY130 high-density standard-cell library
// (../shared/datasets/sky130_fd_sc_hd, Apache-2.0, "Copyright 2020 The SkyWater PDK Authors").
// The oracle is the library's own logic view, cells.json, derived from its Liberty data:
// - a cell without a three-state output is static (the README: "There are no dynamic or
//   precharge cells in this library. All storage cells are static, with keepers or feedback"),
//   so none of its storage nodes may ever be floating or conditional, with its inputs free and,
//   for sequential cells, also with the clock pin as a clock;
// - a three-state cell's output is high-impedance exactly when its `three_state` expression holds.

import * as fs from 'node:fs';
import * as path from 'node:path';
import { describe, expect, it } from 'vitest';
import { analyse, type AnalysisResult } from '../server/src/engine';
import { diskHost } from '../server/src/cli/diskHost';
import { cellFile, cellNames, DATASET_DIR, datasetAvailable } from './support/dataset';
import { coverMatches, parseBool } from './support/boolexpr';
import { floatsIn } from '../server/src/analysis/classify';
import type { EngineOptions } from '../server/src/core/options';

interface CellInfo {
  three_state: Record<string, string>;
  sequential: null | { clock_pins: string[] };
}

const cells: Record<string, CellInfo> = datasetAvailable() ? JSON.parse(fs.readFileSync(path.join(DATASET_DIR, 'cells.json'), 'utf8')).cells : {};

/** Cells exempted one by one, each with its reason. */
const EXEMPT: Record<string, string> = {
  // Upstream defect documented in the dataset README (open_pdks issue #436): its instances bind
  // supplies to signal pins by position, so the flattened circuit is not the intended one.
  sky130_fd_sc_hd__macro_sparecell: 'instance pin order does not follow the children (documented upstream defect)',
};

const host = diskHost();
const base: EngineOptions = { geometryScale: 1e-6, skipEstimates: true };

function risky(r: AnalysisResult): string[] {
  const out: string[] = [];
  for (const a of r.circuits) {
    const { circuit, classification: cl, plan } = a;
    for (let n = 0; n < circuit.nets.length; n++) {
      if (cl.network.role[n] !== 0 || !cl.storage[n]) continue;
      cl.perPhase.forEach((m, i) => {
        const s = m.get(n);
        if (s && (floatsIn(s) || s.state === 'contention')) out.push(`${circuit.name}.${circuit.nets[n]!.name} in ${plan.phases[i]!.name}: ${s.state} ${JSON.stringify(s.when ?? s.contentionWhen ?? {})}`);
      });
    }
  }
  return out;
}

describe.runIf(datasetAvailable())('sky130_fd_sc_hd classification', () => {
  const names = cellNames();
  const started = Date.now();
  const runs: Array<{ cell: string; dialect: string; clocked: boolean; result: AnalysisResult }> = [];
  for (const cell of names) {
    if (EXEMPT[cell]) continue;
    const info = cells[cell.replace(/^/, '')] ?? cells[cell];
    for (const dialect of ['spice', 'cdl'] as const) {
      const file = cellFile(cell, dialect);
      runs.push({ cell, dialect, clocked: false, result: analyse(host, file, base) });
      const clockPins = info?.sequential?.clock_pins ?? [];
      if (clockPins.length) {
        const clocks = clockPins.map((p) => ({ net: p.toLowerCase(), periodS: 1e-9, highS: 0.5e-9 }));
        runs.push({ cell, dialect, clocked: true, result: analyse(host, file, { ...base, clocks }) });
      }
    }
  }
  const elapsedMs = Date.now() - started;

  it('analyses the whole library (874 files, plus clocked runs of the sequential cells) in a few seconds', () => {
    expect(runs.filter((r) => !r.clocked).length).toBe(2 * (names.length - Object.keys(EXEMPT).length));
    expect(runs.filter((r) => r.clocked).length).toBe(2 * 69);
    expect(elapsedMs).toBeLessThan(20_000); // a generous bound for slow machines; the bench prints the figure
  });

  it('never reports a storage node of a cell without a three-state output as floating, conditional or contended', () => {
    const problems: string[] = [];
    for (const r of runs) {
      if (Object.keys(cells[r.cell]?.three_state ?? {}).length) continue;
      for (const p of risky(r.result)) problems.push(`${r.dialect}${r.clocked ? ' (clocked)' : ''}: ${p}`);
    }
    expect(problems).toEqual([]);
  });

  it('reports each three-state output conditional exactly when its three_state expression holds, with the enable in the witness', () => {
    const threeState = Object.entries(cells).filter(([, c]) => Object.keys(c.three_state ?? {}).length > 0);
    expect(threeState.length).toBe(13);
    const problems: string[] = [];
    for (const [cell, info] of threeState) {
      for (const dialect of ['spice', 'cdl'] as const) {
        const r = runs.find((x) => x.cell === cell && x.dialect === dialect && !x.clocked)!.result;
        const { circuit, classification: cl } = r.circuits[0]!;
        for (const [pin, expr] of Object.entries(info.three_state)) {
          const id = circuit.netByName.get(pin.toLowerCase())!;
          const s = cl.perPhase[0]!.get(id);
          if (s?.state !== 'conditional') {
            problems.push(`${dialect} ${cell}.${pin}: ${s?.state ?? 'driven'}`);
            continue;
          }
          const { fn, vars } = parseBool(expr);
          const diff = coverMatches(s.floatCover ?? [], fn, vars);
          if (diff.length) problems.push(`${dialect} ${cell}.${pin}: ${diff[0]}`);
          for (const v of vars) if (!(v in (s.when ?? {}))) problems.push(`${dialect} ${cell}.${pin}: witness ${JSON.stringify(s.when)} lacks the enable ${v}`);
        }
        // and no other storage node of the cell floats
        for (const p of risky(r)) if (!Object.keys(info.three_state).some((pin) => p.includes(`.${pin.toLowerCase()} in`))) problems.push(`${dialect}: ${p}`);
      }
    }
    expect(problems).toEqual([]);
  });
});
