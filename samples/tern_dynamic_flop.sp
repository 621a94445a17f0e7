Tern sensor hub: dynamic capture flop of the wake-up timer (Quillmoor Labs, always-on team)
* Two clocked-CMOS stages. The timer's clock is gated off for up to 50 us in deep sleep, and the
* slave's storage node then holds the last state only as charge.
.lib models/tern45.lib tt
* tidemark: standby clk=0 for=50u
* tidemark: input d

.subckt c2mos_stage d ck ckb q vdd vss
Mp1 pu d vdd vdd tp w=0.3u l=0.045u
Mp2 st ckb pu vdd tp w=0.3u l=0.045u
Mn2 st ck pd vss tn w=0.2u l=0.045u
Mn1 pd d vss vss tn w=0.2u l=0.045u
Minv_n q st vss vss tn w=0.2u l=0.045u
Minv_p q st vdd vdd tp w=0.4u l=0.045u
Cst st vss 1f
.ends c2mos_stage

Xi clk clkb vdd 0 tinv
Xmaster d clkb clk m vdd 0 c2mos_stage
Xslave m clk clkb q vdd 0 c2mos_stage

.subckt tinv a y vdd vss
Mn y a vss vss tn w=0.2u l=0.045u
Mp y a vdd vdd tp w=0.4u l=0.045u
.ends tinv

vdd vdd 0 1.0
vclk clk 0 PULSE(0 1.0 0 20p 20p 4.98n 10n)
.end
