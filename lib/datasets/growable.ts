/** A Float64Array that grows by half its size when full, so appends cost amortised O(1). */
export class GrowableFloat64 {
  private buf: Float64Array;
  length = 0;

  constructor(initialCapacity = 4096) {
    this.buf = new Float64Array(Math.max(16, initialCapacity));
  }

  /** Makes room for at least `n` values in total and returns the backing array. */
  reserve(n: number): Float64Array {
    if (n > this.buf.length) {
      let cap = this.buf.length;
      while (cap < n) cap = Math.ceil(cap * 1.5);
      const next = new Float64Array(cap);
      next.set(this.buf.subarray(0, this.length));
      this.buf = next;
    }
    return this.buf;
  }

  /** The first `length` values, copied into an array of exactly that size. */
  toArray(): Float64Array {
    return this.buf.length === this.length ? this.buf : this.buf.slice(0, this.length);
  }
}
