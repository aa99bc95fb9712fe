// The Crowntip mark: a measuring tape beside a cereal shoot rising from its crown.
// Same drawing as client/assets/mark.svg (a test keeps them in step); colour from currentColor.

interface MarkProps {
  className?: string;
  /** Give a title when the mark stands alone; leave it out beside the word "Crowntip". */
  title?: string;
}

export const MARK_PATHS = [
  { d: 'M6 3v22.5M6 3h3M6 8.6h2M6 14.2h3M6 19.9h2M6 25.5h3', w: 1.5 },
  { d: 'M11 29c4.5-4.3 10.5-4.3 15 0', w: 2.25 },
  { d: 'M18.5 25.5V5M18.5 21.5c2.2-2.6 5-3.7 7.8-3M18.5 17.5c-1.9-2.2-4.1-3-6.3-2.6', w: 2 },
  {
    d: 'M18.5 14c-1.6-.6-2.2-1.8-2.2-3.4M18.5 14c1.6-.6 2.2-1.8 2.2-3.4M18.5 10.5c-1.6-.6-2.2-1.8-2.2-3.4M18.5 10.5c1.6-.6 2.2-1.8 2.2-3.4M18.5 7c-1.4-.6-1.9-1.6-1.9-3M18.5 7c1.4-.6 1.9-1.6 1.9-3M18.5 5V2.2',
    w: 1.6,
  },
] as const;

export function Mark({ className, title }: MarkProps) {
  return (
    <svg
      xmlns="http://www.w3.org/2000/svg"
      viewBox="0 0 32 32"
      fill="none"
      stroke="currentColor"
      strokeLinecap="round"
      strokeLinejoin="round"
      className={className}
      role={title ? 'img' : undefined}
      aria-label={title}
      aria-hidden={title ? undefined : true}
      focusable="false"
    >
      {MARK_PATHS.map((p) => (
        <path key={p.d} d={p.d} strokeWidth={p.w} />
      ))}
    </svg>
  );
}
