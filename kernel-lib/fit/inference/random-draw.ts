/**
 * Random effects drawn for a parametric bootstrap, added through Z: out += scale · Z Λ(θ) u, with u
 * the spherical draws in the engine's term order (level by level) and Λ the engine's current
 * templates (set θ first). Shared by the normal and the count resamplers.
 */
import type { ProfiledDeviance } from '../profiled-deviance';

/** out[i] += scale · Σ_terms z_iᵀ b_level(i), with b = Λu written into `b` (length q). */
export function addDrawnEffects(dev: ProfiledDeviance, u: Float64Array, b: Float64Array, scale: number, out: Float64Array): void {
  dev.spreadInto(u, b);
  for (const t of dev.terms) {
    const k = t.k;
    const { index, values } = t.term;
    for (let i = 0; i < out.length; i++) {
      const start = t.start + index[i] * k;
      let add = 0;
      for (let a = 0; a < k; a++) add += values[i * k + a] * b[start + a];
      out[i] += scale * add;
    }
  }
}
