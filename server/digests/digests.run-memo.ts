/**
 * A digest run's memo: the answer for a key is asked for once and shared by every reader who
 * needs it (a promise, so readers assembled at the same time share the one question too). A run
 * of thousands of subscribers asks the facility and the investor record a few questions per
 * (project, audience, window), not one per reader. A run, a preview or a test send makes its own.
 */
export function createRunMemo<T>() {
  const memo = new Map<string, Promise<T>>();
  return function once(key: string, make: () => Promise<T>): Promise<T> {
    let hit = memo.get(key);
    if (!hit) memo.set(key, (hit = make()));
    return hit;
  };
}
