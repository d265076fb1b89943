/**
 * Reads answered from memory for a moment. Some reads are asked many times a second with the same answer (a list's
 * total, the signed-in person's session and account on every request); each is made once and its answer shared
 * until any write of this process (write-queue.ts and postgres-transactions.ts report every one, after its commit)
 * or the reuse's lifetime, whichever comes first. Writes of other processes show at most one lifetime late.
 */

let generation = 0;

/** Called after each write of this process: every read made before it may be out of date. */
export function noteWrite(): void {
  generation += 1;
}

export interface ReusedReads<T> {
  /** The answer for `key`, read by `load` unless one read since this process's last write is younger than the lifetime. */
  read(key: string, load: () => Promise<T>, now?: number): Promise<T>;
}

/** A set of reused reads kept for `lifetimeMs`, at most `maxEntries` of them (the oldest is forgotten first). */
export function reusedReads<T>(lifetimeMs: number, maxEntries: number): ReusedReads<T> {
  const answers = new Map<string, { generation: number; at: number; answer: Promise<T> }>();
  return {
    read(key, load, now = Date.now()) {
      const known = answers.get(key);
      if (known && known.generation === generation && now - known.at < lifetimeMs) return known.answer;
      // The generation is taken before the read starts: a write that ends while it runs makes its answer stale.
      const entry = { generation, at: now, answer: load() };
      answers.delete(key);
      answers.set(key, entry);
      if (answers.size > maxEntries) answers.delete(answers.keys().next().value!);
      entry.answer.catch(() => {
        if (answers.get(key) === entry) answers.delete(key);
      });
      return entry.answer;
    },
  };
}
