// `.model` cards as typed parameter sets, and the selection of binned variants (`nch.1`,
// `nch.2`, ... with LMIN/LMAX/WMIN/WMAX) by a device's L and W.

import type { Range } from '../core/source';
import type { AssignItem, Statement, ValueItem, WordItem } from '../syntax/tree';
import { splitItems } from './elements';

export type ModelKind = 'nmos' | 'pmos' | 'diode' | 'resistor' | 'capacitor' | 'bjt' | 'other';

/** The MOSFET model family the level selects (ngspice numbering). */
export type MosFamily = 'level1' | 'level2' | 'level3' | 'bsim3' | 'bsim4' | 'unsupported';

export interface ModelCard {
  /** Lower-case name as written, including any bin suffix (`nch.2`). */
  name: string;
  /** Name without the bin suffix. */
  baseName: string;
  kind: ModelKind;
  /** The type word as written (`nmos`, `d`, `npn`, ...), lower case. */
  type: string;
  level: number;
  family: MosFamily | undefined;
  /** Every numeric parameter, by lower-case name, in SI units as SPICE writes them. */
  params: Readonly<Record<string, number>>;
  /** Parameters whose values were text (kept for display). */
  textParams: Readonly<Record<string, string>>;
  file: string;
  range: Range;
}

/**
 * A `.model` statement read as a card, each parameter's value given by `valueOf`: a number, text
 * (kept for display), or undefined (left out). Undefined when the statement has no name and type
 * words. Parameters may sit inside parentheses after the type.
 */
export function readModelCard(file: string, stmt: Statement, valueOf: (value: ValueItem) => number | string | undefined): { card: ModelCard; nameItem: WordItem } | undefined {
  const { positional, params } = splitItems(stmt.items);
  const nameItem = positional[0];
  const typeItem = positional[1];
  if (nameItem?.kind !== 'word' || typeItem?.kind !== 'word') return undefined;
  const all: AssignItem[] = [...params];
  for (const p of positional.slice(2)) if (p.kind === 'group') for (const g of p.items) if (g.kind === 'assign') all.push(g);
  const numeric: Record<string, number> = {};
  const text: Record<string, string> = {};
  for (const a of all) {
    if (!a.value) continue;
    const v = valueOf(a.value);
    if (typeof v === 'string') text[a.name.text.toLowerCase()] = v;
    else if (v !== undefined) numeric[a.name.text.toLowerCase()] = v;
  }
  const name = nameItem.text.toLowerCase();
  const type = typeItem.text.toLowerCase();
  const kind = modelKindOf(type);
  const level = numeric['level'] ?? 1;
  const card: ModelCard = {
    name,
    baseName: splitBinName(name).baseName,
    kind,
    type,
    level,
    family: kind === 'nmos' || kind === 'pmos' ? mosFamilyOf(level) : undefined,
    params: numeric,
    textParams: text,
    file,
    range: stmt.range,
  };
  return { card, nameItem };
}

export function modelKindOf(type: string): ModelKind {
  switch (type) {
    case 'nmos':
      return 'nmos';
    case 'pmos':
      return 'pmos';
    case 'd':
      return 'diode';
    case 'r':
    case 'res':
      return 'resistor';
    case 'c':
    case 'cap':
      return 'capacitor';
    case 'npn':
    case 'pnp':
      return 'bjt';
    default:
      return 'other';
  }
}

export function mosFamilyOf(level: number): MosFamily {
  switch (level) {
    case 1:
      return 'level1';
    case 2:
      return 'level2';
    case 3:
      return 'level3';
    case 8:
    case 49:
      return 'bsim3';
    case 14:
    case 54:
      return 'bsim4';
    default:
      return 'unsupported';
  }
}

export function splitBinName(name: string): { baseName: string; bin: boolean } {
  const m = /^(.*)\.(\d+)$/.exec(name);
  return m ? { baseName: m[1]!, bin: true } : { baseName: name, bin: false };
}

/**
 * The card a device with this model name, L and W (metres) uses: an exact name first, else the
 * bin of that base name whose [LMIN, LMAX) and [WMIN, WMAX) hold the device (ngspice's rule).
 */
export function selectModel(cards: ReadonlyMap<string, ModelCard[]>, name: string, lM: number | undefined, wM: number | undefined): ModelCard | undefined {
  const list = cards.get(name);
  if (!list || list.length === 0) return undefined;
  const exact = list.find((c) => c.name === name);
  if (exact) return exact;
  if (lM === undefined || wM === undefined) return list[0];
  for (const c of list) {
    const p = c.params;
    const lmin = p['lmin'] ?? 0;
    const lmax = p['lmax'] ?? Infinity;
    const wmin = p['wmin'] ?? 0;
    const wmax = p['wmax'] ?? Infinity;
    if (lM >= lmin && lM < lmax && wM >= wmin && wM < wmax) return c;
  }
  return undefined;
}
