// Index buffers that draw axon paths straight out of frames.npy. The frames array [F, N, 3] is
// the position attribute as it is (vertex f·N + a is axon a at frame f), and a path is a list of
// segment pairs (f·N + a, (f + s)·N + a). Sorting the pairs by the frame they end at means
// "every path up to frame f" is a prefix of the index, so scrubbing is a draw-range change and
// never rebuilds or re-uploads geometry. Segments where an axon did not move (before it started,
// after it stopped) are left out; they would draw nothing and cost vertex work.

export interface PathIndex {
  /** segment endpoint pairs, ordered by the frame each segment ends at */
  index: Uint32Array;
  /** prefixEnd[f] = how many index entries draw every segment ending at or before frame f */
  prefixEnd: Uint32Array;
  /** the frame stride the segments span */
  stride: number;
  /** the axons it covers */
  axons: Int32Array;
}

/** Segments for `axons` (every axon when null) spanning `stride` frames: frame 0 → s → 2s …
 *  A stride above 1 thins the path for quick drawing; the last partial stretch up to a frame
 *  that is not a multiple of the stride is drawn by `tailIndex`. */
export function buildPathIndex(frames: Float32Array, F: number, N: number, axons: Int32Array | null, stride = 1): PathIndex {
  const list = axons ?? identity(N);
  const s = Math.max(1, Math.floor(stride));
  const spans = F > s ? Math.floor((F - 1) / s) : 0;
  const index = new Uint32Array(2 * list.length * spans);
  const prefixEnd = new Uint32Array(Math.max(F, 0));
  let k = 0;
  let f = 0;
  for (let span = 1; span <= spans; span++) {
    const end = span * s;
    // frames before `end` (and not yet written) end with the previous total
    for (; f < end; f++) prefixEnd[f] = k;
    const rowA = (end - s) * N, rowB = end * N;
    for (let i = 0; i < list.length; i++) {
      const a = list[i];
      const pa = (rowA + a) * 3, pb = (rowB + a) * 3;
      if (frames[pa] === frames[pb] && frames[pa + 1] === frames[pb + 1] && frames[pa + 2] === frames[pb + 2]) continue;
      index[k++] = rowA + a;
      index[k++] = rowB + a;
    }
  }
  for (; f < F; f++) prefixEnd[f] = k;
  return { index: index.subarray(0, k), prefixEnd, stride: s, axons: list };
}

/** The segments from the last stride boundary to `frame`, for the axons of a thinned index, so a
 *  thinned path still reaches its growth cone. Writes into `out` and returns the entries used. */
export function tailIndex(frames: Float32Array, N: number, axons: Int32Array, stride: number, frame: number, out: Uint32Array): number {
  const base = Math.floor(frame / stride) * stride;
  if (base === frame) return 0;
  let k = 0;
  const rowA = base * N, rowB = frame * N;
  for (let i = 0; i < axons.length; i++) {
    const a = axons[i];
    const pa = (rowA + a) * 3, pb = (rowB + a) * 3;
    if (frames[pa] === frames[pb] && frames[pa + 1] === frames[pb + 1] && frames[pa + 2] === frames[pb + 2]) continue;
    out[k++] = rowA + a;
    out[k++] = rowB + a;
  }
  return k;
}

/** For each axon, the first frame at which it has moved and the last frame at which it moved
 *  (−1 for both if it never moves). Read from the positions, so it needs no status bookkeeping. */
export function motionSpan(frames: Float32Array, F: number, N: number): { first: Int32Array; last: Int32Array } {
  const first = new Int32Array(N).fill(-1);
  const last = new Int32Array(N).fill(-1);
  for (let f = 1; f < F; f++) {
    const rowA = (f - 1) * N * 3, rowB = f * N * 3;
    for (let a = 0; a < N; a++) {
      const pa = rowA + a * 3, pb = rowB + a * 3;
      if (frames[pa] !== frames[pb] || frames[pa + 1] !== frames[pb + 1] || frames[pa + 2] !== frames[pb + 2]) {
        if (first[a] < 0) first[a] = f - 1;
        last[a] = f;
      }
    }
  }
  return { first, last };
}

function identity(n: number): Int32Array {
  const out = new Int32Array(n);
  for (let i = 0; i < n; i++) out[i] = i;
  return out;
}
