/**
 * OverlayMap: a read-only view of a base map with some keys changed, removed or added, for
 * the new release's hierarchy: the injector changes a few thousand entries of a hierarchy of
 * a million, and copying the whole Map cost more than the injection itself (measured at 1M
 * concepts). Iteration keeps the base's order, with added keys after it in insertion order.
 */
const REMOVED = Symbol('removed');

export class OverlayMap<K, V> implements ReadonlyMap<K, V> {
  private readonly changes = new Map<K, V | typeof REMOVED>();
  private added = 0;
  private removed = 0;

  constructor(private readonly base: ReadonlyMap<K, V>) {}

  set(key: K, value: V): this {
    const had = this.has(key);
    if (!had) {
      if (this.base.has(key)) this.removed--;
      else this.added++;
    }
    this.changes.set(key, value);
    return this;
  }

  delete(key: K): boolean {
    if (!this.has(key)) return false;
    if (this.base.has(key)) {
      this.changes.set(key, REMOVED);
      this.removed++;
    } else {
      this.changes.delete(key);
      this.added--;
    }
    return true;
  }

  get(key: K): V | undefined {
    const c = this.changes.get(key);
    if (c === REMOVED) return undefined;
    return c !== undefined || this.changes.has(key) ? (c as V) : this.base.get(key);
  }

  has(key: K): boolean {
    const c = this.changes.get(key);
    if (c === REMOVED) return false;
    return c !== undefined || this.changes.has(key) || this.base.has(key);
  }

  get size(): number {
    return this.base.size + this.added - this.removed;
  }

  *entries(): MapIterator<[K, V]> {
    for (const [k, v] of this.base) {
      if (!this.changes.has(k)) yield [k, v];
      else {
        const c = this.changes.get(k)!;
        if (c !== REMOVED) yield [k, c];
      }
    }
    for (const [k, c] of this.changes) if (c !== REMOVED && !this.base.has(k)) yield [k, c];
  }

  *keys(): MapIterator<K> {
    for (const [k] of this.entries()) yield k;
  }

  *values(): MapIterator<V> {
    for (const [, v] of this.entries()) yield v;
  }

  [Symbol.iterator](): MapIterator<[K, V]> {
    return this.entries();
  }

  forEach(fn: (value: V, key: K, map: ReadonlyMap<K, V>) => void): void {
    for (const [k, v] of this.entries()) fn(v, k, this);
  }
}
