// Front end and elaboration against an open dataset: the SKY130 high-density standard-cell
// library (../shared/datasets/sky130_fd_sc_hd, Apache-2.0, "Copyright 2020 The SkyWater PDK
// Authors"). The oracle is independent of Tidemark: the dataset README states that both
// dialects (layout-extracted .spice and schematic .cdl) hold the same transistors with the same
// W and L, 8,339 MOSFETs in all (4,177 n-channel, 4,162 p-channel).

import { describe, expect, it } from 'vitest';
import { analyse } from '../server/src/engine';
import { diskHost } from '../server/src/cli/diskHost';
import { cellFile, cellNames, datasetAvailable } from './support/dataset';
import type { AnalysisResult } from '../server/src/engine';
import type { FileHost } from '../server/src/core/host';

const disk = diskHost();
// macro_sparecell instantiates other cells of the library, each in a file of its own; a designer
// would include them, so the test reads it through a wrapper deck that includes its children.
const SPARECELL_CHILDREN = ['sky130_fd_sc_hd__nand2_2', 'sky130_fd_sc_hd__nor2_2', 'sky130_fd_sc_hd__inv_2', 'sky130_fd_sc_hd__conb_1'];
const host: FileHost = {
  ...disk,
  readFile(p) {
    const m = /^wrapper:(spice|cdl)$/.exec(p);
    if (!m) return disk.readFile(p);
    const dialect = m[1] as 'spice' | 'cdl';
    const cells = [...SPARECELL_CHILDREN, 'sky130_fd_sc_hd__macro_sparecell'];
    return `* wrapper deck\n.option scale=1e-6\n${cells.map((c) => `.include ${cellFile(c, dialect)}`).join('\n')}\n`;
  },
};

function analyseCell(cell: string, dialect: 'spice' | 'cdl'): AnalysisResult {
  if (cell === 'sky130_fd_sc_hd__macro_sparecell') return analyse(host, `wrapper:${dialect}`, { ...options, top: cell });
  return analyse(host, cellFile(cell, dialect), options);
}
// The dataset's W and L are written in microns without a scale card (README, "Parameters and
// units"), so the test states the scale as a user would in settings.
const options = { geometryScale: 1e-6, frontEndOnly: true };

/** Diagnostics the README documents as upstream facts, one by one. */
function undocumented(result: AnalysisResult): string[] {
  return result.diagnostics
    .filter((d) => {
      // "There is no .model anywhere. The device models are not defined in these files."
      if (d.rule === 'unknown-model' && /'(sky130_fd_pr__)?(nfet_01v8|pfet_01v8_hvt)'/.test(d.message)) return false;
      return true;
    })
    .map((d) => `${d.file}:${d.range.start.line + 1} ${d.rule} ${d.message}`);
}

function deviceMultiset(result: AnalysisResult): Map<string, number> {
  const m = new Map<string, number>();
  for (const c of result.design.circuits) {
    for (const d of c.mosfets) {
      // nanometre integers avoid float noise (the README's oracle is in microns)
      const key = `${d.polarity} ${Math.round(d.wM * 1e9)} ${Math.round(d.lM * 1e9)}`;
      m.set(key, (m.get(key) ?? 0) + d.m);
    }
  }
  return m;
}

describe.runIf(datasetAvailable())('sky130_fd_sc_hd front end', () => {
  const cells = cellNames();
  const results = new Map<string, { spice: AnalysisResult; cdl: AnalysisResult }>();
  for (const cell of cells) {
    results.set(cell, { spice: analyseCell(cell, 'spice'), cdl: analyseCell(cell, 'cdl') });
  }

  it('has 437 cells in each dialect', () => {
    expect(cells.length).toBe(437);
  });

  it('parses every file with no syntax finding and only documented elaboration findings', () => {
    const problems: string[] = [];
    for (const r of results.values()) problems.push(...undocumented(r.spice), ...undocumented(r.cdl));
    expect(problems).toEqual([]);
  });

  it('gives the same (type, W, L) multiset in both dialects, cell by cell', () => {
    const mismatches: string[] = [];
    for (const [cell, r] of results) {
      // README: "diode_2: the .cdl body is empty" — no MOSFETs in either, so it compares equal.
      const a = [...deviceMultiset(r.spice)].sort();
      const b = [...deviceMultiset(r.cdl)].sort();
      if (JSON.stringify(a) !== JSON.stringify(b)) mismatches.push(`${cell}: spice ${JSON.stringify(a)} cdl ${JSON.stringify(b)}`);
    }
    expect(mismatches).toEqual([]);
  });

  it('matches the library totals: 8,339 MOSFETs, 4,177 n-channel, 4,162 p-channel', () => {
    for (const dialect of ['spice', 'cdl'] as const) {
      let n = 0;
      let p = 0;
      for (const [cell, r] of results) {
        // devices written in the cell's own file (macro_sparecell's children are counted once, as cells)
        for (const c of r[dialect].design.circuits) {
          for (const d of c.mosfets) if (d.origin.file === cellFile(cell, dialect)) d.polarity === 'n' ? (n += d.m) : (p += d.m);
        }
      }
      expect({ dialect, n, p, total: n + p }).toEqual({ dialect, n: 4177, p: 4162, total: 8339 });
    }
  });

  it('reads CDL pin directions and infers the same outputs from the extracted netlists', () => {
    const disagreements: string[] = [];
    for (const [cell, r] of results) {
      const cdl = r.cdl.design.circuits[0];
      const spice = r.spice.design.circuits[0];
      if (!cdl || !spice) continue;
      for (const port of cdl.ports) {
        if (port.from !== 'pininfo') continue;
        const other = spice.ports.find((p) => p.name === port.name);
        if (other && other.direction !== port.direction) disagreements.push(`${cell}.${port.name}: pininfo ${port.direction}, inferred ${other.direction}`);
      }
    }
    // The only disagreements allowed are listed here with their reason.
    expect(disagreements).toEqual([]);
  });
});
