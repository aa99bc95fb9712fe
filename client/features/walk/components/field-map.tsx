import { useTranslation } from '../../../lib/i18n';
import type { Boundary } from '../../../../shared/registry/boundary';
import { boundaryOutline } from '../../../../shared/registry/outline';
import type { PlanResult } from '../field-plan';

const W = 340;
const H = 300;
const MARGIN = 22;

/**
 * The field outline (no map tiles: works offline), the walking line and the numbered stops; the
 * sampler's position as a blue dot when known. Without a boundary, a square of the field's area.
 */
export function FieldMap(props: {
  boundary: Boundary | null;
  result: PlanResult;
  nextStop: number | null;
  here: { lat: number; lon: number } | null;
}) {
  const { t } = useTranslation();
  const { plan, shape } = props.result;

  let paths: string[];
  let project: (lon: number, lat: number) => [number, number];
  let points: Array<[number, number]>;
  // The sampling lines (one per leg), and the crossings between them that stay inside the margin.
  let legs: Array<[[number, number], [number, number]]>;
  let crossings: Array<[[number, number], [number, number]]> = [];

  if (shape && props.boundary && plan.legs.every((g) => g.start && g.end)) {
    const outline = boundaryOutline(props.boundary, { width: W, height: H, margin: MARGIN });
    paths = outline.paths;
    project = outline.project;
    points = plan.stops.map((s) => project(s.lng ?? 0, s.lat ?? 0));
    const at = (p: [number, number] | null) => project(...(p ?? [0, 0]));
    legs = plan.legs.map((g) => [at(g.start), at(g.end)]);
    crossings = plan.legs.flatMap((g, i) => {
      const before = plan.legs[i - 1];
      return before && g.transferInside && g.transferM > 0 ? [[at(before.end), at(g.start)] as [[number, number], [number, number]]] : [];
    });
  } else {
    // Schematic square of the field's area: the line runs corner to corner, the margin in from each corner.
    const side = Math.min(W, H) - 2 * MARGIN;
    const x0 = (W - side) / 2;
    const y0 = (H - side) / 2;
    paths = [`M${x0} ${y0} H${x0 + side} V${y0 + side} H${x0} Z`];
    const diagonal = Math.SQRT2 * Math.sqrt(plan.areaHa * 10_000);
    const inset = Math.SQRT2 * plan.edgeMarginM;
    const at = (d: number): [number, number] => {
      const f = (inset + d) / diagonal;
      return [x0 + f * side, y0 + side - f * side];
    };
    points = plan.stops.map((s) => at(s.distanceM));
    legs = [[at(0), at(plan.diagonalM)]];
    project = () => [-100, -100];
  }
  // A plan always has at least one leg (walkPlan lays one even on the smallest field).
  const [start, firstEnd] = legs[0]!;
  const [dx, dy] = [firstEnd[0] - start[0], firstEnd[1] - start[1]];
  const len = Math.hypot(dx, dy) || 1;
  const clamp = (v: number, lo: number, hi: number) => Math.min(hi, Math.max(lo, v));
  const startLabel: [number, number] = [clamp(start[0] - (dx / len) * 24, 22, W - 22), clamp(start[1] - (dy / len) * 18, 10, H - 10)];

  // Stop markers as big as the spacing allows (a long walk with many stops packs them close).
  let gap = Infinity;
  for (let k = 1; k < points.length; k++) gap = Math.min(gap, Math.hypot(points[k]![0] - points[k - 1]![0], points[k]![1] - points[k - 1]![1]));
  const r = Math.max(7, Math.min(13, gap / 2 - 0.5));

  // Drawn only where it really is on this drawing: off the drawing, no dot (never pinned to an edge).
  let here: [number, number] | null = null;
  if (props.here && shape) {
    const [x, y] = project(props.here.lon, props.here.lat);
    if (x >= 8 && x <= W - 8 && y >= 8 && y <= H - 8) here = [x, y];
  }

  return (
    <svg
      viewBox={`0 0 ${W} ${H}`}
      role="img"
      aria-label={t('plan.mapLabel')}
      className="h-auto w-full rounded-xl border-2 border-loam-300 bg-shoot-50"
    >
      {paths.map((d) => (
        <path key={d} d={d} fill="#d6ecdd" fillRule="evenodd" stroke="#1f5f36" strokeWidth={3} strokeLinejoin="round" />
      ))}
      {crossings.map(([p, q], i) => (
        <line key={`c${i}`} x1={p[0]} y1={p[1]} x2={q[0]} y2={q[1]} stroke="#6f6757" strokeWidth={2} strokeDasharray="2 5" strokeLinecap="round" />
      ))}
      {legs.map(([p, q], i) => (
        <line key={`l${i}`} x1={p[0]} y1={p[1]} x2={q[0]} y2={q[1]} stroke="#23201a" strokeWidth={3} strokeDasharray="8 6" strokeLinecap="round" />
      ))}
      {points.map(([x, y], k) => {
        const n = k + 1;
        const next = n === props.nextStop;
        return (
          <g key={n}>
            <circle cx={x} cy={y} r={next ? r + 2 : r} fill={next ? '#e9b949' : '#ffffff'} stroke="#23201a" strokeWidth={2.5} />
            {(r >= 9 || next || n === 1 || n === points.length) && (
              <text x={x} y={y} textAnchor="middle" dominantBaseline="central" fontSize={Math.round(r + 2)} fontWeight={700} fill="#23201a">
                {n}
              </text>
            )}
          </g>
        );
      })}
      {/* The start of the first line, labelled behind it (away from the stops along it). */}
      <g>
        <rect x={start[0] - 5} y={start[1] - 5} width={10} height={10} fill="#23201a" />
        <text
          x={startLabel[0]}
          y={startLabel[1]}
          textAnchor="middle"
          dominantBaseline="central"
          fontSize={13}
          fontWeight={700}
          fill="#23201a"
          stroke="#ffffff"
          strokeWidth={4}
          paintOrder="stroke"
        >
          {t('plan.start')}
        </text>
      </g>
      {here && (
        <g>
          <circle cx={here[0]} cy={here[1]} r={13} fill="#1d5b8c" fillOpacity={0.25} />
          <circle cx={here[0]} cy={here[1]} r={7} fill="#1d5b8c" stroke="#ffffff" strokeWidth={3} />
          <text
            x={here[0]}
            y={here[1] + (here[1] > 40 ? -18 : 28)}
            textAnchor={here[0] < 60 ? 'start' : here[0] > W - 60 ? 'end' : 'middle'}
            fontSize={14}
            fontWeight={700}
            fill="#133a59"
            stroke="#ffffff"
            strokeWidth={4}
            paintOrder="stroke"
          >
            {t('plan.here')}
          </text>
        </g>
      )}
    </svg>
  );
}
