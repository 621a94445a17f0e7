Tern sensor hub: shared result bus and precharged status line (Quillmoor Labs, interconnect team)
.lib models/tern45.lib tt
* tidemark: input en_adc en_dsp d_adc d_dsp sel flag_a flag_b noisy

* tri-state driver: an inverter gated by en and its own inverted copy
.subckt tsbuf d en bus vdd vss
Men_n enb en vss vss tn w=0.2u l=0.045u
Men_p enb en vdd vdd tp w=0.4u l=0.045u
Mp1 pu d vdd vdd tp w=0.6u l=0.045u
Mp2 bus enb pu vdd tp w=0.6u l=0.045u
Mn2 bus en pd vss tn w=0.3u l=0.045u
Mn1 pd d vss vss tn w=0.3u l=0.045u
.ends tsbuf

* two blocks drive the result bus; nothing keeps them from both driving, or neither
Xadc d_adc en_adc rbus vdd 0 tsbuf
Xdsp d_dsp en_dsp rbus vdd 0 tsbuf
Mrx_n rout rbus 0 0 tn w=0.2u l=0.045u
Mrx_p rout rbus vdd vdd tp w=0.4u l=0.045u

* precharged status line, routed beside the noisy sensor line
Mpre stat pclk vdd vdd tp w=0.5u l=0.045u
Ma stat flag_a xa 0 tn w=0.3u l=0.045u
Mea xa pclk 0 0 tn w=0.3u l=0.045u
Mb stat flag_b xb 0 tn w=0.3u l=0.045u
Meb xb pclk 0 0 tn w=0.3u l=0.045u
Cstat stat 0 3f
Cnear stat noisy 1.5f
Msx_n sout stat 0 0 tn w=0.2u l=0.045u
Msx_p sout stat vdd vdd tp w=0.4u l=0.045u

* a spare gate whose select was misspelt when the net was renamed
Msp_n spare selx 0 0 tn w=0.2u l=0.045u
Msp_p spare sel vdd vdd tp w=0.4u l=0.045u
* the debug clock was never given a waveform
Mdbg_n dbg dbg_clk 0 0 tn w=0.2u l=0.045u
Mdbg_p dbg dbg_clk vdd vdd tp w=0.4u l=0.045u

vdd vdd 0 1.0
vpclk pclk 0 PULSE(0 1.0 0 20p 20p 0.48n 1n)
.end
