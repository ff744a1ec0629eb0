* Keepwell test library: inverters, buffers, NAND and NOR up to four inputs
.option scale=1e-6

.subckt kwl_inv_1 A Y VDD VSS
X0 Y A VSS VSS kwl_nfet w=0.65 l=0.15
X1 VDD A Y VDD kwl_pfet w=1.0 l=0.15
.ends

.subckt kwl_inv_4 A Y VDD VSS
X0 Y A VSS VSS kwl_nfet w=0.65 l=0.15
X1 VSS A Y VSS kwl_nfet w=0.65 l=0.15
X2 Y A VDD VDD kwl_pfet w=1.0 l=0.15
X3 VDD A Y VDD kwl_pfet w=1.0 l=0.15
X4 Y A VSS VSS kwl_nfet w=0.65 l=0.15
X5 VSS A Y VSS kwl_nfet w=0.65 l=0.15
X6 Y A VDD VDD kwl_pfet w=1.0 l=0.15
X7 VDD A Y VDD kwl_pfet w=1.0 l=0.15
.ends

.subckt kwl_buf_2 A Y VDD VSS
X0 a_27_47# A VSS VSS kwl_nfet w=0.42 l=0.15
X1 Y a_27_47# VSS VSS kwl_nfet w=0.65 l=0.15
X2 VDD A a_27_47# VDD kwl_pfet w=0.64 l=0.15
X3 VSS a_27_47# Y VSS kwl_nfet w=0.65 l=0.15
X4 Y a_27_47# VDD VDD kwl_pfet w=1.0 l=0.15
X5 VDD a_27_47# Y VDD kwl_pfet w=1.0 l=0.15
.ends

.subckt kwl_nand2_1 A B Y VDD VSS
X0 Y A a_113_47# VSS kwl_nfet w=0.65 l=0.15
X1 VDD B Y VDD kwl_pfet w=1.0 l=0.15
X2 a_113_47# B VSS VSS kwl_nfet w=0.65 l=0.15
X3 Y A VDD VDD kwl_pfet w=1.0 l=0.15
.ends

.subckt kwl_nand3_1 A B C Y VDD VSS
X0 a_109_47# B a_193_47# VSS kwl_nfet w=0.65 l=0.15
X1 Y C VDD VDD kwl_pfet w=1.0 l=0.15
X2 a_193_47# A VSS VSS kwl_nfet w=0.65 l=0.15
X3 VDD B Y VDD kwl_pfet w=1.0 l=0.15
X4 Y C a_109_47# VSS kwl_nfet w=0.65 l=0.15
X5 Y A VDD VDD kwl_pfet w=1.0 l=0.15
.ends

.subckt kwl_nand4_1 A B C D Y VDD VSS
X0 Y D a_307_47# VSS kwl_nfet w=0.65 l=0.15
X1 a_307_47# C a_221_47# VSS kwl_nfet w=0.65 l=0.15
X2 a_221_47# B a_135_47# VSS kwl_nfet w=0.65 l=0.15
X3 a_135_47# A VSS VSS kwl_nfet w=0.65 l=0.15
X4 VDD A Y VDD kwl_pfet w=1.0 l=0.15
X5 Y B VDD VDD kwl_pfet w=1.0 l=0.15
X6 VDD C Y VDD kwl_pfet w=1.0 l=0.15
X7 Y D VDD VDD kwl_pfet w=1.0 l=0.15
.ends

.subckt kwl_nor2_1 A B Y VDD VSS
X0 VSS A Y VSS kwl_nfet w=0.65 l=0.15
X1 Y B a_109_297# VDD kwl_pfet w=1.0 l=0.15
X2 Y B VSS VSS kwl_nfet w=0.65 l=0.15
X3 a_109_297# A VDD VDD kwl_pfet w=1.0 l=0.15
.ends

.subckt kwl_nor3_1 A B C Y VDD VSS
X0 a_191_297# B a_109_297# VDD kwl_pfet w=1.0 l=0.15
X1 Y A VSS VSS kwl_nfet w=0.65 l=0.15
X2 a_109_297# A VDD VDD kwl_pfet w=1.0 l=0.15
X3 VSS B Y VSS kwl_nfet w=0.65 l=0.15
X4 Y C a_191_297# VDD kwl_pfet w=1.0 l=0.15
X5 Y C VSS VSS kwl_nfet w=0.65 l=0.15
.ends

.subckt kwl_nor4_1 A B C D Y VDD VSS
X0 Y D VSS VSS kwl_nfet w=0.65 l=0.15
X1 VSS C Y VSS kwl_nfet w=0.65 l=0.15
X2 Y B VSS VSS kwl_nfet w=0.65 l=0.15
X3 VSS A Y VSS kwl_nfet w=0.65 l=0.15
X4 a_109_297# A VDD VDD kwl_pfet w=1.0 l=0.15
X5 a_191_297# B a_109_297# VDD kwl_pfet w=1.0 l=0.15
X6 a_277_297# C a_191_297# VDD kwl_pfet w=1.0 l=0.15
X7 Y D a_277_297# VDD kwl_pfet w=1.0 l=0.15
.ends
