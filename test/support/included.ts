// A netlist that includes its cells from another file (cells.inc): the tests of edits made in
// an included file, in the engine and over the protocol.

export const CELLS_INC = `* Tern datapath cells (included)
.subckt t_dom a b clk out vdd vss
Mpre dyn clk vdd vdd tp w=0.5u l=0.05u
Mna dyn a n1 vss tn w=0.6u l=0.05u
Mnb n1 b foot vss tn w=0.6u l=0.05u
Mft foot clk vss vss tn w=0.8u l=0.05u
Mi out dyn vss vss tn w=0.3u l=0.05u
Mj out dyn vdd vdd tp w=0.6u l=0.05u
.ends
`;

/** The top netlist: `instances` domino instances in a ring of inputs a0, a1, ... */
export function topIncludingCells(instances: number): string {
  const inputs = Array.from({ length: Math.max(2, instances) }, (_, i) => `a${i}`);
  const lines = ['Tern datapath with included cells', '.model tn nmos level=1 vto=0.4 kp=200u', '.model tp pmos level=1 vto=-0.4 kp=80u', '.include cells.inc', `* tidemark: input ${inputs.join(' ')}`];
  for (let i = 0; i < instances; i++) lines.push(`X${i} ${inputs[i]} ${inputs[(i + 1) % inputs.length]} clk y${i} vdd 0 t_dom`);
  lines.push('vdd vdd 0 1', 'vclk clk 0 PULSE(0 1 0 10p 10p 0.5n 1n)', '.end', '');
  return lines.join('\n');
}
