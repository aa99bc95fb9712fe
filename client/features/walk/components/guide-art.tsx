/*
 * Simple line drawings for the measuring guide (our own; currentColor strokes, straw accents).
 * They show the idea, not the scene: big shapes that read in sunlight on a small screen.
 */
const common = {
  viewBox: '0 0 160 110',
  fill: 'none',
  stroke: 'currentColor',
  strokeWidth: 3,
  strokeLinecap: 'round' as const,
  strokeLinejoin: 'round' as const,
  className: 'h-auto w-full max-w-56 text-loam',
  role: 'img' as const,
};

const ACCENT = '#b07d1d';
const SOIL = '#8a5f18';

/** Plants in a row, a marker falling between them, the nearest plant ringed. */
export function ArtRandom({ label }: { label: string }) {
  return (
    <svg {...common} aria-label={label}>
      <path d="M8 92h144" stroke={SOIL} />
      {[22, 44, 66, 96, 118, 140].map((x, k) => (
        <path
          key={x}
          d={`M${x} 92c0-12-1-24 ${k % 2 ? 2 : -2}-${38 - (k % 3) * 6}M${x} 82c-8-4-13-11-15-21M${x} 74c7-4 11-10 13-18`}
          strokeWidth={2.5}
        />
      ))}
      <path d="M78 18l8 22" stroke={ACCENT} strokeWidth={4} />
      <path d="M74 30l-6 4M92 26l6 2" strokeWidth={2} />
      <circle cx={96} cy={72} r={20} stroke={ACCENT} strokeDasharray="5 4" />
    </svg>
  );
}

/** A spade going straight down beside a plant. */
export function ArtDig({ label }: { label: string }) {
  return (
    <svg {...common} aria-label={label}>
      <path d="M8 70h144" stroke={SOIL} />
      <path d="M60 70V28M60 50c-8-5-12-12-12-20M60 44c8-5 11-11 11-18" />
      <path d="M54 70c2 8 4 14 6 18M62 70c2 6 6 12 10 14M58 70c-4 6-8 10-12 12" strokeWidth={2} />
      <path d="M104 6v44" strokeWidth={5} />
      <path d="M94 6h20" strokeWidth={5} />
      <path d="M96 50h16l-2 34c-1 6-11 6-12 0z" fill="#d6d1c4" />
      <path d="M130 60l0 24M124 78l6 8 6-8" stroke={ACCENT} strokeWidth={3} />
    </svg>
  );
}

/** The base of a plant: stem, the crown knot, the crown roots, and the start point marked. */
export function ArtCrown({ label }: { label: string }) {
  return (
    <svg {...common} aria-label={label}>
      <path d="M60 8v52M60 30c-10-6-16-14-16-24M60 22c10-6 14-12 14-20" />
      <ellipse cx={60} cy={64} rx={9} ry={6} fill="#ebe8e0" />
      <path d="M54 68c-6 10-14 18-24 24M58 70c-2 12-4 22-8 32M62 70c2 12 6 22 12 30M66 68c6 10 14 18 24 22" strokeWidth={2} />
      <path d="M80 64h44" stroke={ACCENT} strokeWidth={3} />
      <path d="M86 58l-8 6 8 6" stroke={ACCENT} strokeWidth={3} />
      <circle cx={70} cy={64} r={4} fill={ACCENT} stroke="none" />
    </svg>
  );
}

/** The main shoot held straight beside a tape, crown to awn tip. */
export function ArtMeasure({ label }: { label: string }) {
  return (
    <svg {...common} aria-label={label}>
      <rect x={100} y={6} width={18} height={98} rx={2} fill="#faedc8" />
      {[14, 26, 38, 50, 62, 74, 86, 98].map((y) => (
        <path key={y} d={`M100 ${y}h${y % 24 === 2 ? 10 : 6}`} strokeWidth={2} />
      ))}
      <path d="M70 94V24" />
      <path d="M70 24c-3-4-3-8-2-12M70 24c3-4 3-8 2-12M70 34c-3-4-3-8-2-12M70 34c3-4 3-8 2-12" strokeWidth={2} />
      <path d="M70 12L68 2M70 12l2-10" strokeWidth={1.5} />
      <path d="M70 70c-12-6-20-14-22-26M70 58c-14-2-24 2-30 10" strokeWidth={2} />
      <ellipse cx={70} cy={96} rx={7} ry={4} fill="#ebe8e0" />
      <path d="M88 96V4" stroke={ACCENT} strokeWidth={3} />
      <path d="M83 96h10M83 4h10" stroke={ACCENT} strokeWidth={3} />
    </svg>
  );
}
