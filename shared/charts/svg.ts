/*
 * Small, pure SVG charts for Crowntip's pages and printouts: an x–y plot made of layers (points,
 * lines, a shaded band, a horizontal reference line, a marked point). The server renders them into
 * the page, so they need no script and print as they show. They read in black and white: each
 * layer has its own dash pattern or glyph and the legend repeats it, colour only helps.
 * No DOM, Node or framework imports: the phone can render the same charts later.
 */

import { formatNumber } from '../format/figures';

export interface ChartPoint {
  x: number;
  y: number;
}

export type ChartLayer =
  | { kind: 'points'; label: string; points: ChartPoint[] }
  | { kind: 'line'; label: string; points: ChartPoint[]; style?: 'curve' | 'plain' }
  | { kind: 'band'; label: string; lower: ChartPoint[]; upper: ChartPoint[] }
  | { kind: 'hline'; label: string; y: number; style?: 'threshold' | 'zero' }
  | { kind: 'marker'; label: string; x: number; y: number; text: string };

export interface AxisSpec {
  label: string;
  /** Fixed ends; otherwise the data's extent widened to nice tick values. */
  min?: number;
  max?: number;
  /** Always include this value in the axis (e.g. 0 for biomass). */
  include?: number;
}

export interface ChartSpec {
  /** Unique within the page: prefixes the ids of the title, description and clip path. */
  id: string;
  title: string;
  description: string;
  xAxis: AxisSpec;
  yAxis: AxisSpec;
  layers: ChartLayer[];
  width?: number;
  height?: number;
  /** class attribute of the <svg> (e.g. "w-full h-auto"). */
  className?: string;
}

// Crowntip's palette (tailwind.config.ts): loam ink, shoot curve, sky band, clay threshold.
const INK = '#23201a';
const GRID = '#d6d1c4';
const CURVE = '#1f5f36';
const BAND_FILL = '#d6e7f5';
const BAND_EDGE = '#1d5b8c';
const THRESHOLD = '#a63d1f';
const FONT = 13;

/** Escapes text for SVG content and attribute values. */
export function escapeXml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

/** A step of 1, 2 or 5 × 10^k giving about `count` intervals over [min, max] (Heckbert's rounding). */
export function niceStep(min: number, max: number, count = 6): number {
  const span = Math.abs(max - min) || Math.abs(max) || 1;
  const raw = span / Math.max(1, count);
  const mag = 10 ** Math.floor(Math.log10(raw));
  const f = raw / mag;
  return (f < 1.5 ? 1 : f < 3 ? 2 : f < 7 ? 5 : 10) * mag;
}

/** Tick values covering [min, max], the ends widened to whole steps. */
export function niceTicks(min: number, max: number, count = 6): { min: number; max: number; step: number; ticks: number[] } {
  if (!(Number.isFinite(min) && Number.isFinite(max))) return { min: 0, max: 1, step: 0.2, ticks: [0, 0.2, 0.4, 0.6, 0.8, 1] };
  if (min === max) {
    const pad = Math.abs(min) * 0.1 || 1;
    min -= pad;
    max += pad;
  }
  const step = niceStep(min, max, count);
  const lo = Math.floor(min / step + 1e-9) * step;
  const hi = Math.ceil(max / step - 1e-9) * step;
  const ticks: number[] = [];
  for (let i = 0; lo + i * step <= hi + step * 1e-9; i++) ticks.push(Number((lo + i * step).toPrecision(12)));
  return { min: lo, max: hi, step, ticks };
}

/**
 * Tick label: as many decimals as the step needs, written by the shared formatter (thousands
 * grouped with a comma), with a true minus sign (−) below zero.
 */
export function tickLabel(value: number, step: number): string {
  const decimals = Math.max(0, Math.min(6, -Math.floor(Math.log10(step) + 1e-9)));
  const text = formatNumber(Math.abs(value), decimals);
  return (value < 0 && /[1-9]/.test(text) ? '−' : '') + text;
}

const r2 = (v: number) => Math.round(v * 100) / 100;

function extent(spec: ChartSpec, axis: 'x' | 'y'): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  const see = (v: number) => {
    if (Number.isFinite(v)) {
      lo = Math.min(lo, v);
      hi = Math.max(hi, v);
    }
  };
  for (const layer of spec.layers) {
    switch (layer.kind) {
      case 'points':
      case 'line':
        for (const p of layer.points) see(p[axis]);
        break;
      case 'band':
        for (const p of [...layer.lower, ...layer.upper]) see(p[axis]);
        break;
      case 'hline':
        if (axis === 'y') see(layer.y);
        break;
      case 'marker':
        see(layer[axis]);
        break;
    }
  }
  const a = axis === 'x' ? spec.xAxis : spec.yAxis;
  if (a.include !== undefined) see(a.include);
  if (lo === Infinity) return [0, 1];
  return [a.min ?? lo, a.max ?? hi];
}

/** Legend glyph for a layer, drawn in a 28 × 14 box at (x, y) = its top-left corner. */
function glyph(layer: ChartLayer, x: number, y: number): string {
  const mid = y + 7;
  switch (layer.kind) {
    case 'points':
      return `<circle cx="${x + 14}" cy="${mid}" r="4" fill="#fff" stroke="${INK}" stroke-width="1.5"/>`;
    case 'line':
      return layer.style === 'plain'
        ? `<line x1="${x}" y1="${mid}" x2="${x + 28}" y2="${mid}" stroke="${INK}" stroke-width="1.5"/>`
        : `<line x1="${x}" y1="${mid}" x2="${x + 28}" y2="${mid}" stroke="${CURVE}" stroke-width="3"/>`;
    case 'band':
      return `<rect x="${x}" y="${y + 1}" width="28" height="12" fill="${BAND_FILL}" stroke="${BAND_EDGE}" stroke-width="1" stroke-dasharray="5 3"/>`;
    case 'hline':
      return layer.style === 'zero'
        ? `<line x1="${x}" y1="${mid}" x2="${x + 28}" y2="${mid}" stroke="${INK}" stroke-width="1"/>`
        : `<line x1="${x}" y1="${mid}" x2="${x + 28}" y2="${mid}" stroke="${THRESHOLD}" stroke-width="2" stroke-dasharray="9 3 2 3"/>`;
    case 'marker':
      return `<line x1="${x + 14}" y1="${y}" x2="${x + 14}" y2="${y + 14}" stroke="${INK}" stroke-width="1.5" stroke-dasharray="2 2"/><path d="M${x + 14} ${mid - 5}l5 5-5 5-5-5z" fill="${THRESHOLD}" stroke="${INK}" stroke-width="1"/>`;
  }
}

/** Rough text width (Lato at 13 px averages about 0.55 em per character). */
const textWidth = (text: string, size = FONT) => text.length * size * 0.55;

/** The chart as an SVG string, safe to put in an HTML page as is (all text escaped). */
export function renderChart(spec: ChartSpec): string {
  const W = spec.width ?? 720;
  const id = spec.id.replace(/[^A-Za-z0-9_-]/g, '');
  const legendLayers = spec.layers.filter((l) => l.label);

  // Legend rows first: they decide the height left for the plot.
  const legendItems: { layer: ChartLayer; x: number; row: number }[] = [];
  let lx = 0;
  let row = 0;
  const legendWidth = W - 90;
  for (const layer of legendLayers) {
    const w = 36 + textWidth(layer.label) + 18;
    if (lx > 0 && lx + w > legendWidth) {
      row++;
      lx = 0;
    }
    legendItems.push({ layer, x: lx, row });
    lx += w;
  }
  const legendHeight = legendItems.length ? (row + 1) * 22 + 8 : 0;
  const H = (spec.height ?? 420) + legendHeight;
  const m = { left: 78, right: 24, top: 16, bottom: 58 + legendHeight };
  const pw = W - m.left - m.right;
  const ph = H - m.top - m.bottom;

  const [x0, x1] = extent(spec, 'x');
  const [y0, y1] = extent(spec, 'y');
  const xt = niceTicks(spec.xAxis.min ?? x0, spec.xAxis.max ?? x1);
  const yt = niceTicks(spec.yAxis.min ?? y0, spec.yAxis.max ?? y1);
  const xMin = spec.xAxis.min ?? xt.min;
  const xMax = spec.xAxis.max ?? xt.max;
  const yMin = spec.yAxis.min ?? yt.min;
  const yMax = spec.yAxis.max ?? yt.max;
  const sx = (v: number) => r2(m.left + ((v - xMin) / (xMax - xMin || 1)) * pw);
  const sy = (v: number) => r2(m.top + ph - ((v - yMin) / (yMax - yMin || 1)) * ph);
  const path = (pts: ChartPoint[]) =>
    pts
      .filter((p) => Number.isFinite(p.x) && Number.isFinite(p.y))
      .map((p, i) => `${i ? 'L' : 'M'}${sx(p.x)} ${sy(p.y)}`)
      .join('');

  const out: string[] = [];
  out.push(
    `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${W} ${H}" width="${W}" height="${H}" role="img" aria-label="${escapeXml(spec.title)}" aria-describedby="${id}-desc"${spec.className ? ` class="${escapeXml(spec.className)}"` : ''} font-family="Lato, system-ui, sans-serif" font-size="${FONT}">`,
    `<title id="${id}-title">${escapeXml(spec.title)}</title>`,
    `<desc id="${id}-desc">${escapeXml(spec.description)}</desc>`,
    `<defs><clipPath id="${id}-plot"><rect x="${m.left}" y="${m.top}" width="${pw}" height="${ph}"/></clipPath></defs>`,
    `<rect x="${m.left}" y="${m.top}" width="${pw}" height="${ph}" fill="#fff" stroke="${INK}" stroke-width="1"/>`,
  );

  // Grid and ticks.
  const axis: string[] = [];
  for (const t of xt.ticks) {
    if (t < xMin - 1e-9 || t > xMax + 1e-9) continue;
    const x = sx(t);
    axis.push(`<line x1="${x}" y1="${m.top}" x2="${x}" y2="${m.top + ph}" stroke="${GRID}" stroke-width="0.75"/>`);
    axis.push(`<line x1="${x}" y1="${m.top + ph}" x2="${x}" y2="${m.top + ph + 5}" stroke="${INK}"/>`);
    axis.push(`<text x="${x}" y="${m.top + ph + 20}" text-anchor="middle" fill="${INK}">${tickLabel(t, xt.step)}</text>`);
  }
  for (const t of yt.ticks) {
    if (t < yMin - 1e-9 || t > yMax + 1e-9) continue;
    const y = sy(t);
    axis.push(`<line x1="${m.left}" y1="${y}" x2="${m.left + pw}" y2="${y}" stroke="${GRID}" stroke-width="0.75"/>`);
    axis.push(`<line x1="${m.left - 5}" y1="${y}" x2="${m.left}" y2="${y}" stroke="${INK}"/>`);
    axis.push(`<text x="${m.left - 8}" y="${r2(y + 4)}" text-anchor="end" fill="${INK}">${tickLabel(t, yt.step)}</text>`);
  }
  axis.push(`<text x="${r2(m.left + pw / 2)}" y="${m.top + ph + 42}" text-anchor="middle" font-weight="700" fill="${INK}">${escapeXml(spec.xAxis.label)}</text>`);
  axis.push(
    `<text transform="translate(18 ${r2(m.top + ph / 2)}) rotate(-90)" text-anchor="middle" font-weight="700" fill="${INK}">${escapeXml(spec.yAxis.label)}</text>`,
  );
  out.push(`<g aria-hidden="true">${axis.join('')}</g>`);

  // Layers, clipped to the plot area; bands first so lines and points sit on top.
  const order: Record<ChartLayer['kind'], number> = { band: 0, hline: 1, line: 2, points: 3, marker: 4 };
  const layers = [...spec.layers].sort((a, b) => order[a.kind] - order[b.kind]);
  const body: string[] = [];
  const labels: string[] = [];
  for (const layer of layers) {
    switch (layer.kind) {
      case 'band': {
        const lower = layer.lower.filter((p) => Number.isFinite(p.y));
        const upper = layer.upper.filter((p) => Number.isFinite(p.y));
        if (lower.length < 2 || upper.length < 2) break;
        const poly = [...upper, ...[...lower].reverse()].map((p) => `${sx(p.x)},${sy(p.y)}`).join(' ');
        body.push(`<polygon points="${poly}" fill="${BAND_FILL}" fill-opacity="0.85" stroke="none"/>`);
        body.push(`<path d="${path(upper)}" fill="none" stroke="${BAND_EDGE}" stroke-width="1.25" stroke-dasharray="5 3"/>`);
        body.push(`<path d="${path(lower)}" fill="none" stroke="${BAND_EDGE}" stroke-width="1.25" stroke-dasharray="5 3"/>`);
        break;
      }
      case 'hline': {
        const y = sy(layer.y);
        body.push(
          layer.style === 'zero'
            ? `<line x1="${m.left}" y1="${y}" x2="${m.left + pw}" y2="${y}" stroke="${INK}" stroke-width="1"/>`
            : `<line x1="${m.left}" y1="${y}" x2="${m.left + pw}" y2="${y}" stroke="${THRESHOLD}" stroke-width="2" stroke-dasharray="9 3 2 3"/>`,
        );
        break;
      }
      case 'line':
        body.push(
          layer.style === 'plain'
            ? `<path d="${path(layer.points)}" fill="none" stroke="${INK}" stroke-width="1.5"/>`
            : `<path d="${path(layer.points)}" fill="none" stroke="${CURVE}" stroke-width="3" stroke-linejoin="round"/>`,
        );
        break;
      case 'points':
        body.push(
          `<g fill="#fff" fill-opacity="0.6" stroke="${INK}" stroke-width="1.25">${layer.points
            .filter((p) => Number.isFinite(p.x) && Number.isFinite(p.y))
            .map((p) => `<circle cx="${sx(p.x)}" cy="${sy(p.y)}" r="3.5"/>`)
            .join('')}</g>`,
        );
        break;
      case 'marker': {
        const x = sx(layer.x);
        const y = sy(layer.y);
        body.push(`<line x1="${x}" y1="${y}" x2="${x}" y2="${m.top + ph}" stroke="${INK}" stroke-width="1.5" stroke-dasharray="2 2"/>`);
        body.push(`<path d="M${x} ${r2(y - 7)}l7 7-7 7-7-7z" fill="${THRESHOLD}" stroke="${INK}" stroke-width="1.25"/>`);
        // The value beside the axis end of the drop line, on a white ground so it reads over the grid.
        const right = x + 8 + textWidth(layer.text) < m.left + pw;
        const tx = right ? x + 6 : x - 6;
        const ty = m.top + ph - 8;
        const tw = textWidth(layer.text) + 6;
        labels.push(`<rect x="${r2(right ? tx - 3 : tx - tw + 3)}" y="${ty - 13}" width="${r2(tw)}" height="17" fill="#fff" fill-opacity="0.9"/>`);
        labels.push(`<text x="${tx}" y="${ty}" text-anchor="${right ? 'start' : 'end'}" font-weight="700" fill="${INK}">${escapeXml(layer.text)}</text>`);
        break;
      }
    }
  }
  out.push(`<g clip-path="url(#${id}-plot)">${body.join('')}</g>`);
  if (labels.length) out.push(`<g>${labels.join('')}</g>`);

  // Legend below the x-axis label.
  if (legendItems.length) {
    const top = m.top + ph + 56;
    const items = legendItems.map(({ layer, x, row: r }) => {
      const gx = r2(m.left + x);
      const gy = top + r * 22;
      return `${glyph(layer, gx, gy)}<text x="${r2(gx + 36)}" y="${gy + 11}" fill="${INK}">${escapeXml(layer.label)}</text>`;
    });
    out.push(`<g>${items.join('')}</g>`);
  }
  out.push('</svg>');
  return out.join('');
}

/*
 * A small horizontal bar chart (credit by ranch on the registers overview). Presentation attributes
 * only (the content security policy allows no inline style). The bars are solid ink-dark green with
 * the value written beside each, so the chart reads in black and white too.
 */
export interface Bar {
  label: string;
  /** In the unit the axis shows (e.g. lb N). */
  value: number;
  /** Written beside the bar, e.g. "1,234 lb N". */
  valueText: string;
  /** Drawn hatched-light (e.g. a draft, not finalised). */
  muted?: boolean;
}

/** Axis end and step: 1, 2 or 5 × 10^k, about four steps, at least 1 (whole units on the axis). null when nothing is above 0. */
function niceAxis(max: number): { max: number; step: number } | null {
  if (!(max > 0)) return null;
  const raw = max / 4;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const f = raw / mag;
  const step = Math.max(1, (f <= 1 ? 1 : f <= 2 ? 2 : f <= 5 ? 5 : 10) * mag);
  return { max: Math.ceil(max / step - 1e-9) * step, step };
}

export function barChartSvg(opts: { id: string; title: string; description: string; bars: Bar[]; axisLabel: string; formatTick: (n: number) => string; width?: number; emptyNote?: string }): string {
  const width = opts.width ?? 760;
  const labelW = 190;
  const valueW = 120;
  const barH = 22;
  const gap = 10;
  const top = 8;
  const axisH = 44;
  const plotW = width - labelW - valueW;
  const height = top + opts.bars.length * (barH + gap) + axisH;
  // Nothing above 0 (no credit yet): no invented 0–4 scale, only the bars' labels, their values and a note.
  const axis = niceAxis(Math.max(0, ...opts.bars.map((b) => b.value)));
  const max = axis?.max ?? 1;
  const x = (v: number) => labelW + (plotW * Math.min(max, Math.max(0, v))) / max;
  const ticks: number[] = [];
  if (axis) for (let v = 0; v <= max + 1e-9; v += axis.step) ticks.push(v);
  const bottom = top + opts.bars.length * (barH + gap);
  const parts: string[] = [];
  parts.push(
    `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${width} ${height}" width="${width}" height="${height}" class="register-chart w-full h-auto" role="img" aria-labelledby="${opts.id}-title ${opts.id}-desc">`,
    `<title id="${opts.id}-title">${escapeXml(opts.title)}</title><desc id="${opts.id}-desc">${escapeXml(opts.description)}</desc>`,
    `<defs><pattern id="${opts.id}-hatch" width="6" height="6" patternUnits="userSpaceOnUse" patternTransform="rotate(45)"><rect width="6" height="6" fill="#ffffff"/><line x1="0" y1="0" x2="0" y2="6" stroke="#1f5f36" stroke-width="3"/></pattern></defs>`,
  );
  for (const t of ticks) {
    parts.push(`<line x1="${x(t).toFixed(1)}" y1="${top - 4}" x2="${x(t).toFixed(1)}" y2="${bottom}" stroke="#d6d1c4" stroke-width="1"/>`);
    parts.push(`<text x="${x(t).toFixed(1)}" y="${bottom + 16}" font-size="12" text-anchor="middle" fill="#23201a">${escapeXml(opts.formatTick(t))}</text>`);
  }
  opts.bars.forEach((b, i) => {
    const y = top + i * (barH + gap);
    const w = Math.max(0, x(b.value) - labelW);
    const label = b.label.length > 28 ? `${b.label.slice(0, 27)}…` : b.label;
    parts.push(`<text x="${labelW - 8}" y="${y + barH / 2 + 4}" font-size="13" text-anchor="end" fill="#23201a">${escapeXml(label)}</text>`);
    parts.push(
      `<rect x="${labelW}" y="${y}" width="${w.toFixed(1)}" height="${barH}" fill="${b.muted ? `url(#${opts.id}-hatch)` : '#1f5f36'}" stroke="#1f5f36" stroke-width="${w > 0 ? 1 : 0}"/>`,
    );
    parts.push(`<text x="${(x(b.value) + 6).toFixed(1)}" y="${y + barH / 2 + 4}" font-size="13" font-weight="700" fill="#23201a">${escapeXml(b.valueText)}</text>`);
  });
  parts.push(`<line x1="${labelW}" y1="${top - 4}" x2="${labelW}" y2="${bottom}" stroke="#23201a" stroke-width="1"/>`);
  parts.push(
    axis
      ? `<text x="${labelW + plotW / 2}" y="${bottom + 36}" font-size="12" text-anchor="middle" fill="#23201a">${escapeXml(opts.axisLabel)}</text>`
      : `<text x="${labelW + plotW / 2}" y="${bottom + 20}" font-size="12" text-anchor="middle" fill="#23201a">${escapeXml(opts.emptyNote ?? 'Nothing to chart yet: every value is 0.')}</text>`,
  );
  parts.push('</svg>');
  return parts.join('');
}
