// False-positive discipline: a library of ordinary static cells (tests/rules/library/,
// written for this test in the style layout extraction writes) must raise no
// error-severity finding and contain no dynamic node. Static complementary CMOS gates,
// transmission-gate multiplexers, latches with clocked feedback and flip-flops restore
// every level and hold no state as bare charge between clock edges (Rabaey et al.,
// Digital Integrated Circuits, 2nd ed., §6.2 and §7.2), so any such finding here is a
// recognition error.

import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { defaultDeck } from '../../rules/default-deck';
import { checkDesign } from '../../rules/engine';
import { ruleRegistry } from '../../rules/registry';
import { defineRule } from '../../rules/types';
import { stagesOf } from '../../rules/stages';
import { dynamicNodesOf } from '../../rules/recognition/dynamic';
import { z } from 'zod';
import { read } from '../recognition/support';

const dir = join(import.meta.dirname, 'library');
const files = Object.fromEntries(
  readdirSync(dir)
    .filter((f) => f.endsWith('.sp'))
    .map((f) => [f, readFileSync(join(dir, f), 'utf8')]),
);

describe('static cell library', () => {
  const deck = defaultDeck();
  const design = read(files, deck);

  it('reads without netlist errors and holds the cells it claims', () => {
    expect(design.diagnostics.filter((d) => d.severity === 'error')).toEqual([]);
    const subckts = Object.values(files).join('\n').match(/^\.subckt\s+\S+/gim) ?? [];
    expect(design.cells.size).toBe(subckts.length);
  });

  it('raises no error-severity finding, and no dynamic-node finding of any severity, with every rule enabled', () => {
    const result = checkDesign(design, deck);
    const errors = result.findings.filter((f) => f.severity === 'error');
    expect(errors.map((f) => `${f.cell}: ${f.ruleId}: ${f.message}`)).toEqual([]);
    expect(result.findings.filter((f) => f.ruleId.startsWith('dynamic.')).map((f) => f.message)).toEqual([]);
    // Every cell was analysed, the flip-flops of the shift register in their clock context too.
    expect(result.summary.cells).toBe(design.cells.size);
  });

  it('sees every driving stage as static or clocked, and no dynamic node, in every cell and context', () => {
    const seen: string[] = [];
    const probe = defineRule({
      meta: { id: 'test.probe', title: 'probe', area: 'stage', rationale: '', fix: '', defaultSeverity: 'info' },
      params: z.object({}),
      check(ctx) {
        for (const s of stagesOf(ctx).stages) {
          if (s.output !== null && s.kind !== 'pass') seen.push(`${ctx.cell.name}:${ctx.cell.nets[s.output]}:${s.kind}`);
        }
        for (const d of dynamicNodesOf(ctx)) seen.push(`${ctx.cell.name}:${d.name}:dynamic node`);
      },
    });
    checkDesign(design, { ...deck, rules: { 'test.probe': { enabled: true, severity: 'info', params: {} } } }, { rules: [probe] });
    expect(seen.length).toBeGreaterThan(50);
    expect(seen.filter((s) => !/:(inverter|complementary|clocked)$/.test(s))).toEqual([]);
  });

  it('runs every registered rule (the list above is the whole registry)', () => {
    expect(Object.keys(deck.rules).sort()).toEqual(ruleRegistry.map((r) => r.meta.id).sort());
  });
});
