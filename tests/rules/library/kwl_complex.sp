* Keepwell test library: AND-OR-INVERT and OR-AND-INVERT gates, XOR, multiplexers, tri-state buffer
.option scale=1e-6

* Y = !((A1 & A2) | B1)
.subckt kwl_a21oi_1 A1 A2 B1 Y VDD VSS
X0 VDD A1 a_109_297# VDD kwl_pfet w=1.0 l=0.15
X1 Y A1 a_109_47# VSS kwl_nfet w=0.65 l=0.15
X2 a_109_297# A2 VDD VDD kwl_pfet w=1.0 l=0.15
X3 a_109_47# A2 VSS VSS kwl_nfet w=0.65 l=0.15
X4 Y B1 a_109_297# VDD kwl_pfet w=1.0 l=0.15
X5 VSS B1 Y VSS kwl_nfet w=0.65 l=0.15
.ends

* Y = !((A1 & A2) | (B1 & B2))
.subckt kwl_a22oi_1 A1 A2 B1 B2 Y VDD VSS
X0 a_71_297# B2 Y VDD kwl_pfet w=1.0 l=0.15
X1 Y B1 a_71_297# VDD kwl_pfet w=1.0 l=0.15
X2 VDD A1 a_71_297# VDD kwl_pfet w=1.0 l=0.15
X3 a_71_297# A2 VDD VDD kwl_pfet w=1.0 l=0.15
X4 Y A1 a_61_47# VSS kwl_nfet w=0.65 l=0.15
X5 a_61_47# A2 VSS VSS kwl_nfet w=0.65 l=0.15
X6 VSS B2 a_225_47# VSS kwl_nfet w=0.65 l=0.15
X7 a_225_47# B1 Y VSS kwl_nfet w=0.65 l=0.15
.ends

* Y = !(((A1 & A2) | B1) | C1)
.subckt kwl_a211oi_1 A1 A2 B1 C1 Y VDD VSS
X0 a_79_297# A1 VDD VDD kwl_pfet w=1.0 l=0.15
X1 VDD A2 a_79_297# VDD kwl_pfet w=1.0 l=0.15
X2 a_79_297# B1 a_301_297# VDD kwl_pfet w=1.0 l=0.15
X3 a_301_297# C1 Y VDD kwl_pfet w=1.0 l=0.15
X4 Y A1 a_79_47# VSS kwl_nfet w=0.65 l=0.15
X5 a_79_47# A2 VSS VSS kwl_nfet w=0.65 l=0.15
X6 VSS B1 Y VSS kwl_nfet w=0.65 l=0.15
X7 Y C1 VSS VSS kwl_nfet w=0.65 l=0.15
.ends

* Y = !((A1 | A2) & B1)
.subckt kwl_o21ai_1 A1 A2 B1 Y VDD VSS
X0 a_109_297# A1 VDD VDD kwl_pfet w=1.0 l=0.15
X1 Y A2 a_109_297# VDD kwl_pfet w=1.0 l=0.15
X2 VDD B1 Y VDD kwl_pfet w=1.0 l=0.15
X3 VSS A1 a_27_47# VSS kwl_nfet w=0.65 l=0.15
X4 a_27_47# A2 VSS VSS kwl_nfet w=0.65 l=0.15
X5 Y B1 a_27_47# VSS kwl_nfet w=0.65 l=0.15
.ends

* Y = !((A1 | A2) & (B1 | B2))
.subckt kwl_o22ai_1 A1 A2 B1 B2 Y VDD VSS
X0 VDD B1 a_307_297# VDD kwl_pfet w=1.0 l=0.15
X1 a_307_297# B2 Y VDD kwl_pfet w=1.0 l=0.15
X2 Y A2 a_109_297# VDD kwl_pfet w=1.0 l=0.15
X3 a_109_297# A1 VDD VDD kwl_pfet w=1.0 l=0.15
X4 VSS A1 a_27_47# VSS kwl_nfet w=0.65 l=0.15
X5 a_27_47# A2 VSS VSS kwl_nfet w=0.65 l=0.15
X6 Y B1 a_27_47# VSS kwl_nfet w=0.65 l=0.15
X7 a_27_47# B2 Y VSS kwl_nfet w=0.65 l=0.15
.ends

* Y = A ^ B, complementary: Y = !(A & B | !A & !B) from inverted inputs
.subckt kwl_xor2_1 A B Y VDD VSS
X0 a_35_47# A VSS VSS kwl_nfet w=0.42 l=0.15
X1 VDD A a_35_47# VDD kwl_pfet w=0.64 l=0.15
X2 a_185_47# B VSS VSS kwl_nfet w=0.42 l=0.15
X3 VDD B a_185_47# VDD kwl_pfet w=0.64 l=0.15
X4 Y A a_279_47# VSS kwl_nfet w=0.65 l=0.15
X5 a_279_47# B VSS VSS kwl_nfet w=0.65 l=0.15
X6 Y a_35_47# a_389_47# VSS kwl_nfet w=0.65 l=0.15
X7 a_389_47# a_185_47# VSS VSS kwl_nfet w=0.65 l=0.15
X8 VDD A a_279_297# VDD kwl_pfet w=1.0 l=0.15
X9 a_279_297# a_35_47# Y VDD kwl_pfet w=1.0 l=0.15
X10 VDD B a_279_297# VDD kwl_pfet w=1.0 l=0.15
X11 a_279_297# a_185_47# Y VDD kwl_pfet w=1.0 l=0.15
.ends

* two-input multiplexer: transmission gates on a local select pair, then an output inverter (Y = !(S ? A1 : A0))
.subckt kwl_muxi2_1 A0 A1 S Y VDD VSS
X0 a_193_47# S VSS VSS kwl_nfet w=0.42 l=0.15
X1 VDD S a_193_47# VDD kwl_pfet w=0.64 l=0.15
X2 A0 a_193_47# a_304_47# VSS kwl_nfet w=0.65 l=0.15
X3 a_304_47# S A0 VDD kwl_pfet w=1.0 l=0.15
X4 A1 S a_304_47# VSS kwl_nfet w=0.65 l=0.15
X5 a_304_47# a_193_47# A1 VDD kwl_pfet w=1.0 l=0.15
X6 Y a_304_47# VSS VSS kwl_nfet w=0.65 l=0.15
X7 VDD a_304_47# Y VDD kwl_pfet w=1.0 l=0.15
.ends

* four-input multiplexer: a tree of transmission gates, two levels, then a buffer
.subckt kwl_mux4_1 A0 A1 A2 A3 S0 S1 X VDD VSS
X0 a_27_47# S0 VSS VSS kwl_nfet w=0.42 l=0.15
X1 VDD S0 a_27_47# VDD kwl_pfet w=0.64 l=0.15
X2 a_247_47# S1 VSS VSS kwl_nfet w=0.42 l=0.15
X3 VDD S1 a_247_47# VDD kwl_pfet w=0.64 l=0.15
X4 A0 a_27_47# a_411_47# VSS kwl_nfet w=0.65 l=0.15
X5 a_411_47# S0 A0 VDD kwl_pfet w=1.0 l=0.15
X6 A1 S0 a_411_47# VSS kwl_nfet w=0.65 l=0.15
X7 a_411_47# a_27_47# A1 VDD kwl_pfet w=1.0 l=0.15
X8 A2 a_27_47# a_757_47# VSS kwl_nfet w=0.65 l=0.15
X9 a_757_47# S0 A2 VDD kwl_pfet w=1.0 l=0.15
X10 A3 S0 a_757_47# VSS kwl_nfet w=0.65 l=0.15
X11 a_757_47# a_27_47# A3 VDD kwl_pfet w=1.0 l=0.15
X12 a_411_47# a_247_47# a_923_47# VSS kwl_nfet w=0.65 l=0.15
X13 a_923_47# S1 a_411_47# VDD kwl_pfet w=1.0 l=0.15
X14 a_757_47# S1 a_923_47# VSS kwl_nfet w=0.65 l=0.15
X15 a_923_47# a_247_47# a_757_47# VDD kwl_pfet w=1.0 l=0.15
X16 a_1281_47# a_923_47# VSS VSS kwl_nfet w=0.42 l=0.15
X17 VDD a_923_47# a_1281_47# VDD kwl_pfet w=0.64 l=0.15
X18 X a_1281_47# VSS VSS kwl_nfet w=0.65 l=0.15
X19 VDD a_1281_47# X VDD kwl_pfet w=1.0 l=0.15
.ends

* tri-state inverting buffer: Z = !A when TE is high, floating otherwise
.subckt kwl_einvp_1 A TE Z VDD VSS
X0 a_21_47# TE VSS VSS kwl_nfet w=0.42 l=0.15
X1 VDD TE a_21_47# VDD kwl_pfet w=0.64 l=0.15
X2 a_204_297# a_21_47# VDD VDD kwl_pfet w=1.0 l=0.15
X3 Z A a_204_297# VDD kwl_pfet w=1.0 l=0.15
X4 a_204_47# TE VSS VSS kwl_nfet w=0.65 l=0.15
X5 Z A a_204_47# VSS kwl_nfet w=0.65 l=0.15
.ends
