/** Small dense helpers on row-major Float64Array matrices, for the inference methods. */
import { choleskyInPlace, inverseFromCholesky } from '../../numeric/dense';

/** out (n×m) = a (n×k) · b (k×m). */
export function multiply(a: Float64Array, b: Float64Array, n: number, k: number, m: number, out = new Float64Array(n * m)): Float64Array {
  out.fill(0, 0, n * m);
  for (let i = 0; i < n; i++) {
    const ri = i * k;
    const ro = i * m;
    for (let c = 0; c < k; c++) {
      const aic = a[ri + c];
      if (aic === 0) continue;
      const rb = c * m;
      for (let j = 0; j < m; j++) out[ro + j] += aic * b[rb + j];
    }
  }
  return out;
}

/** Inverse of a symmetric positive definite n×n matrix, or null when it is not positive definite. */
export function inverseSpd(a: ArrayLike<number>, n: number): Float64Array | null {
  if (n === 0) return new Float64Array(0);
  const l = Float64Array.from({ length: n * n }, (_, i) => a[i]);
  if (choleskyInPlace(l, n) >= 0) return null;
  const out = new Float64Array(n * n);
  inverseFromCholesky(l, n, out);
  return out;
}

/** cᵀ A c for a symmetric n×n A. */
export function quadraticForm(a: ArrayLike<number>, c: ArrayLike<number>, n: number): number {
  let s = 0;
  for (let i = 0; i < n; i++) {
    if (c[i] === 0) continue;
    let r = 0;
    for (let j = 0; j < n; j++) r += a[i * n + j] * c[j];
    s += c[i] * r;
  }
  return s;
}

/** L A Lᵀ for L (r×n) and symmetric A (n×n): an r×r matrix. */
export function sandwich(l: ArrayLike<number>, a: ArrayLike<number>, r: number, n: number): Float64Array {
  const la = new Float64Array(r * n);
  for (let i = 0; i < r; i++) {
    for (let j = 0; j < n; j++) {
      let s = 0;
      for (let k = 0; k < n; k++) s += l[i * n + k] * a[k * n + j];
      la[i * n + j] = s;
    }
  }
  const out = new Float64Array(r * r);
  for (let i = 0; i < r; i++) {
    for (let j = 0; j <= i; j++) {
      let s = 0;
      for (let k = 0; k < n; k++) s += la[i * n + k] * l[j * n + k];
      out[i * r + j] = s;
      out[j * r + i] = s;
    }
  }
  return out;
}

