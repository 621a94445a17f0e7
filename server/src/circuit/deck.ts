// From parsed files to the definitions a circuit is built from: follows `.include` and `.lib`
// (through the host, relative to the including file, then the include paths), skips library
// sections not asked for, and groups statements into subcircuit definitions, models, parameters,
// globals, options and directives. Parsing is done by the caller's `parse` so results are cached.

import type { Diagnostic } from '../core/diagnostics';
import { diag } from '../core/diagnostics';
import type { FileHost } from '../core/host';
import type { Range } from '../core/source';
import type { DirectiveLine, PinInfoLine, Statement, SyntaxFile, ValueItem, WordItem } from '../syntax/tree';
import { splitItems } from './elements';

export interface Located<T> {
  file: string;
  item: T;
}

export interface ParamDefinition {
  name: string;
  value: ValueItem;
  file: string;
  range: Range;
}

export interface SubcktDefinition {
  /** Lower case. */
  name: string;
  nameItem: WordItem;
  ports: string[];
  portItems: WordItem[];
  /** Defaults from the header (`params:` or bare `name=value`). */
  defaults: ParamDefinition[];
  /** Statements of the body in order (elements, `.param`, `.model`), nested definitions removed. */
  body: Located<Statement>[];
  /** Subcircuits defined inside this one (visible only here). */
  local: Map<string, SubcktDefinition>;
  pinDirections: Map<string, 'input' | 'output' | 'inout'>;
  directives: Located<DirectiveLine>[];
  file: string;
  range: Range;
}

export interface Deck {
  /** Files read, in order, with their parse results. */
  files: SyntaxFile[];
  title: string | undefined;
  /** Top-level statements in order (elements, `.param`, `.model`, other cards). */
  top: Located<Statement>[];
  subckts: Map<string, SubcktDefinition>;
  globals: Located<WordItem>[];
  directives: Located<DirectiveLine>[];
  diagnostics: Diagnostic[];
}

export type ParseFn = (file: string, text: string, hasTitle: boolean) => SyntaxFile;

type StreamEntry =
  | { kind: 'stmt'; file: string; stmt: Statement }
  /** Element lines `statements[from..to)` of one file, passed on without being read. */
  | { kind: 'run'; file: string; statements: Statement[]; from: number; to: number }
  | { kind: 'directive'; file: string; d: DirectiveLine }
  | { kind: 'pininfo'; file: string; p: PinInfoLine };

const MAX_INCLUDE_DEPTH = 64;

export function loadDeck(host: FileHost, roots: { file: string; text: string }[], parse: ParseFn): Deck {
  const diagnostics: Diagnostic[] = [];
  const files: SyntaxFile[] = [];
  const parsedByPath = new Map<string, SyntaxFile>();
  const stream: StreamEntry[] = [];

  const getParsed = (path: string, text: string, hasTitle: boolean): SyntaxFile => {
    const key = `${hasTitle ? 'T' : 'I'}:${path}`;
    let f = parsedByPath.get(key);
    if (!f) {
      f = parse(path, text, hasTitle);
      parsedByPath.set(key, f);
      files.push(f);
      diagnostics.push(...f.diagnostics);
    }
    return f;
  };

  const findInclude = (from: string, rawName: string): string | undefined => {
    const name = rawName.replace(/^["']|["']$/g, '');
    const candidates = [host.resolve(from, name), ...(host.includePaths ?? []).map((d) => host.resolve(d + '/x', name))];
    for (const c of candidates) if (host.readFile(c) !== undefined) return c;
    return undefined;
  };

  /** Emits a file's entries (statements interleaved with its special comments). */
  const emitFile = (f: SyntaxFile, stack: string[], section: string | undefined, at: { file: string; range: Range } | undefined): void => {
    const specials: Array<{ index: number; entry: StreamEntry }> = [
      ...f.directives.map((d) => ({ index: d.statementIndex, entry: { kind: 'directive', file: f.file, d } as StreamEntry })),
      ...f.pinInfos.map((p) => ({ index: p.statementIndex, entry: { kind: 'pininfo', file: f.file, p } as StreamEntry })),
    ].sort((a, b) => a.index - b.index);
    let si = 0;
    // Inside a `.lib name ... .endl` block that was not asked for, nothing is emitted.
    let skippingLib: string | undefined;
    let inWantedSection = section === undefined;
    let sectionFound = section === undefined;
    // the special comments due before statement `at`
    const specialsBefore = (at: number) => {
      while (si < specials.length && specials[si]!.index <= at) {
        if (inWantedSection && !skippingLib) stream.push(specials[si]!.entry);
        si++;
      }
    };
    // element lines (most of a long file) are passed on in runs, unread, between the cards and
    // the special comments
    let next = 0;
    const passOn = (to: number) => {
      while (next < to) {
        specialsBefore(next);
        const end = si < specials.length ? Math.min(to, specials[si]!.index) : to;
        if (inWantedSection && !skippingLib) stream.push({ kind: 'run', file: f.file, statements: f.statements, from: next, to: end });
        next = end;
      }
    };
    for (const i of f.cardIndices) {
      passOn(i);
      specialsBefore(i);
      next = i + 1;
      const stmt = f.statements[i]!;
      const head = stmt.head.text.toLowerCase();
      const { positional } = splitItems(stmt.items);
      const args = positional.map((p) => (p.kind === 'word' || p.kind === 'string' ? p.text : ''));
      if (head === '.lib' && positional.length === 1) {
        // a section definition
        if (section !== undefined && args[0]!.toLowerCase() === section) {
          inWantedSection = true;
          sectionFound = true;
        } else if (section === undefined) skippingLib = args[0];
        else inWantedSection = false;
        continue;
      }
      if (head === '.endl') {
        if (section !== undefined) inWantedSection = false;
        skippingLib = undefined;
        continue;
      }
      if (!inWantedSection || skippingLib) continue;
      if (head === '.include' || head === '.inc' || (head === '.lib' && positional.length >= 2)) {
        const target = positional[0];
        if (!target || !args[0]) {
          diagnostics.push(diag('syntax', f.file, stmt.range, `${head} needs a file name`));
          continue;
        }
        const resolved = findInclude(f.file, args[0]);
        if (!resolved) {
          diagnostics.push(diag('include-missing', f.file, target.range, `cannot find '${args[0]}' next to ${f.file}${(host.includePaths ?? []).length ? ' or on the include paths' : ''}`));
          continue;
        }
        if (stack.includes(resolved)) {
          diagnostics.push(diag('include-cycle', f.file, target.range, `'${args[0]}' is already being read (${[...stack, resolved].join(' -> ')}); not followed again`));
          continue;
        }
        if (stack.length > MAX_INCLUDE_DEPTH) {
          diagnostics.push(diag('include-cycle', f.file, target.range, `includes nest deeper than ${MAX_INCLUDE_DEPTH} files; not followed`));
          continue;
        }
        const text = host.readFile(resolved)!;
        const inc = getParsed(resolved, text, false);
        const wanted = head === '.lib' ? args[1]!.toLowerCase() : undefined;
        emitFile(inc, [...stack, resolved], wanted, { file: f.file, range: positional[1]?.range ?? target.range });
        continue;
      }
      stream.push({ kind: 'stmt', file: f.file, stmt });
    }
    passOn(f.statements.length);
    while (si < specials.length) {
      if (inWantedSection && !skippingLib) stream.push(specials[si]!.entry);
      si++;
    }
    if (!sectionFound && at) {
      diagnostics.push(diag('include-missing', at.file, at.range, `${f.file} has no library section '${section}'`));
    }
  };

  let title: string | undefined;
  for (const r of roots) {
    const f = getParsed(r.file, r.text, true);
    title ??= f.title;
    emitFile(f, [r.file], undefined, undefined);
  }

  const deck: Deck = { files, title, top: [], subckts: new Map(), globals: [], directives: [], diagnostics };
  buildDefinitions(stream, deck);
  return deck;
}

function buildDefinitions(stream: StreamEntry[], deck: Deck): void {
  const stack: SubcktDefinition[] = [];
  const scopeOf = (): Map<string, SubcktDefinition> => (stack.length ? stack[stack.length - 1]!.local : deck.subckts);
  for (const e of stream) {
    const cur = stack[stack.length - 1];
    if (e.kind === 'directive') {
      (cur ? cur.directives : deck.directives).push({ file: e.file, item: e.d });
      continue;
    }
    if (e.kind === 'pininfo') {
      if (cur) for (const p of e.p.pins) cur.pinDirections.set(p.name.toLowerCase(), p.direction);
      continue;
    }
    if (e.kind === 'run') {
      const into = cur ? cur.body : deck.top;
      for (let k = e.from; k < e.to; k++) into.push({ file: e.file, item: e.statements[k]! });
      continue;
    }
    const stmt = e.stmt;
    const head = stmt.head.text.toLowerCase();
    if (head === '.subckt' || head === '.macro') {
      const { positional, params } = splitItems(stmt.items);
      const ws = positional.filter((p): p is WordItem => p.kind === 'word');
      const nameItem = ws[0];
      if (!nameItem) {
        deck.diagnostics.push(diag('syntax', e.file, stmt.range, '.subckt needs a name'));
        continue;
      }
      const portItems = ws.slice(1).filter((w) => w.text.toLowerCase() !== 'params:');
      const def: SubcktDefinition = {
        name: nameItem.text.toLowerCase(),
        nameItem,
        ports: portItems.map((p) => p.text.toLowerCase()),
        portItems,
        defaults: params.filter((p) => p.value).map((p) => ({ name: p.name.text.toLowerCase(), value: p.value!, file: e.file, range: p.range })),
        body: [],
        local: new Map(),
        pinDirections: new Map(),
        directives: [],
        file: e.file,
        range: stmt.range,
      };
      for (const p of params) if (!p.value) deck.diagnostics.push(diag('syntax', e.file, p.range, `parameter '${p.name.text}' has no default value`));
      const scope = scopeOf();
      const prior = scope.get(def.name);
      if (prior) {
        deck.diagnostics.push(
          diag('duplicate-definition', e.file, nameItem.range, `subcircuit '${nameItem.text}' is already defined at ${prior.file}:${prior.range.start.line + 1}; this definition is ignored`),
        );
        stack.push(def); // read and dropped, so its body does not leak into the enclosing scope
        (def as { dropped?: boolean }).dropped = true;
      } else {
        scope.set(def.name, def);
        stack.push(def);
      }
      continue;
    }
    if (head === '.ends' || head === '.eom') {
      if (!stack.length) deck.diagnostics.push(diag('syntax', e.file, stmt.head.range, `${head} with no .subckt open`));
      else stack.pop();
      continue;
    }
    if (head === '.global') {
      for (const p of stmt.items) if (p.kind === 'word') deck.globals.push({ file: e.file, item: p });
      continue;
    }
    (cur ? cur.body : deck.top).push({ file: e.file, item: stmt });
  }
  for (const open of stack) {
    deck.diagnostics.push(diag('syntax', open.file, open.nameItem.range, `.subckt ${open.nameItem.text} has no .ends`));
  }
}
