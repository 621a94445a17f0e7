Tern sensor hub: domino carry slice of the filter accumulator (Quillmoor Labs, datapath team)
* Footed domino gates for generate/propagate and carry, precharged while clk is low.
.lib models/tern45.lib tt

* carry = g + p & cin, as a footed domino gate with a keeper
.subckt dom_carry g p cin clk cout vdd vss
Mpre dyn clk vdd vdd tp w=0.4u l=0.045u
Mng dyn g ft vss tn w=0.4u l=0.045u
Mnp dyn p mid vss tn w=0.4u l=0.045u
Mnc mid cin ft vss tn w=0.4u l=0.045u
Mft ft clk vss vss tn w=0.8u l=0.045u
* the keeper was copied from a wider gate and is far too strong here
Mkeep dyn cout vdd vdd tp w=0.6u l=0.045u
Cdyn dyn vss 4f
Minv_n cout dyn vss vss tn w=0.3u l=0.045u
Minv_p cout dyn vdd vdd tp w=0.6u l=0.045u
.ends dom_carry

* propagate = a & b, with no keeper and a large internal node
.subckt dom_and2 a b clk y vdd vss
Mpre dyn clk vdd vdd tp w=0.3u l=0.045u
Mna dyn a n1 vss tn w=0.4u l=0.045u
Mnb n1 b ft vss tn w=0.4u l=0.045u
Mft ft clk vss vss tn w=0.6u l=0.045u
Cn1 n1 vss 1.5f
Minv_n y dyn vss vss tn w=0.2u l=0.045u
Minv_p y dyn vdd vdd tp w=0.4u l=0.045u
.ends dom_and2

* the same gate with a keeper long enough to be useless at the hot corner
.subckt dom_carry_lk g p cin clk cout vdd vss
Mpre dyn clk vdd vdd tp w=0.4u l=0.045u
Mng dyn g ft vss tn w=0.8u l=0.045u
Mnp dyn p mid vss tn w=0.8u l=0.045u
Mnc mid cin ft vss tn w=0.8u l=0.045u
Mft ft clk vss vss tn w=1.2u l=0.045u
Mkeep dyn cout vdd vdd tp w=0.12u l=2u
Cdyn dyn vss 4f
Cmid mid vss 0.5f
Minv_n cout dyn vss vss tn w=0.3u l=0.045u
Minv_p cout dyn vdd vdd tp w=0.6u l=0.045u
.ends dom_carry_lk

* tidemark: input a0 b0 g0 c0 g1
Xp0 a0 b0 clk p0 vdd 0 dom_and2
Xc0 g0 p0 c0 clk c1 vdd 0 dom_carry
Cl c1 0 2f
Xc1 g1 p0 c1 clk c2 vdd 0 dom_carry_lk

vdd vdd 0 1.0
vclk clk 0 PULSE(0 1.0 0 20p 20p 0.48n 1n)
.end
