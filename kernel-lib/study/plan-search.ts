/**
 * The search behind a plan: the smallest candidate value whose goals hold (or the largest, when
 * the goals hold at the small end), found by bisection over the candidates with an adaptive
 * number of replicates per value. Pure: the replicates come from an `evaluate` callback.
 *
 * Decision at a value: a goal "metric ≥ t" is met when (estimate − t)/s ≥ z and missed when
 * (t − estimate)/s > z (mirrored for "≤ t"), z = 1.96 (95% Monte Carlo confidence). For a share
 * (power, coverage, …) s is the binomial MCSE at the threshold, sqrt(t(1 − t)/n), the standard
 * error under the hypothesis that the share equals t; for other metrics s is the metric's MCSE
 * (Morris, White and Crowther 2019, Statistics in Medicine 38:2074, Table 6). While neither holds
 * the value gets more replicates (the number the current estimate says is needed, between double
 * and four times the current count), up to a cap. Every look is a test at 95%; with at least doubling there are few looks.
 * The metric is assumed monotone in the varied value, as power is in the number of sites.
 */
import type { PlanGoal } from './plan-spec';
import { PROPORTION_METRICS } from './plan-spec';

export const PLAN_Z = 1.959964;

export type Verdict = 'meets' | 'fails' | 'undecided';

export interface GoalEstimate {
  estimate: number;
  mcse: number;
  n: number;
}

export interface GoalLook extends GoalEstimate {
  verdict: Verdict;
  /** Replicates that would make the decision clear if the estimate stayed where it is. */
  needed: number;
}

export interface Probe {
  index: number;
  value: number;
  replicates: number;
  verdict: Verdict;
  goals: GoalLook[];
}

export interface SearchOptions {
  firstReplicates: number;
  maxReplicates: number;
  /** Replicate counts are rounded up to multiples of this (the batch size). */
  step: number;
}

export interface SearchOutcome {
  /** 'smallest' when the goals hold at large values, 'largest' when they hold at small ones. */
  find: 'smallest' | 'largest';
  /** The answer: the value clearly meeting the goals nearest the boundary, or null. */
  answer: number | null;
  decided: boolean;
  /** When undecided: the answer lies between these two candidates (inclusive). */
  between: [number, number] | null;
  reason: string;
  probes: Probe[];
}

/** Judge one goal from an estimate. */
export function judgeGoal(goal: PlanGoal, est: GoalEstimate, z = PLAN_Z): GoalLook {
  const t = goal.threshold;
  if (!Number.isFinite(est.estimate) || !(est.n > 0)) return { ...est, verdict: 'fails', needed: 0 };
  const unit = PROPORTION_METRICS.includes(goal.metric) ? Math.sqrt(t * (1 - t)) : est.mcse * Math.sqrt(est.n);
  const s = unit / Math.sqrt(est.n);
  const gap = goal.direction === 'atLeast' ? est.estimate - t : t - est.estimate;
  if (!(s > 0)) {
    // a metric without Monte Carlo error (e.g. every estimate equal): its side of the threshold is certain
    return { ...est, verdict: gap >= 0 ? 'meets' : 'fails', needed: 0 };
  }
  if (gap / s >= z) return { ...est, verdict: 'meets', needed: 0 };
  if (-gap / s > z) return { ...est, verdict: 'fails', needed: 0 };
  const needed = gap === 0 ? Infinity : Math.ceil(((z * unit) / Math.abs(gap)) ** 2);
  return { ...est, verdict: 'undecided', needed };
}

/** All goals met, any goal missed, or not yet clear. */
function combine(looks: readonly GoalLook[]): Verdict {
  if (looks.some((l) => l.verdict === 'fails')) return 'fails';
  return looks.every((l) => l.verdict === 'meets') ? 'meets' : 'undecided';
}

/** Next replicate count: what the estimate says is needed (+20%), at least double, at most four times (the estimate is noisy). */
function nextCount(n: number, needed: number, o: SearchOptions): number {
  const want = Math.min(4 * n, Math.max(2 * n, Number.isFinite(needed) ? Math.ceil(1.2 * needed) : Infinity));
  return Math.min(o.maxReplicates, Math.ceil(want / o.step) * o.step);
}

/**
 * Find the boundary. `evaluate(index, n)` returns each goal's estimate from the first n
 * replicates at values[index] (n a multiple of options.step, never decreasing for an index).
 */
export async function searchPlan(
  values: readonly number[],
  goals: readonly PlanGoal[],
  options: SearchOptions,
  evaluate: (index: number, replicates: number) => Promise<GoalEstimate[]>,
  shouldStop: () => boolean = () => false,
): Promise<SearchOutcome> {
  const probes = new Map<number, Probe>();
  // whole batches only: the first look and the cap are rounded up to the batch size
  const cap = Math.ceil(options.maxReplicates / options.step) * options.step;
  options = { ...options, maxReplicates: cap };
  const first = Math.min(cap, Math.ceil(options.firstReplicates / options.step) * options.step);
  const probe = async (index: number): Promise<Probe> => {
    let n = Math.min(options.maxReplicates, Math.max(first, probes.get(index)?.replicates ?? 0));
    for (;;) {
      const estimates = await evaluate(index, n);
      const looks = goals.map((g, j) => judgeGoal(g, estimates[j]));
      const p: Probe = { index, value: values[index], replicates: n, verdict: combine(looks), goals: looks };
      probes.set(index, p);
      if (p.verdict !== 'undecided' || n >= options.maxReplicates || shouldStop()) return p;
      n = nextCount(n, Math.max(...looks.filter((l) => l.verdict === 'undecided').map((l) => l.needed)), options);
    }
  };
  const K = values.length;
  const low = await probe(0);
  const high = shouldStop() ? low : await probe(K - 1);
  // the goals hold at the small end (and not at the large one): look for the largest value instead
  const find: SearchOutcome['find'] =
    (low.verdict === 'meets' && high.verdict !== 'meets') || (low.verdict === 'undecided' && high.verdict === 'fails') ? 'largest' : 'smallest';
  const at = (pos: number) => (find === 'smallest' ? pos : K - 1 - pos);
  const state = (pos: number) => probes.get(at(pos))?.verdict;
  // positions in search order: lo = last clearly failing, hi = first clearly meeting
  let lo = -1;
  let hi = K;
  const update = (pos: number) => {
    const s = state(pos);
    if (s === 'fails' && pos > lo) lo = pos;
    if (s === 'meets' && pos < hi) hi = pos;
  };
  update(0);
  update(K - 1);
  while (!shouldStop() && lo < hi - 1) {
    const open: number[] = [];
    for (let pos = lo + 1; pos < hi; pos++) if (!probes.has(at(pos))) open.push(pos);
    if (!open.length) break;
    const mid = (lo + hi) / 2;
    const pos = open.reduce((a, b) => (Math.abs(b - mid) < Math.abs(a - mid) ? b : a));
    await probe(at(pos));
    update(pos);
  }
  const list = [...probes.values()].sort((a, b) => a.value - b.value);
  const name = (pos: number) => values[at(pos)];
  const outcome = (answer: number | null, decided: boolean, between: [number, number] | null, reason: string): SearchOutcome =>
    ({ find, answer, decided, between, reason, probes: list });
  if (hi === 0) return outcome(name(0), true, null, `every candidate meets the goals, the ${find === 'smallest' ? 'smallest' : 'largest'} included`);
  if (lo === K - 1) return outcome(null, true, null, 'no candidate meets the goals, not even the most favourable one');
  if (hi === lo + 1) return outcome(name(hi), true, null, `${name(hi)} clearly meets the goals and ${name(lo)} clearly does not`);
  const unclear = list.filter((p) => p.verdict === 'undecided').map((p) => p.value);
  const stopped = shouldStop();
  const reason = stopped
    ? 'the search was interrupted before the boundary was clear'
    : `${unclear.length ? `at ${unclear.join(', ')} the estimate stays within Monte Carlo error of the goal after ${options.maxReplicates} replicates (the cap)` : 'no candidate between them could be decided'}`;
  const lower = name(lo + 1);
  const upper = hi < K ? name(hi) : name(K - 1);
  const pair: [number, number] = find === 'smallest' ? [lower, upper] : [upper, lower];
  return outcome(hi < K ? name(hi) : null, false, pair, reason);
}
