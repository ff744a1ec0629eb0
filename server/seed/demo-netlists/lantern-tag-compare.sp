* Lantern core, instruction cache: tag comparator match lines (Marrowgate Silicon, invented demo block)
* Each match line is precharged while clk is low and discharged by any mismatching bit.
* Extracted netlist: the coupling capacitors (cx_*) come from layout.
* Sizes in micrometres: .option scale applies to W and L.
.option scale=1e-6
.global vdd vss

* One bit of comparison: two stacks from the match line to ground, one of which conducts on a mismatch.
.subckt ltc_cmp ml tag tag_b key key_b
mc1 ml tag cm1 vss nch w=0.8 l=0.25
mc2 cm1 key_b vss vss nch w=0.8 l=0.25
mc3 ml tag_b cm2 vss nch w=0.8 l=0.25
mc4 cm2 key vss vss nch w=0.8 l=0.25
.ends ltc_cmp

* Search-key driver: true and complement of the key, from static logic (not clock-qualified).
.subckt ltc_keydrv k key key_b
mk1p key_b k vdd vdd pch w=2.0 l=0.25
mk1n key_b k vss vss nch w=1.0 l=0.25
mk2p key key_b vdd vdd pch w=2.0 l=0.25
mk2n key key_b vss vss nch w=1.0 l=0.25
.ends ltc_keydrv

* A four-bit match line: precharge, an always-on weak keeper, the compare stacks, a sense inverter
* and a transmission gate that latches the result onto the hit bus.
.subckt ltc_match4 clk tag0 tag0_b tag1 tag1_b tag2 tag2_b tag3 tag3_b k0 k1 k2 k3 lat lat_b hit
mpre ml clk vdd vdd pch w=1.5 l=0.25
mkeep ml vss vdd vdd pch w=0.3 l=1.5
xk0 k0 key0 key0_b ltc_keydrv
xk1 k1 key1 key1_b ltc_keydrv
xk2 k2 key2 key2_b ltc_keydrv
xk3 k3 key3 key3_b ltc_keydrv
xb0 ml tag0 tag0_b key0 key0_b ltc_cmp
xb1 ml tag1 tag1_b key1 key1_b ltc_cmp
xb2 ml tag2 tag2_b key2 key2_b ltc_cmp
xb3 ml tag3 tag3_b key3 key3_b ltc_cmp
msp mlo ml vdd vdd pch w=3.0 l=0.25
msn mlo ml vss vss nch w=1.0 l=0.25
mtn ml lat hitl vss nch w=0.8 l=0.25
mtp ml lat_b hitl vdd pch w=1.6 l=0.25
mhp hit hitl vdd vdd pch w=2.0 l=0.25
mhn hit hitl vss vss nch w=1.0 l=0.25
* The match line runs beside the search line of key bit 3 across the whole array.
cx_ml_key3 ml key3 20f
.ends ltc_match4
