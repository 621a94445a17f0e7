// Outline, folding, definitions and completion from the syntax trees alone.

import type { SyntaxFile, WordItem } from '../syntax/tree';
import type { Range } from '../core/source';
import type { Deck } from '../circuit/deck';
import { DIRECTIVE_VERBS } from '../circuit/directives';
import { interpretElement } from '../circuit/elements';

export interface OutlineSymbol {
  name: string;
  kind: 'subckt' | 'model' | 'param';
  range: Range;
  selection: Range;
  children: OutlineSymbol[];
}

export function outline(f: SyntaxFile): OutlineSymbol[] {
  const top: OutlineSymbol[] = [];
  const stack: OutlineSymbol[] = [];
  // only dot cards make symbols: element lines (most of a long file) are not read
  for (const k of f.cardIndices) {
    const s = f.statements[k]!;
    const head = s.head.text.toLowerCase();
    const here = stack.length ? stack[stack.length - 1]!.children : top;
    if (head === '.subckt') {
      const w = s.items.find((x): x is WordItem => x.kind === 'word');
      if (!w) continue;
      const sym: OutlineSymbol = { name: w.text, kind: 'subckt', range: s.range, selection: w.range, children: [] };
      here.push(sym);
      stack.push(sym);
    } else if (head === '.ends') {
      const sym = stack.pop();
      if (sym) sym.range = { start: sym.range.start, end: s.range.end };
    } else if (head === '.model') {
      const w = s.items.find((x): x is WordItem => x.kind === 'word');
      if (w) here.push({ name: w.text, kind: 'model', range: s.range, selection: w.range, children: [] });
    } else if (head === '.param' || head === '.params') {
      for (const it of s.items) if (it.kind === 'assign') here.push({ name: it.name.text, kind: 'param', range: it.range, selection: it.name.range, children: [] });
    }
  }
  return top;
}

/** Folding: subcircuits, and .control blocks (found in the raw text, which the parser skips). */
export function foldingRanges(f: SyntaxFile, text: string): Array<{ startLine: number; endLine: number }> {
  const out: Array<{ startLine: number; endLine: number }> = [];
  const walk = (syms: OutlineSymbol[]) => {
    for (const s of syms) {
      if (s.kind === 'subckt' && s.range.end.line > s.range.start.line) out.push({ startLine: s.range.start.line, endLine: s.range.end.line });
      walk(s.children);
    }
  };
  walk(outline(f));
  const lines = text.split(/\r\n|\r|\n/);
  let open = -1;
  lines.forEach((l, i) => {
    const t = l.trim().toLowerCase();
    if (t.startsWith('.control')) open = i;
    else if (t.startsWith('.endc') && open >= 0) {
      out.push({ startLine: open, endLine: i });
      open = -1;
    }
  });
  return out;
}

export interface DefinitionSite {
  file: string;
  range: Range;
}

/** Where a subcircuit, model or parameter is defined, across the deck's files. */
export function definitionOf(deck: Deck, kind: 'subckt' | 'model' | 'param', name: string): DefinitionSite[] {
  const out: DefinitionSite[] = [];
  for (const f of deck.files) {
    for (const s of f.statements) {
      const head = s.head.text.toLowerCase();
      if ((kind === 'subckt' && head === '.subckt') || (kind === 'model' && head === '.model')) {
        const w = s.items.find((x): x is WordItem => x.kind === 'word');
        if (w && w.text.toLowerCase() === name) out.push({ file: f.file, range: w.range });
      }
      if (kind === 'param' && (head === '.param' || head === '.params' || head === '.subckt')) {
        for (const it of s.items) if (it.kind === 'assign' && it.name.text.toLowerCase() === name) out.push({ file: f.file, range: it.name.range });
      }
    }
  }
  return out;
}

export interface CompletionItem {
  label: string;
  kind: 'directive' | 'subckt' | 'model';
  detail: string;
}

const DIRECTIVE_HELP: Record<string, string> = {
  clock: 'clock <net> period=<t> high=<t> [delay=<t>] | duty=<f> | inverse=<net>',
  standby: 'standby <net>=<0|1> for=<t>',
  supply: 'supply <net>=<volts>',
  ground: 'ground <net>...',
  input: 'input <net>...',
  output: 'output <net>...',
  temps: 'temps <C> <C>...',
  budget: 'budget <percent>% | <volts>V | receiver',
  accept: 'accept <node> <rule> reason="..."',
  device: 'device <pattern> nmos|pmos|diode|short|resistor|capacitor',
  scale: 'scale <metres per unit>',
};

/** Completions for the text before the cursor on its line. */
export function completions(deck: Deck, linePrefix: string): CompletionItem[] {
  if (/^\s*\*\s*tidemark\s*:\s*\w*$/i.test(linePrefix)) {
    return DIRECTIVE_VERBS.map((v) => ({ label: v, kind: 'directive' as const, detail: DIRECTIVE_HELP[v] ?? v }));
  }
  if (/^\s*\*\s*tide?m?a?r?k?$/i.test(linePrefix)) return [{ label: 'tidemark: ', kind: 'directive', detail: 'a Tidemark directive' }];
  const items: CompletionItem[] = [];
  if (/^\s*x\S*\s/i.test(linePrefix)) {
    for (const [name, d] of deck.subckts) items.push({ label: name, kind: 'subckt', detail: `.subckt ${name} ${d.ports.join(' ')}` });
  }
  if (/^\s*[mx]\S*\s/i.test(linePrefix)) {
    for (const f of deck.files) {
      for (const s of f.statements) {
        if (s.head.text.toLowerCase() !== '.model') continue;
        const ws = s.items.filter((x): x is WordItem => x.kind === 'word');
        if (ws[0]) items.push({ label: ws[0].text, kind: 'model', detail: `.model ${ws[0].text} ${ws[1]?.text ?? ''}` });
      }
    }
  }
  return items;
}

/**
 * Every occurrence of a net name within its scope (one subcircuit body with its port list, or
 * the top level) in a file: element nodes and subcircuit ports. Names are case-insensitive.
 */
export function netReferences(f: SyntaxFile, subckt: string | null, name: string): Range[] {
  return netReferenceWords(f, subckt, name).map((w) => w.range);
}

/** The words of `netReferences`, as written. */
export function netReferenceWords(f: SyntaxFile, subckt: string | null, name: string): WordItem[] {
  const out: WordItem[] = [];
  const stack: Array<string | null> = [null];
  for (const s of f.statements) {
    const head = s.head.text.toLowerCase();
    if (head === '.subckt' || head === '.macro') {
      const ws = s.items.filter((x): x is WordItem => x.kind === 'word');
      const here = ws[0]?.text.toLowerCase() ?? null;
      stack.push(here);
      if (here === subckt) for (const p of ws.slice(1)) if (p.text.toLowerCase() === name) out.push(p);
      continue;
    }
    if (head === '.ends' || head === '.eom') {
      if (stack.length > 1) stack.pop();
      continue;
    }
    if (stack[stack.length - 1] !== subckt || head.startsWith('.')) continue;
    // a line's nodes are among its plain words: most lines are passed over without reading them as an element
    if (!s.items.some((x) => x.kind === 'word' && x.text.toLowerCase() === name)) continue;
    const el = interpretElement(s);
    if (el && 'nodes' in el) for (const w of el.nodes) if (w.text.toLowerCase() === name) out.push(w);
  }
  return out;
}
