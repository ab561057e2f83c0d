/**
 * The banded least-squares solver of the Vold–Kalman filter (vold-kalman.ts): the factor R of
 * I + AᵀWA = RᵀR, A the p-th difference matrix and W the structural weights, by Givens rotations,
 * and the solves with it. Pure numerics, no signal knowledge.
 */

/** Alternating binomial coefficients: the p-th difference stencil. */
function stencil(p: number): number[] {
  return p === 1 ? [1, -1] : p === 2 ? [1, -2, 1] : [1, -3, 3, -1];
}

/**
 * The banded upper-triangular factor R of I + AᵀWA = RᵀR (half-width p, row j holds R[j][j…j+p]
 * at j·(p+1)), computed as the QR factor of the least-squares matrix [I; √W·A] by Givens
 * rotations, row by row: O(n·p²). Why not Cholesky of I + AᵀWA: forming that matrix adds 1 to
 * entries of about 6·r², so at r² ≳ 1e12 (0.3 Hz at 5 kHz) the identity is lost to rounding and
 * the envelope came out 1 % (r² = 2e13) to 100 % (r² = 1e15) wrong; the rotations work on √W·A
 * (entries ~r) and keep 1e-8 at r² = 1e19 (docs/order-filter.md). `w2[k]` is the weight r² of
 * structural row k (k = 0 … n−p−1). One factor serves every right-hand side with these weights.
 */
export function factorBanded(w2: Float64Array, p: number, n: number): Float64Array {
  if (p === 2) return factorBanded2(w2, n);
  const c = stencil(p);
  const wd = p + 1;
  const R = new Float64Array(n * wd);
  const v = new Float64Array(wd);
  let filled = 0;
  for (let k = 0; k < n; k++) {
    for (let row = 0; row < 2; row++) {
      if (row === 0) {
        v.fill(0);
        v[0] = 1; // the data equation of sample k
      } else {
        if (k + p >= n) break;
        const r = Math.sqrt(w2[k]!); // structural equation k, weighted
        for (let m = 0; m <= p; m++) v[m] = r * c[m]!;
      }
      const last = Math.min(k + p, n - 1);
      for (let j = k; j <= last; j++) {
        const at = j * wd;
        if (j >= filled) {
          for (let m = 0; m <= p; m++) R[at + m] = v[m]!;
          filled = j + 1;
          break;
        }
        const a = R[at]!;
        const b = v[0]!;
        if (b !== 0) {
          const h = Math.sqrt(a * a + b * b);
          const cs = a / h;
          const sn = b / h;
          R[at] = h;
          for (let m = 1; m <= p; m++) {
            const rj = R[at + m]!;
            const vm = v[m]!;
            R[at + m] = cs * rj + sn * vm;
            v[m - 1] = cs * vm - sn * rj;
          }
        } else for (let m = 1; m <= p; m++) v[m - 1] = v[m]!;
        v[p] = 0;
      }
    }
  }
  return R;
}

/** factorBanded for p = 2 (the default) with the row in locals: the same rotations, 3× faster. */
function factorBanded2(w2: Float64Array, n: number): Float64Array {
  const R = new Float64Array(n * 3);
  let filled = 0;
  for (let k = 0; k < n; k++) {
    for (let row = 0; row < 2; row++) {
      let v0 = 1;
      let v1 = 0;
      let v2 = 0;
      if (row === 1) {
        if (k + 2 >= n) break;
        const r = Math.sqrt(w2[k]!);
        v0 = r;
        v1 = -2 * r;
        v2 = r;
      }
      const last = Math.min(k + 2, n - 1);
      for (let j = k; j <= last; j++) {
        const at = j * 3;
        if (j >= filled) {
          R[at] = v0;
          R[at + 1] = v1;
          R[at + 2] = v2;
          filled = j + 1;
          break;
        }
        if (v0 !== 0) {
          const a = R[at]!;
          const h = Math.sqrt(a * a + v0 * v0);
          const cs = a / h;
          const sn = v0 / h;
          const r1 = R[at + 1]!;
          const r2 = R[at + 2]!;
          R[at] = h;
          R[at + 1] = cs * r1 + sn * v1;
          R[at + 2] = cs * r2 + sn * v2;
          v0 = cs * v1 - sn * r1;
          v1 = cs * v2 - sn * r2;
        } else {
          v0 = v1;
          v1 = v2;
        }
        v2 = 0;
      }
    }
  }
  return R;
}

/** Solves RᵀR·x = b in place (forward then back substitution with the factor R). */
export function solveFactored(R: Float64Array, p: number, b: Float64Array): void {
  const n = b.length;
  const wd = p + 1;
  for (let i = 0; i < n; i++) {
    let s = b[i]!;
    for (let m = 1; m <= p && m <= i; m++) s -= R[(i - m) * wd + m]! * b[i - m]!;
    b[i] = s / R[i * wd]!;
  }
  for (let j = n - 1; j >= 0; j--) {
    const at = j * wd;
    let s = b[j]!;
    for (let m = 1; m <= p && j + m < n; m++) s -= R[at + m]! * b[j + m]!;
    b[j] = s / R[at]!;
  }
}
