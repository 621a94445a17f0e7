Tern sensor hub: 2x2 one-transistor calibration store (Quillmoor Labs, memory team)
* Each cell is an access device and a storage capacitor. Word line wl0 is refreshed every 64 us.
.lib models/tern45.lib tt
* tidemark: clock wl0 period=64u high=10n
* tidemark: clock wl1 period=64u high=10n delay=32u
* tidemark: input bl0 bl1

.subckt cell1t bl wl vss
Macc bl wl sn vss tn w=0.12u l=0.06u
Cs sn vss 20f
.ends cell1t

X00 bl0 wl0 0 cell1t
X01 bl1 wl0 0 cell1t
X10 bl0 wl1 0 cell1t
X11 bl1 wl1 0 cell1t
.end
