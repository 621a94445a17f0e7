// The typing path (circuit/inertEdit.ts, engine `reanalyse`): while a line is typed, the states
// it passes through that add nothing yet (a MOSFET with too few nodes or no model, an instance
// with no subcircuit or one whose cell name is half typed, a value still missing, a directive
// with an unknown verb or without its values) are answered from the previous analysis, with the
// findings on the edited line said again; each answer must equal a fresh analysis of the same
// text. Lines typed character by character, and taken out again, in every sample, every
// electrical fixture and a generated datapath, at the top level and in a cell's body.

import * as fs from 'node:fs';
import * as path from 'node:path';
import { describe, expect, it } from 'vitest';
import { analyse, readDeck, reanalyse, type AnalysisResult } from '../server/src/engine';
import { memoryHost } from '../server/src/core/host';
import { overlay } from './support/edits';
import { same } from './support/sameAnalysis';
import { hierarchicalNetlist } from '../scripts/netlists';

const SAMPLES = path.join(__dirname, '..', 'samples');
const FIXTURES = path.join(__dirname, 'fixtures', 'electrical');

/**
 * Types `line` after line `at` of `text` one character at a time (a blank line first, as Enter
 * makes it), then takes it out again one character at a time; each text's analysis from the
 * one before (fresh when the quick paths decline), compared with a fresh one. Returns how many
 * states the typing path answered.
 */
function typeLine(file: string, text: string, at: number, line: string, host: (t: string) => ReturnType<typeof overlay>): number {
  const lines = text.split('\n');
  const withLine = (l: string) => [...lines.slice(0, at + 1), l, ...lines.slice(at + 1)].join('\n');
  let previous: AnalysisResult = analyse(host(text), file);
  let answered = 0;
  const states = [withLine('')];
  for (let k = 1; k <= line.length; k++) states.push(withLine(line.slice(0, k)));
  for (let k = line.length - 1; k >= 0; k--) states.push(withLine(line.slice(0, k)));
  states.push(text);
  for (const t of states) {
    const fast = reanalyse(previous, readDeck(host(t), file));
    const fresh = analyse(host(t), file);
    if (fast) {
      same(file, fast, fresh);
      answered++;
    }
    previous = fast ?? fresh;
  }
  return answered;
}

describe('a line being typed is answered from the previous analysis and equals a fresh one', () => {
  it('transistor, instance, capacitor and directive lines typed into every sample and electrical fixture, at the top level and in cell bodies', () => {
    const files = [...fs.readdirSync(SAMPLES).filter((f) => f.endsWith('.sp')).map((f) => path.join(SAMPLES, f)), ...fs.readdirSync(FIXTURES).filter((f) => f.endsWith('.sp')).map((f) => path.join(FIXTURES, f))];
    let answered = 0;
    let places = 0;
    for (const file of files) {
      const text = fs.readFileSync(file, 'utf8');
      const lines = text.split('\n');
      // after the first element line of the file, and after the first line of each cell body
      const spots = new Set<number>();
      const first = lines.findIndex((l) => /^[a-z]/i.test(l));
      if (first >= 0) spots.add(first);
      lines.forEach((l, i) => {
        if (/^\.subckt /i.test(l)) spots.add(i);
      });
      for (const at of spots) {
        const host = (t: string) => overlay(file, t);
        answered += typeLine(file, text, at, 'Mnew y a vss vss tn w=0.2u', host);
        answered += typeLine(file, text, at, 'Cx y 0 1f', host);
        answered += typeLine(file, text, at, 'Xnew a b', host);
        // a directive: its verb typed (unknown until complete), then a clock with no period yet
        answered += typeLine(file, text, at, '* tidemark: clock ck2 period=2n high=1n', host);
        places++;
      }
    }
    expect(places).toBeGreaterThan(10);
    // most states of a typed line add nothing yet (the states that do, a complete transistor
    // with default sizes, a capacitor, an instance, go to the other paths)
    expect(answered).toBeGreaterThan(places * 100);
  }, 300_000);

  it('a generated 2k datapath: in the leaf cell every block uses, and at the top level', () => {
    const file = '/typing/datapath.sp';
    const text = hierarchicalNetlist(2000);
    const lines = text.split('\n');
    const host = (t: string) => memoryHost({ [file]: t }) as ReturnType<typeof overlay>;
    let answered = 0;
    for (const start of ['Mkp dyn out', 'Xb1 ']) answered += typeLine(file, text, lines.findIndex((l) => l.startsWith(start)), 'Mx dyn clk vdd', host);
    // an inverter instance typed into the domino cell: its cell name is unknown until complete
    answered += typeLine(file, text, lines.findIndex((l) => l.startsWith('Mkp dyn out')), 'Xq dyn out vdd vss b_inv', host);
    expect(answered).toBeGreaterThan(2 * 20 + 30);
  }, 120_000);

  it('says a left-out line only where the elaborator reads it: not in a cell nobody uses; a top-level line in a cell library is left to a fresh analysis', () => {
    const file = '/typing/cells.sp';
    const cells = 'cells\n.model bn nmos level=1\n.subckt used a b\nMa a b 0 0 bn w=1u l=1u\n.ends\n.subckt unused a b\nMb a b 0 0 bn w=1u l=1u\n.ends\n';
    const top = `${cells}X1 p q used\nv1 p 0 1\n.end\n`;
    const put = (text: string, after: string, line: string) => text.replace(after, `${after}${line}\n`);
    const quick = (before: string, after: string) => {
      const previous = analyse(memoryHost({ [file]: before }), file);
      const fast = reanalyse(previous, readDeck(memoryHost({ [file]: after }), file));
      const fresh = analyse(memoryHost({ [file]: after }), file);
      if (fast) same(file, fast, fresh);
      return { fast, fresh };
    };
    // in the used cell: said; in the unused one: nothing to say, in both answers
    const inUsed = quick(top, put(top, 'Ma a b 0 0 bn w=1u l=1u\n', 'Mx a'));
    expect(inUsed.fast).toBeDefined();
    expect(inUsed.fresh.diagnostics.some((d) => d.rule === 'syntax' && d.message.startsWith('Mx needs 4 nodes'))).toBe(true);
    const inUnused = quick(top, put(top, 'Mb a b 0 0 bn w=1u l=1u\n', 'My a'));
    expect(inUnused.fast).toBeDefined();
    expect(inUnused.fresh.diagnostics.some((d) => d.rule === 'syntax')).toBe(false);
    // a library of cells alone (each its own circuit): a line in a body is said; one at the top
    // level would make the top level a circuit, so it goes to a fresh analysis
    const library = `${cells}.end\n`;
    expect(quick(library, put(library, 'Mb a b 0 0 bn w=1u l=1u\n', 'My a')).fast).toBeDefined();
    expect(quick(library, put(library, '.ends\n', 'Mz a')).fast).toBeUndefined();
    // a line that is not an element name, elements short of nodes, an instance with no subcircuit
    for (const line of ['1abc', 'C1', 'R2 a', 'X2']) expect(quick(top, put(top, 'X1 p q used\n', line)).fast).toBeDefined();
    // a length on a line left out counts in the guess of the geometry scale: left to a fresh
    // analysis, which here guesses microns from it and scales every device
    const metres = 'metres\n.model bn nmos level=1\nM1 d g 0 0 bn w=0.2u l=0.1u\nv1 d 0 1\nvg g 0 1\n.end\n';
    const guessing = quick(metres, put(metres, 'M1 d g 0 0 bn w=0.2u l=0.1u\n', 'Mx d l=5'));
    expect(guessing.fast).toBeUndefined();
    expect(guessing.fresh.design.geometryScale.from).toBe('assumed');
    expect(quick(metres, put(metres, 'M1 d g 0 0 bn w=0.2u l=0.1u\n', 'Mx d')).fast).toBeDefined();
    // an instance while its cell's name is typed: answered on nets the top level already used
    // (or globals); a new net name, a name a device rule maps, or a cell that exists are not
    const typingCell = quick(top, put(top, 'v1 p 0 1\n', 'X2 p q 0 use'));
    expect(typingCell.fast).toBeDefined();
    expect(typingCell.fresh.diagnostics.some((d) => d.rule === 'unknown-subckt' && d.message.startsWith("subcircuit 'use'"))).toBe(true);
    expect(quick(top, put(top, 'v1 p 0 1\n', 'X2 p fresh_net use')).fast).toBeUndefined();
    // above the line that first uses p and q: it would become their first use
    expect(quick(top, top.replace('X1 p q used\n', 'X0 p q us\nX1 p q used\n')).fast).toBeUndefined();
    const ruled = top.replace('.end\n', '* tidemark: device nch* nmos\n.end\n');
    expect(quick(ruled, put(ruled, 'v1 p 0 1\n', 'X3 p q p q nch')).fast).toBeUndefined();
    expect(quick(top, put(top, 'v1 p 0 1\n', 'X2 p q used')).fast).toBeUndefined();
    // the same in a cell's body, on its ports; not on a name new to the cell, nor in a cell
    // nobody instantiates (nothing is built for it)
    const inCell = quick(top, put(top, 'Ma a b 0 0 bn w=1u l=1u\n', 'X2 a b 0 ce'));
    expect(inCell.fast).toBeDefined();
    expect(inCell.fresh.diagnostics.some((d) => d.rule === 'unknown-subckt' && d.message.startsWith("subcircuit 'ce'"))).toBe(true);
    expect(quick(top, put(top, 'Ma a b 0 0 bn w=1u l=1u\n', 'X2 a zz ce')).fast).toBeUndefined();
    expect(quick(top, put(top, 'Mb a b 0 0 bn w=1u l=1u\n', 'X2 a b ce')).fast).toBeUndefined();
    // an element of a letter with no node count of its own names its nets at once: not this path
    expect(quick(top, put(top, 'X1 p q used\n', 'B1 a')).fast).toBeUndefined();
  });
});
