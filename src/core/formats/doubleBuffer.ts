/** A growable Float64Array, for readers that learn the number of values only as they read. */
export class DoubleBuffer {
  data: Float64Array;
  length = 0;

  constructor(capacity = 1024) {
    this.data = new Float64Array(Math.max(1, capacity));
  }

  push(v: number): void {
    if (this.length === this.data.length) {
      const next = new Float64Array(this.data.length * 2);
      next.set(this.data);
      this.data = next;
    }
    this.data[this.length++] = v;
  }

  /** A copy holding exactly the values pushed. */
  toArray(): Float64Array {
    return this.data.slice(0, this.length);
  }
}

/** A growable Float32Array (values that need no more than single precision, e.g. occupations). */
export class FloatBuffer {
  data: Float32Array;
  length = 0;

  constructor(capacity = 1024) {
    this.data = new Float32Array(Math.max(1, capacity));
  }

  push(v: number): void {
    if (this.length === this.data.length) {
      const next = new Float32Array(this.data.length * 2);
      next.set(this.data);
      this.data = next;
    }
    this.data[this.length++] = v;
  }
}
