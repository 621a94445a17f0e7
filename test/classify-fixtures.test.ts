// Classification fixtures: netlists under test/fixtures/classify with the expected state of each
// node written beside it:
//
//   *= <node> [in <phase>]: <state> [when <boolean expression>] [level <0|1>]
//
// The `when` expression is the exact float (or contention) condition over the free inputs; the
// test compares it with the reported cover on every assignment. Storage nodes not listed must be
// driven in every phase (false positives fail the test). Findings use the `*^` lines of
// test/support/fixtures.ts.

import * as fs from 'node:fs';
import * as path from 'node:path';
import { describe, expect, it } from 'vitest';
import { analyse } from '../server/src/engine';
import { diskHost } from '../server/src/cli/diskHost';
import { checkExpectations } from './support/fixtures';
import { coverMatches, parseBool } from './support/boolexpr';

const DIR = path.join(__dirname, 'fixtures', 'classify');

interface StateExpectation {
  node: string;
  phase: string | undefined;
  state: string;
  when: string | undefined;
  level: number | undefined;
}

function readStateExpectations(text: string): StateExpectation[] {
  const out: StateExpectation[] = [];
  for (const line of text.split(/\r?\n/)) {
    const m = /^\*=\s*(\S+)(?:\s+in\s+(.+?))?\s*:\s*(\w+)(?:\s+when\s+(.+?))?(?:\s+level\s+([01]))?\s*$/.exec(line.trim());
    if (m) out.push({ node: m[1]!.toLowerCase(), phase: m[2], state: m[3]!, when: m[4], level: m[5] === undefined ? undefined : Number(m[5]) });
  }
  return out;
}

describe('classification fixtures', () => {
  for (const name of fs.readdirSync(DIR).filter((f) => f.endsWith('.sp')).sort()) {
    it(name, () => {
      const file = path.join(DIR, name);
      const text = fs.readFileSync(file, 'utf8');
      const result = analyse(diskHost(), file);
      checkExpectations(file, text, result);
      const { circuit, plan, classification: cl } = result.circuits[0]!;
      const expectations = readStateExpectations(text);
      const problems: string[] = [];
      const listed = new Set(expectations.map((e) => e.node));
      for (const e of expectations) {
        const id = circuit.netByName.get(e.node);
        if (id === undefined) {
          problems.push(`${e.node}: no such net`);
          continue;
        }
        const phases = plan.phases.map((p, i) => ({ p, i })).filter(({ p }) => e.phase === undefined || p.name === e.phase);
        if (phases.length === 0) problems.push(`${e.node}: no phase '${e.phase}' (phases: ${plan.phases.map((p) => p.name).join(' | ')})`);
        for (const { p, i } of phases) {
          const r = cl.perPhase[i]!.get(id);
          const state = r?.state ?? 'driven';
          if (e.state === 'internal' || e.state === 'storage') {
            const role = cl.storage[id] ? 'storage' : 'internal';
            if (role !== e.state) problems.push(`${e.node}: role ${role}, expected ${e.state}`);
            continue;
          }
          if (e.state === 'floats') {
            // the float condition alone, whatever the state (a node can both float and contend)
            const { fn, vars } = parseBool(e.when ?? '1');
            const diff = coverMatches(r?.floatCover ?? [], fn, vars);
            if (diff.length) problems.push(`${e.node} in ${p.name}: float condition differs from '${e.when}': ${diff.slice(0, 3).join('; ')}`);
            continue;
          }
          if (state !== e.state) {
            problems.push(`${e.node} in ${p.name}: ${state}${r?.when ? ' ' + JSON.stringify(r.when) : ''}, expected ${e.state}`);
            continue;
          }
          if (e.when && r) {
            const { fn, vars } = parseBool(e.when);
            const cubes = e.state === 'contention' ? (r.contentionWhen ? [r.contentionWhen] : []) : r.floatCover ?? [];
            const diff = e.state === 'contention' ? (cubes.every((c) => fn(c as Record<string, 0 | 1>)) ? [] : [`witness ${JSON.stringify(cubes[0])} does not satisfy ${e.when}`]) : coverMatches(cubes, fn, vars);
            if (diff.length) problems.push(`${e.node} in ${p.name}: float condition differs from '${e.when}': ${diff.slice(0, 3).join('; ')}`);
          }
          if (e.level !== undefined && r?.keptLevel !== e.level) problems.push(`${e.node} in ${p.name}: kept level ${r?.keptLevel}, expected ${e.level}`);
        }
      }
      // no false positives: every unlisted storage node is driven everywhere
      for (let n = 0; n < circuit.nets.length; n++) {
        if (cl.network.role[n] !== 0 || !cl.storage[n] || listed.has(circuit.nets[n]!.name)) continue;
        cl.perPhase.forEach((m, i) => {
          const r = m.get(n);
          if (r) problems.push(`${circuit.nets[n]!.name} in ${plan.phases[i]!.name}: ${r.state} ${r.when ? JSON.stringify(r.when) : ''} (not expected)`);
        });
      }
      expect(problems).toEqual([]);
    });
  }
});
