import type { Feature, MultiPolygon, Polygon, Position } from 'geojson';
import {
  type Edge,
  type LocalFrame,
  type PlaneField,
  type XY,
  bufferedChords,
  dist,
  edgesOf,
  isConvexRing,
  localFrame,
  lonLatOf,
  openRing,
  reflexCorners,
  ringArea,
  rotate,
  segmentInBuffer,
  shrinkConvex,
  simplifyRing,
  distanceToEdges,
  insideField,
  toLngLat,
  toXY,
  unrotate,
} from '../geo/plane';
import { formatNumber, formatUpTo } from '../format/figures';
import { CalcError } from './errors';
import { M_PER_FT } from './units';
import { requireNonNegative } from './validate';

/** One walking step, about 0.76 m (2.5 ft): common practice, no published source. */
export const PACE_LENGTH_M = 0.76;
export const MAX_STOPS = 100;
export const DEFAULT_EDGE_MARGIN_M = 10;
/** The demo rule's minimum number of plants; a real rule's minimum is passed in as `stops`. */
export const DEFAULT_WALK_STOPS = 10;
/** The margin is reduced when less than this share of the field would be left to walk. */
export const MIN_BUFFERED_SHARE = 0.25;
/** Stops are planned this much further in than the margin, so rounding never puts one a hair closer. */
const SAFETY_M = 0.05;
/** Sweep lines used to cut a concave or multi-part field into parts. */
const SWEEP_LEVELS = 160;
/** Outlines are simplified to within this share of the margin (at most 1 m) before planning, and the margin grown to match. */
const SIMPLIFY_SHARE = 0.1;
/** Parts under this share of the walkable area are left out (slivers at rounded corners). */
const SLIVER_SHARE = 0.02;

export type WalkPattern = 'diagonal' | 'legs' | 'square';
/** Why the pattern: a convex outline, a concave one, holes, several parts, or no boundary on file. */
export type WalkPatternReason = 'convex' | 'concave' | 'holes' | 'parts' | 'no_boundary';

export interface WalkReason {
  code: WalkPatternReason;
  parts: number;
  holes: number;
  /** Inward-pointing corners of the outer rings. */
  reflexCorners: number;
  legs: number;
  /** Direction of the sweep that cut the field into parts, degrees counter-clockwise from east; null for one diagonal. */
  sweepDeg: number | null;
  /** Share of the field at least the margin from every edge. */
  walkableShare: number;
}

export interface WalkLeg {
  /** 1-based, in walking order. */
  index: number;
  /** [lng, lat]; null when planned from the acreage alone. */
  start: [number, number] | null;
  end: [number, number] | null;
  lengthM: number;
  /** Walkable area this leg stands for: its stops are in proportion to it. */
  areaHa: number;
  stops: number;
  /** Between consecutive stops on this leg. */
  spacingM: number;
  /** Straight line from the end of the previous leg to this one's start (0 for the first). */
  transferM: number;
  /** False when that straight line would leave the margin (another part, or round an inner corner). */
  transferInside: boolean;
}

export interface WalkStop {
  /** 1-based. */
  index: number;
  /** Along the route (legs and the transfers between them) from the start of the first leg. */
  distanceM: number;
  distanceFt: number;
  paces: number;
  /** WGS84 position when planned from a boundary; null when planned from the acreage alone. */
  lng: number | null;
  lat: number | null;
  /** 1-based leg it lies on, and its distance from that leg's start. */
  leg: number;
  legDistanceM: number;
}

/** The note as data, for the phone and office to word in their own language. */
export type WalkNotePart =
  | { code: 'pattern'; pattern: WalkPattern; reason: WalkPatternReason; legs: number; stops: number; marginM: number }
  | { code: 'margin_reduced'; askedM: number; usedM: number }
  | { code: 'no_boundary'; areaHa: number }
  | { code: 'pace'; paceM: number };

export interface WalkPlan {
  mode: 'boundary' | 'area';
  pattern: WalkPattern;
  reason: WalkReason;
  /** Total length of the sampling line(s): for one diagonal, its length inside the margin. */
  diagonalM: number;
  /** The whole route: legs plus the straight transfers between them. */
  walkLengthM: number;
  walkLengthFt: number;
  /** Between consecutive stops on the leg holding most stops (every leg's own is in `legs`). */
  spacingM: number;
  spacingFt: number;
  spacingPaces: number;
  /** The margin actually kept from every edge (reduced on a small field; see `edgeMarginAskedM`). */
  edgeMarginM: number;
  edgeMarginAskedM: number;
  /** Start of the first leg and end of the last, [lng, lat]; null without a boundary. */
  start: [number, number] | null;
  end: [number, number] | null;
  legs: WalkLeg[];
  stops: WalkStop[];
  areaHa: number;
  /** Area at least the margin from every edge. */
  walkableAreaHa: number;
  /** Draws the stop positions; the same seed, boundary, margin and stop count give the same stops. */
  seed: string;
  paceLengthM: number;
  note: string;
  noteParts: WalkNotePart[];
}

export interface WalkPlanOptions {
  /** Default: the demo rule's minimum plants (10). */
  stops?: number;
  /** Needed when there is no boundary. */
  areaHa?: number;
  /** Kept from every edge; default 10 m. */
  edgeMarginM?: number;
  /** Omitted: one derived from the boundary and stop count, so the plan is stable until re-drawn. */
  seed?: string | number;
}

type Boundaryish = Polygon | MultiPolygon | Feature<Polygon | MultiPolygon>;

function bad(message: string): never {
  throw new CalcError('bad_boundary', message, 'boundary');
}

/** The boundary as a list of polygons' coordinates, each checked for shape. */
function validParts(boundary: unknown): Position[][][] {
  let g = boundary as { type?: unknown; coordinates?: unknown; geometry?: unknown };
  if (g && typeof g === 'object' && g.type === 'Feature') g = g.geometry as typeof g;
  const kind = g && typeof g === 'object' ? g.type : undefined;
  if ((kind !== 'Polygon' && kind !== 'MultiPolygon') || !Array.isArray(g.coordinates) || g.coordinates.length === 0) {
    bad('The field boundary must be a GeoJSON Polygon or MultiPolygon.');
  }
  const parts = (kind === 'Polygon' ? [g.coordinates] : g.coordinates) as unknown[];
  for (const part of parts) {
    if (!Array.isArray(part) || part.length === 0) bad('Each part of the boundary needs an outer ring.');
    part.forEach((ring, r) => {
      if (!Array.isArray(ring) || ring.length < 4) bad(`Boundary ring ${r + 1} needs at least 4 positions (a closed triangle).`);
      for (const pos of ring as unknown[]) {
        const ok =
          Array.isArray(pos) && pos.length >= 2 &&
          typeof pos[0] === 'number' && Number.isFinite(pos[0]) && Math.abs(pos[0]) <= 180 &&
          typeof pos[1] === 'number' && Number.isFinite(pos[1]) && Math.abs(pos[1]) <= 90;
        if (!ok) bad('Every boundary position must be [longitude, latitude] in degrees.');
      }
      const first = (ring as number[][])[0]!;
      const last = (ring as number[][])[(ring as number[][]).length - 1]!;
      if (first[0] !== last[0] || first[1] !== last[1]) bad(`Boundary ring ${r + 1} is not closed (its last position must repeat the first).`);
    });
    const outer = (part[0] as number[][]).slice(0, -1);
    if (new Set(outer.map((p) => `${p[0]},${p[1]}`)).size < 3) bad('The field boundary needs at least 3 distinct corners.');
  }
  return parts as Position[][][];
}

// ---------------------------------------------------------------------------------------------
// Seeds: a string (or integer) stored with the walk; one uniform draw per plan.

/** FNV-1a, 32 bits. */
function hash32(s: string): number {
  let h = 0x811c9dc5;
  for (let i = 0; i < s.length; i++) {
    h ^= s.charCodeAt(i);
    h = Math.imul(h, 0x01000193);
  }
  return h >>> 0;
}

/** mulberry32: a small public-domain 32-bit generator; enough for one start position. */
function uniformFromSeed(seed: string): number {
  let a = hash32(seed);
  a = (a + 0x6d2b79f5) | 0;
  let t = Math.imul(a ^ (a >>> 15), 1 | a);
  t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
  return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
}

/** A fresh seed for "re-draw": 12 base-36 characters from the platform's random source. */
export function newWalkSeed(random?: () => number): string {
  const c = (globalThis as { crypto?: { getRandomValues?: (a: Uint32Array) => Uint32Array } }).crypto;
  const words = new Uint32Array(2);
  if (!random && c?.getRandomValues) c.getRandomValues(words);
  else for (let i = 0; i < 2; i++) words[i] = Math.floor((random ?? Math.random)() * 4294967296) >>> 0;
  return Array.from(words, (w) => w.toString(36).padStart(7, '0').slice(-6)).join('');
}

function normaliseSeed(seed: unknown): string | null {
  if (seed === undefined || seed === null) return null;
  if (typeof seed === 'number' && Number.isInteger(seed)) return String(seed);
  if (typeof seed === 'string' && seed.length >= 1 && seed.length <= 64) return seed;
  throw new CalcError('bad_option', 'The walk seed must be a whole number or a text of 1 to 64 characters.', 'seed');
}

// ---------------------------------------------------------------------------------------------
// How many stops.

export interface StopSuggestion {
  /** The rule's minimum: the default number of stops. */
  minimum: number;
  /** Suggested for this field; never below the minimum. */
  suggested: number;
  /** Where the suggestion comes from: a rule of thumb with no published source. */
  source: 'common_practice';
  /** What raised it above the minimum: size, visible variability, both, or nothing. */
  why: 'none' | 'large' | 'variable' | 'large_and_variable';
}

/** Fields up to this size need no more than the rule's minimum (common practice, no published source). */
export const LARGE_FIELD_HA = 20;
/** One more stop for every this many hectares beyond LARGE_FIELD_HA (common practice, no published source). */
export const HA_PER_EXTRA_STOP = 5;

/**
 * The rule's minimum, and a suggestion of more for a large or visibly variable field: one more stop
 * per 5 ha beyond 20 ha, half as many again for a patchy stand, at most twice the minimum.
 * Common practice, no published source.
 */
export function suggestStops(areaHa: number, minimum: number = DEFAULT_WALK_STOPS, options: { variable?: boolean } = {}): StopSuggestion {
  if (!Number.isInteger(minimum) || minimum < 1 || minimum > MAX_STOPS) {
    throw new CalcError('bad_option', `The minimum number of plants must be a whole number from 1 to ${MAX_STOPS}.`, 'stops');
  }
  if (typeof areaHa !== 'number' || !Number.isFinite(areaHa) || areaHa <= 0) {
    throw new CalcError('non_positive', 'The field area must be a number greater than zero.', 'areaHa');
  }
  const bySize = minimum + Math.max(0, Math.ceil((areaHa - LARGE_FIELD_HA) / HA_PER_EXTRA_STOP));
  const byVariability = options.variable ? Math.ceil(minimum * 1.5) : minimum;
  const cap = Math.min(MAX_STOPS, 2 * minimum);
  const suggested = Math.min(cap, Math.max(bySize, byVariability));
  const large = bySize > minimum;
  const variable = byVariability > minimum;
  return {
    minimum,
    suggested: Math.max(minimum, suggested),
    source: 'common_practice',
    why: large && variable ? 'large_and_variable' : large ? 'large' : variable ? 'variable' : 'none',
  };
}

// ---------------------------------------------------------------------------------------------
// Geometry of the plan, in the local plane (metres).

interface PlaneLeg {
  a: XY;
  b: XY;
  area: number;
}

interface Layout {
  legs: PlaneLeg[];
  walkableArea: number;
  sweepDeg: number | null;
}

/** Longest segment inside the inward offset of a convex ring (the offset is convex, so any chord is inside). */
function convexLayout(ring: XY[], margin: number): Layout | null {
  const shrunk = margin > 0 ? shrinkConvex(ring, margin) : ring;
  if (shrunk.length < 3) return null;
  let best: [XY, XY] = [shrunk[0]!, shrunk[1]!];
  let bestLen = -1;
  for (let i = 0; i < shrunk.length; i++) {
    for (let j = i + 1; j < shrunk.length; j++) {
      const d = dist(shrunk[i]!, shrunk[j]!);
      if (d > bestLen) {
        bestLen = d;
        best = [shrunk[i]!, shrunk[j]!];
      }
    }
  }
  const area = ringArea(shrunk);
  return { legs: [{ a: best[0], b: best[1], area }], walkableArea: area, sweepDeg: null };
}

interface Level {
  y: number;
  l: number;
  r: number;
}

/**
 * Cuts the walkable field into parts along parallel sweep lines at angle `theta` (a part ends where
 * the lines split, merge or jump, as at an inner corner), then gives each part its longest straight
 * leg that stays inside it.
 */
function sweepLayout(edges: Edge[], theta: number, margin: number, checkMargin: number): Layout {
  const cos = Math.cos(theta);
  const sin = Math.sin(theta);
  const rot: Edge[] = edges.map(([a, b]) => [rotate(a, cos, sin), rotate(b, cos, sin)]);
  let ymin = Infinity;
  let ymax = -Infinity;
  for (const [a] of rot) {
    ymin = Math.min(ymin, a[1]);
    ymax = Math.max(ymax, a[1]);
  }
  const h = (ymax - ymin) / SWEEP_LEVELS;
  const cells: Level[][] = [];
  let open: Array<{ cell: Level[]; l: number; r: number }> = [];
  for (let j = 0; j < SWEEP_LEVELS; j++) {
    const y = ymin + (j + 0.5) * h;
    const chords = bufferedChords(rot, y, margin);
    const overlaps = (p: { l: number; r: number }, c: [number, number]) => c[0] < p.r && c[1] > p.l;
    const next: typeof open = [];
    for (const c of chords) {
      const prev = open.filter((p) => overlaps(p, c));
      let cell: Level[] | null = null;
      if (prev.length === 1 && chords.filter((c2) => overlaps(prev[0]!, c2)).length === 1) {
        const p = prev[0]!;
        const tol = Math.max(3 * h, 0.25 * Math.min(p.r - p.l, c[1] - c[0]));
        if (Math.abs(c[0] - p.l) <= tol && Math.abs(c[1] - p.r) <= tol) cell = p.cell;
      }
      if (!cell) {
        cell = [];
        cells.push(cell);
      }
      cell.push({ y, l: c[0], r: c[1] });
      next.push({ cell, l: c[0], r: c[1] });
    }
    open = next;
  }
  const areaOf = (cell: Level[]) => cell.reduce((s, v) => s + (v.r - v.l) * h, 0);
  const walkableArea = cells.reduce((s, c) => s + areaOf(c), 0);
  const legs: PlaneLeg[] = [];
  for (const cell of cells) {
    const area = areaOf(cell);
    if (area < SLIVER_SHARE * walkableArea) continue;
    const f = cell[0]!;
    const l = cell[cell.length - 1]!;
    const m = cell[Math.floor(cell.length / 2)]!;
    const candidates: Array<[XY, XY]> = [
      [[m.l, m.y], [m.r, m.y]],
      [[f.l, f.y], [l.r, l.y]],
      [[f.r, f.y], [l.l, l.y]],
      [[(f.l + f.r) / 2, f.y], [(l.l + l.r) / 2, l.y]],
    ];
    let best = candidates[0]!;
    let bestLen = -1;
    for (const [a, b] of candidates) {
      const len = dist(a, b);
      if (len <= bestLen) continue;
      // Stay within this part at every sweep line, and inside the margin everywhere in between.
      const within = cell.every((v) => {
        const t = b[1] === a[1] ? 0 : (v.y - a[1]) / (b[1] - a[1]);
        const x = a[0] + t * (b[0] - a[0]);
        return x >= v.l - 1e-6 && x <= v.r + 1e-6;
      });
      if (within && segmentInBuffer(rot, a, b, checkMargin)) {
        best = [a, b];
        bestLen = len;
      }
    }
    legs.push({ a: unrotate(best[0], cos, sin), b: unrotate(best[1], cos, sin), area });
  }
  return { legs, walkableArea, sweepDeg: ((theta * 180) / Math.PI + 360) % 180 };
}

/** Sweep directions worth trying: along and across the longest sides of the largest part. */
function sweepAngles(field: PlaneField): number[] {
  const largest = field.reduce((p, q) => (Math.abs(ringArea(q[0]!)) > Math.abs(ringArea(p[0]!)) ? q : p));
  const ring = largest[0]!;
  const sides = ring.map((a, i) => {
    const b = ring[(i + 1) % ring.length]!;
    return { len: dist(a, b), angle: (Math.atan2(b[1] - a[1], b[0] - a[0]) + Math.PI) % Math.PI };
  });
  sides.sort((p, q) => q.len - p.len);
  const angles: number[] = [];
  const near = (x: number, y: number) => {
    const d = Math.abs(x - y) % Math.PI;
    return Math.min(d, Math.PI - d) < (2 * Math.PI) / 180;
  };
  for (const s of sides) {
    for (const a of [s.angle, (s.angle + Math.PI / 2) % Math.PI]) if (!angles.some((b) => near(a, b))) angles.push(a);
    if (angles.length >= 6) break;
  }
  return angles;
}

function bestSweep(field: PlaneField, edges: Edge[], margin: number, checkMargin: number): Layout {
  let best: Layout | null = null;
  let bestKey: [number, number] = [Infinity, Infinity];
  for (const theta of sweepAngles(field)) {
    const layout = sweepLayout(edges, theta, margin, checkMargin);
    if (layout.legs.length === 0) continue;
    // Fewest legs first, then the most ground covered by the legs.
    const key: [number, number] = [layout.legs.length, -layout.legs.reduce((s, g) => s + dist(g.a, g.b), 0)];
    if (!best || key[0] < bestKey[0] || (key[0] === bestKey[0] && key[1] < bestKey[1] - 1e-6)) {
      best = layout;
      bestKey = key;
    }
  }
  return best ?? { legs: [], walkableArea: 0, sweepDeg: null };
}

/** Walking order: nearest next leg, each entered at its nearer end. */
function orderLegs(legs: PlaneLeg[]): PlaneLeg[] {
  const [first, ...left] = legs;
  if (!first || left.length === 0) return legs;
  const out: PlaneLeg[] = [first];
  while (left.length) {
    const at = out[out.length - 1]!.b;
    let k = 0;
    let flip = false;
    let bestD = Infinity;
    left.forEach((g, i) => {
      const da = dist(at, g.a);
      const db = dist(at, g.b);
      if (Math.min(da, db) < bestD) {
        bestD = Math.min(da, db);
        k = i;
        flip = db < da;
      }
    });
    const g = left.splice(k, 1)[0]!;
    out.push(flip ? { a: g.b, b: g.a, area: g.area } : g);
  }
  return out;
}

function marginSteps(asked: number): number[] {
  return [...new Set([asked, asked / 2, asked / 4, asked / 10, 0])];
}

// ---------------------------------------------------------------------------------------------

/**
 * A field walk plan. Every stop is at least the edge margin (default 10 m) from every edge, holes
 * included. A convex field is walked along the longest straight line inside the margin; a concave
 * field, one with holes or in several parts is cut into parts along parallel lines and walked as one
 * straight leg per part, each part drawing stops in proportion to its area. Stops are placed by
 * systematic sampling with a random start from `seed`: equal shares of area apart, so equally spaced
 * along each leg. Without a boundary, the field is taken as a square of the given area.
 */
export function walkPlan(boundary: Boundaryish | null, options: WalkPlanOptions = {}): WalkPlan {
  const stops = options.stops ?? DEFAULT_WALK_STOPS;
  if (!Number.isInteger(stops) || stops < 1 || stops > MAX_STOPS) {
    throw new CalcError('bad_option', `The number of stops must be a whole number from 1 to ${MAX_STOPS}.`, 'stops');
  }
  const asked = requireNonNegative(options.edgeMarginM ?? DEFAULT_EDGE_MARGIN_M, 'edgeMarginM');
  const givenSeed = normaliseSeed(options.seed);

  let frame: LocalFrame | null = null;
  let legs: PlaneLeg[];
  let used = asked;
  let areaM2: number;
  let walkableM2: number;
  let pattern: WalkPattern;
  let reason: WalkReason;
  let seedBasis: string;
  let edges: Edge[] = [];

  if (boundary === null || boundary === undefined) {
    const ah = options.areaHa;
    if (ah === undefined || ah === null) {
      throw new CalcError('missing_area', 'Without a field boundary, the field area is needed to plan the walk.', 'areaHa');
    }
    if (typeof ah !== 'number' || !Number.isFinite(ah) || ah <= 0) {
      throw new CalcError('non_positive', 'The field area must be a number greater than zero.', 'areaHa');
    }
    areaM2 = ah * 10_000;
    const side = Math.sqrt(areaM2);
    used = marginSteps(asked).find((m) => side > 2 * m && (side - 2 * m) ** 2 >= MIN_BUFFERED_SHARE * areaM2) ?? 0;
    const inner = side - 2 * used;
    walkableM2 = inner * inner;
    legs = [{ a: [used, used], b: [side - used, side - used], area: walkableM2 }];
    pattern = 'square';
    reason = { code: 'no_boundary', parts: 0, holes: 0, reflexCorners: 0, legs: 1, sweepDeg: null, walkableShare: walkableM2 / areaM2 };
    seedBasis = `area:${ah}`;
  } else {
    const parts = validParts(boundary);
    let minLon = Infinity, maxLon = -Infinity, minLat = Infinity, maxLat = -Infinity; // prettier-ignore
    for (const part of parts) {
      for (const [lon, lat] of part[0]!.map(lonLatOf)) {
        minLon = Math.min(minLon, lon);
        maxLon = Math.max(maxLon, lon);
        minLat = Math.min(minLat, lat);
        maxLat = Math.max(maxLat, lat);
      }
    }
    frame = localFrame((minLon + maxLon) / 2, (minLat + maxLat) / 2);
    const f = frame;
    const field: PlaneField = parts.map((part) => part.map((ring) => openRing(ring.map((p) => toXY(f, p)))));
    for (const part of field) if (ringArea(part[0]!) < 0) part[0]!.reverse();
    edges = edgesOf(field);
    areaM2 = field.reduce((s, part) => s + Math.abs(ringArea(part[0]!)) - part.slice(1).reduce((t, r) => t + Math.abs(ringArea(r)), 0), 0);
    const across = dist(toXY(f, [minLon, minLat]), toXY(f, [maxLon, maxLat]));
    if (!(across >= 1)) throw new CalcError('boundary_too_small', 'The field boundary is too small to walk (under 1 m across).', 'boundary');

    const holes = field.reduce((s, part) => s + part.length - 1, 0);
    const plan = (tol: number) => {
      // A traced outline can have thousands of corners: plan on a simplified one and keep its
      // largest departure from the true outline further in, so the true edges are as far away.
      let error = 0;
      const simple: PlaneField = field.map((part) =>
        part.map((ring) => {
          const r = simplifyRing(ring, tol);
          error = Math.max(error, r.error);
          return r.ring;
        }),
      );
      const simpleEdges = edgesOf(simple);
      const convex = simple.length === 1 && holes === 0 && isConvexRing(simple[0]![0]!);
      for (const m of marginSteps(asked)) {
        const inner = m + error + (m > 0 ? SAFETY_M : 0);
        const l = convex ? convexLayout(simple[0]![0]!, inner) : bestSweep(simple, simpleEdges, inner, m + error);
        if (l && l.legs.length > 0 && (l.walkableArea >= MIN_BUFFERED_SHARE * areaM2 || m === 0)) return { layout: l, used: m, convex, simple };
      }
      return null;
    };
    const tol = Math.min(1, SIMPLIFY_SHARE * asked);
    let found = plan(tol);
    // Simplifying can in rare outlines cut a corner the wrong way: then plan on the full outline.
    const keepsMargin = (f: NonNullable<typeof found>) =>
      f.layout.legs.every((g) => [g.a, g.b].every((p) => insideField(edges, p) && distanceToEdges(edges, p) >= f.used));
    if (tol > 0 && (!found || !keepsMargin(found))) found = plan(0);
    if (!found) bad('No walking line fits inside this boundary; check that it is a simple (non-crossing) outline.');
    const { layout, convex } = found;
    used = found.used;
    const reflex = field.reduce((s, part) => s + reflexCorners(part[0]!), 0);
    legs = layout.legs;
    walkableM2 = layout.walkableArea;
    pattern = convex ? 'diagonal' : 'legs';
    reason = {
      code: convex ? 'convex' : field.length > 1 ? 'parts' : holes > 0 ? 'holes' : 'concave',
      parts: field.length,
      holes,
      reflexCorners: reflex,
      legs: legs.length,
      sweepDeg: layout.sweepDeg,
      walkableShare: walkableM2 / areaM2,
    };
    seedBasis = parts.flat(2).map((p) => `${p[0]!.toFixed(7)},${p[1]!.toFixed(7)}`).join(';');
  }

  const seed = givenSeed ?? hash32(`${seedBasis}|${stops}|${asked}`).toString(36);
  legs = orderLegs(legs);

  // Systematic sampling over the walkable area laid end to end along the legs: one stop in each of
  // `stops` equal shares, at the same random offset within every share.
  const totalArea = legs.reduce((s, g) => s + g.area, 0);
  const share = totalArea / stops;
  const offset = uniformFromSeed(seed) * share;
  const lengths = legs.map((g) => dist(g.a, g.b));
  const transfers = legs.map((g, i) => (i === 0 ? 0 : dist(legs[i - 1]!.b, g.a)));
  const legStart: number[] = [];
  let route = 0;
  legs.forEach((_, i) => {
    route += transfers[i]!;
    legStart.push(route);
    route += lengths[i]!;
  });
  const counts = legs.map(() => 0);
  const stopList: WalkStop[] = [];
  let cumulative = 0;
  let leg = 0;
  for (let k = 0; k < stops; k++) {
    const at = offset + k * share;
    while (leg < legs.length - 1 && at >= cumulative + legs[leg]!.area) {
      cumulative += legs[leg]!.area;
      leg++;
    }
    const t = Math.min(1, Math.max(0, (at - cumulative) / legs[leg]!.area));
    const g = legs[leg]!;
    const p: XY = [g.a[0] + t * (g.b[0] - g.a[0]), g.a[1] + t * (g.b[1] - g.a[1])];
    const ll = frame ? toLngLat(frame, p) : null;
    const d = legStart[leg]! + t * lengths[leg]!;
    counts[leg]!++;
    stopList.push({
      index: k + 1,
      distanceM: d,
      distanceFt: d / M_PER_FT,
      paces: d / PACE_LENGTH_M,
      lng: ll ? ll[0] : null,
      lat: ll ? ll[1] : null,
      leg: leg + 1,
      legDistanceM: t * lengths[leg]!,
    });
  }

  const spacings = legs.map((g, i) => (share * lengths[i]!) / g.area);
  const busiest = counts.indexOf(Math.max(...counts));
  const spacingM = stops === 1 ? 0 : spacings[busiest]!;
  const lngLat = (p: XY) => (frame ? toLngLat(frame, p) : null);
  const legList: WalkLeg[] = legs.map((g, i) => ({
    index: i + 1,
    start: lngLat(g.a),
    end: lngLat(g.b),
    lengthM: lengths[i]!,
    areaHa: g.area / 10_000,
    stops: counts[i]!,
    spacingM: spacings[i]!,
    transferM: transfers[i]!,
    transferInside: i === 0 || transfers[i] === 0 || (frame !== null && segmentInBuffer(edges, legs[i - 1]!.b, g.a, used)),
  }));
  reason.legs = legList.length;

  const noteParts: WalkNotePart[] = [{ code: 'pattern', pattern, reason: reason.code, legs: legList.length, stops, marginM: used }];
  if (used < asked) noteParts.push({ code: 'margin_reduced', askedM: asked, usedM: used });
  if (!frame) noteParts.push({ code: 'no_boundary', areaHa: areaM2 / 10_000 });
  noteParts.push({ code: 'pace', paceM: PACE_LENGTH_M });

  return {
    mode: frame ? 'boundary' : 'area',
    pattern,
    reason,
    diagonalM: lengths.reduce((s, x) => s + x, 0),
    walkLengthM: route,
    walkLengthFt: route / M_PER_FT,
    spacingM,
    spacingFt: spacingM / M_PER_FT,
    spacingPaces: spacingM / PACE_LENGTH_M,
    edgeMarginM: used,
    edgeMarginAskedM: asked,
    start: legList[0]!.start,
    end: legList[legList.length - 1]!.end,
    legs: legList,
    stops: stopList,
    areaHa: areaM2 / 10_000,
    walkableAreaHa: walkableM2 / 10_000,
    seed,
    paceLengthM: PACE_LENGTH_M,
    note: englishNote(noteParts),
    noteParts,
  };
}

/** The note in English (the office's language); the phone words `noteParts` in its own. Distances in metres unless `formatM` says otherwise. */
export function englishNote(parts: WalkNotePart[], formatM: (m: number) => string = metres): string {
  const out: string[] = [];
  for (const p of parts) {
    if (p.code === 'pattern') {
      const keep = `keeping ${formatM(p.marginM)} from every edge`;
      if (p.pattern === 'diagonal') out.push(`Walk the longest straight line across the field, ${keep}; dig one plant at each of the ${p.stops} stops.`);
      else if (p.pattern === 'square') out.push(`Walk the diagonal of a square field of this area, ${keep}; dig one plant at each of the ${p.stops} stops.`);
      else {
        const why = p.reason === 'parts' ? 'is in several parts' : p.reason === 'holes' ? 'has a hole in it' : 'is not a simple convex shape';
        out.push(`The field ${why}, so the walk has ${p.legs} straight legs, each part getting stops in proportion to its area, ${keep}; dig one plant at each of the ${p.stops} stops.`);
      }
    } else if (p.code === 'margin_reduced') {
      out.push(`The field is too small for a ${formatM(p.askedM)} edge margin, so ${formatM(p.usedM)} is kept.`);
    } else if (p.code === 'no_boundary') {
      out.push(`No boundary on file: the plan assumes a square field of ${formatNumber(p.areaHa, 2)} ha.`);
    } else {
      out.push(`Paces assume a ${p.paceM} m step (common practice).`);
    }
  }
  return out.join(' ');
}

function metres(m: number): string {
  return `${m >= 10 ? formatNumber(m) : formatUpTo(m, 1)} m`;
}

/** A field's plan as the phone draws it, and whether its boundary on file had to be set aside. */
export interface FieldWalkPlan {
  plan: WalkPlan;
  /** The boundary on file could not be walked, so the plan uses the field's area. */
  boundaryProblem: boolean;
}

/**
 * The plan of a field the way the phone and the office both draw it: from the boundary when there
 * is one that can be walked, else from the field's area; the same seed, boundary, stop count and
 * margin give the same stops on both.
 */
export function fieldWalkPlan(
  boundary: Boundaryish | null,
  areaHa: number,
  stops: number,
  options: { edgeMarginM: number; seed?: string },
): FieldWalkPlan {
  const opts = { stops, areaHa, edgeMarginM: options.edgeMarginM, ...(options.seed ? { seed: options.seed } : {}) };
  if (boundary) {
    try {
      return { plan: walkPlan(boundary, opts), boundaryProblem: false };
    } catch {
      // a degenerate outline: planned from the area below
    }
  }
  return { plan: walkPlan(null, opts), boundaryProblem: boundary !== null };
}
