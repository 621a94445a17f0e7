// Generated netlists for the benchmarks: a hierarchical datapath of leaf cells (domino gates,
// dynamic latches, static gates) and a flat extracted-style inverter chain.

const LEAF_CELLS = `
.subckt b_inv a y vdd vss
Mn y a vss vss bn w=0.3u l=0.05u
Mp y a vdd vdd bp w=0.6u l=0.05u
.ends
.subckt b_nand2 a b y vdd vss
Mn1 y a n1 vss bn w=0.4u l=0.05u
Mn2 n1 b vss vss bn w=0.4u l=0.05u
Mp1 y a vdd vdd bp w=0.6u l=0.05u
Mp2 y b vdd vdd bp w=0.6u l=0.05u
.ends
.subckt b_domino a b clk out vdd vss
Mpre dyn clk vdd vdd bp w=0.5u l=0.05u
Mna dyn a n1 vss bn w=0.6u l=0.05u
Mnb n1 b foot vss bn w=0.6u l=0.05u
Mft foot clk vss vss bn w=0.8u l=0.05u
Mkp dyn out vdd vdd bp w=0.15u l=0.1u
Xo dyn out vdd vss b_inv
.ends
.subckt b_dlatch d clk clkb q vdd vss
Mtn d clk st vss bn w=0.3u l=lpass
Mtp d clkb st vdd bp w=0.6u l=lpass
Xr st q vdd vss b_inv
.ends
`;

/** A slice of 48 transistors built from leaf cells: 2 domino (14), 3 latches (12), 5 nand2 (20), 1 inv (2). */
const SLICE = `
.subckt b_slice i0 i1 i2 i3 clk clkb o vdd vss
Xd0 i0 i1 clk d0 vdd vss b_domino
Xd1 i2 i3 clk d1 vdd vss b_domino
Xl0 d0 clk clkb l0 vdd vss b_dlatch
Xl1 d1 clk clkb l1 vdd vss b_dlatch
Xl2 i0 clk clkb l2 vdd vss b_dlatch
Xn0 l0 l1 n0 vdd vss b_nand2
Xn1 l1 l2 n1 vdd vss b_nand2
Xn2 n0 n1 n2 vdd vss b_nand2
Xn3 n2 i3 n3 vdd vss b_nand2
Xn4 n3 l0 n4 vdd vss b_nand2
Xi n4 o vdd vss b_inv
.ends
`;

export function hierarchicalNetlist(transistors: number): string {
  const slices = Math.ceil(transistors / 48);
  const perBlock = 20;
  const blocks = Math.ceil(slices / perBlock);
  // bnl, bpl: low-threshold flavours, unused until an edit swaps a device to one
  const lines = ['benchmark: hierarchical datapath', '.model bn nmos level=1 vto=0.4 kp=200u', '.model bp pmos level=1 vto=-0.4 kp=80u', '.model bnl nmos level=1 vto=0.3 kp=220u', '.model bpl pmos level=1 vto=-0.3 kp=90u', '.param lpass=0.05u', LEAF_CELLS, SLICE];
  lines.push('.subckt b_block ' + Array.from({ length: 4 }, (_, i) => `in${i}`).join(' ') + ' clk clkb out vdd vss');
  for (let s = 0; s < perBlock; s++) {
    const a = s === 0 ? 'in0' : `w${s - 1}`;
    lines.push(`Xs${s} ${a} in1 in2 in3 clk clkb ${s === perBlock - 1 ? 'out' : `w${s}`} vdd vss b_slice`);
  }
  lines.push('.ends');
  for (let b = 0; b < blocks; b++) lines.push(`Xb${b} a${b} a${b + 1} a${b + 2} a${b + 3} clk clkb y${b} vdd 0 b_block`);
  lines.push('vdd vdd 0 1.0', 'vclk clk 0 PULSE(0 1 0 10p 10p 0.5n 1n)', 'vclkb clkb 0 PULSE(1 0 0 10p 10p 0.5n 1n)', '.end', '');
  return lines.join('\n');
}

export function flatNetlist(transistors: number): string {
  const lines = ['benchmark: flat extracted netlist', '.model bn nmos level=1', '.model bp pmos level=1'];
  for (let i = 0; i < transistors; i += 2) {
    const a = `n${i >> 1}`;
    const y = `n${(i >> 1) + 1}`;
    lines.push(`MN${i} ${y} ${a} vss vss bn w=0.3u l=0.05u ad=0.03p as=0.03p pd=0.8u ps=0.8u`);
    lines.push(`MP${i} ${y} ${a} vdd vdd bp w=0.6u l=0.05u ad=0.06p as=0.06p pd=1.4u ps=1.4u`);
  }
  lines.push('vdd vdd 0 1.0', 'vss vss 0 0', 'vin n0 0 PULSE(0 1 0 10p 10p 0.5n 1n)', '.end', '');
  return lines.join('\n');
}

