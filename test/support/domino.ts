// The two-input domino AND gate the editor tests work on (BSIM4 cards of the electrical tests,
// included as models.inc): its dynamic node floats in evaluate, leaks past the budget within the
// phase and shares charge with the stack node n1.

export function dominoDeck(title: string, beforeEnd = ''): string {
  return `${title}
.include models.inc
* tidemark: input a b
.subckt dom_and2 a b clk y vdd vss
Mpre dyn clk vdd vdd p45 w=0.5u l=0.05u
Mna dyn a n1 vss n45 w=0.5u l=0.05u
Mnb n1 b ft vss n45 w=0.5u l=0.05u
Mft ft clk vss vss n45 w=0.8u l=0.05u
Cdyn dyn vss 3f
Mi y dyn vss vss n45 w=0.2u l=0.05u
Mj y dyn vdd vdd p45 w=0.4u l=0.05u
.ends dom_and2
Xg a b clk out vdd 0 dom_and2
vdd vdd 0 1
vclk clk 0 PULSE(0 1 0 10p 10p 0.5u 1u)
${beforeEnd}.end
`;
}
