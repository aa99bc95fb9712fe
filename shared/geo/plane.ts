/*
 * Field-scale plane geometry for the walk plan: a local projection of WGS84 longitude/latitude to
 * metres, and the few exact operations the plan needs (distance to the edges, which parts of a
 * straight line lie at least a margin inside the field). No geometry library: this keeps the
 * phone's plan screen small, and the tests check it against two independent libraries.
 */
import type { Position } from 'geojson';

export type XY = [number, number];
/** A field in the plane: parts, each an outer ring followed by its holes (rings closed or not). */
export type PlaneField = XY[][][];

// WGS84 ellipsoid (NIMA TR8350.2).
const A = 6_378_137;
const F = 1 / 298.257223563;
const E2 = F * (2 - F);
const RAD = Math.PI / 180;

export interface LocalFrame {
  lon0: number;
  lat0: number;
  /** Metres per degree of longitude and of latitude at lat0 (ellipsoid radii of curvature). */
  kx: number;
  ky: number;
}

/** Equirectangular frame at (lon0, lat0): scale error about 1e-4 across a kilometre at mid latitudes. */
export function localFrame(lon0: number, lat0: number): LocalFrame {
  const s = Math.sin(lat0 * RAD);
  const w = 1 - E2 * s * s;
  const n = A / Math.sqrt(w); // prime vertical radius
  const m = (A * (1 - E2)) / (w * Math.sqrt(w)); // meridian radius
  return { lon0, lat0, kx: n * Math.cos(lat0 * RAD) * RAD, ky: m * RAD };
}

/** Longitude and latitude of a GeoJSON position (boundaries are checked to hold both when read). */
export function lonLatOf(p: Position): [number, number] {
  const [lon, lat] = p;
  if (lon === undefined || lat === undefined) throw new RangeError('A position needs longitude and latitude.');
  return [lon, lat];
}

export function toXY(f: LocalFrame, p: Position): XY {
  const [lon, lat] = lonLatOf(p);
  let dl = lon - f.lon0;
  if (dl > 180) dl -= 360;
  if (dl < -180) dl += 360;
  return [dl * f.kx, (lat - f.lat0) * f.ky];
}

export function toLngLat(f: LocalFrame, p: XY): [number, number] {
  let lon = f.lon0 + p[0] / f.kx;
  if (lon > 180) lon -= 360;
  if (lon < -180) lon += 360;
  return [lon, f.lat0 + p[1] / f.ky];
}

export const dist = (a: XY, b: XY) => Math.hypot(a[0] - b[0], a[1] - b[1]);

export function pointSegmentDistance(p: XY, a: XY, b: XY): number {
  const dx = b[0] - a[0];
  const dy = b[1] - a[1];
  const l2 = dx * dx + dy * dy;
  let t = l2 === 0 ? 0 : ((p[0] - a[0]) * dx + (p[1] - a[1]) * dy) / l2;
  t = Math.max(0, Math.min(1, t));
  return Math.hypot(p[0] - a[0] - t * dx, p[1] - a[1] - t * dy);
}

/** Signed area (positive when counter-clockwise) of a ring, closed or not. */
export function ringArea(ring: XY[]): number {
  let s = 0;
  for (let i = 0; i < ring.length; i++) {
    const a = ring[i]!;
    const b = ring[(i + 1) % ring.length]!;
    s += a[0] * b[1] - b[0] * a[1];
  }
  return s / 2;
}

/** Drops the repeated closing position and consecutive duplicates. */
export function openRing(ring: XY[]): XY[] {
  const out: XY[] = [];
  for (const p of ring) {
    const q = out[out.length - 1];
    if (!q || q[0] !== p[0] || q[1] !== p[1]) out.push(p);
  }
  while (out.length > 1 && out[0]![0] === out[out.length - 1]![0] && out[0]![1] === out[out.length - 1]![1]) out.pop();
  return out;
}

export type Edge = [XY, XY];

export function edgesOf(field: PlaneField): Edge[] {
  const edges: Edge[] = [];
  for (const part of field) {
    for (const ring of part) {
      for (let i = 0; i < ring.length; i++) edges.push([ring[i]!, ring[(i + 1) % ring.length]!]);
    }
  }
  return edges;
}

/** Distance from p to the nearest edge of any ring (outer rings and holes). */
export function distanceToEdges(edges: Edge[], p: XY): number {
  let d = Infinity;
  for (const [a, b] of edges) d = Math.min(d, pointSegmentDistance(p, a, b));
  return d;
}

/** Even-odd test over all rings (parts of a valid field do not overlap). */
export function insideField(edges: Edge[], p: XY): boolean {
  let inside = false;
  for (const [a, b] of edges) {
    if (a[1] > p[1] !== b[1] > p[1]) {
      const x = a[0] + ((p[1] - a[1]) * (b[0] - a[0])) / (b[1] - a[1]);
      if (x > p[0]) inside = !inside;
    }
  }
  return inside;
}

function segmentsCross(p: XY, q: XY, a: XY, b: XY): boolean {
  const o = (u: XY, v: XY, w: XY) => (v[0] - u[0]) * (w[1] - u[1]) - (v[1] - u[1]) * (w[0] - u[0]);
  const d1 = o(a, b, p);
  const d2 = o(a, b, q);
  const d3 = o(p, q, a);
  const d4 = o(p, q, b);
  return ((d1 > 0 && d2 < 0) || (d1 < 0 && d2 > 0)) && ((d3 > 0 && d4 < 0) || (d3 < 0 && d4 > 0));
}

/** Smallest distance from segment p–q to any edge (0 when they cross). */
export function segmentDistanceToEdges(edges: Edge[], p: XY, q: XY): number {
  let d = Infinity;
  for (const [a, b] of edges) {
    if (segmentsCross(p, q, a, b)) return 0;
    d = Math.min(d, pointSegmentDistance(p, a, b), pointSegmentDistance(q, a, b), pointSegmentDistance(a, p, q), pointSegmentDistance(b, p, q));
  }
  return d;
}

/** True when the whole segment lies inside the field at least `margin` from every edge. */
export function segmentInBuffer(edges: Edge[], p: XY, q: XY, margin: number): boolean {
  const mid: XY = [(p[0] + q[0]) / 2, (p[1] + q[1]) / 2];
  return insideField(edges, mid) && segmentDistanceToEdges(edges, p, q) >= margin;
}

export function rotate(p: XY, cos: number, sin: number): XY {
  return [p[0] * cos + p[1] * sin, -p[0] * sin + p[1] * cos];
}

export function unrotate(p: XY, cos: number, sin: number): XY {
  return [p[0] * cos - p[1] * sin, p[0] * sin + p[1] * cos];
}

/**
 * x-range where the line y = c meets the capsule (all points within r of segment a–b), or null.
 * The capsule is convex, so its two end discs and its middle band together give one interval.
 */
function capsuleInterval(a: XY, b: XY, r: number, c: number): [number, number] | null {
  let lo = Infinity;
  let hi = -Infinity;
  for (const p of [a, b]) {
    const dy = c - p[1];
    if (Math.abs(dy) < r) {
      const w = Math.sqrt(r * r - dy * dy);
      lo = Math.min(lo, p[0] - w);
      hi = Math.max(hi, p[0] + w);
    }
  }
  const len = dist(a, b);
  if (len > 0) {
    const nx = (-(b[1] - a[1]) / len) * r;
    const ny = ((b[0] - a[0]) / len) * r;
    const quad: XY[] = [
      [a[0] + nx, a[1] + ny],
      [b[0] + nx, b[1] + ny],
      [b[0] - nx, b[1] - ny],
      [a[0] - nx, a[1] - ny],
    ];
    for (let i = 0; i < 4; i++) {
      const u = quad[i]!;
      const v = quad[(i + 1) % 4]!;
      if ((u[1] - c) * (v[1] - c) <= 0 && u[1] !== v[1]) {
        const x = u[0] + ((c - u[1]) * (v[0] - u[0])) / (v[1] - u[1]);
        lo = Math.min(lo, x);
        hi = Math.max(hi, x);
      }
    }
  }
  return lo < hi ? [lo, hi] : null;
}

/**
 * The pieces of the horizontal line y = c lying inside the field and at least `margin` from every
 * edge, sorted left to right. `edges` must already be in the rotated frame.
 */
export function bufferedChords(edges: Edge[], c: number, margin: number): Array<[number, number]> {
  const xs: number[] = [];
  const cut: Array<[number, number]> = [];
  for (const [a, b] of edges) {
    if (a[1] > c !== b[1] > c) xs.push(a[0] + ((c - a[1]) * (b[0] - a[0])) / (b[1] - a[1]));
    if (margin > 0 && Math.min(a[1], b[1]) - margin < c && Math.max(a[1], b[1]) + margin > c) {
      const iv = capsuleInterval(a, b, margin, c);
      if (iv) cut.push(iv);
    }
  }
  xs.sort((p, q) => p - q);
  cut.sort((p, q) => p[0] - q[0]);
  const out: Array<[number, number]> = [];
  for (let i = 0; i + 1 < xs.length; i += 2) {
    let lo = xs[i]!;
    const hi = xs[i + 1]!;
    for (const [u, v] of cut) {
      if (v <= lo) continue;
      if (u >= hi) break;
      if (u > lo) out.push([lo, u]);
      lo = Math.max(lo, v);
      if (lo >= hi) break;
    }
    if (lo < hi) out.push([lo, hi]);
  }
  return out.filter(([l, h]) => h - l > 1e-9);
}

/** Sutherland–Hodgman: the part of a convex polygon on the left of the directed line a→b. */
export function clipLeft(poly: XY[], a: XY, b: XY): XY[] {
  const side = (p: XY) => (b[0] - a[0]) * (p[1] - a[1]) - (b[1] - a[1]) * (p[0] - a[0]);
  const out: XY[] = [];
  for (let i = 0; i < poly.length; i++) {
    const p = poly[i]!;
    const q = poly[(i + 1) % poly.length]!;
    const sp = side(p);
    const sq = side(q);
    if (sp >= 0) out.push(p);
    if ((sp > 0 && sq < 0) || (sp < 0 && sq > 0)) {
      const t = sp / (sp - sq);
      out.push([p[0] + t * (q[0] - p[0]), p[1] + t * (q[1] - p[1])]);
    }
  }
  return out;
}

/** Inward offset of a convex counter-clockwise ring by `margin` (empty when nothing is left). */
export function shrinkConvex(ring: XY[], margin: number): XY[] {
  let poly = ring.slice();
  for (let i = 0; i < ring.length && poly.length >= 3; i++) {
    const a = ring[i]!;
    const b = ring[(i + 1) % ring.length]!;
    const len = dist(a, b);
    if (len === 0) continue;
    const nx = (-(b[1] - a[1]) / len) * margin; // left normal: inward on a counter-clockwise ring
    const ny = ((b[0] - a[0]) / len) * margin;
    poly = clipLeft(poly, [a[0] + nx, a[1] + ny], [b[0] + nx, b[1] + ny]);
  }
  return poly.length >= 3 && ringArea(poly) > 0 ? poly : [];
}

/** Each corner b of a ring (a → b → c): its turn (cross product, positive to the left) and |ab|·|bc|. */
function* cornerTurns(ring: XY[]): Generator<{ cross: number; scale: number }> {
  const k = ring.length;
  for (let i = 0; i < k; i++) {
    const a = ring[i]!;
    const b = ring[(i + 1) % k]!;
    const c = ring[(i + 2) % k]!;
    yield { cross: (b[0] - a[0]) * (c[1] - b[1]) - (b[1] - a[1]) * (c[0] - b[0]), scale: dist(a, b) * dist(b, c) };
  }
}

/** True for a single ring whose turns all go the same way (collinear corners allowed). */
export function isConvexRing(ring: XY[]): boolean {
  let sign = 0;
  for (const { cross, scale } of cornerTurns(ring)) {
    if (Math.abs(cross) <= 1e-9 * scale) continue;
    const s = Math.sign(cross);
    if (sign === 0) sign = s;
    else if (s !== sign) return false;
  }
  return sign !== 0;
}

/** Number of reflex (inward-pointing) corners of a counter-clockwise ring. */
export function reflexCorners(ring: XY[]): number {
  let n = 0;
  for (const { cross, scale } of cornerTurns(ring)) if (cross < -1e-9 * scale) n++;
  return n;
}

/**
 * Douglas–Peucker on a ring (not closed): keeps corners so that every dropped corner lies within
 * `tol` of the kept outline. `error` is the largest such distance (0 when nothing was dropped):
 * distances to the kept outline are within `error` of the distances to the true one.
 */
export function simplifyRing(ring: XY[], tol: number): { ring: XY[]; error: number } {
  const k = ring.length;
  if (k <= 4 || tol <= 0) return { ring, error: 0 };
  let far = 0;
  for (let i = 1; i < k; i++) if (dist(ring[0]!, ring[i]!) > dist(ring[0]!, ring[far]!)) far = i;
  const keep = new Uint8Array(k);
  keep[0] = 1;
  keep[far] = 1;
  let error = 0;
  const stack: Array<[number, number]> = [[0, far], [far, k]];
  while (stack.length) {
    const [i, j] = stack.pop()!;
    const b = ring[j % k]!;
    let worst = -1;
    let worstD = -1;
    for (let m = i + 1; m < j; m++) {
      const d = pointSegmentDistance(ring[m]!, ring[i]!, b);
      if (d > worstD) {
        worstD = d;
        worst = m;
      }
    }
    if (worst < 0) continue;
    if (worstD > tol) {
      keep[worst] = 1;
      stack.push([i, worst], [worst, j]);
    } else {
      error = Math.max(error, worstD);
    }
  }
  const out = ring.filter((_, i) => keep[i]);
  return out.length >= 3 ? { ring: out, error } : { ring, error: 0 };
}
