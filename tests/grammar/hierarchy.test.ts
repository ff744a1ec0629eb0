// Elaboration into the hierarchical model: each cell described once, one variant
// per distinct binding of the parameters that change it, flattened counts by
// multiplication (design.ts helpers), never by flattening.

import { describe, expect, it } from 'vitest';
import { flattenedDeviceCount, instanceCounts, TOP_LEVEL_CELL } from '../../grammar/index';
import { cell, codes, mos, read } from './helpers';

const lines = (...ls: string[]) => ls.join('\n') + '\n';

describe('parameter variants', () => {
  const lib = lines(
    '* sized inverter',
    '.subckt inv a y params: wn=1u wp=2u note=0',
    'Mn y a 0 0 nch w={wn} l=0.15u',
    'Mp y a vdd vdd pch w={wp} l=0.15u',
    '.ends',
  );

  it('elaborates one variant per distinct binding, keyed by what differs', () => {
    const d = read(lib + lines('X1 a b inv', 'X2 b c inv wn=1u', 'X3 c e inv wn=3u', 'X4 e f inv wn=3u', 'X5 f g inv wp=5u'));
    const keys = cell(d, TOP_LEVEL_CELL).instances.map((i) => i.cell);
    // X1 and X2 bind the defaults (wn=1u given explicitly is the default); X3 and X4 share one binding.
    expect(keys).toEqual(['inv', 'inv', 'inv(wn=0.000003)', 'inv(wn=0.000003)', 'inv(wp=0.000005)']);
    expect(mos(cell(d, 'inv(wn=0.000003)'), 'Mn').w).toBeCloseTo(3e-6, 18);
    expect(mos(cell(d, 'inv(wp=0.000005)'), 'Mp').w).toBeCloseTo(5e-6, 18);
    expect(cell(d, 'inv(wn=0.000003)').name).toBe('inv');
    expect(cell(d, 'inv(wn=0.000003)').params).toMatchObject({ wn: 3e-6, wp: 2e-6 });
  });

  it('does not split variants on a parameter the body never reads', () => {
    const d = read(lib + lines('X1 a b inv note=1', 'X2 b c inv note=2', 'X3 c e inv note=3'));
    expect(new Set(cell(d, TOP_LEVEL_CELL).instances.map((i) => i.cell))).toEqual(new Set(['inv']));
    // The instances still carry what they were given.
    expect(cell(d, TOP_LEVEL_CELL).instances.map((i) => i.params.note)).toEqual([1, 2, 3]);
  });

  it('passes parameters down through the hierarchy', () => {
    const d = read(
      lib +
        lines(
          '.subckt chain a y params: size=1',
          '.param wn_local={size*1u}',
          'X1 a m inv wn={wn_local} wp={2*wn_local}',
          'X2 m y inv wn={wn_local} wp={2*wn_local}',
          '.ends',
          'Xa in out1 chain',
          'Xb in out2 chain size=4',
        ),
    );
    expect(d.diagnostics).toEqual([]);
    const top = cell(d, TOP_LEVEL_CELL);
    const [a, b] = top.instances.map((i) => cell(d, i.cell));
    expect(a.key).toBe('chain');
    expect(b.key).toBe('chain(size=4)');
    expect(mos(cell(d, b.instances[0].cell), 'Mn').w).toBeCloseTo(4e-6, 18);
    expect(mos(cell(d, b.instances[0].cell), 'Mp').w).toBeCloseTo(8e-6, 18);
    expect(mos(cell(d, a.instances[0].cell), 'Mn').w).toBeCloseTo(1e-6, 18);
  });
});

describe('top and roots', () => {
  const two = lines('* two blocks', '.subckt leaf a', 'R1 a 0 1k', '.ends', '.subckt left a', 'X1 a leaf', '.ends', '.subckt right a', 'X1 a leaf', 'X2 a leaf', '.ends');

  it('starts from the cells nobody instantiates', () => {
    const d = read(two);
    expect(d.roots).toEqual(['left', 'right']);
    expect(instanceCounts(d).get('leaf')).toBe(3);
  });

  it('starts from the explicit top only, case-insensitively', () => {
    const d = read(two, { top: 'RIGHT' });
    expect(d.roots).toEqual(['right']);
    expect(instanceCounts(d).get('leaf')).toBe(2);
    expect(d.cells.has('left')).toBe(false);
  });

  it('reports an explicit top that does not exist', () => {
    const d = read(two, { top: 'nosuch' });
    expect(codes(d)).toEqual(['unknown-top']);
  });

  it('puts top-level elements in a synthetic cell that is a root', () => {
    const d = read(two + lines('Xa n left', 'Vdd vdd 0 1'));
    expect(d.roots).toEqual([TOP_LEVEL_CELL, 'right']);
    expect(cell(d, TOP_LEVEL_CELL).isTopLevel).toBe(true);
  });
});

describe('huge hierarchies', () => {
  it('elaborates 2^60 flattened devices without flattening', () => {
    // Each level instantiates the one below twice: level k holds 2^k leaf resistors.
    const text = ['* doubling'];
    text.push('.subckt l0 a b', 'R1 a b 1k', '.ends');
    for (let k = 1; k <= 60; k++) text.push(`.subckt l${k} a b`, `X1 a m l${k - 1}`, `X2 m b l${k - 1}`, '.ends');
    const d = read(text.join('\n') + '\n');
    expect(d.diagnostics).toEqual([]);
    // Described once each: 61 cells, not 2^60 devices (speed figures belong to npm run bench).
    expect(d.cells.size).toBe(61);
    // 2^60 is exact in a double.
    expect(flattenedDeviceCount(d)).toBe(2 ** 60);
  });

  it('reads a hierarchy ten thousand levels deep without exhausting the stack', () => {
    const text = ['* deep', '.subckt d0 a', 'R1 a 0 1', '.ends'];
    for (let k = 1; k < 10_000; k++) text.push(`.subckt d${k} a`, `X1 a d${k - 1}`, '.ends');
    const d = read(text.join('\n') + '\n');
    expect(d.diagnostics).toEqual([]);
    expect(d.roots).toEqual(['d9999']);
    expect(flattenedDeviceCount(d)).toBe(1);
  });

  it('reads ten thousand nested .subckt definitions', () => {
    const text = ['* nested'];
    for (let k = 0; k < 10_000; k++) text.push(`.subckt n${k} a`);
    text.push('R1 a 0 1');
    for (let k = 0; k < 10_000; k++) text.push('.ends');
    const d = read(text.join('\n') + '\n');
    expect(d.diagnostics).toEqual([]);
    expect(d.cells.size).toBe(10_000);
  });

  it('stops runaway parameter variants with a diagnostic', () => {
    // Each level passes two different values down: the number of distinct bindings doubles per level.
    const text = ['* exponential variants', '.subckt v0 a params: p=0', 'R1 a 0 {p+1}', '.ends'];
    for (let k = 1; k <= 40; k++) text.push(`.subckt v${k} a params: p=0`, `X1 a v${k - 1} p={2*p}`, `X2 a v${k - 1} p={2*p+1}`, '.ends');
    const d = read(text.join('\n') + '\n');
    expect(codes(d)).toContain('too-many-variants');
    // Bounded by the reader's documented limits (10 000 variants per definition, 100 000 in all), not 2^40.
    const perDefinition = new Map<string, number>();
    for (const c of d.cells.values()) perDefinition.set(c.name, (perDefinition.get(c.name) ?? 0) + 1);
    expect(Math.max(...perDefinition.values())).toBe(10_000);
    expect(d.cells.size).toBeLessThanOrEqual(100_000);
    // Level k has 2^(40-k) distinct bindings until the limits bite: v30 still complete.
    expect(perDefinition.get('v30')).toBe(1024);
  });
});
