* Keepwell test library: a hierarchical block of the library's cells. A gated clock drives a three-bit
* shift register; the clock reaches each flip-flop's CLK port through the clock gate and a buffer.
.option scale=1e-6
.include kwl_gates.sp
.include kwl_seq.sp
.include kwl_complex.sp

.subckt kwl_shift3 CLK EN SI SEL Q2 MUXO VDD VSS
Xgate CLK EN gclk VDD VSS kwl_icgtp_1
Xbuf gclk gclk_b VDD VSS kwl_buf_2
Xf0 gclk_b SI q0 VDD VSS kwl_dfxtp_1
Xf1 gclk_b q0 q1 VDD VSS kwl_dfxtp_1
Xf2 gclk_b q1 Q2 VDD VSS kwl_dfxtp_1
Xm q0 q1 SEL MUXO VDD VSS kwl_muxi2_1
Xl q1 gclk_b lq VDD VSS kwl_dlxtp_1
Xn lq Q2 nq VDD VSS kwl_nand2_1
Xo nq MUXO unused VDD VSS kwl_nor2_1
.ends
