// The per-stage report: one row per stage and swept input, at the corner where the
// stage is worst, as the `stages` command prints it; plus the pieces rule findings
// share (transfer plot, names, descriptions).

import type { z } from 'zod';
import type { transferPlotSchema } from '../../shared/findings';
import type { Cell } from '../../grammar/design';
import type { TransferResult } from '../electrical/transfer';
import { describeSources } from '../electrical/parameters';
import { formatSi } from '../units';
import { marginOf, type CornerAnalysis, type HeldInput, type StageAnalysis } from './analyse';
import type { Stage } from './stage';

export function transferPlot(r: TransferResult): z.infer<typeof transferPlotSchema> {
  return { kind: 'transfer', vdd: r.vdd, vin: r.vin.slice(), vout: r.vout.slice(), vm: r.vm, gainAtVm: r.gainAtVm, vil: r.vil, vih: r.vih, voh: r.voh, vol: r.vol };
}

export function stageDeviceNames(cell: Cell, stage: Stage): string[] {
  return stage.elements.map((e) => (e.kind === 'mos' ? cell.mosfets[e.index].name : cell.others[e.index].name));
}

export function heldText(cell: Cell, held: readonly HeldInput[]): string {
  if (!held.length) return '';
  const high = held.filter((h) => h.high).map((h) => cell.nets[h.net]);
  const low = held.filter((h) => !h.high).map((h) => cell.nets[h.net]);
  const parts = [high.length ? `${high.join(', ')} high` : '', low.length ? `${low.join(', ')} low` : ''].filter(Boolean);
  return parts.join(', ');
}

export function stageLabel(cell: Cell, stage: Stage): string {
  const what = stage.kind === 'complementary' ? 'static gate' : stage.kind === 'clocked' ? 'clocked stage' : stage.kind === 'ratioed' ? 'ratioed stage' : stage.kind;
  return stage.output === null ? what : `${what} driving ${cell.nets[stage.output]}`;
}

/** "VT0, k′ from .model nch; λ, γ, 2φF from corner tt" for each device type of the stage. */
export function sourcesText(corner: CornerAnalysis): string {
  return corner.models.map((m) => `${m.polarity}-channel ${m.model}: ${describeSources(m.resolved.sources)}`).join('; ');
}

export interface StageRow {
  cell: string;
  stage: number;
  kind: Stage['kind'];
  output: string | null;
  /** Swept input first, then the held ones. */
  inputs: string[];
  held: { net: string; volts: number }[];
  vm: number | null;
  vmDefinition: TransferResult['vmDefinition'] | null;
  gain: number | null;
  maxGain: number | null;
  vil: number | null;
  vih: number | null;
  voh: number | null;
  vol: number | null;
  nmh: number | null;
  nml: number | null;
  corner: string | null;
  devices: string[];
  line: number;
  file: string;
  /** Where the device values came from, per device type. */
  parameters: string | null;
  note: string | null;
}

/** The worst corner of one input: smallest noise margin, then smallest gain magnitude. */
export function worstCorner(corners: readonly CornerAnalysis[]): CornerAnalysis {
  let worst = corners[0];
  for (const c of corners) {
    const m = marginOf(c.worstMargin.result);
    const w = marginOf(worst.worstMargin.result);
    if (m < w || (m === w && Math.abs(c.worstMargin.result.gainAtVm) < Math.abs(worst.worstMargin.result.gainAtVm))) worst = c;
  }
  return worst;
}

export function stageRows(cell: Cell, analyses: readonly StageAnalysis[]): StageRow[] {
  const rows: StageRow[] = [];
  const names = (nets: number[]) => nets.map((n) => cell.nets[n]);
  for (const a of analyses) {
    const st = a.stage;
    const base = {
      cell: cell.name,
      stage: st.id,
      kind: st.kind,
      output: st.output === null ? null : cell.nets[st.output],
      devices: stageDeviceNames(cell, st),
      line: st.anchor.line,
      file: st.anchor.file,
    };
    if (!a.inputs.length) {
      rows.push({
        ...base,
        inputs: names(st.inputs),
        held: [],
        vm: null,
        vmDefinition: null,
        gain: null,
        maxGain: null,
        vil: null,
        vih: null,
        voh: null,
        vol: null,
        nmh: null,
        nml: null,
        corner: null,
        parameters: null,
        note: a.skipped ?? (st.notes.join('; ') || null),
      });
      continue;
    }
    for (const inp of a.inputs) {
      const corner = worstCorner(inp.corners);
      const c = corner.worstMargin;
      const r = c.result;
      rows.push({
        ...base,
        inputs: [cell.nets[inp.input], ...c.held.map((h) => cell.nets[h.net])],
        held: c.held.map((h) => ({ net: cell.nets[h.net], volts: h.high ? corner.vdd : 0 })),
        vm: r.vm,
        vmDefinition: r.vmDefinition,
        gain: r.gainAtVm,
        maxGain: r.maxGain,
        vil: r.vil,
        vih: r.vih,
        voh: r.voh,
        vol: r.vol,
        nmh: r.nmh,
        nml: r.nml,
        corner: corner.corner,
        parameters: sourcesText(corner),
        note: st.notes.length ? st.notes.join('; ') : null,
      });
    }
  }
  return rows;
}

export function volts(v: number): string {
  return formatSi(v, 'V');
}
