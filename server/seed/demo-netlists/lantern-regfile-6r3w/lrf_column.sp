* Lantern core, register file: one bit column of eight entries (Marrowgate Silicon, invented demo block)
* The read bit lines rbl0 and rbl1 run through the column: precharge, eight bit cells and a sense stage each.
* The read word lines are qualified by the clock in their drivers, so they are low while the bit lines precharge.
.include lrf_cells.sp

.subckt lrf_column clk din wen
+ wwl0 wwl1 wwl2 wwl3 wwl4 wwl5 wwl6 wwl7
+ rdec0_b0 rdec0_b1 rdec0_b2 rdec0_b3 rdec0_b4 rdec0_b5 rdec0_b6 rdec0_b7
+ rdec1_b0 rdec1_b1 rdec1_b2 rdec1_b3 rdec1_b4 rdec1_b5 rdec1_b6 rdec1_b7
+ dout0 dout1
xclk clk ck_n pre_b lrf_rclk
xwd din wen wbl lrf_wdrv
xpre0 pre_b rbl0 lrf_pre
xpre1 pre_b rbl1 lrf_pre
xwl0_0 rdec0_b0 ck_n rwl0_0 lrf_wldrv
xwl1_0 rdec1_b0 ck_n rwl1_0 lrf_wldrv
xwl0_1 rdec0_b1 ck_n rwl0_1 lrf_wldrv
xwl1_1 rdec1_b1 ck_n rwl1_1 lrf_wldrv
xwl0_2 rdec0_b2 ck_n rwl0_2 lrf_wldrv
xwl1_2 rdec1_b2 ck_n rwl1_2 lrf_wldrv
xwl0_3 rdec0_b3 ck_n rwl0_3 lrf_wldrv
xwl1_3 rdec1_b3 ck_n rwl1_3 lrf_wldrv
xwl0_4 rdec0_b4 ck_n rwl0_4 lrf_wldrv
xwl1_4 rdec1_b4 ck_n rwl1_4 lrf_wldrv
xwl0_5 rdec0_b5 ck_n rwl0_5 lrf_wldrv
xwl1_5 rdec1_b5 ck_n rwl1_5 lrf_wldrv
xwl0_6 rdec0_b6 ck_n rwl0_6 lrf_wldrv
xwl1_6 rdec1_b6 ck_n rwl1_6 lrf_wldrv
xwl0_7 rdec0_b7 ck_n rwl0_7 lrf_wldrv
xwl1_7 rdec1_b7 ck_n rwl1_7 lrf_wldrv
xe0 wwl0 wbl rwl0_0 rbl0 rwl1_0 rbl1 lrf_bit
xe1 wwl1 wbl rwl0_1 rbl0 rwl1_1 rbl1 lrf_bit
xe2 wwl2 wbl rwl0_2 rbl0 rwl1_2 rbl1 lrf_bit
xe3 wwl3 wbl rwl0_3 rbl0 rwl1_3 rbl1 lrf_bit
xe4 wwl4 wbl rwl0_4 rbl0 rwl1_4 rbl1 lrf_bit
xe5 wwl5 wbl rwl0_5 rbl0 rwl1_5 rbl1 lrf_bit
xe6 wwl6 wbl rwl0_6 rbl0 rwl1_6 rbl1 lrf_bit
* Entry 7's second read word line is misspelt: it reaches nothing.
xe7 wwl7 wbl rwl0_7 rbl0 rwl1_7x rbl1 lrf_bit
xs0 rbl0 dout0 lrf_sense
xs1 rbl1 dout1 lrf_sense_lite
* Extracted wire capacitance of the read bit lines.
cw_rbl0 rbl0 vss 15f
cw_rbl1 rbl1 vss 15f
.ends lrf_column
