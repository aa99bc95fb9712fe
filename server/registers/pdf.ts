import { createRequire } from 'node:module';
import fs from 'node:fs';
import path from 'node:path';
import PDFDocument from 'pdfkit';
import { haToAc } from '../../shared/calc/units';
import { SHOOT_N_CAUTION } from '../../shared/format/walk';
import { date, dateTime } from '../../shared/format/figures';
import type { Units } from '../people/public';
import { woffToSfnt } from './woff';
import { CAUTIONS, VERDICT_LABELS, cropLabel, registerUnits, shortId, walkVerdictOfRow, type RegisterDoc } from './format';
import type { RegisterRow } from './service';

/* The register as a PDF: one or many ranches, with a cover page for the organisation's register. */

const require = createRequire(import.meta.url);
const LATO_DIR = path.join(path.dirname(require.resolve('@fontsource/lato/package.json')), 'files');
// Unpacked once per process and kept (woff.ts says why): about 150 KB for the two.
let lato: { regular: Buffer; bold: Buffer } | undefined;
const latoFonts = () =>
  (lato ??= {
    regular: woffToSfnt(fs.readFileSync(path.join(LATO_DIR, 'lato-latin-400-normal.woff'))),
    bold: woffToSfnt(fs.readFileSync(path.join(LATO_DIR, 'lato-latin-700-normal.woff'))),
  });

export type Paper = 'a4' | 'letter';

export interface PdfOptions {
  units: Units;
  paper?: Paper;
  /** Called after each field row is written (for a job's progress). */
  onRow?: () => void;
  /** Title of a cover page listing every register (the organisation's register). */
  cover?: { title: string; lines: string[] };
}

const INK = '#23201a';
// Meets in the theme's shoot green, below in clay, borderline in plain ink: neither good nor bad.
const WALK_VERDICT_INK = { meets: '#1f5f36', below: '#a63d1f', borderline: INK } as const;
const MUTED = '#5b5446';
const RULE = '#b9b2a3';
const FIELD_ROW_FONT = 7.5;

interface Column {
  title: string;
  share: number;
  align?: 'left' | 'right';
  cell: (r: RegisterRow) => string;
  /** Ink of the cell when it differs from the row's. */
  color?: (r: RegisterRow) => string | null;
  bold?: (r: RegisterRow) => boolean;
  /** Names are never cut: the cell wraps onto more lines and the row grows. */
  wrap?: boolean;
}

const yieldToLoop = () => new Promise<void>((resolve) => setImmediate(resolve));
/** Longest stretch of PDF writing between two turns of the event loop, so a building server keeps answering. */
const YIELD_EVERY_MS = 15;

/** One PDF for one or many registers; lets the event loop run every YIELD_EVERY_MS so a server stays responsive. */
export async function registerPdf(docs: RegisterDoc[], opts: PdfOptions): Promise<Buffer> {
  const u = registerUnits(opts.units);
  const pdf = new PDFDocument({
    size: opts.paper === 'letter' ? 'LETTER' : 'A4',
    layout: 'landscape',
    margins: { top: 58, bottom: 46, left: 36, right: 36 },
    bufferPages: true,
    autoFirstPage: false,
    info: {
      Title: docs.length === 1 ? `Credit register ${docs[0]!.ranch.name} ${docs[0]!.year}` : (opts.cover?.title ?? 'Credit registers'),
      Author: 'Crowntip',
      Subject: 'Nitrogen scavenging credit register',
    },
  });
  pdf.registerFont('Lato', latoFonts().regular);
  pdf.registerFont('Lato-Bold', latoFonts().bold);
  const chunks: Buffer[] = [];
  pdf.on('data', (c: Buffer) => chunks.push(c));
  const ended = new Promise<void>((resolve, reject) => {
    pdf.on('end', resolve);
    pdf.on('error', reject);
  });

  const left = 36;
  let current: RegisterDoc | null = null;
  const headers: (RegisterDoc | null)[] = [];
  const width = () => pdf.page.width - 72;
  const bottom = () => pdf.page.height - pdf.page.margins.bottom;

  // The walk's verdict of the row being written, worked out once for its three cells.
  let verdictRow: RegisterRow | null = null;
  let verdict: ReturnType<typeof walkVerdictOfRow> = null;
  const verdictOf = (r: RegisterRow) => {
    if (r !== verdictRow) {
      verdictRow = r;
      verdict = current && r.walk ? walkVerdictOfRow(r, current.rule) : null;
    }
    return verdict;
  };

  const columns: Column[] = [
    { title: 'Field', share: 14, cell: (r) => r.fieldName, wrap: true },
    { title: `Area (${u.areaUnit})`, share: 5.5, align: 'right', cell: (r) => u.num(opts.units === 'us' ? haToAc(r.areaHa) : r.areaHa, 1) },
    { title: 'Crop · variety', share: 12.5, cell: (r) => (r.crop ? `${cropLabel(r.crop)}${r.variety ? ` · ${r.variety}` : ''}` : '—'), wrap: true },
    { title: 'Seeded', share: 7, cell: (r) => r.seededOn ?? '—' },
    { title: 'Terminated', share: 8, cell: (r) => r.terminatedOn ?? (r.endOn ? `proj. ${r.endOn}` : '—') },
    { title: 'Days in window', share: 5.5, align: 'right', cell: (r) => (r.daysInWindow == null ? '—' : String(r.daysInWindow)) },
    { title: 'Approved walk', share: 12.5, cell: (r) => (r.walk ? (r.walkQualifies ? `${r.walk.walkedOn} · ${shortId(r.walk.id)}` : `${r.walk.walkedOn} (not usable)`) : '—') },
    { title: `Mean length`, share: 6, align: 'right', cell: (r) => (r.walk ? `${u.length(r.walk.meanLengthCm)}` : '—') },
    { title: `Estimate (interval)`, share: 13.5, cell: (r) => (r.walk ? `${current ? u.walkBiomass(r, current.rule) : u.rate(r.walk.biomassKgHa)} (${u.rateNumber(r.walk.interval[0])}–${u.rateNumber(r.walk.interval[1])})` : '—') },
    {
      title: 'Walk verdict',
      share: 6.5,
      cell: (r) => verdictOf(r)?.word ?? '—',
      color: (r) => {
        const v = verdictOf(r);
        return v ? WALK_VERDICT_INK[v.verdict] : null;
      },
      bold: (r) => Boolean(verdictOf(r) && verdictOf(r)!.verdict !== 'borderline'),
    },
    { title: `N in shoots* (${opts.units === 'us' ? 'lb N/ac' : 'kg N/ha'})`, share: 8, cell: (r) => (r.walk?.shootN ? u.shootN(r).replace(/ (lb|kg) N\/(ac|ha)/, '') : '—') },
    { title: 'Credit status', share: 8.5, cell: (r) => VERDICT_LABELS[r.verdict] },
    { title: `Credit (${u.massUnit})`, share: 6.5, align: 'right', cell: (r) => (r.creditKgN ? `${r.verdict === 'projected_eligible' ? '(' : ''}${u.massNumber(r.creditKgN)}${r.verdict === 'projected_eligible' ? ')' : ''}` : '0') },
  ];
  const totalShare = columns.reduce((s, c) => s + c.share, 0);
  const colX = () => {
    const xs: { x: number; w: number }[] = [];
    let x = left;
    for (const c of columns) {
      const w = (width() * c.share) / totalShare;
      xs.push({ x, w });
      x += w;
    }
    return xs;
  };

  /** Text that fits one line of the width, cut with an ellipsis. */
  const fit = (text: string, w: number) => {
    if (pdf.widthOfString(text) <= w) return text;
    let s = text;
    while (s.length > 1 && pdf.widthOfString(`${s}…`) > w) s = s.slice(0, -1);
    return `${s}…`;
  };
  const fitsOneLine = (text: string, w: number) => !text.includes('\n') && pdf.widthOfString(text) <= w;
  /**
   * One line of a table cell placed by its own width: pdfkit's line wrapper (made afresh for every
   * text with a width) is most of a large register's writing time, and a cell that fits needs none.
   */
  const oneLine = (text: string, x: number, y: number, w: number, align: 'left' | 'right') => {
    pdf.text(text, align === 'right' ? x + w - pdf.widthOfString(text.trimEnd()) : x, y, { lineBreak: false });
  };
  /** Height of a cell that may wrap: one line's height when it fits, else what pdfkit's wrapping takes. */
  const cellHeight = (text: string, w: number) => (fitsOneLine(text, w) ? pdf.currentLineHeight(true) : pdf.heightOfString(text, { width: w }));

  // Every page records the register it belongs to (also pages pdfkit adds for a long paragraph).
  pdf.on('pageAdded', () => headers.push(current));
  const newPage = (doc: RegisterDoc | null) => {
    current = doc;
    pdf.addPage();
    pdf.x = left;
    pdf.y = pdf.page.margins.top;
  };

  const ensure = (height: number, repeatHeader: boolean) => {
    if (pdf.y + height <= bottom()) return;
    newPage(current);
    if (repeatHeader) tableHeader();
  };

  const tableHeader = () => {
    const xs = colX();
    pdf.font('Lato-Bold').fontSize(FIELD_ROW_FONT).fillColor(INK);
    const y = pdf.y;
    const h = Math.max(...columns.map((c, i) => pdf.heightOfString(c.title, { width: xs[i]!.w - 4 })));
    columns.forEach((c, i) => pdf.text(c.title, xs[i]!.x + 2, y, { width: xs[i]!.w - 4, align: c.align ?? 'left' }));
    pdf.moveTo(left, y + h + 2).lineTo(left + width(), y + h + 2).lineWidth(1).strokeColor(INK).stroke();
    pdf.y = y + h + 5;
  };

  const heading = (text: string, size: number) => {
    pdf.font('Lato-Bold').fontSize(size).fillColor(INK).text(text, left, pdf.y, { width: width() });
  };
  const para = (text: string, size = 9, color = INK) => {
    pdf.font('Lato').fontSize(size).fillColor(color).text(text, left, pdf.y, { width: width() });
  };

  /**
   * A long list of ids, line by line, never broken inside an id so that each can be copied whole.
   * Laid out here rather than by pdfkit's line wrapper, which took a quarter of a 5,000-field
   * register's PDF time for these lists alone.
   */
  const idLines = (lead: string, ids: string[], size: number, color: string) => {
    const parts = ids.map((id, i) => `${i ? '' : lead}${id}${i < ids.length - 1 ? ',' : '.'}`);
    const style = () => pdf.font('Lato').fontSize(size).fillColor(color);
    style();
    const lineHeight = pdf.currentLineHeight(true);
    let line = '';
    const flush = () => {
      if (pdf.y + lineHeight > bottom()) {
        newPage(current);
        style();
      }
      oneLine(line, left, pdf.y, width(), 'left');
      pdf.y += lineHeight;
      pdf.x = left;
    };
    for (const part of parts) {
      const longer = line ? `${line} ${part}` : part;
      if (line && pdf.widthOfString(longer) > width()) {
        flush();
        line = part;
      } else line = longer;
    }
    flush();
  };

  if (opts.cover) {
    newPage(null);
    heading(opts.cover.title, 18);
    pdf.moveDown(0.5);
    for (const line of opts.cover.lines) para(line, 10);
    pdf.moveDown(0.5);
    for (const c of CAUTIONS) para(c, 9, MUTED);
  }

  let lastYield = performance.now();
  for (const doc of docs) {
    newPage(doc);
    heading(`Credit register · ${doc.ranch.name} · ${doc.year}`, 15);
    para(
      `Reporting year ${doc.year}: plantings of the ${doc.season.replace('-', '–')} season. ${
        doc.status === 'final'
          ? `Finalised version ${doc.version} by ${doc.finalisedBy?.name ?? '—'} on ${dateTime(doc.finalisedAt)}.`
          : `DRAFT computed on ${date(doc.computedOn)}: not finalised, may change.`
      }`,
      9.5,
    );
    if (doc.contentHash) para(`Content hash (SHA-256): ${doc.contentHash}`, 8.5, MUTED);
    pdf.moveDown(0.6);

    tableHeader();
    const xs = colX();
    for (const r of doc.rows) {
      pdf.font('Lato').fontSize(FIELD_ROW_FONT);
      const why = r.verdict === 'eligible' || r.verdict === 'projected_eligible' ? '' : `Why: ${r.reasons.map((x) => u.reason(x, r, doc.rule)).join(' · ')}`;
      const whyX = xs[2]!.x + 2;
      const whyW = left + width() - whyX - 2;
      const rowFont = r.verdict === 'eligible' ? 'Lato-Bold' : 'Lato';
      pdf.font(rowFont).fontSize(FIELD_ROW_FONT);
      const cells = columns.map((c) => c.cell(r));
      const cellsH = Math.max(10, ...columns.map((c, i) => (c.wrap ? cellHeight(cells[i]!, xs[i]!.w - 4) + 1 : 0)));
      if (why) pdf.fontSize(6.8);
      const rowH = cellsH + (why ? cellHeight(why, whyW) + 2 : 0);
      ensure(rowH + 3, true);
      const y = pdf.y;
      pdf.font(rowFont).fontSize(FIELD_ROW_FONT).fillColor(INK);
      columns.forEach((c, i) => {
        const bold = c.bold ? c.bold(r) : rowFont === 'Lato-Bold';
        pdf.font(bold ? 'Lato-Bold' : 'Lato').fillColor(c.color?.(r) ?? INK);
        const w = xs[i]!.w - 4;
        const text = c.wrap ? cells[i]! : fit(cells[i]!, w);
        if (c.wrap && !fitsOneLine(text, w)) pdf.text(text, xs[i]!.x + 2, y, { width: w, align: c.align ?? 'left' });
        else oneLine(text, xs[i]!.x + 2, y, w, c.align ?? 'left');
      });
      if (why) {
        pdf.font('Lato').fontSize(6.8).fillColor(MUTED);
        if (fitsOneLine(why, whyW)) oneLine(why, whyX, y + cellsH, whyW, 'left');
        else pdf.text(why, whyX, y + cellsH, { width: whyW });
      }
      pdf.y = y + rowH;
      pdf.moveTo(left, pdf.y + 1).lineTo(left + width(), pdf.y + 1).lineWidth(0.4).strokeColor(RULE).stroke();
      pdf.y += 3;
      opts.onRow?.();
      if (performance.now() - lastYield > YIELD_EVERY_MS) {
        await yieldToLoop();
        lastYield = performance.now();
      }
    }
    if (!doc.rows.length) para('This ranch has no fields.', 9);

    // Totals
    const t = doc.totals;
    ensure(70, false);
    pdf.moveDown(0.6);
    heading('Totals', 11);
    para(`Fields: ${t.fields} (${t.plantedFields} with a cover crop); eligible: ${t.eligibleFields}.`, 9.5);
    para(`Area: ${u.area(t.totalAreaHa)}; eligible area: ${u.area(t.eligibleAreaHa)} (${u.num(t.eligibleAreaHa, 2)} ha).`, 9.5);
    pdf.font('Lato-Bold').fontSize(10.5).fillColor(INK).text(`Credit total: ${u.massN(t.creditKgN)} (${u.num(t.creditKgN, 1)} kg N)`, left, pdf.y, { width: width() });
    if (t.projectedFields) {
      para(
        `${t.projectedFields} field(s) have no termination date yet: they are counted up to ${doc.projectionDate} (projected) and are not in the total; the eligible ones would add ${u.massN(t.projectedCreditKgN)}.`,
        9,
      );
    }

    // Provenance
    ensure(120, false);
    pdf.moveDown(0.6);
    heading('Provenance', 11);
    const rule = doc.rule;
    para(`Credit rule: ${rule.label}; the rule in effect on 1 January ${doc.year}.`, 8.5);
    para(
      `Rule values: threshold ${u.rate(rule.thresholdKgHa)}; at least ${rule.minDaysInWindow} days inside the rainy window ${rule.window.start} to ${rule.window.end}; eligible crops ${rule.eligibleCrops.map(cropLabel).join(', ') || 'none'}; credit ${u.creditRate(rule.creditKgNPerHa)}; walk at most ${rule.maxDaysSampleBeforeTermination} days before termination.`,
      8.5,
    );
    para(`Calibrations used: ${doc.calibrations.map((c) => `${c.id} version ${c.version}`).join('; ') || 'none'}.`, 8.5);
    if (doc.walkIds.length) idLines(`Field walks (${doc.walkIds.length}): `, doc.walkIds, 7.5, MUTED);
    else para('Field walks (0): none.', 7.5, MUTED);
    if (doc.status === 'final') {
      para(`Finalised by ${doc.finalisedBy?.name ?? '—'} on ${dateTime(doc.finalisedAt)}; version ${doc.version}${doc.previousId ? `, amends version id ${doc.previousId}` : ''}.`, 8.5);
      para(`Register id ${doc.id}. Content hash (SHA-256 of the stored canonical JSON): ${doc.contentHash}`, 8.5);
    }

    // Cautions
    ensure(50, false);
    pdf.moveDown(0.6);
    heading('Cautions', 11);
    for (const c of CAUTIONS) para(c, 8.5);
    if (doc.rows.some((r) => r.walk?.shootN)) para(`* ${SHOOT_N_CAUTION.en}`, 8.5);
    if (rule.isDemo) para('This register uses demo rule values that have not been confirmed with the local authority.', 8.5);
  }

  // Running header and page numbers on every page.
  const range = pdf.bufferedPageRange();
  for (let i = 0; i < range.count; i++) {
    pdf.switchToPage(range.start + i);
    const doc = headers[i];
    const top = 22;
    pdf.font('Lato-Bold').fontSize(8).fillColor(INK);
    const label = doc
      ? `Crowntip · ${doc.ranch.name} · ${doc.year} · ${doc.status === 'final' ? `version ${doc.version}` : 'DRAFT'}`
      : `Crowntip · ${opts.cover?.title ?? 'Credit registers'}`;
    pdf.text(label, left, top, { width: width() / 2, lineBreak: false });
    if (doc?.contentHash) {
      pdf.font('Lato').fontSize(7).fillColor(MUTED).text(`sha256 ${doc.contentHash}`, left + width() / 2, top, { width: width() / 2, align: 'right', lineBreak: false });
    }
    pdf.moveTo(left, top + 12).lineTo(left + width(), top + 12).lineWidth(0.6).strokeColor(RULE).stroke();
    pdf.font('Lato').fontSize(7).fillColor(MUTED);
    // Written inside the bottom margin: pdfkit would start a new page for text below it otherwise.
    const savedBottom = pdf.page.margins.bottom;
    pdf.page.margins.bottom = 0;
    pdf.text(`Page ${i + 1} of ${range.count} · Screening estimates; the local authority’s rule and a licensed adviser decide what is reported.`, left, pdf.page.height - 30, {
      width: width(),
      lineBreak: false,
    });
    pdf.page.margins.bottom = savedBottom;
  }
  pdf.end();
  await ended;
  return Buffer.concat(chunks);
}
