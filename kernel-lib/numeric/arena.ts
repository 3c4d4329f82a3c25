/**
 * Many small Float64Arrays carved out of one allocation. V8 allocates a typed array with its own
 * backing store far more slowly than a view on a shared buffer, and a fit needs a dozen workspaces.
 */
export class Float64Arena {
  private readonly buffer: ArrayBuffer;
  private offset = 0;

  constructor(readonly capacity: number) {
    this.buffer = new ArrayBuffer(8 * Math.max(1, capacity));
  }

  /** A zero-filled view of `length` doubles. */
  take(length: number): Float64Array {
    if (this.offset + length > this.capacity) throw new RangeError(`arena of ${this.capacity} doubles exhausted (asked ${length} more at ${this.offset})`);
    const view = new Float64Array(this.buffer, 8 * this.offset, length);
    this.offset += length;
    return view;
  }
}
