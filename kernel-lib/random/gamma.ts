/**
 * Gamma variates from a seeded stream: Marsaglia and Tsang (2000, "A simple method for generating
 * gamma variables", ACM Trans. Math. Softw. 26(3):363), with their boost for shape < 1:
 * G(a) = G(a + 1) · U^(1/a) (same paper, §5).
 */
import type { Stream } from './stream';

/** One Gamma(shape, scale) variate (mean shape · scale); shape and scale must be positive and finite. */
export function drawGamma(stream: Stream, shape: number, scale: number): number {
  if (!(shape > 0) || !(scale > 0) || !Number.isFinite(shape) || !Number.isFinite(scale)) {
    throw new RangeError(`drawGamma: shape and scale must be positive and finite, got ${shape} and ${scale}`);
  }
  if (shape < 1) {
    const g = standardGammaAtLeastOne(stream, shape + 1);
    return g * Math.pow(stream.uniform(), 1 / shape) * scale;
  }
  return standardGammaAtLeastOne(stream, shape) * scale;
}

function standardGammaAtLeastOne(stream: Stream, a: number): number {
  const d = a - 1 / 3;
  const c = 1 / Math.sqrt(9 * d);
  for (;;) {
    let x: number;
    let v: number;
    do {
      x = stream.normal();
      v = 1 + c * x;
    } while (v <= 0);
    v = v * v * v;
    const u = stream.uniform();
    const x2 = x * x;
    // squeeze first, then the exact log test
    if (u < 1 - 0.0331 * x2 * x2) return d * v;
    if (Math.log(u) < 0.5 * x2 + d * (1 - v + Math.log(v))) return d * v;
  }
}
