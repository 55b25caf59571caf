/** A binary min-heap of (time, payload) pairs on typed arrays, for the discrete-event simulation. */
export class EventQueue {
  private times = new Float64Array(64);
  private payloads = new Int32Array(64);
  private count = 0;

  get size(): number {
    return this.count;
  }

  clear(): void {
    this.count = 0;
  }

  push(time: number, payload: number): void {
    if (this.count === this.times.length) {
      const times = new Float64Array(this.count * 2);
      const payloads = new Int32Array(this.count * 2);
      times.set(this.times);
      payloads.set(this.payloads);
      this.times = times;
      this.payloads = payloads;
    }
    let slot = this.count;
    this.count += 1;
    while (slot > 0) {
      const parent = (slot - 1) >> 1;
      if (this.times[parent] <= time) break;
      this.times[slot] = this.times[parent];
      this.payloads[slot] = this.payloads[parent];
      slot = parent;
    }
    this.times[slot] = time;
    this.payloads[slot] = payload;
  }

  peekTime(): number {
    return this.count === 0 ? Infinity : this.times[0];
  }

  /** Removes the earliest entry and returns its payload. */
  pop(): number {
    const top = this.payloads[0];
    this.count -= 1;
    if (this.count > 0) {
      const time = this.times[this.count];
      const payload = this.payloads[this.count];
      let slot = 0;
      for (;;) {
        const left = 2 * slot + 1;
        if (left >= this.count) break;
        const right = left + 1;
        const child = right < this.count && this.times[right] < this.times[left] ? right : left;
        if (this.times[child] >= time) break;
        this.times[slot] = this.times[child];
        this.payloads[slot] = this.payloads[child];
        slot = child;
      }
      this.times[slot] = time;
      this.payloads[slot] = payload;
    }
    return top;
  }
}
