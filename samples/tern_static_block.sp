Tern sensor hub: static status decoder (Quillmoor Labs, control team)
* Static CMOS gates and a transmission-gate flip-flop: nothing here should float.
.lib models/tern45.lib tt
* tidemark: input s0 s1 s2 en

.subckt inv a y vdd vss
Mn y a vss vss tn w=0.2u l=0.045u
Mp y a vdd vdd tp w=0.4u l=0.045u
.ends inv
.subckt nand2 a b y vdd vss
Mn1 y a n1 vss tn w=0.3u l=0.045u
Mn2 n1 b vss vss tn w=0.3u l=0.045u
Mp1 y a vdd vdd tp w=0.4u l=0.045u
Mp2 y b vdd vdd tp w=0.4u l=0.045u
.ends nand2
.subckt tg_latch d ck ckb q vdd vss
Mn1 d ck m vss tn w=0.2u l=0.045u
Mp1 d ckb m vdd tp w=0.4u l=0.045u
Xf m qb vdd vss inv
Xo qb q vdd vss inv
Mn2 q ckb m vss tn w=0.15u l=0.045u
Mp2 q ck m vdd tp w=0.3u l=0.045u
.ends tg_latch

Xd0 s0 s1 t0 vdd 0 nand2
Xd1 t0 s2 t1 vdd 0 nand2
Xd2 t1 en t2 vdd 0 nand2
Xck clk clkb vdd 0 inv
Xm t2 clkb clk mq vdd 0 tg_latch
Xs mq clk clkb status vdd 0 tg_latch
Xo status status_b vdd 0 inv

vdd vdd 0 1.0
vclk clk 0 PULSE(0 1.0 0 20p 20p 0.98n 2n)
.end
