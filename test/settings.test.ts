// The editor's settings as the server reads them (lsp/settings.ts) and the values the command
// line shares with them (core/options.ts): good values are taken, and each one the analysis
// cannot use is left at its default and named, never passed on to break the analysis.

import { describe, expect, it } from 'vitest';
import { clockSetting, DEFAULT_SETTINGS, engineOptionsFor, readSettings } from '../server/src/lsp/settings';
import { parseBudget, validTemps } from '../server/src/core/options';
import { analyse } from '../server/src/engine';
import { diskHost } from '../server/src/cli/diskHost';
import * as path from 'node:path';

describe('settings', () => {
  it('takes every good value, and the defaults for what the client leaves out or sends as null', () => {
    const good = { temps: [0, 85, 125], budget: '80mV', supplies: { vddq: 1.2 }, clocks: ['clk period=1n high=0.5n', 'clkb inverse=clk'], deviceRules: [{ pattern: 'sky130_*nfet*', kind: 'nmos' }], includePaths: ['/lib'], geometryScale: 1e-6, maxAnalysisLines: 1000 };
    expect(readSettings(good)).toEqual({ settings: good, problems: [] });
    expect(readSettings(null)).toEqual({ settings: DEFAULT_SETTINGS, problems: [] });
    expect(readSettings({ temps: null, budget: undefined, trace: { server: 'verbose' } })).toEqual({ settings: DEFAULT_SETTINGS, problems: [] });
  });

  it('leaves each value the analysis cannot use at its default and names it', () => {
    const cases: Array<[string, unknown]> = [
      ['temps', '25,110'],
      ['temps', []],
      ['temps', [25, 'hot']],
      ['temps', [-300]],
      ['budget', 10],
      ['budget', 'ten percent'],
      ['budget', '0%'],
      ['supplies', [1.2]],
      ['clocks', 'clk'],
      ['deviceRules', { pattern: 'x', kind: 'nmos' }],
      ['includePaths', '/lib'],
      ['geometryScale', 0],
      ['maxAnalysisLines', 'many'],
    ];
    for (const [key, value] of cases) {
      const { settings, problems } = readSettings({ [key]: value });
      expect(settings, `${key}: ${JSON.stringify(value)}`).toEqual(DEFAULT_SETTINGS);
      expect(problems.length).toBe(1);
      expect(problems[0]).toMatch(new RegExp(`^tidemark\\.${key} is .*; the default is used$`));
    }
  });

  it('leaves out the bad entries of a list or object and keeps the rest', () => {
    const { settings, problems } = readSettings({ supplies: { vddq: 1.2, vddx: 'high' }, clocks: ['clk period=1n high=0.5n', 'clk2 period=1n', 7], deviceRules: [{ pattern: 'p*', kind: 'pmos' }, { pattern: 'q*', kind: 'transistor' }, null] });
    expect(settings.supplies).toEqual({ vddq: 1.2 });
    expect(settings.clocks).toEqual(['clk period=1n high=0.5n']);
    expect(settings.deviceRules).toEqual([{ pattern: 'p*', kind: 'pmos' }]);
    expect(problems.length).toBe(5);
    expect(problems.join('\n')).toMatch(/vddx/);
    expect(problems.join('\n')).toMatch(/clk2 period=1n/);
    expect(problems.join('\n')).toMatch(/transistor/);
  });

  it('what it takes, the analysis runs with (the values that used to stop it)', () => {
    const file = path.join(__dirname, '..', 'samples', 'tern_dynamic_latch.sp');
    for (const raw of [{ temps: '25,110' }, { temps: [] }, { clocks: 'clk' }, { budget: 5 }]) {
      const options = engineOptionsFor(readSettings(raw).settings, 100);
      expect(() => analyse(diskHost(), file, options), JSON.stringify(raw)).not.toThrow();
    }
  });

  it('budgets, corners and clock specs as written', () => {
    expect(parseBudget('10%')).toEqual({ fraction: 0.1 });
    expect(parseBudget(' 0.12V ')).toEqual({ volts: 0.12 });
    expect(parseBudget('80mV')).toEqual({ volts: 0.08 });
    expect(parseBudget('Receiver')).toEqual({ receiver: true });
    for (const bad of ['', '%', '0%', '100%', '1.2.3%', '0V', 'v', '10 %', 'abc']) expect(parseBudget(bad), bad).toBeUndefined();
    expect(validTemps([25, 110])).toEqual([25, 110]);
    for (const bad of [[], [NaN], ['25'], [-273.15], '25']) expect(validTemps(bad)).toBeUndefined();
    expect(clockSetting('CLK period=1n high=0.5n delay=0.1ns')).toEqual({ net: 'clk', periodS: expect.closeTo(1e-9, 20), highS: expect.closeTo(0.5e-9, 20), delayS: expect.closeTo(0.1e-9, 20) });
    expect(clockSetting('clkb inverse=clk')).toEqual({ net: 'clkb', inverseOf: 'clk' });
    expect(clockSetting('clk period=1n')).toBeUndefined();
    expect(clockSetting('  ')).toBeUndefined();
  });
});
