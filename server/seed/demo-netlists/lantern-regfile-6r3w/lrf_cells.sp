* Lantern core, register file: leaf cells (Marrowgate Silicon, invented demo block)
* Sizes in micrometres: .option scale applies to W and L.
.option scale=1e-6
.global vdd vss

* Bit cell: cross-coupled storage, one write port, two single-ended read ports
* (a read word line over a stack gated by the stored value, discharging a precharged read bit line).
.subckt lrf_bit wwl wbl rwl0 rbl0 rwl1 rbl1
mst1p q qb vdd vdd pch w=0.4 l=0.25
mst1n q qb vss vss nch w=0.6 l=0.25
mst2p qb q vdd vdd pch w=0.4 l=0.25
mst2n qb q vss vss nch w=0.6 l=0.25
mwr wbl wwl q vss nch w=0.6 l=0.25
mr0a rbl0 rwl0 r0m vss nch w=0.5 l=0.25
mr0b r0m qb vss vss nch w=0.5 l=0.25
mr1a rbl1 rwl1 r1m vss nch w=0.5 l=0.25
mr1b r1m qb vss vss nch w=0.5 l=0.25
.ends lrf_bit

* Read bit line precharge: on while its enable is low.
.subckt lrf_pre pre_b rbl
mpre rbl pre_b vdd vdd pch w=2.0 l=0.25
.ends lrf_pre

* Sense stage with a half keeper fed back from its inverter.
.subckt lrf_sense rbl dout
msp dout rbl vdd vdd pch w=3.0 l=0.25
msn dout rbl vss vss nch w=1.0 l=0.25
mkp rbl dout vdd vdd pch w=0.3 l=0.5
.ends lrf_sense

* Sense stage without a keeper, used on the second read port to save area.
.subckt lrf_sense_lite rbl dout
msp dout rbl vdd vdd pch w=3.0 l=0.25
msn dout rbl vss vss nch w=1.0 l=0.25
.ends lrf_sense_lite

* Write driver: the write bit line follows din while wen is high.
.subckt lrf_wdrv din wen wbl
mdi1 dinb din vdd vdd pch w=1.0 l=0.25
mdi2 dinb din vss vss nch w=0.5 l=0.25
mwp1 wbl dinb t1 vdd pch w=2.0 l=0.25
mwp2 t1 wenb vdd vdd pch w=2.0 l=0.25
mwn1 wbl dinb t2 vdd nch w=1.0 l=0.25
mwn2 t2 wen vss vss nch w=1.0 l=0.25
mwi1 wenb wen vdd vdd pch w=1.0 l=0.25
mwi2 wenb wen vss vss nch w=0.5 l=0.25
.ends lrf_wdrv

* Read clock: the precharge enable is the clock, buffered (low while clk is low), and the inverted clock for the word lines.
.subckt lrf_rclk clk ck_n pre_b
mc1p ck_n clk vdd vdd pch w=2.0 l=0.25
mc1n ck_n clk vss vss nch w=1.0 l=0.25
mc2p pre_b ck_n vdd vdd pch w=4.0 l=0.25
mc2n pre_b ck_n vss vss nch w=2.0 l=0.25
.ends lrf_rclk

* Read word-line driver: rwl = NOR(dec_b, ck_n), high only while clk is high and the entry is selected.
.subckt lrf_wldrv dec_b ck_n rwl
mw1p wm dec_b vdd vdd pch w=2.0 l=0.25
mw2p rwl ck_n wm vdd pch w=2.0 l=0.25
mw1n rwl dec_b vss vss nch w=0.5 l=0.25
mw2n rwl ck_n vss vss nch w=0.5 l=0.25
.ends lrf_wldrv
