/**
 * A cover-crop season is the winter it grows through, written "2026-27". Seeding from July on
 * belongs to the season starting that year; seeding before July to the one that started the year
 * before (a late-winter seeding still scavenges that winter's rain).
 */
export const SEASON_PATTERN = /^(\d{4})-(\d{2})$/;

export function isSeason(s: string): boolean {
  const m = SEASON_PATTERN.exec(s);
  return Boolean(m && (Number(m[1]) + 1) % 100 === Number(m[2]));
}

export function seasonOfDate(isoDate: string): string {
  const year = Number(isoDate.slice(0, 4));
  const month = Number(isoDate.slice(5, 7));
  const start = month >= 7 ? year : year - 1;
  return seasonStarting(start);
}

export const seasonStarting = (year: number) => `${String(year).padStart(4, '0')}-${String((year + 1) % 100).padStart(2, '0')}`;

export const seasonStartYear = (season: string) => Number(season.slice(0, 4));

/** Shown with an en dash, as people write it: "2026–27". */
export const seasonLabel = (season: string) => season.replace('-', '–');

export const todayIso = (now = new Date()) => now.toISOString().slice(0, 10);

/** The ISO date `days` days after (or before) an ISO date, in whole UTC days. */
export const addDaysIso = (isoDate: string, days: number) =>
  new Date(Date.parse(`${isoDate.slice(0, 10)}T00:00:00Z`) + days * 86_400_000).toISOString().slice(0, 10);

const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];

/**
 * The one season rule of the planting form, the API and the CSV import: a planting belongs to the
 * season its seeding date falls in. Null when they agree, else the words shown beside the season.
 */
export function seasonMismatch(season: string, seededOn: string): string | null {
  if (!isSeason(season) || !/^\d{4}-\d{2}-\d{2}$/.test(seededOn)) return null;
  const belongs = seasonOfDate(seededOn);
  if (belongs === season) return null;
  const [y = 0, m = 0, d = 0] = seededOn.split('-').map(Number);
  return `Seeded on ${MONTHS[m - 1]} ${d}, ${y} belongs to season ${belongs}, not ${season} (seasons run July to June).`;
}
