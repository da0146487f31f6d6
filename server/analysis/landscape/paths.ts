/**
 * How the pest got to a place: the earliest time at which an occupied path (every cell on it at the
 * detection level) joined the infestation to the place, optionally without using band cells. Comparing the
 * two tells whether the pest came through a band or around it.
 *
 * @remarks
 * The quantity is a bottleneck (minimax) path value on the arrival-time field: τ(k) = min over 4-connected
 * paths from the start cells to k of the largest arrival time along the path, computed by Dijkstra's
 * algorithm with `max` in place of `+` (valid because max is monotone along paths; Dijkstra 1959,
 * Numer. Math. 1:269–271). Cells never reached (NaN) and excluded cells are impassable.
 */

/** Binary min-heap of (key, cell) in typed arrays. */
class Heap {
  private keys: Float64Array;
  private cells: Int32Array;
  size = 0;
  constructor(capacity: number) {
    this.keys = new Float64Array(Math.max(16, capacity));
    this.cells = new Int32Array(Math.max(16, capacity));
  }
  push(key: number, cell: number): void {
    if (this.size === this.keys.length) {
      const k = new Float64Array(this.size * 2);
      k.set(this.keys);
      const c = new Int32Array(this.size * 2);
      c.set(this.cells);
      this.keys = k;
      this.cells = c;
    }
    let i = this.size++;
    while (i > 0) {
      const parent = (i - 1) >> 1;
      if (this.keys[parent] <= key) break;
      this.keys[i] = this.keys[parent];
      this.cells[i] = this.cells[parent];
      i = parent;
    }
    this.keys[i] = key;
    this.cells[i] = cell;
  }
  /** Removes the smallest entry; returns its cell (its key in `lastKey`). */
  pop(): number {
    const top = this.cells[0];
    this.lastKey = this.keys[0];
    const key = this.keys[--this.size];
    const cell = this.cells[this.size];
    let i = 0;
    for (;;) {
      let child = 2 * i + 1;
      if (child >= this.size) break;
      if (child + 1 < this.size && this.keys[child + 1] < this.keys[child]) child++;
      if (this.keys[child] >= key) break;
      this.keys[i] = this.keys[child];
      this.cells[i] = this.cells[child];
      i = child;
    }
    this.keys[i] = key;
    this.cells[i] = cell;
    return top;
  }
  lastKey = 0;
}

/**
 * Bottleneck arrival τ per cell (NaN where no occupied path reaches it).
 *
 * @param nx - raster columns
 * @param arrival - first year at the detection level per cell (NaN: never)
 * @param starts - cells the pest starts from (the infestation)
 * @param excluded - cells a path may not use (e.g. the band), or null
 */
export function bottleneckArrival(nx: number, arrival: Float32Array, starts: ArrayLike<number>, excluded: Uint8Array | null): Float64Array {
  const n = arrival.length;
  const tau = new Float64Array(n).fill(NaN);
  const done = new Uint8Array(n);
  const heap = new Heap(1024);
  for (let i = 0; i < starts.length; i++) {
    const k = starts[i];
    if (excluded?.[k] || !(arrival[k] >= 0)) continue;
    tau[k] = arrival[k];
    heap.push(arrival[k], k);
  }
  const ny = n / nx;
  while (heap.size > 0) {
    const k = heap.pop();
    if (done[k]) continue;
    done[k] = 1;
    const key = heap.lastKey;
    const r = Math.floor(k / nx);
    const q = k - r * nx;
    for (let d = 0; d < 4; d++) {
      const j = d === 0 ? (q + 1 < nx ? k + 1 : -1) : d === 1 ? (q > 0 ? k - 1 : -1) : d === 2 ? (r + 1 < ny ? k + nx : -1) : r > 0 ? k - nx : -1;
      if (j < 0 || done[j] || excluded?.[j]) continue;
      const a = arrival[j];
      if (!(a >= 0)) continue;
      const v = a > key ? a : key;
      if (!(tau[j] <= v)) {
        tau[j] = v;
        heap.push(v, j);
      }
    }
  }
  return tau;
}

/**
 * Depth of each band cell: the 4-neighbour distance in cells to the nearest cell outside the band (1 on
 * the band's rim); 0 off the band.
 */
export function bandDepth(nx: number, band: Uint8Array): Int32Array {
  const n = band.length;
  const ny = n / nx;
  const depth = new Int32Array(n);
  const queue = new Int32Array(n);
  let head = 0;
  let tail = 0;
  for (let k = 0; k < n; k++) {
    if (!band[k]) continue;
    const r = Math.floor(k / nx);
    const q = k - r * nx;
    const rim = q === 0 || q === nx - 1 || r === 0 || r === ny - 1 ? false : !band[k - 1] || !band[k + 1] || !band[k - nx] || !band[k + nx];
    // Cells on the map's edge count from their inside neighbours only (the map edge is not a way out).
    if (rim) {
      depth[k] = 1;
      queue[tail++] = k;
    }
  }
  while (head < tail) {
    const k = queue[head++];
    const r = Math.floor(k / nx);
    const q = k - r * nx;
    const next = [q + 1 < nx ? k + 1 : -1, q > 0 ? k - 1 : -1, r + 1 < ny ? k + nx : -1, r > 0 ? k - nx : -1];
    for (const j of next) {
      if (j >= 0 && band[j] && depth[j] === 0) {
        depth[j] = depth[k] + 1;
        queue[tail++] = j;
      }
    }
  }
  // Band cells cut off from any rim (a band covering the whole map) get depth 1.
  for (let k = 0; k < n; k++) if (band[k] && depth[k] === 0) depth[k] = 1;
  return depth;
}

/**
 * Density-weighted centre of the infestation at the start, in cell units from the raster's north-west corner
 * to the centre of cell (0, 0) (column, row); null when nothing is infested.
 */
export function infestationCentre(nx: number, u0: Float64Array): { col: number; row: number } | null {
  let sx = 0;
  let sy = 0;
  let m = 0;
  for (let k = 0; k < u0.length; k++) {
    if (u0[k] > 0) {
      sx += (k % nx) * u0[k];
      sy += Math.floor(k / nx) * u0[k];
      m += u0[k];
    }
  }
  return m > 0 ? { col: sx / m, row: sy / m } : null;
}
