/*
 * A small horizontal bar chart as SVG text (credit by ranch on the registers overview). Rendered on
 * the server so that it needs no script and prints as it shows; presentation attributes only (the
 * content security policy allows no inline style). The bars are solid ink-dark green with the value
 * written beside each, so the chart reads in black and white too.
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

const esc = (s: string) => s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

/** Axis end and step: 1, 2 or 5 × 10^k, about four steps, at least 1 (whole units on the axis). */
function niceAxis(max: number): { max: number; step: number } {
  if (!(max > 0)) return { max: 4, step: 1 };
  const raw = max / 4;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const f = raw / mag;
  const step = Math.max(1, (f <= 1 ? 1 : f <= 2 ? 2 : f <= 5 ? 5 : 10) * mag);
  return { max: Math.ceil(max / step - 1e-9) * step, step };
}

export function barChartSvg(opts: { id: string; title: string; description: string; bars: Bar[]; axisLabel: string; formatTick: (n: number) => string; width?: number }): string {
  const width = opts.width ?? 760;
  const labelW = 190;
  const valueW = 120;
  const barH = 22;
  const gap = 10;
  const top = 8;
  const axisH = 44;
  const plotW = width - labelW - valueW;
  const height = top + opts.bars.length * (barH + gap) + axisH;
  const axis = niceAxis(Math.max(0, ...opts.bars.map((b) => b.value)));
  const max = axis.max;
  const x = (v: number) => labelW + (plotW * Math.min(max, Math.max(0, v))) / max;
  const ticks: number[] = [];
  for (let v = 0; v <= max + 1e-9; v += axis.step) ticks.push(v);
  const bottom = top + opts.bars.length * (barH + gap);
  const parts: string[] = [];
  parts.push(
    `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${width} ${height}" width="${width}" height="${height}" class="register-chart w-full h-auto" role="img" aria-labelledby="${opts.id}-title ${opts.id}-desc">`,
    `<title id="${opts.id}-title">${esc(opts.title)}</title><desc id="${opts.id}-desc">${esc(opts.description)}</desc>`,
    `<defs><pattern id="${opts.id}-hatch" width="6" height="6" patternUnits="userSpaceOnUse" patternTransform="rotate(45)"><rect width="6" height="6" fill="#ffffff"/><line x1="0" y1="0" x2="0" y2="6" stroke="#1f5f36" stroke-width="3"/></pattern></defs>`,
  );
  for (const t of ticks) {
    parts.push(`<line x1="${x(t).toFixed(1)}" y1="${top - 4}" x2="${x(t).toFixed(1)}" y2="${bottom}" stroke="#d6d1c4" stroke-width="1"/>`);
    parts.push(`<text x="${x(t).toFixed(1)}" y="${bottom + 16}" font-size="12" text-anchor="middle" fill="#23201a">${esc(opts.formatTick(t))}</text>`);
  }
  opts.bars.forEach((b, i) => {
    const y = top + i * (barH + gap);
    const w = Math.max(0, x(b.value) - labelW);
    const label = b.label.length > 28 ? `${b.label.slice(0, 27)}…` : b.label;
    parts.push(`<text x="${labelW - 8}" y="${y + barH / 2 + 4}" font-size="13" text-anchor="end" fill="#23201a">${esc(label)}</text>`);
    parts.push(
      `<rect x="${labelW}" y="${y}" width="${w.toFixed(1)}" height="${barH}" fill="${b.muted ? `url(#${opts.id}-hatch)` : '#1f5f36'}" stroke="#1f5f36" stroke-width="${w > 0 ? 1 : 0}"/>`,
    );
    parts.push(`<text x="${(x(b.value) + 6).toFixed(1)}" y="${y + barH / 2 + 4}" font-size="13" font-weight="700" fill="#23201a">${esc(b.valueText)}</text>`);
  });
  parts.push(`<line x1="${labelW}" y1="${top - 4}" x2="${labelW}" y2="${bottom}" stroke="#23201a" stroke-width="1"/>`);
  parts.push(`<text x="${labelW + plotW / 2}" y="${bottom + 36}" font-size="12" text-anchor="middle" fill="#23201a">${esc(opts.axisLabel)}</text>`);
  parts.push('</svg>');
  return parts.join('');
}
