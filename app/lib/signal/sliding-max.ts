/**
 * The running maximum over a centred window (the rattle check's envelope, rattle.ts): for each
 * i in [from, to) the largest x[j] with |j − i| ≤ half, by a monotone queue of indices (each
 * index enters and leaves it once, so O(n) whatever the window, where the direct loop costs
 * O(n·half): 0.4 s on the bench log's idle minutes). Exact: the same values as the direct loop
 * for finite x. Unitless.
 */

/** out[i − from] = max(x[i − half … i + half]) for i in [from, to); needs half ≤ from, to + half ≤ x.length. */
export function slidingMax(x: Float64Array, half: number, from: number, to: number): Float64Array {
  const out = new Float64Array(Math.max(0, to - from));
  if (to <= from) return out;
  const queue = new Int32Array(2 * half + 2); // ring buffer of indices, values decreasing
  const size = queue.length;
  let head = 0;
  let tail = 0; // queue holds [head, tail) modulo size
  let next = from - half; // next index to enter the window
  for (let i = from; i < to; i++) {
    for (; next <= i + half; next++) {
      const v = x[next]!;
      while (tail !== head && x[queue[(tail - 1 + size) % size]!]! <= v)
        tail = (tail - 1 + size) % size;
      queue[tail] = next;
      tail = (tail + 1) % size;
    }
    while (queue[head]! < i - half) head = (head + 1) % size;
    out[i - from] = x[queue[head]!]!;
  }
  return out;
}
