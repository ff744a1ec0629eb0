// The existing stage rules judge static stages by their transfer curves, which a dynamic
// node or a pass device does not have (a precharged node is not a function of its inputs
// alone; a pass device restores nothing). With recognition in front of them they must
// leave every dynamic node and pass stage alone, footless stages whose clock is traced
// through the hierarchy included, and still fire on the static stages that deserve it.
// References for the firing cases: the gain < 1 of a diode-loaded stage with a driver as
// wide as its load, and its low noise margin with a 3× driver (both checked against ngspice
// in tests/rules/stage.*.test.ts).

import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import nonRegenerative from '../../rules/stage/non-regenerative';
import noiseMargin from '../../rules/stage/noise-margin';
import { check } from './support';

const demo = (name: string) => readFileSync(join(import.meta.dirname, '../../server/seed/demo-netlists', name), 'utf8');

describe('stage rules beside recognition', () => {
  it('raise nothing on the domino ALU slice, whose every stage is dynamic, a pass device or a clean inverter', () => {
    expect(check(demo('lantern-alu-domino.sp'), { rules: [nonRegenerative, noiseMargin] })).toEqual([]);
  });

  it('fire on the diode-loaded stages of the scan slice and nowhere else there', () => {
    const f = check(demo('lantern-scan-latches.sp'), { rules: [nonRegenerative, noiseMargin] });
    expect(f.map((x) => `${x.ruleId}:${x.cell}:${x.nets[0]}`).sort()).toEqual([
      'stage.noise-margin:lsc_tmbuf:tmo',
      'stage.non-regenerative:lsc_sedec:se',
      'stage.non-regenerative:lsc_tmbuf:tmi',
    ]);
  });
});
