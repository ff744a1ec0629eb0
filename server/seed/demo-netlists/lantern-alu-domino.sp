* Lantern core, integer unit: domino generate/propagate, Manchester carry chain and sum
* (Marrowgate Silicon, invented demo block)
* Schematic netlist with the coupling capacitors layout extraction added (cx_*).
* Sizes in micrometres: .option scale applies to W and L.
.option scale=1e-6
.global vdd vss

* Generate and propagate of one bit: footed domino gates with half keepers, the reference form.
.subckt lad_gp a b clk g p
mpg_pre gx clk vdd vdd pch w=1.0 l=0.25
mpg_kp gx g vdd vdd pch w=0.4 l=0.5
mng_a gx a gs vss nch w=1.0 l=0.25
mng_b gs b gf vss nch w=1.0 l=0.25
mng_f gf clk vss vss nch w=1.0 l=0.25
mpg_o g gx vdd vdd pch w=3.0 l=0.25
mng_o g gx vss vss nch w=1.0 l=0.25
mpp_pre px clk vdd vdd pch w=1.0 l=0.25
mpp_kp px p vdd vdd pch w=0.4 l=0.5
mnp_a px a pf vss nch w=1.0 l=0.25
mnp_b px b pf vss nch w=1.0 l=0.25
mnp_f pf clk vss vss nch w=1.0 l=0.25
mpp_o p px vdd vdd pch w=3.0 l=0.25
mnp_o p px vss vss nch w=1.0 l=0.25
.ends lad_gp

* Four-bit Manchester carry chain. Each carry node cb<i> (active low) is precharged while clk is low,
* pulled low by its generate input and joined to the previous one by its propagate device.
.subckt lad_carry4 cin g0 g1 g2 g3 p0 p1 p2 p3 clk c1 c2 c3 c4 cb3
mi0p cb0 cin vdd vdd pch w=2.0 l=0.25
mi0n cb0 cin vss vss nch w=1.0 l=0.25
mpc1 cb1 clk vdd vdd pch w=1.0 l=0.25
mkc1 cb1 c1 vdd vdd pch w=0.4 l=0.5
mgc1 cb1 g0 cf1 vss nch w=1.0 l=0.25
mfc1 cf1 clk vss vss nch w=1.0 l=0.25
mtc1 cb0 p0 cb1 vss nch w=1.0 l=0.25
mic1p c1 cb1 vdd vdd pch w=3.0 l=0.25
mic1n c1 cb1 vss vss nch w=1.0 l=0.25
mpc2 cb2 clk vdd vdd pch w=1.0 l=0.25
mkc2 cb2 c2 vdd vdd pch w=0.4 l=0.5
mgc2 cb2 g1 cf2 vss nch w=1.0 l=0.25
mfc2 cf2 clk vss vss nch w=1.0 l=0.25
mtc2 cb1 p1 cb2 vss nch w=1.0 l=0.25
mic2p c2 cb2 vdd vdd pch w=3.0 l=0.25
mic2n c2 cb2 vss vss nch w=1.0 l=0.25
* The third keeper was drawn at minimum length: it fights every carry that should fall.
mpc3 cb3 clk vdd vdd pch w=1.0 l=0.25
mkc3 cb3 c3 vdd vdd pch w=1.2 l=0.25
mgc3 cb3 g2 cf3 vss nch w=1.0 l=0.25
mfc3 cf3 clk vss vss nch w=1.0 l=0.25
mtc3 cb2 p2 cb3 vss nch w=1.0 l=0.25
mic3p c3 cb3 vdd vdd pch w=3.0 l=0.25
mic3n c3 cb3 vss vss nch w=1.0 l=0.25
* The last carry node lost its keeper in an ECO.
mpc4 cb4 clk vdd vdd pch w=1.0 l=0.25
mgc4 cb4 g3 cf4 vss nch w=1.0 l=0.25
mfc4 cf4 clk vss vss nch w=1.0 l=0.25
mtc4 cb3 p3 cb4 vss nch w=1.0 l=0.25
mic4p c4 cb4 vdd vdd pch w=3.0 l=0.25
mic4n c4 cb4 vss vss nch w=1.0 l=0.25
* Extracted coupling: the carry wire runs beside the propagate wire of bit 3 for most of its length.
cx_cb2_p3 cb2 p3 12f
.ends lad_carry4

* Sum of bit 3: a domino stage evaluating p3 with the carry. It takes the carry node cb3 itself,
* not its inverted output c3.
.subckt lad_sum3 p3 cb3 clk s3
mps_pre sx clk vdd vdd pch w=1.0 l=0.25
mps_kp sx s3 vdd vdd pch w=0.4 l=0.5
mns_p sx p3 ss1 vss nch w=1.0 l=0.25
mns_c ss1 cb3 ss2 vss nch w=1.0 l=0.25
mns_f ss2 clk vss vss nch w=1.0 l=0.25
mps_o s3 sx vdd vdd pch w=3.0 l=0.25
mns_o s3 sx vss vss nch w=1.0 l=0.25
.ends lad_sum3

* Zero detect of the four sum bits: one tall stack of wide devices under a small node.
.subckt lad_zero4 z0 z1 z2 z3 clk zero
mpz_pre zx clk vdd vdd pch w=0.5 l=0.25
mpz_kp zx zero vdd vdd pch w=0.4 l=0.5
mnz_0 zx z0 zs0 vss nch w=4.0 l=0.25
mnz_1 zs0 z1 zs1 vss nch w=4.0 l=0.25
mnz_2 zs1 z2 zs2 vss nch w=4.0 l=0.25
mnz_3 zs2 z3 zs3 vss nch w=4.0 l=0.25
mnz_f zs3 clk vss vss nch w=4.0 l=0.25
mpz_o zero zx vdd vdd pch w=1.0 l=0.25
mnz_o zero zx vss vss nch w=0.5 l=0.25
.ends lad_zero4

* Overflow flag: precharged from a local inverted copy of the clock, but footed on the clock itself.
.subckt lad_flag c3 c4 clk ovf
mif_p clk_loc clk vdd vdd pch w=1.0 l=0.25
mif_n clk_loc clk vss vss nch w=0.5 l=0.25
mpf_pre fx clk_loc vdd vdd pch w=1.0 l=0.25
mpf_kp fx ovf vdd vdd pch w=0.4 l=0.5
mnf_a fx c3 fs vss nch w=1.0 l=0.25
mnf_b fs c4 ff vss nch w=1.0 l=0.25
mnf_f ff clk vss vss nch w=1.0 l=0.25
mpf_o ovf fx vdd vdd pch w=3.0 l=0.25
mnf_o ovf fx vss vss nch w=1.0 l=0.25
.ends lad_flag

.subckt lantern_alu_slice a0 a1 a2 a3 b0 b1 b2 b3 cin clk s3 zero ovf
xgp0 a0 b0 clk g0 p0 lad_gp
xgp1 a1 b1 clk g1 p1 lad_gp
xgp2 a2 b2 clk g2 p2 lad_gp
xgp3 a3 b3 clk g3 p3 lad_gp
xcy cin g0 g1 g2 g3 p0 p1 p2 p3 clk c1 c2 c3 c4 cb3 lad_carry4
xsum p3 cb3 clk s3 lad_sum3
xz g0 g1 g2 g3 clk zero lad_zero4
xovf c3 c4 clk ovf lad_flag
.ends lantern_alu_slice
