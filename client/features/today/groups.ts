import type { TodayItem } from '../../../shared/schemas/walks';

/**
 * Today's plantings in the order a sampler works through them: the ones assigned to them, then
 * the other open plantings; in each group a rejected walk (to be walked again) comes first, the
 * rest keep the server's order.
 */
export interface TodayGroups {
  assigned: TodayItem[];
  other: TodayItem[];
}

const rejectedFirst = (items: TodayItem[]) =>
  items
    .map((item, i) => ({ item, i, rank: item.latestWalk?.status === 'rejected' ? 0 : 1 }))
    .sort((a, b) => a.rank - b.rank || a.i - b.i)
    .map((x) => x.item);

export function groupToday(items: readonly TodayItem[]): TodayGroups {
  return {
    assigned: rejectedFirst(items.filter((i) => i.assigned)),
    other: rejectedFirst(items.filter((i) => !i.assigned)),
  };
}
