// The review report as a PDF (pdfkit): the run and its deck version, counts by severity and status, every
// open error, every lapsed waiver, every waiver with its justification, people and
// dates, and the review caution on every page.

import PDFDocument from 'pdfkit';
import type { ReviewReport } from '../../shared/api/reports';
import type { StoredFinding } from '../../shared/api/runs';
import { WAIVER_SCOPE_LABELS } from '../../shared/api/waivers';
import { measuredText } from './reports';
import { formatQuantity } from './waivers-status';

// The PDF standard fonts, always present in a reader (ISO 32000-1 §9.6.2.2). Embedding
// the client's IBM Plex WOFF files was tried: fontkit fails to subset some of their glyphs.
const FONTS = { sans: 'Helvetica', bold: 'Helvetica-Bold', mono: 'Courier' };

/** Characters the standard fonts' WinAnsi encoding lacks, spelled out. */
const SPELLED: Record<string, string> = { '\u221a': 'sqrt ', '\u2264': '<=', '\u2265': '>=', '\u2212': '-', '\u03a9': 'ohm', '\u2192': '->', '\u2032': "'", '\u00a0': ' ' };
const winAnsi = (text: string) => text.replace(/[\u221a\u2264\u2265\u2212\u03a9\u2192\u2032\u00a0]/g, (c) => SPELLED[c]).replace(/[^\x20-\x7e\u00a1-\u00ff\u2013\u2014\u2018\u2019\u201c\u201d\u2022\u2026\u20ac\n]/g, '?');

const INK = '#1d232b';
const MUTED = '#5b6472';
const RULE = '#c9ced6';
const MARGIN = 50;
const FOOTER = 40;

const STATUS_WORDS = { open: 'Open', waived: 'Waived', 'waiver-requested': 'Requested', 'waiver-lapsed': 'Lapsed' } as const;
const day = (iso: string | null) => (iso ? iso.slice(0, 10) : '—');
/** An expiry instant is the midnight after the last day the waiver holds. */
const lastDay = (iso: string | null) => (iso ? new Date(Date.parse(iso) - 1).toISOString().slice(0, 10) : 'none');

export function reviewReportPdf(report: ReviewReport): Promise<Buffer> {
  const doc = new PDFDocument({
    size: 'A4',
    margins: { top: MARGIN, bottom: MARGIN + FOOTER, left: MARGIN, right: MARGIN },
    bufferPages: true,
    info: { Title: `Review report: ${report.run.block.name}`, Author: 'Keepwell', Subject: `Run ${report.run.id}` },
  });
  // Every string goes through winAnsi before it reaches the page.
  const text = doc.text.bind(doc);
  doc.text = ((t: string, ...rest: unknown[]) => (text as (...a: unknown[]) => PDFKit.PDFDocument)(winAnsi(String(t)), ...rest)) as typeof doc.text;
  const chunks: Buffer[] = [];
  doc.on('data', (c: Buffer) => chunks.push(c));
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on('end', () => resolve(Buffer.concat(chunks)));
    doc.on('error', reject);
  });

  const width = doc.page.width - 2 * MARGIN;
  const bottom = () => doc.page.height - MARGIN - FOOTER;
  const room = (h: number) => {
    if (doc.y + h > bottom()) doc.addPage();
  };
  const heading = (text: string) => {
    room(60);
    doc.moveDown(0.8).font(FONTS.bold).fontSize(13).fillColor(INK).text(text, MARGIN, doc.y, { width });
    doc.moveTo(MARGIN, doc.y + 2).lineTo(MARGIN + width, doc.y + 2).strokeColor(RULE).lineWidth(0.5).stroke();
    doc.moveDown(0.5);
  };
  const line = (label: string, value: string) => {
    doc.font(FONTS.bold).fontSize(9.5).fillColor(MUTED).text(`${label}  `, MARGIN, doc.y, { continued: true, width });
    doc.font(FONTS.sans).fillColor(INK).text(value || '—');
  };
  const para = (text: string, font = FONTS.sans, size = 9.5, color = INK) => doc.font(font).fontSize(size).fillColor(color).text(text, MARGIN, doc.y, { width });

  // Header
  doc.font(FONTS.bold).fontSize(18).fillColor(INK).text(`Review report: ${report.run.block.name}`, { width });
  doc.moveDown(0.4);
  line('Run', report.run.id);
  line('Submitted', `${day(report.run.createdAt)}${report.run.submitter ? ` by ${report.run.submitter.name} <${report.run.submitter.email}>` : ''}`);
  line('Finished', day(report.run.finishedAt));
  if (report.run.note) line('Note', report.run.note);
  line('Netlist files', report.run.files.map((f) => `${f.path} (sha256 ${f.sha256.slice(0, 12)}…)`).join(', '));
  line('Rule deck', `${report.deck.name}, version ${report.deck.version} (${report.deck.state})`);
  line('Published', `${day(report.deck.publishedAt)}${report.deck.publishedBy ? ` by ${report.deck.publishedBy.name}` : ''}`);
  line('Publish note', report.deck.publishNote);
  line('Generated', report.generatedAt.replace('T', ' ').slice(0, 16) + ' UTC');
  doc.moveDown(0.6);
  const cautionTop = doc.y;
  doc.font(FONTS.bold).fontSize(9.5).fillColor(INK).text(report.caution, MARGIN + 8, cautionTop + 6, { width: width - 16 });
  doc.rect(MARGIN, cautionTop, width, doc.y - cautionTop + 6).strokeColor(RULE).lineWidth(0.8).stroke();
  doc.y += 8;

  // Counts
  heading('Findings by severity and status');
  const cols = ['Severity', 'Open', 'Waived', 'Requested', 'Lapsed', 'Total'];
  const colX = (i: number) => MARGIN + (i === 0 ? 0 : 110 + (i - 1) * ((width - 110) / 5));
  const row = (cells: string[], font: string) => {
    const y = doc.y;
    cells.forEach((c, i) => doc.font(font).fontSize(9.5).fillColor(INK).text(c, colX(i), y, { width: i === 0 ? 100 : (width - 110) / 5, align: i === 0 ? 'left' : 'right' }));
    doc.y = y + 15;
  };
  row(cols, FONTS.bold);
  for (const [label, c] of [
    ['Error', report.counts.bySeverity.error],
    ['Warning', report.counts.bySeverity.warning],
    ['Info', report.counts.bySeverity.info],
    ['All', report.counts.total],
  ] as const) {
    const total = c.open + c.waived + c['waiver-requested'] + c['waiver-lapsed'];
    row([label, String(c.open), String(c.waived), String(c['waiver-requested']), String(c['waiver-lapsed']), String(total)], label === 'All' ? FONTS.bold : FONTS.sans);
  }

  const finding = (f: StoredFinding, extra?: string) => {
    room(48);
    doc.font(FONTS.mono).fontSize(8.5).fillColor(MUTED).text(`${f.file}:${f.line}:${f.column}   ${f.ruleId}   cell ${f.cell} ×${f.instances}`, MARGIN, doc.y, { width });
    para(f.message);
    const m = measuredText(f);
    if (m) para(`Measured ${m}${f.corner ? ` at corner ${f.corner}` : ''}`, FONTS.sans, 9, MUTED);
    if (extra) para(extra, FONTS.bold, 9, INK);
    doc.moveDown(0.4);
  };

  heading(`Open errors (${report.openErrorsTotal})`);
  if (report.openErrors.length === 0) para('No open error: every error-severity finding is waived.', FONTS.sans, 9.5, MUTED);
  for (const f of report.openErrors) finding(f);
  if (report.openErrorsTotal > report.openErrors.length) para(`… and ${report.openErrorsTotal - report.openErrors.length} more; the CSV export lists every finding.`, FONTS.sans, 9, MUTED);

  heading(`Lapsed waivers (${report.lapsedTotal})`);
  if (report.lapsed.length === 0) para('No waiver of this run has lapsed.', FONTS.sans, 9.5, MUTED);
  for (const f of report.lapsed) finding(f, `Lapsed: ${f.waiver?.reason ?? ''}`);

  heading(`Waivers (${report.waivers.length})`);
  if (report.waivers.length === 0) para('No waiver concerns this run’s findings.', FONTS.sans, 9.5, MUTED);
  for (const w of report.waivers) {
    room(90);
    doc.font(FONTS.bold).fontSize(10).fillColor(INK).text(`${w.ruleId} in ${w.cell ?? 'every cell'}`, MARGIN, doc.y, { width, continued: true });
    doc.font(FONTS.sans).fillColor(MUTED).text(`   ${WAIVER_SCOPE_LABELS[w.scope].label.toLowerCase()}${w.block ? `, asked in block ${w.block.name}` : ''}`);
    line('In this run', `${STATUS_WORDS[w.statusInRun]}, ${w.findings} finding${w.findings === 1 ? '' : 's'} (waiver ${w.state})`);
    line('Justification', w.justification);
    line('Requested', `${day(w.createdAt)}${w.requester ? ` by ${w.requester.name} <${w.requester.email}>` : ''}`);
    if (w.decidedAt) line(w.state === 'rejected' ? 'Rejected' : 'Approved', `${day(w.decidedAt)}${w.decider ? ` by ${w.decider.name} <${w.decider.email}>` : ''}${w.decisionComment ? `: ${w.decisionComment}` : ''}`);
    line('Holds through', lastDay(w.expiresAt));
    if (w.bound) line('Lapses when', `the measured value is ${w.bound.sense === 'max' ? 'above' : 'below'} ${formatQuantity(w.bound)}`);
    if (w.revokedAt) line('Revoked', `${day(w.revokedAt)}${w.revoker ? ` by ${w.revoker.name}` : ''}: ${w.revokeReason ?? ''}`);
    doc.moveDown(0.5);
  }

  // Footer on every page: the caution and the page number.
  const range = doc.bufferedPageRange();
  for (let i = range.start; i < range.start + range.count; i++) {
    doc.switchToPage(i);
    const y = doc.page.height - MARGIN - FOOTER + 14;
    doc.page.margins.bottom = 0;
    doc.font(FONTS.sans).fontSize(7.5).fillColor(MUTED).text(report.caution, MARGIN, y, { width: width - 60 });
    doc.text(`Page ${i - range.start + 1} of ${range.count}`, MARGIN + width - 60, y, { width: 60, align: 'right' });
  }
  doc.end();
  return done;
}
