* Lantern core, scan chain slice: pass-gate multiplexers, latches and the scan-enable decoder
* (Marrowgate Silicon, invented demo block)
* Sizes in micrometres: .option scale applies to W and L.
.option scale=1e-6
.global vdd vss
* The bypass device is a high-threshold n-channel transistor (level-1 card from the team's model file).
.model lsc_nhvt nmos level=1 vto=0.8 kp=115e-6 lambda=0.06 gamma=0.4 phi=0.6

.subckt lsc_inv a y
mp y a vdd vdd pch w=1.2 l=0.25
mn y a vss vss nch w=0.6 l=0.25
.ends lsc_inv

* Eight-to-one observation multiplexer: three levels of transmission gates, then a retiming gate
* before the capture latch (four devices in series).
.subckt lsc_obsmux d0 d1 d2 d3 d4 d5 d6 d7 s0 s0_b s1 s1_b s2 s2_b ret ret_b q
mn00 d0 s0_b m00 vss nch w=0.6 l=0.25
mp00 d0 s0 m00 vdd pch w=1.2 l=0.25
mn01 d1 s0 m00 vss nch w=0.6 l=0.25
mp01 d1 s0_b m00 vdd pch w=1.2 l=0.25
mn02 d2 s0_b m01 vss nch w=0.6 l=0.25
mp02 d2 s0 m01 vdd pch w=1.2 l=0.25
mn03 d3 s0 m01 vss nch w=0.6 l=0.25
mp03 d3 s0_b m01 vdd pch w=1.2 l=0.25
mn04 d4 s0_b m02 vss nch w=0.6 l=0.25
mp04 d4 s0 m02 vdd pch w=1.2 l=0.25
mn05 d5 s0 m02 vss nch w=0.6 l=0.25
mp05 d5 s0_b m02 vdd pch w=1.2 l=0.25
mn06 d6 s0_b m03 vss nch w=0.6 l=0.25
mp06 d6 s0 m03 vdd pch w=1.2 l=0.25
mn07 d7 s0 m03 vss nch w=0.6 l=0.25
mp07 d7 s0_b m03 vdd pch w=1.2 l=0.25
mn10 m00 s1_b m10 vss nch w=0.6 l=0.25
mp10 m00 s1 m10 vdd pch w=1.2 l=0.25
mn11 m01 s1 m10 vss nch w=0.6 l=0.25
mp11 m01 s1_b m10 vdd pch w=1.2 l=0.25
mn12 m02 s1_b m11 vss nch w=0.6 l=0.25
mp12 m02 s1 m11 vdd pch w=1.2 l=0.25
mn13 m03 s1 m11 vss nch w=0.6 l=0.25
mp13 m03 s1_b m11 vdd pch w=1.2 l=0.25
mn20 m10 s2_b m20 vss nch w=0.6 l=0.25
mp20 m10 s2 m20 vdd pch w=1.2 l=0.25
mn21 m11 s2 m20 vss nch w=0.6 l=0.25
mp21 m11 s2_b m20 vdd pch w=1.2 l=0.25
mnr m20 ret lat vss nch w=0.6 l=0.25
mpr m20 ret_b lat vdd pch w=1.2 l=0.25
mlp q lat vdd vdd pch w=1.2 l=0.25
mln q lat vss vss nch w=0.6 l=0.25
mfp lat q vdd vdd pch w=0.4 l=1.0
mfn lat q vss vss nch w=0.4 l=1.0
.ends lsc_obsmux

* Scan cell: a transparent-low latch on the scan input, kept by a clocked feedback inverter.
.subckt lsc_cell d clk q
xck clk ck_b lsc_inv
mtn d ck_b m vss nch w=0.6 l=0.25
mtp d clk m vdd pch w=1.2 l=0.25
xq m q lsc_inv
mf1 vdd q f1 vdd pch w=0.6 l=0.25
mf2 f1 ck_b m vdd pch w=0.6 l=0.25
mf3 m clk f2 vss nch w=0.3 l=0.25
mf4 f2 q vss vss nch w=0.3 l=0.25
.ends lsc_cell

* Bypass select: a single high-threshold n-channel pass device into a receiver skewed for a fast rising output.
.subckt lsc_bypass d sel y
mby d sel byp vss lsc_nhvt w=0.6 l=0.25
mbp y byp vdd vdd pch w=3.6 l=0.25
mbn y byp vss vss nch w=0.6 l=0.25
.ends lsc_bypass

* Scan-enable decoder, drawn ratioed: an always-on pull-up against two pull-downs, too strong for them.
.subckt lsc_sedec sen tm se
mpl se vss vdd vdd pch w=1.5 l=0.25
mna se sen vss vss nch w=0.6 l=0.25
mnb se tm vss vss nch w=0.6 l=0.25
.ends lsc_sedec

* Test-mode level buffer, two stages with n-channel loads (gate and drain on the supply): the first with a
* driver as wide as its load, the second with one three times wider.
.subckt lsc_tmbuf tm tmo
mld1 vdd vdd tmi vss nch w=0.6 l=0.25
mdr1 tmi tm vss vss nch w=0.6 l=0.25
mld2 vdd vdd tmo vss nch w=0.6 l=0.25
mdr2 tmo tmi vss vss nch w=1.8 l=0.25
.ends lsc_tmbuf

* Spare return path kept from an earlier revision: its pass devices now join only each other.
.subckt lsc_spare sen out
msp1 sr_a sen sr_b vss nch w=0.6 l=0.25
msp2 sr_b sen sr_c vss nch w=0.6 l=0.25
msp3 out sr_c vss vss nch w=0.6 l=0.25
.ends lsc_spare

.subckt lantern_scan_slice d0 d1 d2 d3 d4 d5 d6 d7 s0 s1 s2 ret si clk sen tm byp_sel q obs byp
xs0 s0 s0_b lsc_inv
xs1 s1 s1_b lsc_inv
xs2 s2 s2_b lsc_inv
xr ret ret_b lsc_inv
xobs d0 d1 d2 d3 d4 d5 d6 d7 s0 s0_b s1 s1_b s2 s2_b ret ret_b obs lsc_obsmux
xc0 si clk q0 lsc_cell
xc1 q0 clk q lsc_cell
xby q0 byp_sel byp lsc_bypass
xdec sen tm se lsc_sedec
xtm tm tmo lsc_tmbuf
xsp se spare_out lsc_spare
* The retiming clock driver was netlisted with its width in metres.
mck_p ret_buf clk vdd vdd pch w=1.2e-6 l=0.25
mck_n ret_buf clk vss vss nch w=0.6 l=0.25
.ends lantern_scan_slice
