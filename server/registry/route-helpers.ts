import { seasonOfDate, todayIso } from '../../shared/registry/season';

/** The season of today's date: what registry lists count cover-cropped area for by default. */
export const currentSeason = () => seasonOfDate(todayIso());
