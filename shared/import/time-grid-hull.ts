/**
 * Tracks how far a stream of sample times strays from an even grid without keeping the times: a deep record's
 * time column would otherwise need 8 bytes a row just to learn that it is evenly spaced.
 *
 * Each time becomes a point (i, r_i), r_i = t_i − t0 − i·dtHint. For the final grid through the first and last
 * sample (dt = dtHint + δ) the deviation is d_i = r_i − i·δ, a linear function of the point, so its largest value
 * is reached at a vertex of the upper convex hull of the points and its smallest at a vertex of the lower hull
 * (the support-function property of convex hulls). Both hulls are kept with Andrew's monotone chain (Andrew,
 * Inf. Process. Lett. 9(5) 216, 1979), which for points arriving in increasing i is amortized O(1) a point and
 * holds only the hull vertices (a handful for rounding noise).
 */
export interface TimeGridHullData {
  t0: number;
  dtHint: number;
  upper: [number[], number[]];
  lower: [number[], number[]];
}

export class TimeGridHull {
  readonly t0: number;
  readonly dtHint: number;
  private ui: Float64Array = new Float64Array(64);
  private ur: Float64Array = new Float64Array(64);
  private un = 0;
  private li: Float64Array = new Float64Array(64);
  private lr: Float64Array = new Float64Array(64);
  private ln = 0;

  constructor(t0: number, dtHint: number) {
    if (!Number.isFinite(t0)) throw new RangeError('t0 must be a finite number');
    if (!(dtHint > 0) || !Number.isFinite(dtHint)) throw new RangeError('dtHint must be a positive finite number');
    this.t0 = t0;
    this.dtHint = dtHint;
  }

  /** Adds sample i (in increasing order) at time t, in seconds. */
  push(i: number, t: number): void {
    const r = t - this.t0 - i * this.dtHint;
    // Locals, not fields, inside the loops: this runs once per row of a deep record.
    let xs = this.ui;
    let ys = this.ur;
    let n = this.un;
    // Upper hull: drop the last vertex while it does not make a right turn.
    while (n >= 2) {
      const x0 = xs[n - 2];
      const y0 = ys[n - 2];
      if ((xs[n - 1] - x0) * (r - y0) - (ys[n - 1] - y0) * (i - x0) >= 0) n--;
      else break;
    }
    if (n === xs.length) {
      this.ui = xs = grow(xs);
      this.ur = ys = grow(ys);
    }
    xs[n] = i;
    ys[n] = r;
    this.un = n + 1;
    xs = this.li;
    ys = this.lr;
    n = this.ln;
    while (n >= 2) {
      const x0 = xs[n - 2];
      const y0 = ys[n - 2];
      if ((xs[n - 1] - x0) * (r - y0) - (ys[n - 1] - y0) * (i - x0) <= 0) n--;
      else break;
    }
    if (n === xs.length) {
      this.li = xs = grow(xs);
      this.lr = ys = grow(ys);
    }
    xs[n] = i;
    ys[n] = r;
    this.ln = n + 1;
  }

  /** Adds every vertex of another hull whose samples were numbered from `indexShift` too high. */
  merge(other: TimeGridHull, indexShift = 0): void {
    const points: [number, number][] = [];
    for (let k = 0; k < other.un; k++) points.push([other.ui[k], other.ur[k]]);
    for (let k = 0; k < other.ln; k++) points.push([other.li[k], other.lr[k]]);
    points.sort((a, b) => a[0] - b[0]);
    for (const [i, r] of points) this.push(i - indexShift, r + other.t0 + i * other.dtHint);
  }

  /** Largest |t_i − (t0 + i·dt)| over every sample pushed. */
  jitter(t0: number, dt: number): number {
    let worst = 0;
    const c = this.t0 - t0;
    const delta = dt - this.dtHint;
    for (let k = 0; k < this.un; k++) worst = Math.max(worst, Math.abs(this.ur[k] + c - this.ui[k] * delta));
    for (let k = 0; k < this.ln; k++) worst = Math.max(worst, Math.abs(this.lr[k] + c - this.li[k] * delta));
    return worst;
  }

  /** The hull as plain data, to pass between threads. */
  toData(): TimeGridHullData {
    return {
      t0: this.t0, dtHint: this.dtHint,
      upper: [Array.from(this.ui.subarray(0, this.un)), Array.from(this.ur.subarray(0, this.un))],
      lower: [Array.from(this.li.subarray(0, this.ln)), Array.from(this.lr.subarray(0, this.ln))],
    };
  }

  /** Rebuilds a hull from toData(). */
  static fromData(data: TimeGridHullData): TimeGridHull {
    const hull = new TimeGridHull(data.t0, data.dtHint);
    hull.ui = Float64Array.from(data.upper[0]);
    hull.ur = Float64Array.from(data.upper[1]);
    hull.un = data.upper[0].length;
    hull.li = Float64Array.from(data.lower[0]);
    hull.lr = Float64Array.from(data.lower[1]);
    hull.ln = data.lower[0].length;
    if (hull.un === 0) [hull.ui, hull.ur, hull.li, hull.lr] = [new Float64Array(64), new Float64Array(64), new Float64Array(64), new Float64Array(64)];
    return hull;
  }

  /**
   * Copies the vertices into `to` from index `at` (upper i, upper r, lower i, lower r, `room` slots each) for the
   * compiled row scanner, which pushes with the same arithmetic (shared/import/wasm/scan-rows.as.ts);
   * false when they do not fit. `loadFrom` takes them back, `upper` and `lower` of them.
   */
  saveTo(to: Float64Array, at: number, room: number): boolean {
    if (this.un > room || this.ln > room) return false;
    to.set(this.ui.subarray(0, this.un), at);
    to.set(this.ur.subarray(0, this.un), at + room);
    to.set(this.li.subarray(0, this.ln), at + 2 * room);
    to.set(this.lr.subarray(0, this.ln), at + 3 * room);
    return true;
  }

  loadFrom(from: Float64Array, at: number, room: number, upper: number, lower: number): void {
    while (this.ui.length < upper) [this.ui, this.ur] = [grow(this.ui), grow(this.ur)];
    while (this.li.length < lower) [this.li, this.lr] = [grow(this.li), grow(this.lr)];
    this.ui.set(from.subarray(at, at + upper));
    this.ur.set(from.subarray(at + room, at + room + upper));
    this.li.set(from.subarray(at + 2 * room, at + 2 * room + lower));
    this.lr.set(from.subarray(at + 3 * room, at + 3 * room + lower));
    this.un = upper;
    this.ln = lower;
  }

  /** Vertices of the upper and of the lower hull. */
  get counts(): [number, number] {
    return [this.un, this.ln];
  }

  /** Vertices held, for tests and for a cap on memory. */
  get size(): number {
    return this.un + this.ln;
  }
}

function grow(a: Float64Array): Float64Array {
  const b = new Float64Array(a.length * 2);
  b.set(a);
  return b;
}
