// The bundled samples (the fictional Tern sensor hub): between them every analysis rule shows,
// and the clean static block shows none.
import * as fs from 'node:fs';
import * as path from 'node:path';
import { describe, expect, it } from 'vitest';
import { analyse } from '../server/src/engine';
import { diskHost } from '../server/src/cli/diskHost';

const DIR = path.join(__dirname, '..', 'samples');
const samples = fs.readdirSync(DIR).filter((f) => f.endsWith('.sp'));

describe('samples', () => {
  const results = new Map(samples.map((f) => [f, analyse(diskHost(), path.join(DIR, f))]));
  it('show every analysis rule between them', () => {
    const rules = new Set([...results.values()].flatMap((r) => r.diagnostics.map((d) => d.rule)));
    for (const r of ['floating-node', 'retention-short', 'charge-sharing', 'coupling-noise', 'combined-droop', 'undriven-net', 'contention', 'keeper-weak', 'keeper-strong', 'clock-unknown']) {
      expect(rules.has(r as never), r).toBe(true);
    }
  });
  it('have no front-end findings', () => {
    for (const [f, r] of results) {
      const front = r.diagnostics.filter((d) => ['syntax', 'param-error', 'include-missing', 'unknown-subckt', 'pin-count', 'unknown-model', 'geometry-scale'].includes(d.rule));
      expect({ f, front }).toEqual({ f, front: [] });
    }
  });
  it('the static block is clean', () => {
    expect(results.get('tern_static_block.sp')!.diagnostics).toEqual([]);
  });
});
