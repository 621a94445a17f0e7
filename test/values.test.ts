// Values and parameters. Two references: the ngspice User Manual's scale-factor rules (section
// 2.3: T G Meg K mil m u n p f a; letters after a number that are not a scale factor are
// ignored), and ngspice itself (WebAssembly build) evaluating the very same netlist.

import { describe, expect, it } from 'vitest';
import { formatRatio, parseSpiceNumber } from '../server/src/circuit/numbers';
import { analyse } from '../server/src/engine';
import { memoryHost } from '../server/src/core/host';
import { runNgspice } from './support/ngspice';

describe('SPICE numbers (ngspice User Manual, scale factors)', () => {
  const cases: Array<[string, number]> = [
    ['1', 1],
    ['1m', 1e-3],
    ['1M', 1e-3], // M is milli, not mega
    ['1meg', 1e6],
    ['1MEG', 1e6],
    ['1mil', 25.4e-6],
    ['10fF', 10e-15],
    ['1.2V', 1.2],
    ['4.7kOhm', 4700],
    ['1e+06u', 1],
    ['4.347e+11p', 0.4347],
    ['2.5G', 2.5e9],
    ['3T', 3e12],
    ['.5n', 0.5e-9],
    ['-1.5m', -1.5e-3],
    ['1a', 1e-18],
    ['1F', 1e-15],
    ['1ms', 1e-3],
  ];
  for (const [text, value] of cases) {
    it(`${text} = ${value}`, () => {
      expect(parseSpiceNumber(text)).toBeCloseTo(value, 20);
      expect(Math.abs(parseSpiceNumber(text)! - value)).toBeLessThanOrEqual(Math.abs(value) * 1e-12);
    });
  }
  it('rejects what is not a number', () => {
    for (const t of ['abc', '', 'u1', '1+2', '--1']) expect(parseSpiceNumber(t)).toBeUndefined();
  });
});

describe('strength ratios in messages', () => {
  it('keeps two decimals, and two significant digits under 0.1 (a long keeper is not 0.00x)', () => {
    expect(formatRatio(0.48)).toBe('0.48');
    expect(formatRatio(1.414)).toBe('1.41');
    expect(formatRatio(0)).toBe('0.00');
    expect(formatRatio(0.0014)).toBe('0.0014');
    expect(formatRatio(0.04567)).toBe('0.046');
  });
});

describe('values against ngspice (same netlist, both tools)', () => {
  // Each source's DC value is one test value; ngspice reports it as the node voltage.
  const values = [
    '1meg', '1mil', '10fF', '1.2V', '4.7kOhm', '1e+06u', '4.347e+11p', '2.5G', '.5n', '-1.5m', '1a',
    '{a*3}', "'sqrt(16)+max(1,2)'", '{2**3}', '{-2**2}', '{2^3}', '{pow(2,0.5)}', '{abs(-3)}', '{exp(1)}', '{log10(100)}',
    '{1<2 ? 5 : 6}', '{floor(2.7)}', '{ceil(2.1)}', '{min(3,4)-max(1,2)}', '{int(-2.7)}', '{b/a}', '{(a+b)*2u}', '{sin(0.5)+cos(0.5)}', '{sqrt(a*b)}', '{3 > 2 && 1 < 0}',
  ];
  const netlist = [
    'value check',
    '.param a=2 b={a*3}',
    '.subckt scaled out w=1',
    'vs out 0 {w*2+a}',
    '.ends',
    ...values.map((v, i) => `v${i} n${i} 0 ${v}`),
    'x1 o1 scaled w=3',
    'x2 o2 scaled',
    '.op',
    '.end',
  ].join('\n');

  it('agrees with ngspice on every value, including subcircuit parameter overrides', async () => {
    const sim = await runNgspice(netlist);
    const r = analyse(memoryHost({ '/t.sp': netlist }), '/t.sp');
    expect(r.diagnostics.filter((d) => d.severity === 'error')).toEqual([]);
    const circuit = r.design.circuits[0]!;
    const ours = new Map<string, number | undefined>();
    for (const s of circuit.sources) {
      if (s.waveform.kind === 'dc') ours.set(circuit.nets[s.p]!.name, s.waveform.volts);
    }
    const rows: string[] = [];
    const check = (node: string, label: string) => {
      const ref = sim.get(`v(${node})`)?.[0];
      const mine = ours.get(node);
      const ok = ref !== undefined && mine !== undefined && Math.abs(ref - mine) <= Math.max(Math.abs(ref) * 1e-9, 1e-30);
      if (!ok) rows.push(`${label}: ngspice ${ref}, tidemark ${mine}`);
    };
    values.forEach((v, i) => check(`n${i}`, v));
    check('o1', 'x1 (w=3)');
    check('o2', 'x2 (default w)');
    expect(rows).toEqual([]);
  });
});

describe('parameter errors', () => {
  const run = (text: string) => analyse(memoryHost({ '/t.sp': text }), '/t.sp').diagnostics;
  it('reports a cycle once, on the line that closes it', () => {
    const d = run('t\n.param a={b+1}\n.param b={a*2}\nv1 x 0 {a}\n.end\n');
    const errors = d.filter((x) => x.rule === 'param-error');
    expect(errors.length).toBe(1);
    expect(errors[0]!.message).toMatch(/depends on itself/);
  });
  it('reports an unknown name with its range', () => {
    const d = run('t\nv1 x 0 {nope*2}\n.end\n');
    expect(d).toMatchObject([{ rule: 'param-error', range: { start: { line: 1, character: 7 } } }]);
    expect(d[0]!.message).toMatch(/unknown parameter 'nope'/);
  });
  it('reports division by zero and unknown functions', () => {
    const d = run('t\nv1 x 0 {1/0}\nv2 y 0 {frob(2)}\n.end\n');
    expect(d.map((x) => x.message)).toEqual([expect.stringMatching(/division by zero/), expect.stringMatching(/unknown function 'frob'/)]);
  });
});
