// Prints the sanity table of the electrical models: off current per micron of width at both
// corners, the hot/nominal leakage ratio, and the subthreshold slope, for each test card, with
// ngspice's values beside them (the WebAssembly build; tiny drain areas so its default
// junction current of 1e-14 A does not mask the channel). `node scripts/sanity-table.mjs`.

import { runNgspice } from '../test/support/ngspice';
import { BSIM3_NMOS, BSIM3_PMOS, BSIM4_NMOS, BSIM4_PMOS } from '../test/support/cards';
import { analyse } from '../server/src/engine';
import { memoryHost } from '../server/src/core/host';
import { modelFor } from '../server/src/analysis/devices/catalogue';

const CASES = [
  { card: BSIM3_NMOS, name: 'n18', pol: 'n' as const, vdd: 1.8, w: 1e-6, l: 0.18e-6 },
  { card: BSIM3_PMOS, name: 'p18', pol: 'p' as const, vdd: 1.8, w: 1e-6, l: 0.18e-6 },
  { card: BSIM4_NMOS, name: 'n45', pol: 'n' as const, vdd: 1.0, w: 1e-6, l: 0.05e-6 },
  { card: BSIM4_PMOS, name: 'p45', pol: 'p' as const, vdd: 1.0, w: 1e-6, l: 0.05e-6 },
];

async function ngspiceCurrent(card: string, name: string, pol: 'n' | 'p', vgs: number, vds: number, temp: number, w: number, l: number): Promise<number> {
  const s = pol === 'n' ? 1 : -1;
  const deck = `t\n${card}\n.options gmin=1e-20\n.temp ${temp}\nvd d 0 ${s * vds}\nvg g 0 ${s * vgs}\nM1 d g 0 0 ${name} w=${w} l=${l} ad=1e-18 as=1e-18 pd=1e-12 ps=1e-12\n.op\n.end\n`;
  const r = await runNgspice(deck);
  return Math.abs(r.get('i(vd)')![0]!);
}

async function main(): Promise<void> {
  const rows: string[] = [];
  rows.push('| card | I_off 25 C (A/um) | I_off 110 C (A/um) | hot/nominal | S 25 C (mV/dec) |');
  rows.push('| --- | --- | --- | --- | --- |');
  for (const c of CASES) {
    const r = analyse(memoryHost({ '/c.sp': `t\n${c.card}\nM1 d g 0 0 ${c.name} w=1u l=1u\nvd d 0 1\n.end\n` }), '/c.sp', { frontEndOnly: true });
    const model = modelFor(r.design.circuits[0]!.mosfets[0]!.card, c.pol);
    const ours = (vgs: number, t: number) => model.drainCurrent(vgs, c.vdd, 0, t + 273.15, c.w, c.l);
    const perUm = c.w * 1e6;
    const o25 = ours(0, 25) / perUm;
    const o110 = ours(0, 110) / perUm;
    const oS = 100 / Math.log10(ours(0.1, 25) / ours(0, 25));
    const n25 = (await ngspiceCurrent(c.card, c.name, c.pol, 0, c.vdd, 25, c.w, c.l)) / perUm;
    const n110 = (await ngspiceCurrent(c.card, c.name, c.pol, 0, c.vdd, 110, c.w, c.l)) / perUm;
    const nS = 100 / Math.log10((await ngspiceCurrent(c.card, c.name, c.pol, 0.1, c.vdd, 25, c.w, c.l)) / (n25 * perUm));
    const e = (x: number) => x.toExponential(2);
    rows.push(`| ${c.name} (${model.family}) | ${e(o25)} / ngspice ${e(n25)} | ${e(o110)} / ${e(n110)} | ${(o110 / o25).toFixed(0)} / ${(n110 / n25).toFixed(0)} | ${oS.toFixed(1)} / ${nS.toFixed(1)} |`);
  }
  console.log(rows.join('\n'));
}

main();
