export interface MinimiseResult {
  x: Float64Array;
  value: number;
  evaluations: number;
  converged: boolean;
  reason: string;
}

export interface NelderMeadOptions {
  /** Initial step per coordinate. Default 0.25 (a quarter of the usual θ scale). */
  step?: number;
  /** Stop when the spread of simplex values is below this. Default 1e-8. */
  fTolerance?: number;
  /** and the simplex fits in a box of this half-width. Default 1e-5. */
  xTolerance?: number;
  /** Default 400 × dimension². */
  maxEvaluations?: number;
}

/**
 * Minimise f over the box lower ≤ x ≤ upper with the Nelder-Mead simplex method
 * (Nelder and Mead 1965, Computer Journal 7:308; coefficients 1, 2, 1/2, 1/2 as in
 * Lagarias et al. 1998, SIAM J. Optim. 9:112). Trial points are projected onto the box,
 * so boundary optima (a variance of zero) are reached exactly.
 */
export function nelderMeadBounded(
  f: (x: Float64Array) => number,
  start: ArrayLike<number>,
  lower: ArrayLike<number>,
  upper: ArrayLike<number>,
  options: NelderMeadOptions = {},
): MinimiseResult {
  const d = start.length;
  const step = options.step ?? 0.25;
  const fTol = options.fTolerance ?? 1e-8;
  const xTol = options.xTolerance ?? 1e-5;
  const maxEval = options.maxEvaluations ?? 400 * d * d;
  const pts: Float64Array[] = [];
  const vals = new Float64Array(d + 1);
  const clamp = (x: Float64Array) => {
    for (let j = 0; j < d; j++) {
      if (x[j] < lower[j]) x[j] = lower[j];
      else if (x[j] > upper[j]) x[j] = upper[j];
    }
  };
  let evaluations = 0;
  const evaluate = (x: Float64Array) => {
    evaluations++;
    const v = f(x);
    return Number.isFinite(v) ? v : Infinity;
  };
  for (let i = 0; i <= d; i++) {
    const x = Float64Array.from(start);
    if (i > 0) {
      const j = i - 1;
      // step inward when the start sits on the upper bound
      x[j] = x[j] + step <= upper[j] ? x[j] + step : x[j] - step;
    }
    clamp(x);
    pts.push(x);
    vals[i] = evaluate(x);
  }
  const order = new Int32Array(d + 1);
  const centroid = new Float64Array(d);
  const xr = new Float64Array(d);
  const xe = new Float64Array(d);
  const xc = new Float64Array(d);
  const byValue = (a: number, b: number) => vals[a] - vals[b];
  const sortSimplex = () => {
    for (let i = 0; i <= d; i++) order[i] = i;
    order.sort(byValue);
  };
  const along = (out: Float64Array, t: number, worst: Float64Array) => {
    for (let j = 0; j < d; j++) out[j] = centroid[j] + t * (worst[j] - centroid[j]);
    clamp(out);
  };
  while (true) {
    sortSimplex();
    const best = order[0];
    const worst = order[d];
    const second = order[d - 1];
    const spreadF = vals[worst] - vals[best];
    let spreadX = 0;
    for (let i = 0; i <= d; i++) {
      for (let j = 0; j < d; j++) spreadX = Math.max(spreadX, Math.abs(pts[i][j] - pts[best][j]));
    }
    if (spreadF <= fTol && spreadX <= xTol) {
      return { x: Float64Array.from(pts[best]), value: vals[best], evaluations, converged: true, reason: '' };
    }
    if (evaluations >= maxEval) {
      return {
        x: Float64Array.from(pts[best]), value: vals[best], evaluations, converged: false,
        reason: `evaluation limit ${maxEval} reached (simplex value spread ${spreadF.toExponential(2)})`,
      };
    }
    centroid.fill(0);
    for (let i = 0; i <= d; i++) {
      if (i === worst) continue;
      for (let j = 0; j < d; j++) centroid[j] += pts[i][j] / d;
    }
    along(xr, -1, pts[worst]);
    const fr = evaluate(xr);
    if (fr < vals[best]) {
      along(xe, -2, pts[worst]);
      const fe = evaluate(xe);
      if (fe < fr) { pts[worst].set(xe); vals[worst] = fe; } else { pts[worst].set(xr); vals[worst] = fr; }
      continue;
    }
    if (fr < vals[second]) { pts[worst].set(xr); vals[worst] = fr; continue; }
    const outside = fr < vals[worst];
    along(xc, outside ? -0.5 : 0.5, pts[worst]);
    const fc = evaluate(xc);
    if (fc < (outside ? fr : vals[worst])) { pts[worst].set(xc); vals[worst] = fc; continue; }
    // shrink towards the best point
    for (let i = 0; i <= d; i++) {
      if (i === best) continue;
      for (let j = 0; j < d; j++) pts[i][j] = pts[best][j] + 0.5 * (pts[i][j] - pts[best][j]);
      clamp(pts[i]);
      vals[i] = evaluate(pts[i]);
    }
  }
}
