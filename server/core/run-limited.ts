/**
 * Runs `work` over `items` with at most `limit` in flight (a lane takes the next item as soon as
 * its last one is done); the results keep the items' order. Bounds CPU- and disk-heavy work
 * (image probes, encodes) without a pool of its own.
 */
export async function runLimited<T, R>(items: readonly T[], limit: number, work: (item: T, index: number) => Promise<R>): Promise<R[]> {
  const results = new Array<R>(items.length);
  let next = 0;
  const lane = async () => {
    while (next < items.length) {
      const index = next;
      next += 1;
      results[index] = await work(items[index] as T, index);
    }
  };
  await Promise.all(Array.from({ length: Math.max(1, Math.min(limit, items.length)) }, lane));
  return results;
}
