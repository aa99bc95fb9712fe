/** Item `i` of a list built alongside another (one per engine, per read…): there by construction, so a missing one is a bench bug. */
export function nth<T>(items: readonly T[], i: number): T {
  const item = items[i];
  if (item === undefined) throw new Error(`bench: item ${i} of a list of ${items.length} is missing`);
  return item;
}
