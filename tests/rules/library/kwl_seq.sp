* Keepwell test library: latches, flip-flops and a clock gate
.option scale=1e-6

* transparent-high latch: inverting input, transmission gate, output inverter, clocked-inverter feedback
.subckt kwl_dlxtp_1 D GATE Q VDD VSS
X0 a_27_47# GATE VSS VSS kwl_nfet w=0.42 l=0.15
X1 VDD GATE a_27_47# VDD kwl_pfet w=0.64 l=0.15
X2 a_193_47# a_27_47# VSS VSS kwl_nfet w=0.42 l=0.15
X3 VDD a_27_47# a_193_47# VDD kwl_pfet w=0.64 l=0.15
X4 a_299_47# D VSS VSS kwl_nfet w=0.42 l=0.15
X5 VDD D a_299_47# VDD kwl_pfet w=0.64 l=0.15
X6 a_299_47# a_193_47# a_466_47# VSS kwl_nfet w=0.36 l=0.15
X7 a_466_47# a_27_47# a_299_47# VDD kwl_pfet w=0.42 l=0.15
X8 Q a_466_47# VSS VSS kwl_nfet w=0.65 l=0.15
X9 VDD a_466_47# Q VDD kwl_pfet w=1.0 l=0.15
X10 VDD Q a_639_413# VDD kwl_pfet w=0.42 l=0.15
X11 a_639_413# a_193_47# a_466_47# VDD kwl_pfet w=0.42 l=0.15
X12 a_466_47# a_27_47# a_639_47# VSS kwl_nfet w=0.36 l=0.15
X13 a_639_47# Q VSS VSS kwl_nfet w=0.42 l=0.15
.ends

* transparent-high latch with a clocked (C2MOS) input stage and clocked feedback
.subckt kwl_dlxcm_1 D GATE Q VDD VSS
X0 a_27_47# GATE VSS VSS kwl_nfet w=0.42 l=0.15
X1 VDD GATE a_27_47# VDD kwl_pfet w=0.64 l=0.15
X2 a_193_47# a_27_47# VSS VSS kwl_nfet w=0.42 l=0.15
X3 VDD a_27_47# a_193_47# VDD kwl_pfet w=0.64 l=0.15
X4 VDD D a_281_413# VDD kwl_pfet w=0.64 l=0.15
X5 a_281_413# a_27_47# a_395_47# VDD kwl_pfet w=0.64 l=0.15
X6 a_395_47# a_193_47# a_281_47# VSS kwl_nfet w=0.42 l=0.15
X7 a_281_47# D VSS VSS kwl_nfet w=0.42 l=0.15
X8 Q a_395_47# VSS VSS kwl_nfet w=0.65 l=0.15
X9 VDD a_395_47# Q VDD kwl_pfet w=1.0 l=0.15
X10 VDD Q a_561_413# VDD kwl_pfet w=0.42 l=0.15
X11 a_561_413# a_193_47# a_395_47# VDD kwl_pfet w=0.42 l=0.15
X12 a_395_47# a_27_47# a_561_47# VSS kwl_nfet w=0.36 l=0.15
X13 a_561_47# Q VSS VSS kwl_nfet w=0.42 l=0.15
.ends

* jam latch: a transmission gate writes a node held by a weak, always-on feedback inverter
.subckt kwl_dljam_1 D GATE Q VDD VSS
X0 a_27_47# GATE VSS VSS kwl_nfet w=0.42 l=0.15
X1 VDD GATE a_27_47# VDD kwl_pfet w=0.64 l=0.15
X2 D GATE a_200_47# VSS kwl_nfet w=0.65 l=0.15
X3 a_200_47# a_27_47# D VDD kwl_pfet w=1.0 l=0.15
X4 a_380_47# a_200_47# VSS VSS kwl_nfet w=0.65 l=0.15
X5 VDD a_200_47# a_380_47# VDD kwl_pfet w=1.0 l=0.15
X6 a_200_47# a_380_47# VSS VSS kwl_nfet w=0.42 l=0.6
X7 VDD a_380_47# a_200_47# VDD kwl_pfet w=0.42 l=0.6
X8 Q a_380_47# VSS VSS kwl_nfet w=0.65 l=0.15
X9 VDD a_380_47# Q VDD kwl_pfet w=1.0 l=0.15
.ends

* positive-edge master-slave flip-flop
.subckt kwl_dfxtp_1 CLK D Q VDD VSS
X0 a_27_47# CLK VSS VSS kwl_nfet w=0.42 l=0.15
X1 VDD CLK a_27_47# VDD kwl_pfet w=0.64 l=0.15
X2 a_193_47# a_27_47# VSS VSS kwl_nfet w=0.42 l=0.15
X3 VDD a_27_47# a_193_47# VDD kwl_pfet w=0.64 l=0.15
X4 a_299_47# D VSS VSS kwl_nfet w=0.42 l=0.15
X5 VDD D a_299_47# VDD kwl_pfet w=0.64 l=0.15
X6 a_299_47# a_27_47# a_466_47# VSS kwl_nfet w=0.36 l=0.15
X7 a_466_47# a_193_47# a_299_47# VDD kwl_pfet w=0.42 l=0.15
X8 a_634_47# a_466_47# VSS VSS kwl_nfet w=0.64 l=0.15
X9 VDD a_466_47# a_634_47# VDD kwl_pfet w=0.75 l=0.15
X10 VDD a_634_47# a_561_413# VDD kwl_pfet w=0.42 l=0.15
X11 a_561_413# a_27_47# a_466_47# VDD kwl_pfet w=0.42 l=0.15
X12 a_466_47# a_193_47# a_592_47# VSS kwl_nfet w=0.36 l=0.15
X13 a_592_47# a_634_47# VSS VSS kwl_nfet w=0.42 l=0.15
X14 a_634_47# a_193_47# a_891_47# VSS kwl_nfet w=0.36 l=0.15
X15 a_891_47# a_27_47# a_634_47# VDD kwl_pfet w=0.42 l=0.15
X16 a_1059_47# a_891_47# VSS VSS kwl_nfet w=0.65 l=0.15
X17 VDD a_891_47# a_1059_47# VDD kwl_pfet w=1.0 l=0.15
X18 VDD a_1059_47# a_975_413# VDD kwl_pfet w=0.42 l=0.15
X19 a_975_413# a_193_47# a_891_47# VDD kwl_pfet w=0.42 l=0.15
X20 a_891_47# a_27_47# a_1017_47# VSS kwl_nfet w=0.36 l=0.15
X21 a_1017_47# a_1059_47# VSS VSS kwl_nfet w=0.42 l=0.15
X22 Q a_1059_47# VSS VSS kwl_nfet w=0.65 l=0.15
X23 VDD a_1059_47# Q VDD kwl_pfet w=1.0 l=0.15
.ends

* positive-edge flip-flop with active-high asynchronous reset (NOR in the master, NAND in the slave)
.subckt kwl_dfrtp_1 CLK D RESET Q VDD VSS
X0 a_27_47# CLK VSS VSS kwl_nfet w=0.42 l=0.15
X1 VDD CLK a_27_47# VDD kwl_pfet w=0.64 l=0.15
X2 a_193_47# a_27_47# VSS VSS kwl_nfet w=0.42 l=0.15
X3 VDD a_27_47# a_193_47# VDD kwl_pfet w=0.64 l=0.15
X4 a_299_47# D VSS VSS kwl_nfet w=0.42 l=0.15
X5 VDD D a_299_47# VDD kwl_pfet w=0.64 l=0.15
X6 a_75_199# RESET VSS VSS kwl_nfet w=0.42 l=0.15
X7 VDD RESET a_75_199# VDD kwl_pfet w=0.64 l=0.15
X8 a_299_47# a_27_47# a_466_47# VSS kwl_nfet w=0.36 l=0.15
X9 a_466_47# a_193_47# a_299_47# VDD kwl_pfet w=0.42 l=0.15
X10 a_634_47# a_466_47# VSS VSS kwl_nfet w=0.64 l=0.15
X11 VSS RESET a_634_47# VSS kwl_nfet w=0.64 l=0.15
X12 VDD a_466_47# a_652_413# VDD kwl_pfet w=1.0 l=0.15
X13 a_652_413# RESET a_634_47# VDD kwl_pfet w=1.0 l=0.15
X14 VDD a_634_47# a_561_413# VDD kwl_pfet w=0.42 l=0.15
X15 a_561_413# a_27_47# a_466_47# VDD kwl_pfet w=0.42 l=0.15
X16 a_466_47# a_193_47# a_592_47# VSS kwl_nfet w=0.36 l=0.15
X17 a_592_47# a_634_47# VSS VSS kwl_nfet w=0.42 l=0.15
X18 a_634_47# a_193_47# a_891_47# VSS kwl_nfet w=0.36 l=0.15
X19 a_891_47# a_27_47# a_634_47# VDD kwl_pfet w=0.42 l=0.15
X20 a_1059_47# a_891_47# a_1121_47# VSS kwl_nfet w=0.65 l=0.15
X21 a_1121_47# a_75_199# VSS VSS kwl_nfet w=0.65 l=0.15
X22 VDD a_891_47# a_1059_47# VDD kwl_pfet w=1.0 l=0.15
X23 a_1059_47# a_75_199# VDD VDD kwl_pfet w=1.0 l=0.15
X24 VDD a_1059_47# a_975_413# VDD kwl_pfet w=0.42 l=0.15
X25 a_975_413# a_193_47# a_891_47# VDD kwl_pfet w=0.42 l=0.15
X26 a_891_47# a_27_47# a_1017_47# VSS kwl_nfet w=0.36 l=0.15
X27 a_1017_47# a_1059_47# VSS VSS kwl_nfet w=0.42 l=0.15
X28 Q a_1059_47# VSS VSS kwl_nfet w=0.65 l=0.15
X29 VDD a_1059_47# Q VDD kwl_pfet w=1.0 l=0.15
.ends

* latch-based clock gate: enable latched while CLK is low, GCLK = CLK AND the latched enable
.subckt kwl_icgtp_1 CLK EN GCLK VDD VSS
X0 a_27_47# CLK VSS VSS kwl_nfet w=0.42 l=0.15
X1 VDD CLK a_27_47# VDD kwl_pfet w=0.64 l=0.15
X2 a_111_47# EN VSS VSS kwl_nfet w=0.42 l=0.15
X3 VDD EN a_111_47# VDD kwl_pfet w=0.64 l=0.15
X4 a_111_47# a_27_47# a_287_47# VSS kwl_nfet w=0.36 l=0.15
X5 a_287_47# CLK a_111_47# VDD kwl_pfet w=0.42 l=0.15
X6 a_455_47# a_287_47# VSS VSS kwl_nfet w=0.42 l=0.15
X7 VDD a_287_47# a_455_47# VDD kwl_pfet w=0.64 l=0.15
X8 VDD a_455_47# a_393_413# VDD kwl_pfet w=0.42 l=0.15
X9 a_393_413# a_27_47# a_287_47# VDD kwl_pfet w=0.42 l=0.15
X10 a_287_47# CLK a_393_47# VSS kwl_nfet w=0.36 l=0.15
X11 a_393_47# a_455_47# VSS VSS kwl_nfet w=0.42 l=0.15
X12 a_641_47# CLK a_725_47# VSS kwl_nfet w=0.65 l=0.15
X13 a_725_47# a_455_47# VSS VSS kwl_nfet w=0.65 l=0.15
X14 VDD CLK a_641_47# VDD kwl_pfet w=1.0 l=0.15
X15 a_641_47# a_455_47# VDD VDD kwl_pfet w=1.0 l=0.15
X16 GCLK a_641_47# VSS VSS kwl_nfet w=0.65 l=0.15
X17 VDD a_641_47# GCLK VDD kwl_pfet w=1.0 l=0.15
.ends
