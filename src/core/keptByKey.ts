/**
 * Answers of a pure function kept by their exact input (a text key), at most `bound` of them: when full, the
 * oldest kept goes first (first in, first out; a hit does not renew an answer). Callers must not change an answer
 * they were given: the next caller gets the same object.
 */
export class KeptByKey<V> {
  private readonly kept = new Map<string, V>();

  constructor(readonly bound: number) {
    if (!(Number.isInteger(bound) && bound >= 1)) throw new RangeError(`A cache must keep at least one answer (got ${bound}).`);
  }

  get size(): number {
    return this.kept.size;
  }

  get(key: string): V | undefined {
    return this.kept.get(key);
  }

  set(key: string, value: V): void {
    if (!this.kept.has(key) && this.kept.size >= this.bound) this.kept.delete(this.kept.keys().next().value!);
    this.kept.set(key, value);
  }

  /** The answer kept for `key`, or `make()`'s, kept. */
  answer(key: string, make: () => V): V {
    const known = this.kept.get(key);
    if (known !== undefined) return known;
    const made = make();
    this.set(key, made);
    return made;
  }
}
