// An invented two-file netlist set of the demo scenario (Marrowgate's Lantern tag compare):
// a dynamic match line with precharge, footer, evaluate pairs, keeper and output inverter, a
// chain of buffers with enhancement (gate on VDD) loads, and four n-channel pass devices in
// series before an inverter in the scan path. The browser journey
// uploads it when the demo has no finished run with a dynamic-node finding.

export const TAG_BIT = `* Lantern tag compare: one match-line bit slice (invented demo netlist)
.include "lantern_cells.sp"
.subckt lt_match_bit clk a0 b0 a1 b1 hit vdd vss
* precharge of the dynamic match line
Mpre ml clk vdd vdd pch w=0.42u l=0.25u
* evaluate: two series pairs onto a shared footer
Mfoot foot clk vss vss nch w=1.2u l=0.25u
Ma0 ml a0 x0 vss nch w=0.84u l=0.25u
Mb0 x0 b0 foot vss nch w=0.84u l=0.25u
Ma1 ml a1 x1 vss nch w=0.84u l=0.25u
Mb1 x1 b1 foot vss nch w=0.84u l=0.25u
* keeper fed back from the output
Mkeep ml hit vdd vdd pch w=0.3u l=0.5u
* output inverter
Mhp hit ml vdd vdd pch w=0.9u l=0.25u
Mhn hit ml vss vss nch w=0.42u l=0.25u
.ends lt_match_bit

.subckt lt_tag_slice clk a0 b0 a1 b1 hit scan_in scan_out vdd vss
Xbit clk a0 b0 a1 b1 hit vdd vss lt_match_bit
Xs1 scan_in s1 vdd vss lt_load_buf
Xs2 s1 s2 vdd vss lt_load_buf
Xs3 s2 s3 vdd vss lt_load_buf
Xs4 s3 s4 vdd vss lt_load_buf
Xsp s4 clk a0 b0 a1 scan_out vdd vss lt_pass4
.ends lt_tag_slice
`;

export const CELLS = `* Lantern shared cells (invented demo netlist)
* inverting buffer with an enhancement load: its gain stays below one
.subckt lt_load_buf in out vdd vss
Mload vdd vdd out vss nch w=0.5u l=0.25u
Mdrv out in vss vss nch w=0.5u l=0.25u
.ends lt_load_buf

* four n-channel pass devices in series, then the restoring inverter
.subckt lt_pass4 d g0 g1 g2 g3 q vdd vss
Mp0 d g0 n1 vss nch w=0.5u l=0.25u
Mp1 n1 g1 n2 vss nch w=0.5u l=0.25u
Mp2 n2 g2 n3 vss nch w=0.5u l=0.25u
Mp3 n3 g3 n4 vss nch w=0.5u l=0.25u
Mrp q n4 vdd vdd pch w=0.9u l=0.25u
Mrn q n4 vss vss nch w=0.42u l=0.25u
.ends lt_pass4
`;

export const NETLIST_SET = [
  { path: 'lantern_tag_bit.sp', text: TAG_BIT },
  { path: 'lantern_cells.sp', text: CELLS },
];
