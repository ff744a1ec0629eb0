* Lantern core, scan chain slice (Marrowgate Silicon, invented demo block)
* A scan mux in front of a static latch, and the decoder of the scan enable.
* Sizes in micrometres: .option scale applies to W and L.
.option scale=1e-6

* Inverter used by the mux select and the latch loop.
.subckt lsc_inv a y vdd vss
mp1 y a vdd vdd pch w=1.2 l=0.25
mn1 y a vss vss nch w=0.6 l=0.25
.ends lsc_inv

* Scan mux: d when se is low, si when se is high, through transmission gates.
.subckt lsc_mux2 d si se y vdd vss
xsel se seb vdd vss lsc_inv
mpd y seb d vdd pch w=0.8 l=0.25
mnd y se_n d vss nch w=0.6 l=0.25
mps y se si vdd pch w=0.8 l=0.25
mns y seb si vss nch w=0.6 l=0.25
xsen seb se_n vdd vss lsc_inv
.ends lsc_mux2

* Scan-enable decoder, drawn ratioed: an always-on pull-up against one pull-down.
* The pull-up is too strong for the pull-down it fights.
.subckt lsc_sedec sen se vdd vss
mpl se vss vdd vdd pch w=1.5 l=0.25
mnd se sen vss vss nch w=0.6 l=0.25
.ends lsc_sedec

* One scan cell: mux, then a latch kept by a weak feedback inverter.
.subckt lsc_cell d si se clk q vdd vss
xmux d si se m vdd vss lsc_mux2
mpt l clkb m vdd pch w=0.8 l=0.25
mnt l clk m vss nch w=0.6 l=0.25
xclk clk clkb vdd vss lsc_inv
xfwd l q vdd vss lsc_inv
mpf l q vdd vdd pch w=0.4 l=1
mnf l q vss vss nch w=0.4 l=1
.ends lsc_cell

.subckt lantern_scan_slice d0 d1 si sen clk q0 q1 vdd vss
xdec sen se vdd vss lsc_sedec
x0 d0 si se clk q0 vdd vss lsc_cell
x1 d1 q0 se clk q1 vdd vss lsc_cell
.ends lantern_scan_slice
