import { describe, expect, it } from 'vitest';
import { judgeGoal, searchPlan, type GoalEstimate } from '../../kernel-lib/study/plan-search';
import type { PlanGoal } from '../../kernel-lib/study/plan-spec';

// The search is checked on invented, noise-free curves: the estimate at each value is the curve
// itself and its MCSE is that of a share (sqrt(p(1 − p)/n), Morris, White and Crowther 2019,
// Statistics in Medicine 38:2074, Table 6) or a given per-replicate SD over sqrt(n). The answers
// follow from the curves by hand.
const power = (threshold: number, direction: 'atLeast' | 'atMost' = 'atLeast'): PlanGoal =>
  ({ variant: 'v', parameter: 'p', metric: 'power', direction, threshold });
const options = { firstReplicates: 100, maxReplicates: 3200, step: 25 };
const share = (curve: (v: number) => number, values: number[]) => async (i: number, n: number): Promise<GoalEstimate[]> => {
  const p = curve(values[i]);
  return [{ estimate: p, mcse: Math.sqrt((p * (1 - p)) / n), n }];
};
const oneToNineteen = Array.from({ length: 19 }, (_, i) => i + 1);

describe('judgeGoal', () => {
  it('uses the MCSE of a share at the threshold: 0.85 vs 0.8 at n = 100 is 1.25 SE, not clear', () => {
    // (0.85 − 0.8)/sqrt(0.8·0.2/100) = 0.05/0.04 = 1.25 < 1.96; needed n = (1.96·0.4/0.05)² = 245.9 -> 246
    const look = judgeGoal(power(0.8), { estimate: 0.85, mcse: 0.0357, n: 100 });
    expect(look.verdict).toBe('undecided');
    expect(look.needed).toBe(246);
    expect(judgeGoal(power(0.8), { estimate: 0.85, mcse: 0.0357, n: 400 }).verdict).toBe('meets'); // 2.5 SE
    expect(judgeGoal(power(0.8), { estimate: 0.7, mcse: 0.0458, n: 100 }).verdict).toBe('fails'); // 2.5 SE below
    // a power of 1 in 100 replicates still meets 0.8 clearly (0.2/0.04 = 5 SE), though its own MCSE is 0
    expect(judgeGoal(power(0.8), { estimate: 1, mcse: 0, n: 100 }).verdict).toBe('meets');
  });

  it('uses the metric MCSE for other metrics, mirrored for atMost', () => {
    const rmse: PlanGoal = { variant: 'v', parameter: 'p', metric: 'rmse', direction: 'atMost', threshold: 0.5 };
    expect(judgeGoal(rmse, { estimate: 0.45, mcse: 0.02, n: 100 }).verdict).toBe('meets'); // 2.5 SE below
    expect(judgeGoal(rmse, { estimate: 0.55, mcse: 0.02, n: 100 }).verdict).toBe('fails');
    expect(judgeGoal(rmse, { estimate: 0.48, mcse: 0.02, n: 100 }).verdict).toBe('undecided'); // 1 SE
    expect(judgeGoal(rmse, { estimate: NaN, mcse: NaN, n: 0 }).verdict).toBe('fails');
  });
});

describe('searchPlan', () => {
  it('finds the smallest value, spending few replicates far from the threshold and more near it', async () => {
    // p(v) = v/20, goal ≥ 0.62: p(12) = 0.60 < 0.62 ≤ p(13) = 0.65, so the answer is 13
    const out = await searchPlan(oneToNineteen, [power(0.62)], options, share((v) => v / 20, oneToNineteen));
    expect(out).toMatchObject({ find: 'smallest', answer: 13, decided: true, between: null });
    const reps = new Map(out.probes.map((p) => [p.value, p.replicates]));
    expect(reps.get(1)).toBe(100);
    expect(reps.get(19)).toBe(100);
    expect(reps.get(12)!).toBeGreaterThan(1000); // 0.02 from the goal: (1.96·0.485/0.02)² ≈ 2260 needed
    expect(reps.get(13)!).toBeGreaterThan(100);
    expect(out.probes.length).toBeLessThan(oneToNineteen.length); // bisection, not every value
  });

  it('says undecided, between which values and why, when the boundary stays within Monte Carlo error', async () => {
    // p(12) = 0.6 equals the goal: never clear; p(11) = 0.55 fails, p(13) = 0.65 meets
    const out = await searchPlan(oneToNineteen, [power(0.6)], options, share((v) => v / 20, oneToNineteen));
    expect(out).toMatchObject({ decided: false, between: [12, 13], answer: 13 });
    expect(out.reason).toContain('at 12 the estimate stays within Monte Carlo error of the goal after 3200 replicates');
    expect(out.probes.find((p) => p.value === 12)!.replicates).toBe(3200);
  });

  it('finds the largest value when the goal holds at the small end', async () => {
    // p(v) = 1 − v/20, goal ≥ 0.62: p(7) = 0.65 meets, p(8) = 0.60 does not
    const out = await searchPlan(oneToNineteen, [power(0.62)], options, share((v) => 1 - v / 20, oneToNineteen));
    expect(out).toMatchObject({ find: 'largest', answer: 7, decided: true });
  });

  it('reports no value when none meets, and the first when all do', async () => {
    const none = await searchPlan(oneToNineteen, [power(0.99)], options, share((v) => v / 20, oneToNineteen));
    expect(none).toMatchObject({ answer: null, decided: true });
    const all = await searchPlan(oneToNineteen, [power(0.01)], options, share((v) => v / 20, oneToNineteen));
    expect(all).toMatchObject({ answer: 1, decided: true });
    expect(all.probes.map((p) => p.value)).toEqual([1, 19]);
  });

  it('requires every goal: the answer is the larger of the two single-goal answers', async () => {
    const values = [4, 9, 16, 25, 36];
    // goal 1: power v/40 ≥ 0.3 -> 16 (0.4; 9 gives 0.225); goal 2: rmse 2/sqrt(v) ≤ 0.45 -> 25 (0.4; 16 gives 0.5)
    const goals: PlanGoal[] = [power(0.3), { variant: 'v', parameter: 'p', metric: 'rmse', direction: 'atMost', threshold: 0.45 }];
    const evaluate = async (i: number, n: number): Promise<GoalEstimate[]> => {
      const v = values[i];
      const p = v / 40;
      const r = 2 / Math.sqrt(v);
      return [{ estimate: p, mcse: Math.sqrt((p * (1 - p)) / n), n }, { estimate: r, mcse: (0.5 * r) / Math.sqrt(n), n }];
    };
    const out = await searchPlan(values, goals, options, evaluate);
    expect(out).toMatchObject({ answer: 25, decided: true });
  });
});
