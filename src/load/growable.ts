/**
 * Growable typed arrays for the loaders' hot path: amortised O(1) push, compact storage
 * (4 or 1 bytes per value instead of a tagged JS array slot), trimmed on `finish()`.
 */
export class GrowableInt32 {
  data: Int32Array;
  length = 0;
  constructor(capacity = 1024) {
    this.data = new Int32Array(capacity);
  }
  push(v: number): void {
    if (this.length === this.data.length) {
      const next = new Int32Array(this.data.length * 2);
      next.set(this.data);
      this.data = next;
    }
    this.data[this.length++] = v;
  }
  finish(): Int32Array {
    return this.data.slice(0, this.length);
  }
}

export class GrowableUint8 {
  data: Uint8Array;
  length = 0;
  constructor(capacity = 1024) {
    this.data = new Uint8Array(capacity);
  }
  push(v: number): void {
    if (this.length === this.data.length) {
      const next = new Uint8Array(this.data.length * 2);
      next.set(this.data);
      this.data = next;
    }
    this.data[this.length++] = v;
  }
  finish(): Uint8Array {
    return this.data.slice(0, this.length);
  }
}

/** Intern a small vocabulary (categories, languages, term types): value → index. */
export class Interner {
  readonly values: string[] = [];
  private readonly index = new Map<string, number>();
  constructor(initial: readonly string[] = []) {
    for (const v of initial) this.id(v);
  }
  id(value: string): number {
    let i = this.index.get(value);
    if (i === undefined) {
      i = this.values.length;
      this.values.push(value);
      this.index.set(value, i);
    }
    return i;
  }
  /** Index of a value already interned, without interning it. */
  peek(value: string): number | undefined {
    return this.index.get(value);
  }
}

/** Trim only when the value has white space at either end (the common case has none). */
export function clean(s: string | undefined): string {
  if (s === undefined || s.length === 0) return '';
  if (s.charCodeAt(0) <= 32 || s.charCodeAt(s.length - 1) <= 32) return s.trim();
  return s;
}
