// What is under the cursor: the word at a position in a parsed file, and what it names
// (a net in some scope, a device, a subcircuit, a model, a parameter, a directive verb).

import type { SyntaxFile, Statement, WordItem, Item } from '../syntax/tree';
import type { Position, Range } from '../core/source';
import { interpretElement } from '../circuit/elements';

export type Target =
  /** `statement` and `index`: the element line and node position the word was found at. */
  | { kind: 'net'; name: string; subckt: string | null; word: WordItem; statement?: Statement; index?: number }
  | { kind: 'device'; name: string; subckt: string | null; word: WordItem; statement: Statement }
  | { kind: 'subckt'; name: string; word: WordItem }
  | { kind: 'model'; name: string; word: WordItem }
  | { kind: 'param'; name: string; subckt: string | null; word: WordItem };

function inside(r: Range, p: Position): boolean {
  if (p.line < r.start.line || p.line > r.end.line) return false;
  if (p.line === r.start.line && p.character < r.start.character) return false;
  if (p.line === r.end.line && p.character > r.end.character) return false;
  return true;
}

/** The subcircuit (lower case) each statement index sits in, or null at the top level. */
export function scopes(f: SyntaxFile): Array<string | null> {
  const out: Array<string | null> = [];
  const stack: string[] = [];
  for (const s of f.statements) {
    const head = s.head.text.toLowerCase();
    if (head === '.subckt' || head === '.macro') {
      const w = s.items.find((i): i is WordItem => i.kind === 'word');
      out.push(stack[stack.length - 1] ?? null);
      if (w) stack.push(w.text.toLowerCase());
      continue;
    }
    if (head === '.ends' || head === '.eom') {
      out.push(stack[stack.length - 1] ?? null);
      stack.pop();
      continue;
    }
    out.push(stack[stack.length - 1] ?? null);
  }
  return out;
}

function flatWords(items: Item[]): WordItem[] {
  const out: WordItem[] = [];
  for (const it of items) {
    if (it.kind === 'word') out.push(it);
    else if (it.kind === 'assign') {
      out.push(it.name);
      if (it.value?.kind === 'word') out.push(it.value);
    } else if (it.kind === 'group') out.push(...flatWords(it.items));
  }
  return out;
}

export function locate(f: SyntaxFile, p: Position): Target | undefined {
  const sc = scopes(f);
  for (let i = 0; i < f.statements.length; i++) {
    const s = f.statements[i]!;
    if (!inside(s.range, p)) continue;
    const subckt = sc[i]!;
    const head = s.head.text.toLowerCase();
    if (inside(s.head.range, p)) {
      if (head.startsWith('.')) return undefined;
      return { kind: 'device', name: s.head.text.toLowerCase(), subckt, word: s.head, statement: s };
    }
    if (head === '.subckt') {
      const ws = s.items.filter((x): x is WordItem => x.kind === 'word');
      if (ws[0] && inside(ws[0].range, p)) return { kind: 'subckt', name: ws[0].text.toLowerCase(), word: ws[0] };
      const port = ws.slice(1).find((w) => inside(w.range, p));
      if (port) return { kind: 'net', name: port.text.toLowerCase(), subckt: ws[0]?.text.toLowerCase() ?? null, word: port };
      return undefined;
    }
    if (head === '.model') {
      const w = s.items.find((x): x is WordItem => x.kind === 'word');
      if (w && inside(w.range, p)) return { kind: 'model', name: w.text.toLowerCase(), word: w };
      return undefined;
    }
    if (head.startsWith('.')) {
      for (const it of s.items) if (it.kind === 'assign' && inside(it.name.range, p)) return { kind: 'param', name: it.name.text.toLowerCase(), subckt, word: it.name };
      return undefined;
    }
    const el = interpretElement(s);
    if (!el) return undefined;
    if ('nodes' in el) {
      const index = el.nodes.findIndex((w) => inside(w.range, p));
      if (index >= 0) return { kind: 'net', name: el.nodes[index]!.text.toLowerCase(), subckt, word: el.nodes[index]!, statement: s, index };
    }
    if (el.kind === 'instance' && el.subckt && inside(el.subckt.range, p)) return { kind: 'subckt', name: el.subckt.text.toLowerCase(), word: el.subckt };
    if ((el.kind === 'mos' || el.kind === 'diode' || el.kind === 'passive') && el.model && inside(el.model.range, p)) return { kind: 'model', name: el.model.text.toLowerCase(), word: el.model };
    // a parameter name used in a value
    for (const w of flatWords(s.items)) if (inside(w.range, p) && /^[a-z_]/i.test(w.text)) return { kind: 'param', name: w.text.toLowerCase(), subckt, word: w };
    return undefined;
  }
  return undefined;
}
