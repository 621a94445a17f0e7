// A reconnection that names a net its scope did not have (a new word typed on an element line):
// the scope's net slots are the old ones with names put in, so every instance of the scope gets
// its new nets in the run of nets it owns, and every later net moves up (elaborate
// numberNetsByScope keeps that to few). This stage makes the
// old circuit with those nets put in and nothing on them yet (`widenCircuit`), under the net
// insertion (core/renumber) that every later stage applies to its own results; the reconnection
// then wires the edited lines to them as to any other net. Nets put in that a name rule, a
// directive or a setting could make a rail, a clock or an input are left to a fresh analysis.

import { DerivedMap } from '../core/overlay';
import { originIndex, setOriginIndex } from './elementIndex';
import type { EngineOptions } from '../core/options';
import { DEFAULT_GROUND_PATTERN, DEFAULT_SUPPLY_PATTERN } from '../core/options';
import { composeRenumberings, firstMovedNet, movedNets, netInsertion, netRemoval, withNetRows, type NetRenumbering } from '../core/renumber';
import type { Circuit, Design, Instance, Mosfet, Net } from './circuit';
import { mosfetRecord } from './circuit';
import type { NetSlots } from './elaborate';
import { roleNames } from './directives';

/** The slots put in: indices into the new slots' local names (ascending), all past the ports. */
export function insertedSlots(before: NetSlots, after: NetSlots, portCount: number): number[] | undefined {
  const a = before.localNames;
  const b = after.localNames;
  if (b.length <= a.length) return undefined;
  const inserted: number[] = [];
  let i = 0;
  for (let j = 0; j < b.length; j++) {
    if (i < a.length && a[i] === b[j]) i++;
    else if (j < portCount) return undefined;
    else inserted.push(j);
  }
  if (i !== a.length) return undefined;
  // a name put in is new to the scope (not one that moved in the order of first use)
  const old = new Set(a);
  return inserted.every((j) => !old.has(b[j]!)) ? inserted : undefined;
}

/** The slots taken out: indices into the old slots' local names (ascending), all past the ports. */
export function removedSlots(before: NetSlots, after: NetSlots, portCount: number): number[] | undefined {
  return insertedSlots(after, before, portCount);
}

/** Names a directive or a setting gives a role to: a net put in with one of them takes the full path. */
export function namedNets(design: Design, options: EngineOptions): Set<string> {
  return roleNames(design.directives, options);
}

/**
 * `c` with the nets of the inserted slots put in for every instance of the scope (prefix ->
 * its own block of nets), all elements on the nets they had under the new numbers. Undefined
 * when an instance's block of nets is not where the elaborator puts it, or a net put in could
 * take a role by its name. `contexts`: prefix ('' for the top level or a standalone cell).
 */
export function widenCircuit(
  c: Circuit,
  contexts: readonly string[],
  before: NetSlots,
  after: NetSlots,
  portCount: number,
  inserted: readonly number[],
  named: ReadonlySet<string>,
  options: EngineOptions,
): { circuit: Circuit; nets: NetRenumbering } | undefined {
  const supplyRe = new RegExp(options.supplyNamePattern ?? DEFAULT_SUPPLY_PATTERN, 'i');
  const groundRe = new RegExp(options.groundNamePattern ?? DEFAULT_GROUND_PATTERN, 'i');
  const insertedSet = new Set(inserted);
  // each new slot goes in before the next kept internal slot's net (pinned nets apart), or after the last one's
  const puts: Array<{ before: number; name: string; slot: number }> = [];
  for (const prefix of contexts) {
    let lastKept = -1;
    const pending: number[] = [];
    let ids: number[] = [];
    for (let j = portCount; j < after.localNames.length; j++) {
      if (insertedSet.has(j)) {
        pending.push(j);
        continue;
      }
      const id = c.netByName.get(prefix + after.localNames[j]!);
      if (id === undefined) return undefined;
      // a pinned net (a rail, a clock source's) is numbered apart, before every definition's
      if (id < c.pinnedNets) continue;
      ids.push(id);
      for (const s of pending) puts.push({ before: id, name: prefix + after.localNames[s]!, slot: s });
      pending.length = 0;
      lastKept = id;
    }
    if (lastKept < 0) return undefined;
    for (const s of pending) puts.push({ before: lastKept + 1, name: prefix + after.localNames[s]!, slot: s });
    // the block of nets an instance owns is contiguous and in slot order
    for (let k = 1; k < ids.length; k++) if (ids[k] !== ids[k - 1]! + 1) return undefined;
    ids = [];
  }
  for (const p of puts) {
    if (c.netByName.has(p.name) || p.name === '0' || named.has(p.name) || supplyRe.test(p.name) || groundRe.test(p.name)) return undefined;
  }
  // stable by slot within one place, as the elaborator numbers them
  puts.sort((x, y) => x.before - y.before || x.slot - y.slot);
  const ins = netInsertion(c.nets.length, puts.map((p) => p.before));
  const map = ins.oldToNew;
  let k = 0;
  const nets: Net[] = withNetRows(c.nets, ins, () => {
    const p = puts[k++]!;
    return { name: p.name, kind: 'signal', global: false, origin: after.localOrigins[p.slot]! };
  });
  const netByName = NetNumbersByName.over(c.netByName, map, new Map(ins.added.map((j) => [nets[j]!.name, j])));
  const moved = onNewNets(c, ins);
  if (!moved) return undefined;
  const circuit: Circuit = { ...c, nets, netByName, ...moved };

  return { circuit, nets: ins };
}

/**
 * The name index under a net renumbering, read through the old one (a copy of 100,000 names was
 * the largest part of the insertion). Read-only, like every stage's output.
 */
class NetNumbersByName extends DerivedMap<string, number> {
  private constructor(
    private readonly base: ReadonlyMap<string, number>,
    private readonly oldToNew: Int32Array,
    private readonly added: ReadonlyMap<string, number>,
    depth: number,
  ) {
    super(depth);
  }

  static over(base: ReadonlyMap<string, number>, oldToNew: Int32Array, added: ReadonlyMap<string, number>): Map<string, number> {
    if (base instanceof NetNumbersByName) {
      // one level: the renumberings composed, the earlier names put in moved too
      const all = new Map<string, number>();
      for (const [name, j] of base.added) if (oldToNew[j]! >= 0) all.set(name, oldToNew[j]!);
      for (const [name, j] of added) all.set(name, j);
      return new NetNumbersByName(base.base, composeRenumberings(base.oldToNew, oldToNew), all, base.depth);
    }
    const depth = base instanceof DerivedMap ? base.depth + 1 : 1;
    return new NetNumbersByName(base, oldToNew, added, depth).folded();
  }

  override get(name: string): number | undefined {
    const old = this.base.get(name);
    if (old === undefined) return this.added.get(name);
    const j = this.oldToNew[old]!;
    return j >= 0 ? j : undefined;
  }

  override has(name: string): boolean {
    return this.get(name) !== undefined;
  }

  // in net order (nothing walks a name index; the order is only kept stable)
  protected build(): Map<string, number> {
    const all = [...this.base].map(([k, v]): [string, number] => [k, this.oldToNew[v]!]).filter(([, j]) => j >= 0);
    for (const e of this.added) all.push(e);
    return new Map(all.sort((a, b) => a[1] - b[1]));
  }
}

/**
 * `c` (the circuit after a reconnection left the nets `removed` with nothing on them) without
 * them, every element on its nets under the new numbers; undefined when one is still used.
 */
export function narrowCircuit(c: Circuit, removed: readonly number[]): { circuit: Circuit; nets: NetRenumbering } | undefined {
  if (removed.some((x) => x < c.pinnedNets)) return undefined;
  const ins = netRemoval(c.nets.length, removed);
  const moved = onNewNets(c, ins);
  if (!moved) return undefined;
  const nets = withNetRows(c.nets, ins, () => undefined as unknown as Net);
  return { circuit: { ...c, nets, netByName: NetNumbersByName.over(c.netByName, ins.oldToNew, new Map()), ...moved }, nets: ins };
}

/** Instances with their ports under a net renumbering; the same list when none moved. */
function onNewPorts(list: Instance[], ids: (l: readonly number[]) => number[]): Instance[] {
  let out: Instance[] | undefined;
  for (let i = 0; i < list.length; i++) {
    const inst = list[i]!;
    const ports = ids(inst.ports);
    if (ports !== inst.ports) (out ??= list.slice())[i] = { name: inst.name, subckt: inst.subckt, ports, below: inst.below, origin: inst.origin };
  }
  return out ?? list;
}

/**
 * Every element of `c` on its nets under a net renumbering (those unchanged kept as they are),
 * or undefined when one is on a net taken out. The MOSFET and instance lists keep their places,
 * so their origin indexes carry over.
 */
function onNewNets(c: Circuit, ins: NetRenumbering): Pick<Circuit, 'mosfets' | 'capacitors' | 'resistors' | 'inductors' | 'diodes' | 'sources' | 'others' | 'instances' | 'ports' | 'supplies' | 'grounds' | 'inputs' | 'outputs'> | undefined {
  const map = ins.oldToNew;
  let lost = false;
  const at = (x: number) => {
    const j = map[x]!;
    if (j < 0) lost = true;
    return j;
  };
  const ids = (list: readonly number[]) => {
    const moved = movedNets(list, ins);
    if (moved.length !== list.length) lost = true;
    return moved;
  };
  const two = <T extends { a: number; b: number }>(list: T[]) => list.map((x) => (at(x.a) === x.a && at(x.b) === x.b ? x : { ...x, a: at(x.a), b: at(x.b) }));
  // nets below the first moved one keep their numbers: most MOSFETs need one comparison per
  // terminal (a name put in at the top level moves only the top level's later nets)
  const first = firstMovedNet(ins);
  const mosfet = (m: Mosfet): Mosfet => (m.d < first && m.g < first && m.s < first && m.b < first) || (at(m.d) === m.d && at(m.g) === m.g && at(m.s) === m.s && at(m.b) === m.b) ? m : mosfetRecord(m.name, m.polarity, at(m.d), at(m.g), at(m.s), at(m.b), m, m.origin);
  let mosfets: Mosfet[] | undefined;
  for (let i = 0; i < c.mosfets.length; i++) {
    const m = c.mosfets[i]!;
    const moved = mosfet(m);
    if (moved !== m) (mosfets ??= c.mosfets.slice())[i] = moved;
  }
  const out = {
    // the same list when no MOSFET moved (a list is never changed once made)
    mosfets: mosfets ?? c.mosfets,
    capacitors: two(c.capacitors),
    resistors: two(c.resistors),
    inductors: two(c.inductors),
    diodes: two(c.diodes),
    sources: c.sources.map((s) => (at(s.p) === s.p && at(s.n) === s.n ? s : { ...s, p: at(s.p), n: at(s.n) })),
    others: c.others.map((o) => {
      const moved = ids(o.nets);
      return moved === o.nets ? o : { ...o, nets: moved };
    }),
    instances: onNewPorts(c.instances, ids),
    ports: c.ports.map((p) => (at(p.net) === p.net ? p : { ...p, net: at(p.net) })),
    supplies: c.supplies.map((s) => (at(s.net) === s.net ? s : { ...s, net: at(s.net) })),
    grounds: ids(c.grounds),
    inputs: ids(c.inputs),
    outputs: ids(c.outputs),
  };
  if (lost) return undefined;
  if (out.mosfets !== c.mosfets) setOriginIndex(out.mosfets, originIndex(c.mosfets));
  if (out.instances !== c.instances) setOriginIndex(out.instances, originIndex(c.instances));
  return out;
}
