// The quick paths when the edit is in an included file: a comment, a size, a rename, a
// reconnection and a device added and deleted in the cells file a top netlist includes, each
// equal to a fresh analysis of the edited pair of files.

import { describe, expect, it } from 'vitest';
import { analyse, readDeck, reanalyse } from '../server/src/engine';
import { memoryHost } from '../server/src/core/host';
import { carryOver } from '../server/src/service/carryOver';
import { report } from './support/edits';
import { same } from './support/sameAnalysis';
import { CELLS_INC, topIncludingCells } from './support/included';

const CELLS = CELLS_INC;
const TOP = topIncludingCells(3);

const host = (cells: string) => memoryHost({ '/t/top.sp': TOP, '/t/cells.inc': cells });
const before = analyse(host(CELLS), '/t/top.sp');

describe('quick paths for an edit in an included file', () => {
  it('a comment line in the cells file: findings carried over, equal to a fresh analysis', () => {
    const cells = CELLS.replace('Mpre dyn', '* precharge\nMpre dyn');
    const moved = carryOver(before, readDeck(host(cells), '/t/top.sp'));
    expect(moved).toBeDefined();
    expect(JSON.parse(JSON.stringify(moved))).toEqual(JSON.parse(JSON.stringify(analyse(host(cells), '/t/top.sp').diagnostics)));
  });
  it('a width in the cells file: re-estimated from the previous analysis, equal to a fresh one', () => {
    const cells = CELLS.replace('Mna dyn a n1 vss tn w=0.6u', 'Mna dyn a n1 vss tn w=0.9u');
    const fast = reanalyse(before, readDeck(host(cells), '/t/top.sp'));
    expect(fast).toBeDefined();
    expect(report('/t/top.sp', fast!)).toEqual(report('/t/top.sp', analyse(host(cells), '/t/top.sp')));
  });
  it('a net renamed in the cells file: renamed in the previous analysis, equal to a fresh one', () => {
    const cells = CELLS.replace(/\bn1\b/g, 'mid');
    const fast = reanalyse(before, readDeck(host(cells), '/t/top.sp'));
    expect(fast).toBeDefined();
    const full = analyse(host(cells), '/t/top.sp');
    expect(JSON.parse(JSON.stringify(fast!.diagnostics))).toEqual(JSON.parse(JSON.stringify(full.diagnostics)));
    expect(report('/t/top.sp', fast!)).toEqual(report('/t/top.sp', full));
  });
  it('a reconnection in the cells file: rewired from the previous analysis, equal to a fresh one', () => {
    const cells = CELLS.replace('Mnb n1 b foot', 'Mnb n1 a foot');
    const fast = reanalyse(before, readDeck(host(cells), '/t/top.sp'));
    expect(fast).toBeDefined();
    const full = analyse(host(cells), '/t/top.sp');
    expect(JSON.parse(JSON.stringify(fast!.diagnostics))).toEqual(JSON.parse(JSON.stringify(full.diagnostics)));
    expect(report('/t/top.sp', fast!)).toEqual(report('/t/top.sp', full));
  });
  it('a device added in the cells file, then deleted: spliced into the previous analysis, equal to a fresh one', () => {
    const cells = CELLS.replace('Mnb n1 b foot', 'Mextra n1 b vss vss tn w=0.2u l=0.05u\nMnb n1 b foot');
    expect(cells).not.toBe(CELLS);
    const fast = reanalyse(before, readDeck(host(cells), '/t/top.sp'));
    expect(fast).toBeDefined();
    same('/t/top.sp', fast!, analyse(host(cells), '/t/top.sp'));
    const back = reanalyse(fast!, readDeck(host(CELLS), '/t/top.sp'));
    expect(back).toBeDefined();
    same('/t/top.sp', back!, before);
  });
  it('a device whose model has no card is not spliced (its finding counts the devices)', () => {
    const cells = CELLS.replace('Mnb n1 b foot', 'Mextra n1 b vss vss nomodel w=0.2u l=0.05u\nMnb n1 b foot');
    expect(reanalyse(before, readDeck(host(cells), '/t/top.sp'))).toBeUndefined();
  });
});
