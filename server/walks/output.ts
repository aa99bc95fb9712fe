import { toCsv } from '../platform/csv-safe';
import { readerDistance } from './plan-view';
import { cropName } from '../../shared/registry/crops';
import type { Formatter } from '../platform/format';
import { cmToIn, kgPerHaToLbPerAc } from '../../shared/calc/units';
import { escapeXml, niceTicks, tickLabel } from '../../shared/charts/svg';
import type { Boundary } from '../../shared/registry/boundary';
import { boundaryOutline } from '../../shared/registry/outline';
import { lonLatOf } from '../../shared/geo/plane';
import { biomass, formatUpTo, length } from '../../shared/format';
import { WALK_FLAG_LABELS, walkFlags, type WalkFlag } from '../../shared/registry/walk-flags';
import { type Walk } from '../../shared/schemas/walks';
import { SHOOT_N_CAUTION, shootNitrogenText, walkBiomassText, walkVerdictOf, type StoredEstimate } from '../../shared/format/walk';

/** What the walk review pages print: figures in the reader's units, the CSV export, and the SVG dot plot and field sketch. */
// ---- numbers in the reader's units ----

export const mean = (xs: number[]) => (xs.length ? xs.reduce((a, b) => a + b, 0) / xs.length : NaN);

export function walkUnits(fmt: Formatter) {
  const us = fmt.units === 'us';
  const lengthValue = (cm: number) => (us ? cmToIn(cm) : cm);
  const bioValue = (kg: number) => (us ? kgPerHaToLbPerAc(kg) : kg);
  return {
    units: fmt.units,
    shootN: (n: { kgNPerHa: number; interval: [number, number] | null }) => shootNitrogenText(n.kgNPerHa, n.interval, fmt.units),
    shootNCaution: SHOOT_N_CAUTION.en,
    lengthUnit: us ? 'in' : 'cm',
    lengthWord: us ? 'inches' : 'centimetres',
    rateUnit: fmt.rateUnit,
    lengthValue,
    // Figures through the one formatter (shared/format), as on the phone, the register and the PDF.
    len: (cm: number) => length(cm, fmt.units).full,
    bio: (kg: number) => biomass(kg, fmt.units).full,
    range: (r: readonly [number, number]) => `${biomass(r[0], fmt.units).text}–${biomass(r[1], fmt.units).full}`,
    date: fmt.date,
    distance: (m: number) => readerDistance(m, fmt.units),
  };
}
type WalkUnits = ReturnType<typeof walkUnits>;

/** One line of the queue. */
export function walkRow(w: Walk, u: WalkUnits) {
  const e = w.estimate;
  const flags: WalkFlag[] = walkFlags(w);
  const meanCm = e?.meanLengthCm ?? mean(w.plants.map((p) => p.lengthCm));
  return {
    id: w.id,
    field: w.fieldName,
    ranch: w.ranchName,
    sampler: w.sampler.name,
    walkedOn: u.date(w.walkedOn),
    status: w.status,
    n: w.plants.length,
    meanLength: Number.isFinite(meanCm) ? u.len(meanCm) : '—',
    // The same figure and word as the register page, PDF, CSV and e-mail (shared/format/walk.ts).
    estimate: e ? walkBiomassText(e, u.units) : null,
    interval: e ? (e.combinedInterval ? `${Math.round((e.confidence ?? e.level) * 100)} % combined: ${u.range(e.combinedInterval)}` : e.verdict && !e.judgedBeforeDecisionBases ? 'spread unknown' : `${Math.round(e.level * 100)} %: ${u.range(e.interval)}`) : null,
    verdict: e ? walkVerdictOf(e as StoredEstimate).verdict : null,
    flags: flags.map((f) => ({ code: f.code, label: WALK_FLAG_LABELS[f.code] })),
    photos: w.photos.length,
  };
}

// ---- CSV for auditors: one row per plant, SI units as stored ----

const CSV_HEADER = [
  // (one string: its sampler column names a person, not a role of the permissions map)
  ...'walk_id status ranch field crop crop_name variety sampler walked_on stage'.split(' '),
  'stop', 'length_cm', 'lat', 'lon', 'photo',
  'n', 'mean_length_cm', 'biomass_kg_ha', 'interval_low_kg_ha', 'interval_high_kg_ha', 'level', 'threshold_kg_ha', 'meets_threshold', 'extrapolated',
  'calibration_id', 'calibration_version', 'flags', 'submitted_at', 'reviewed_by', 'reviewed_at', 'reject_reason',
];

export function walksCsv(walks: Walk[]): string {
  const rows: Record<string, unknown>[] = [];
  for (const w of walks) {
    const e = w.estimate;
    const flags = walkFlags(w).map((f) => f.code).join(' ');
    const photoStops = new Set(w.photos.map((p) => p.stop));
    for (const p of w.plants) {
      rows.push({
        walk_id: w.id, status: w.status, ranch: w.ranchName, field: w.fieldName, crop: w.crop, crop_name: cropName(w.crop), variety: w.variety, sampler: w.sampler.name,
        walked_on: w.walkedOn, stage: w.stage, stop: p.stop, length_cm: p.lengthCm, lat: p.lat, lon: p.lon, photo: photoStops.has(p.stop),
        n: w.plants.length, mean_length_cm: e?.meanLengthCm, biomass_kg_ha: e?.biomassKgHa, interval_low_kg_ha: e?.interval[0], interval_high_kg_ha: e?.interval[1],
        level: e?.level, threshold_kg_ha: e?.thresholdKgHa, meets_threshold: e?.meetsThreshold, extrapolated: e?.extrapolated,
        calibration_id: e?.calibrationId, calibration_version: e?.calibrationVersion, flags, submitted_at: w.submittedAt,
        reviewed_by: w.reviewedBy?.name, reviewed_at: w.reviewedAt, reject_reason: w.rejectReason,
      });
    }
  }
  return toCsv(rows, CSV_HEADER);
}

// ---- SVG: the plants as a dot plot, the stops on a sketch of the field ----

const INK = '#23201a';
const GRID = '#d6d1c4';
const SHOOT = '#1f5f36';
const CLAY = '#a63d1f';
const PLAN = '#2f5d8a';
const r1 = (v: number) => Math.round(v * 10) / 10;

export interface DotPlotSpec {
  id: string;
  title: string;
  unit: string;
  /** Values in the reader's units. */
  plants: { stop: number; value: number; text: string; outlier: boolean }[];
  mean: { value: number; text: string } | null;
  threshold: { value: number; text: string } | null;
}

/**
 * One dot per plant on a length axis, stacked where dots would overlap; outliers filled and
 * labelled with their stop; the mean as a solid line and the length needed for the threshold as a
 * dash-dot line. Axis ticks from the shared chart helpers.
 */
export function dotPlotSvg(spec: DotPlotSpec): string {
  const id = spec.id.replace(/[^A-Za-z0-9_-]/g, '');
  const W = 600;
  const R = 7;
  const m = { left: 24, right: 24, top: 34 };
  const values = spec.plants.map((p) => p.value);
  const extra = [spec.mean?.value, spec.threshold?.value].filter((v): v is number => v != null && Number.isFinite(v));
  const t = niceTicks(Math.min(...values, ...extra), Math.max(...values, ...extra), 8);
  const pw = W - m.left - m.right;
  const sx = (v: number) => r1(m.left + ((v - t.min) / (t.max - t.min || 1)) * pw);

  // Greedy stacking: each dot takes the lowest row where it overlaps no other dot.
  const rows: number[][] = [];
  const placed = [...spec.plants]
    .sort((a, b) => a.value - b.value || a.stop - b.stop)
    .map((p) => {
      const x = sx(p.value);
      let row = 0;
      while (rows[row]?.some((ox) => Math.abs(ox - x) < 2 * R + 3)) row++;
      (rows[row] ??= []).push(x);
      return { ...p, x, row };
    });
  // At least four rows high, so that a short stack still reads as a plot and the outlier labels fit.
  const stackH = Math.max(4, rows.length + (placed.some((p) => p.outlier) ? 1 : 0)) * (2 * R + 3);
  const axisY = m.top + stackH + 6;
  const H = axisY + 66;
  const cy = (row: number) => r1(axisY - 4 - R - row * (2 * R + 3));

  const out: string[] = [];
  const desc = `${spec.plants.map((p) => `stop ${p.stop}: ${p.text}${p.outlier ? ' (outlier)' : ''}`).join('; ')}.${spec.mean ? ` ${spec.mean.text}.` : ''}${spec.threshold ? ` Length needed for the threshold: ${spec.threshold.text.replace(/^needed /, '')}.` : ''}`;
  out.push(
    `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${W} ${H}" width="${W}" height="${H}" role="img" aria-labelledby="${id}-title" aria-describedby="${id}-desc" class="w-full h-auto max-w-3xl" font-family="Lato, system-ui, sans-serif" font-size="13">`,
    `<title id="${id}-title">${escapeXml(spec.title)}</title><desc id="${id}-desc">${escapeXml(desc)}</desc>`,
  );
  // Axis, ticks and grid.
  const axis: string[] = [`<line x1="${m.left}" y1="${axisY}" x2="${W - m.right}" y2="${axisY}" stroke="${INK}"/>`];
  for (const v of t.ticks) {
    const x = sx(v);
    axis.push(`<line x1="${x}" y1="${m.top - 6}" x2="${x}" y2="${axisY}" stroke="${GRID}" stroke-width="0.75"/>`);
    axis.push(`<line x1="${x}" y1="${axisY}" x2="${x}" y2="${axisY + 5}" stroke="${INK}"/>`);
    axis.push(`<text x="${x}" y="${axisY + 19}" text-anchor="middle" fill="${INK}">${tickLabel(v, t.step)}</text>`);
  }
  axis.push(`<text x="${r1(m.left + pw / 2)}" y="${axisY + 40}" text-anchor="middle" font-weight="700" fill="${INK}">Main shoot length (${escapeXml(spec.unit)})</text>`);
  out.push(`<g aria-hidden="true">${axis.join('')}</g>`);

  // Reference lines with their labels on opposite sides so that they never overlap.
  const refs: string[] = [];
  const meanRight = !spec.threshold || !spec.mean || spec.mean.value >= spec.threshold.value;
  const ref = (v: number, text: string, right: boolean, stroke: string, dash: string) => {
    const x = sx(v);
    refs.push(`<line x1="${x}" y1="${m.top - 8}" x2="${x}" y2="${axisY}" stroke="${stroke}" stroke-width="2"${dash ? ` stroke-dasharray="${dash}"` : ''}/>`);
    const anchorRight = right ? x + 5 + text.length * 7 < W : x - 5 - text.length * 7 < 0;
    refs.push(`<text x="${r1(anchorRight ? x + 5 : x - 5)}" y="${m.top - 14}" text-anchor="${anchorRight ? 'start' : 'end'}" font-weight="700" fill="${stroke}">${escapeXml(text)}</text>`);
  };
  if (spec.threshold) ref(spec.threshold.value, spec.threshold.text, !meanRight, CLAY, '9 3 2 3');
  if (spec.mean) ref(spec.mean.value, spec.mean.text, meanRight, SHOOT, '');
  out.push(`<g>${refs.join('')}</g>`);

  // The dots; each says its stop and length on hover.
  const dots = placed.map((p) => {
    const y = cy(p.row);
    const dot = p.outlier
      ? `<circle cx="${p.x}" cy="${y}" r="${R}" fill="${CLAY}" stroke="${INK}" stroke-width="1.25"><title>Stop ${p.stop}: ${escapeXml(p.text)} (outlier)</title></circle>` +
        `<text x="${p.x}" y="${r1(y - R - 4)}" text-anchor="middle" font-size="11" font-weight="700" fill="${CLAY}">stop ${p.stop}</text>`
      : `<circle cx="${p.x}" cy="${y}" r="${R}" fill="#fff" stroke="${INK}" stroke-width="1.5"><title>Stop ${p.stop}: ${escapeXml(p.text)}</title></circle>`;
    return dot;
  });
  out.push(`<g>${dots.join('')}</g>`);

  // Legend.
  const ly = axisY + 58;
  const legend: string[] = [
    `<circle cx="${m.left + 6}" cy="${ly - 4}" r="${R}" fill="#fff" stroke="${INK}" stroke-width="1.5"/><text x="${m.left + 18}" y="${ly}" fill="${INK}">one plant</text>`,
  ];
  let lx = m.left + 90;
  if (placed.some((p) => p.outlier)) {
    legend.push(`<circle cx="${lx + 6}" cy="${ly - 4}" r="${R}" fill="${CLAY}" stroke="${INK}" stroke-width="1.25"/><text x="${lx + 18}" y="${ly}" fill="${INK}">outlier</text>`);
    lx += 80;
  }
  if (spec.mean) {
    legend.push(`<line x1="${lx}" y1="${ly - 4}" x2="${lx + 24}" y2="${ly - 4}" stroke="${SHOOT}" stroke-width="2"/><text x="${lx + 30}" y="${ly}" fill="${INK}">mean length</text>`);
    lx += 115;
  }
  if (spec.threshold) {
    legend.push(`<line x1="${lx}" y1="${ly - 4}" x2="${lx + 24}" y2="${ly - 4}" stroke="${CLAY}" stroke-width="2" stroke-dasharray="9 3 2 3"/><text x="${lx + 30}" y="${ly}" fill="${INK}">length needed for the threshold</text>`);
  }
  out.push(`<g aria-hidden="true">${legend.join('')}</g>`, '</svg>');
  return out.join('');
}

export interface MapSketchSpec {
  id: string;
  title: string;
  /** The field's outline, if on record. */
  boundary: Boundary | null;
  /** Stops with GPS only. */
  stops: { stop: number; lat: number; lon: number }[];
  outliers: Set<number>;
  units: 'us' | 'metric';
  /** The walk plan's stops and sampling lines, drawn again from the walk's seed (server/walks/plan-view.ts). */
  planned?: { stops: { stop: number; lat: number; lon: number }[]; legs: Array<[[number, number], [number, number]]> } | null;
}

const M_PER_DEG_LAT = 111_320; // metres per degree at the equator, good enough for a sketch scale
const FT_PER_M = 1 / 0.3048;

/**
 * The field's outline (north up) with the walk's stops numbered where GPS was recorded and joined
 * in stop order; without a boundary the stops alone, in a box scaled to them. The projection
 * covers the outline and every stop, so a stop recorded outside the field still shows.
 */
export function mapSketchSvg(spec: MapSketchSpec): string {
  const id = spec.id.replace(/[^A-Za-z0-9_-]/g, '');
  const W = 420;
  const planned = spec.planned?.stops.length ? spec.planned : null;
  const legendH = planned ? 44 : 0;
  const H = 300 + legendH;
  const size = { width: W, height: H - 26 - legendH, margin: 20 };
  const all = [...spec.stops, ...(planned?.stops ?? [])];
  const lons = all.map((s) => s.lon);
  const lats = all.map((s) => s.lat);
  const box: [number, number][] = [
    [Math.min(...lons), Math.min(...lats)],
    [Math.max(...lons), Math.min(...lats)],
    [Math.max(...lons), Math.max(...lats)],
    [Math.min(...lons), Math.max(...lats)],
    [Math.min(...lons), Math.min(...lats)],
  ];
  const fieldPolys = spec.boundary ? (spec.boundary.type === 'Polygon' ? [spec.boundary.coordinates] : spec.boundary.coordinates) : [];
  const outline = boundaryOutline({ type: 'MultiPolygon', coordinates: [...fieldPolys, [box]] }, size);

  const out: string[] = [];
  const desc = [
    ...spec.stops.map((s) => `stop ${s.stop} dug at ${s.lat.toFixed(5)}, ${s.lon.toFixed(5)}`),
    ...(planned?.stops ?? []).map((s) => `stop ${s.stop} planned at ${s.lat.toFixed(5)}, ${s.lon.toFixed(5)}`),
  ].join('; ');
  out.push(
    `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${W} ${H}" width="${W}" height="${H}" role="img" aria-labelledby="${id}-title" aria-describedby="${id}-desc" class="w-full h-auto max-w-md" font-family="Lato, system-ui, sans-serif" font-size="13">`,
    `<title id="${id}-title">${escapeXml(spec.title)}</title><desc id="${id}-desc">${escapeXml(desc)}</desc>`,
    `<rect x="0.5" y="0.5" width="${W - 1}" height="${H - 1}" fill="#fff" stroke="${GRID}"/>`,
  );
  if (fieldPolys.length) {
    for (const d of outline.paths.slice(0, fieldPolys.length)) out.push(`<path d="${d}" fill="#e6efe8" stroke="${SHOOT}" stroke-width="2" fill-rule="evenodd"/>`);
  } else {
    out.push(`<text x="${W / 2}" y="16" text-anchor="middle" fill="${INK}" font-size="12">No field boundary on record: the stops alone</text>`);
  }
  const pts = [...spec.stops].sort((a, b) => a.stop - b.stop).map((s) => ({ ...s, xy: outline.project(s.lon, s.lat) }));
  if (planned) {
    // The plan underneath: its sampling lines, a square per planned stop, and a thin line from each
    // planned stop to where that stop's plant was dug.
    for (const [a, b] of planned.legs) {
      const [pa, pb] = [outline.project(a[0], a[1]), outline.project(b[0], b[1])];
      out.push(`<line x1="${pa[0]}" y1="${pa[1]}" x2="${pb[0]}" y2="${pb[1]}" stroke="${PLAN}" stroke-width="2" stroke-opacity="0.6"/>`);
    }
    const dugAt = new Map(pts.map((p) => [p.stop, p.xy]));
    for (const s of planned.stops) {
      const [x, y] = outline.project(s.lon, s.lat);
      const d = dugAt.get(s.stop);
      if (d) out.push(`<line x1="${x}" y1="${y}" x2="${d[0]}" y2="${d[1]}" stroke="${PLAN}" stroke-width="1"/>`);
      out.push(
        `<g data-planned-stop="${s.stop}" data-lat="${s.lat}" data-lon="${s.lon}"><rect x="${r1(x - 8)}" y="${r1(y - 8)}" width="16" height="16" fill="#eef3fb" stroke="${PLAN}" stroke-width="1.5"/>` +
          (d ? '' : `<text x="${x}" y="${r1(y + 4)}" text-anchor="middle" font-size="10" font-weight="700" fill="${PLAN}">${s.stop}</text>`) +
          `<title>Stop ${s.stop} planned: ${s.lat.toFixed(5)}, ${s.lon.toFixed(5)}</title></g>`,
      );
    }
  }
  if (pts.length > 1) {
    out.push(`<path d="${pts.map((p, i) => `${i ? 'L' : 'M'}${p.xy[0]} ${p.xy[1]}`).join(' ')}" fill="none" stroke="${INK}" stroke-width="1.25" stroke-dasharray="4 3"/>`);
  }
  for (const p of pts) {
    const odd = spec.outliers.has(p.stop);
    out.push(
      `<g><circle cx="${p.xy[0]}" cy="${p.xy[1]}" r="10" fill="${odd ? CLAY : '#fff'}" stroke="${INK}" stroke-width="1.5"/>` +
        `<text x="${p.xy[0]}" y="${r1(p.xy[1] + 4)}" text-anchor="middle" font-size="11" font-weight="700" fill="${odd ? '#fff' : INK}">${p.stop}</text>` +
        `<title>Stop ${p.stop}${odd ? ' (outlier)' : ''}: ${p.lat.toFixed(5)}, ${p.lon.toFixed(5)}</title></g>`,
    );
  }
  // North arrow.
  out.push(`<g aria-hidden="true"><path d="M${W - 22} 14l6 14h-12z" fill="${INK}"/><text x="${W - 22}" y="42" text-anchor="middle" font-weight="700" fill="${INK}">N</text></g>`);
  // Scale bar from the projection: pixels per metre along the middle latitude.
  const fieldLats = fieldPolys.flat(2).map((c) => lonLatOf(c)[1]);
  const lat0 = (Math.min(...lats, ...fieldLats) + Math.max(...lats, ...fieldLats)) / 2;
  const lon0 = lons[0] ?? NaN; // no stops: no scale bar (checked below)
  const dLon = 0.001;
  const pxPerM = Math.abs(outline.project(lon0 + dLon, lat0)[0] - outline.project(lon0, lat0)[0]) / (dLon * M_PER_DEG_LAT * Math.cos((lat0 * Math.PI) / 180));
  if (Number.isFinite(pxPerM) && pxPerM > 0 && pxPerM < 50) {
    const perUnit = spec.units === 'us' ? 1 / FT_PER_M : 1; // metres per display unit
    const target = W / 4 / pxPerM / perUnit; // a quarter of the width, in display units
    const step = 10 ** Math.floor(Math.log10(target));
    const nice = [5, 2, 1].map((k) => k * step).find((v) => v <= target) ?? step;
    const len = r1(nice * perUnit * pxPerM);
    const y = H - 12 - legendH;
    out.push(
      `<g aria-hidden="true"><line x1="16" y1="${y}" x2="${r1(16 + len)}" y2="${y}" stroke="${INK}" stroke-width="3"/>` +
        `<line x1="16" y1="${y - 5}" x2="16" y2="${y + 1}" stroke="${INK}"/><line x1="${r1(16 + len)}" y1="${y - 5}" x2="${r1(16 + len)}" y2="${y + 1}" stroke="${INK}"/>` +
        `<text x="${r1(24 + len)}" y="${y + 4}" fill="${INK}">${formatUpTo(nice, 3)} ${spec.units === 'us' ? 'ft' : 'm'}</text></g>`,
    );
  }
  if (planned) {
    const ly = H - 30;
    out.push(
      `<g aria-hidden="true" font-size="12"><line x1="0" y1="${ly - 14}" x2="${W}" y2="${ly - 14}" stroke="${GRID}"/>` +
        `<rect x="12" y="${ly - 7}" width="14" height="14" fill="#eef3fb" stroke="${PLAN}" stroke-width="1.5"/><text x="32" y="${ly + 4}" fill="${INK}">planned stop</text>` +
        `<circle cx="132" cy="${ly}" r="8" fill="#fff" stroke="${INK}" stroke-width="1.5"/><text x="146" y="${ly + 4}" fill="${INK}">plant dug (GPS)</text>` +
        `<line x1="258" y1="${ly}" x2="282" y2="${ly}" stroke="${PLAN}" stroke-width="2" stroke-opacity="0.6"/><text x="288" y="${ly + 4}" fill="${INK}">sampling line</text>` +
        `<line x1="12" y1="${ly + 18}" x2="26" y2="${ly + 18}" stroke="${PLAN}" stroke-width="1"/><text x="32" y="${ly + 22}" fill="${INK}">planned stop to the plant dug there</text></g>`,
    );
  }
  out.push('</svg>');
  return out.join('');
}
