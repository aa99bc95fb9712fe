import { useTranslation } from '../../../lib/i18n';
import type { Formatter } from '../../../lib/format';

const W = 340;
const H = 96;
const PAD = 18;
const AXIS_Y = 70;

function niceStep(span: number): number {
  const raw = span / 4;
  const p = 10 ** Math.floor(Math.log10(raw));
  const m = raw / p;
  return (m < 1.5 ? 1 : m < 3 ? 2 : m < 7 ? 5 : 10) * p;
}

/**
 * Each plant's length as a dot on one axis (dots at the same place stack up), the mean as a
 * triangle, and the mean length the calibration needs for the threshold as a line.
 */
export function DotPlot({ lengthsCm, neededCm, f }: { lengthsCm: number[]; neededCm: number | null; f: Formatter }) {
  const { t } = useTranslation();
  if (lengthsCm.length === 0) return null;
  const toUnit = (cm: number) => (f.us ? cm / 2.54 : cm);
  const vals = lengthsCm.map(toUnit);
  const needed = neededCm !== null && Number.isFinite(neededCm) && neededCm > 0 ? toUnit(neededCm) : null;
  const all = needed !== null ? [...vals, needed] : vals;
  let lo = Math.min(...all);
  let hi = Math.max(...all);
  const span = Math.max(hi - lo, f.us ? 4 : 10);
  lo = Math.max(0, lo - span * 0.12);
  hi = hi + span * 0.12;
  const step = niceStep(hi - lo);
  const x = (v: number) => PAD + ((v - lo) / (hi - lo)) * (W - 2 * PAD);
  const ticks: number[] = [];
  for (let v = Math.ceil(lo / step) * step; v <= hi; v += step) ticks.push(v);

  const bins = new Map<number, number>();
  const dots = vals.map((v) => {
    const key = Math.round(x(v) / 9);
    const k = bins.get(key) ?? 0;
    bins.set(key, k + 1);
    return { cx: x(v), cy: AXIS_Y - 9 - k * 12 };
  });
  const mean = vals.reduce((s, v) => s + v, 0) / vals.length;

  return (
    <svg viewBox={`0 0 ${W} ${H}`} role="img" aria-label={t('estimate.plotLabel')} className="h-auto w-full">
      <line x1={PAD} y1={AXIS_Y} x2={W - PAD} y2={AXIS_Y} stroke="#23201a" strokeWidth={2} />
      {ticks.map((v) => (
        <g key={v}>
          <line x1={x(v)} y1={AXIS_Y} x2={x(v)} y2={AXIS_Y + 6} stroke="#23201a" strokeWidth={2} />
          <text x={x(v)} y={AXIS_Y + 20} textAnchor="middle" fontSize={13} fill="#23201a">
            {f.num(v, step < 1 ? 1 : 0)}
          </text>
        </g>
      ))}
      <text x={W - PAD} y={AXIS_Y + 20} textAnchor="end" fontSize={13} fontWeight={700} fill="#23201a" dx={PAD - 2}>
        {f.lengthLabel}
      </text>
      {needed !== null && (
        <g>
          <line x1={x(needed)} y1={6} x2={x(needed)} y2={AXIS_Y} stroke="#a63d1f" strokeWidth={3} strokeDasharray="6 4" />
          <text
            x={x(needed)}
            y={12}
            textAnchor={x(needed) > W - 70 ? 'end' : 'start'}
            dx={x(needed) > W - 70 ? -5 : 5}
            fontSize={13}
            fontWeight={700}
            fill="#8a321a"
          >
            {t('estimate.plotNeeded')} {f.num(needed, 1)}
          </text>
        </g>
      )}
      {dots.map((d, k) => (
        <circle key={k} cx={d.cx} cy={Math.max(8, d.cy)} r={5.5} fill="#1f5f36" stroke="#ffffff" strokeWidth={1.5} />
      ))}
      <path d={`M${x(mean)} ${AXIS_Y + 1}l-7 11h14z`} fill="#e9b949" stroke="#23201a" strokeWidth={1.5} />
    </svg>
  );
}
