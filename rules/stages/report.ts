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
import type { Stage, StageElement } from './stage';
import { isMosElement, elementIndex } from './stage';

export function transferPlot(r: TransferResult): z.infer<typeof transferPlotSchema> {
  return { kind: 'transfer', vdd: r.vdd, vin: r.vin.slice(), vout: r.vout.slice(), vm: r.vm, gainAtVm: r.gainAtVm, vil: r.vil, vih: r.vih, voh: r.voh, vol: r.vol };
}

/** The device of a stage element, by its name as written. */
export function deviceName(cell: Cell, el: StageElement): string {
  return isMosElement(el) ? cell.mosfets.names[el] : cell.others[elementIndex(el)].name;
}

export function stageDeviceNames(cell: Cell, stage: Stage): string[] {
  return stage.elements.map((e) => deviceName(cell, e));
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
  output: string | null;
  /** Swept input first, then the held ones. */
  inputs: string[];
  kind: Stage['kind'];
  vm: number | null;
  /** dVout/dVin at VM. */
  gain: number | null;
  vil: number | null;
  vih: number | null;
  voh: number | null;
  vol: number | null;
  nmh: number | null;
  nml: number | null;
  corner: string | null;
  /** Values of the held inputs. */
  held: { net: string; volts: number }[];
  vmDefinition: TransferResult['vmDefinition'] | null;
  maxGain: number | null;
  stage: number;
  devices: string[];
  file: string;
  line: number;
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
  for (const a of analyses) {
    const st = a.stage;
    const where = { stage: st.id, devices: stageDeviceNames(cell, st), file: st.anchor.file, line: st.anchor.line };
    const output = st.output === null ? null : cell.nets[st.output];
    const inputs = a.inputs;
    if (!inputs.length) {
      rows.push({
        cell: cell.name,
        output,
        inputs: st.inputs.map((n) => cell.nets[n]),
        kind: st.kind,
        vm: null,
        gain: null,
        vil: null,
        vih: null,
        voh: null,
        vol: null,
        nmh: null,
        nml: null,
        corner: null,
        held: [],
        vmDefinition: null,
        maxGain: null,
        ...where,
        parameters: null,
        note: a.skipped ?? (st.notes.join('; ') || null),
      });
      continue;
    }
    for (const inp of inputs) {
      const corner = worstCorner(inp.corners);
      const c = corner.worstMargin;
      const r = c.result;
      rows.push({
        cell: cell.name,
        output,
        inputs: [cell.nets[inp.input], ...c.held.map((h) => cell.nets[h.net])],
        kind: st.kind,
        vm: r.vm,
        gain: r.gainAtVm,
        vil: r.vil,
        vih: r.vih,
        voh: r.voh,
        vol: r.vol,
        nmh: r.nmh,
        nml: r.nml,
        corner: corner.corner,
        held: c.held.map((h) => ({ net: cell.nets[h.net], volts: h.high ? corner.vdd : 0 })),
        vmDefinition: r.vmDefinition,
        maxGain: r.maxGain,
        ...where,
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
