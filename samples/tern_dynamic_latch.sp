Tern sensor hub: sample-and-hold latch on the ADC capture path (Quillmoor Labs, datapath team)
* A clocked pass gate loads the storage node; a static inverter reads it. While the capture
* clock is low the storage node holds its level only as charge.
.lib models/tern45.lib tt
.param wn=0.2u wp=0.4u lmin=0.045u

.subckt capture_latch d clk clkb q vdd vss
Mpass_n d clk st vss tn w={wn} l={lmin}
Mpass_p d clkb st vdd tp w={wp} l={lmin}
Minv_n q st vss vss tn w={wn} l={lmin}
Minv_p q st vdd vdd tp w={wp} l={lmin}
.ends capture_latch

Xcap0 adc_bit0 cap_clk cap_clkb bit0_q vdd 0 capture_latch
Xcap1 adc_bit1 cap_clk cap_clkb bit1_q vdd 0 capture_latch
Cload0 bit0_q 0 2f
Cload1 bit1_q 0 2f

vdd vdd 0 DC 1.0
vclk cap_clk 0 PULSE(0 1.0 0.2n 20p 20p 0.5n 2n)
vclkb cap_clkb 0 PULSE(1.0 0 0.2n 20p 20p 0.5n 2n)
vd0 adc_bit0 0 PULSE(0 1.0 0 20p 20p 1n 4n)
vd1 adc_bit1 0 PULSE(1.0 0 0 20p 20p 3n 8n)
.tran 10p 8n
.end
