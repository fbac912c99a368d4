// A small memory of recent preview work in this web process, so an owner typing a few numbers in a
// row does not reload a month of readings and replay the saved rules again for each one. Keys hold
// everything the answer depends on (the bin, its probes and species, the rules, the window's end);
// the window ends on a step boundary, so a key lives at most one step. What it can miss: a reading
// stored late for a time inside the window (a probe's backlog, a CSV import) is seen once the window
// moves on, within one step. Nothing here is needed for correctness: another process, or a restart,
// simply works it out again.
export function recentMemo<T>(max: number) {
  const entries = new Map<string, T>();
  return (key: string, make: () => T): T => {
    const hit = entries.get(key);
    if (hit !== undefined) {
      // Most recently used last, so the oldest goes first.
      entries.delete(key);
      entries.set(key, hit);
      return hit;
    }
    const value = make();
    entries.set(key, value);
    while (entries.size > max) entries.delete(entries.keys().next().value!);
    // A promise that fails is not kept.
    if (value instanceof Promise) value.catch(() => entries.delete(key));
    return value;
  };
}
