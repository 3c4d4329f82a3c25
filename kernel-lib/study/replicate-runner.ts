import { buildDesign } from '../data/build-design';
import { fillDesign, planDesign, type DesignPlan } from '../data/design-plan';
import type { Columns } from '../data/columns';
import type { DesignMatrices } from '../data/design-matrices';
import { fitDesign, type IntervalMethod } from '../fit/fit-design';
import type { FitResult } from '../fit/result';
import { expandGrid, type Scenario } from '../design/grid';
import { TargetProjector } from '../design/realised-truth';
import { createWorkspace, simulateInto, simulationPlan, type SimulatedData } from '../design/simulate';
import type { ResolvedVariant, SurveyDesign } from '../design/types';
import { replicateStreams, type ReplicateStreams } from '../random/stream';
import type { ReplicateKind, ReplicateRow, ReplicateStatus } from './replicate-row';

/** Replicates tried for a coding plan before building every design the ordinary way. */
const PLAN_TRIES = 5;

/** Name of the SD parameter of a random term ("sd(site)", "sd(site:x)") or of the residual ("sd(residual)"). */
export function sdParameterName(factor: string, term: string): string {
  if (factor === 'residual') return 'sd(residual)';
  return term === 'intercept' ? `sd(${factor})` : `sd(${factor}:${term})`;
}

/**
 * Runs replicates of a study: simulate from the replicate's own stream, fit every variant, and
 * turn each fit into tidy rows. A failing fit becomes rows with status 'failed' and its reason;
 * it never stops the study.
 */
export class ReplicateRunner {
  readonly scenarios: Scenario[];
  private readonly workspaces = new Map<number, ReturnType<typeof createWorkspace>>();
  private readonly streams = new Map<number, ReplicateStreams>();

  /** Interval method of each variant (checked with its family and estimation by parseModel, before anything runs). */
  private readonly intervals = new Map<string, IntervalMethod>();

  /** Target projector per variant of each scenario, built on first use. */
  private readonly projectors = new Map<ResolvedVariant, TargetProjector>();

  /**
   * Coding plan per variant of each scenario: the design is coded once and refilled per replicate.
   * A number counts the replicates that could not give a plan (e.g. a level absent); after a few, none is tried.
   */
  private readonly plans = new Map<ResolvedVariant, DesignPlan | number>();

  constructor(readonly design: SurveyDesign) {
    design.variants.forEach((v) => this.intervals.set(v.name, v.model.interval));
    this.scenarios = expandGrid(design);
  }

  /** Replicates [from, to) of one scenario, in order: replicate, then variant, then parameter. */
  runBatch(scenarioIndex: number, from: number, to: number): ReplicateRow[] {
    const scenario = this.scenarios[scenarioIndex];
    if (!scenario) throw new RangeError(`scenario ${scenarioIndex} does not exist (the study has ${this.scenarios.length})`);
    const rows: ReplicateRow[] = [];
    for (let r = from; r < to; r++) this.runReplicate(scenario, scenarioIndex, r, rows);
    return rows;
  }

  /** Simulate one data set of a scenario (the same one runBatch fits). */
  simulate(scenarioIndex: number, replicate: number): SimulatedData {
    const scenario = this.scenarios[scenarioIndex];
    let ws = this.workspaces.get(scenarioIndex);
    if (!ws) {
      ws = createWorkspace(simulationPlan(scenario.design));
      this.workspaces.set(scenarioIndex, ws);
    }
    // one stream per (study seed, scenario key, replicate): independent of workers, order and shards
    let streams = this.streams.get(scenarioIndex);
    if (!streams) {
      streams = replicateStreams(this.design.seed, scenario.key);
      this.streams.set(scenarioIndex, streams);
    }
    return simulateInto(ws, streams.stream(replicate));
  }

  private projectorFor(scenario: Scenario, variant: ResolvedVariant): TargetProjector {
    let projector = this.projectors.get(variant);
    if (!projector) {
      projector = new TargetProjector(scenario.design, variant);
      this.projectors.set(variant, projector);
    }
    return projector;
  }

  /**
   * The variant's design for this data set: the plan's design refilled in place (the same numbers
   * buildDesign gives), else built the ordinary way (which also names any input error).
   */
  private designFor(variant: ResolvedVariant, data: SimulatedData): DesignMatrices {
    const plan = this.plans.get(variant) ?? 0;
    if (typeof plan !== 'number') {
      const refilled = fillDesign(plan, data.columns as Columns);
      if (refilled) return refilled;
    }
    const built = buildDesign(data.columns as Columns, variant.model);
    if (typeof plan === 'number' && plan < PLAN_TRIES) {
      this.plans.set(variant, planDesign(data.columns as Columns, variant.model, built, data.n + data.dropped) ?? plan + 1);
    }
    return built;
  }

  private runReplicate(scenario: Scenario, scenarioIndex: number, replicate: number, rows: ReplicateRow[]): void {
    const data = this.simulate(scenarioIndex, replicate);
    for (const variant of scenario.design.variants) {
      let fit: FitResult | null = null;
      let design: DesignMatrices | null = null;
      let reason = '';
      try {
        design = this.designFor(variant, data);
        fit = fitDesign(design, {
          family: variant.model.family,
          integration: variant.model.integration,
          nodes: variant.model.nodes,
          estimation: variant.model.estimation,
          level: variant.model.level,
          interval: this.intervals.get(variant.name)!,
          modes: false,
          fitted: false,
        });
        if (fit.failure) reason = fit.failure;
      } catch (e) {
        reason = (e as Error).message.split('\n')[0];
        fit = null;
      }
      const projector = this.projectorFor(scenario, variant);
      const targets = fit && design && !reason
        ? projector.targets(data, design.X, design.n, design.p, design.rowIds, design.fixedNames, fit.aliased)
        : projector.fixedTruth;
      pushRows(rows, scenario, replicate, variant, fit, reason, targets);
    }
  }
}

function fitStatus(fit: FitResult | null, reason: string): ReplicateStatus {
  if (!fit || reason) return 'failed';
  if (!fit.converged) return 'nonconverged';
  if (fit.singular) return 'singular';
  return 'ok';
}

/** One row, built with a fixed field order so every row shares one object shape. */
function makeRow(
  scenario: string, variant: string, replicate: number, parameter: string, kind: ReplicateKind, truth: number,
  estimate: number, se: number, lower: number, upper: number, df: number, status: ReplicateStatus, reason: string,
): ReplicateRow {
  return { scenario, variant, replicate, parameter, kind, truth, estimate, se, lower, upper, df, status, reason };
}

function pushRows(
  rows: ReplicateRow[], scenario: Scenario, replicate: number, variant: ResolvedVariant,
  fit: FitResult | null, reason: string, targets: Float64Array,
): void {
  const status = fitStatus(fit, reason);
  const why = status === 'nonconverged' ? fit!.warnings.find((w) => w.startsWith('did not converge')) ?? 'did not converge' : reason;
  const key = scenario.key;
  const name = variant.name;
  const usable = status === 'ok' || status === 'singular';
  for (let c = 0; c < variant.coefficients.length; c++) {
    const coef = variant.coefficients[c];
    const truth = targets[c];
    let r = null;
    if (fit) for (const f of fit.fixed) if (f.term === coef) { r = f; break; }
    if (!fit || !r || status === 'failed') {
      rows.push(makeRow(key, name, replicate, coef, 'fixed', truth, NaN, NaN, NaN, NaN, NaN, 'failed', why || `coefficient ${coef} not in the fit`));
    } else if (r.aliased) {
      rows.push(makeRow(key, name, replicate, coef, 'fixed', truth, NaN, NaN, NaN, NaN, NaN, 'aliased', `not estimable: ${fit.aliasReasons[coef] ?? 'a linear combination of other columns'}`));
    } else {
      rows.push(makeRow(key, name, replicate, coef, 'fixed', truth, r.estimate, r.se, r.lower, r.upper, r.df, status, usable ? r.note ?? '' : why));
    }
  }
  for (const [factor, terms] of randomTermsOf(variant)) {
    for (const term of terms) {
      const truth = sdTruth(scenario.design, factor, term);
      let r = null;
      if (fit) for (const v of fit.random) if (v.factor === factor && v.term === term) { r = v; break; }
      const bad = status === 'failed' || !r;
      // profile and bootstrap fits give the SD an interval; the others leave it empty
      const lower = bad || r!.lower === undefined ? NaN : r!.lower;
      const upper = bad || r!.upper === undefined ? NaN : r!.upper;
      rows.push(makeRow(key, name, replicate, sdParameterName(factor, term), 'sd', truth, bad ? NaN : r!.sd, NaN, lower, upper, NaN,
        bad ? 'failed' : status, usable ? '' : why));
    }
  }
  for (const g of variant.model.groups) {
    if (g.as !== 'random' || !g.slopes?.length || g.correlated === false) continue;
    const terms = ['intercept', ...g.slopes];
    for (let i = 0; i < terms.length; i++) {
      for (let j = i + 1; j < terms.length; j++) {
        const truth = correlationTruth(scenario.design, g.factor, terms[i], terms[j]);
        let r = null;
        if (fit) for (const c of fit.correlations) if (c.factor === g.factor && c.terms[0] === terms[i] && c.terms[1] === terms[j]) { r = c; break; }
        const bad = status === 'failed' || !r;
        rows.push(makeRow(key, name, replicate, correlationParameterName(g.factor, terms[i], terms[j]), 'correlation', truth,
          bad ? NaN : r!.value, NaN, NaN, NaN, NaN, bad ? 'failed' : status, usable ? '' : why));
      }
    }
  }
}

/** Name of the correlation parameter of two random terms of a factor ("cor(site:intercept,x)"). */
function correlationParameterName(factor: string, a: string, b: string): string {
  return `cor(${factor}:${a},${b})`;
}

/** True correlation of two random terms (truth.correlations, either order); 0 when not given. */
function correlationTruth(design: SurveyDesign, factor: string, a: string, b: string): number {
  const given = design.truth.correlations[factor];
  return given?.[`${a}:${b}`] ?? given?.[`${b}:${a}`] ?? 0;
}

/** Random terms a variant estimates, plus the residual (normal responses only: counts have none), in model order. */
function randomTermsOf(variant: ResolvedVariant): [string, string[]][] {
  const out: [string, string[]][] = [];
  for (const g of variant.model.groups) {
    if (g.as === 'random') out.push([g.factor, ['intercept', ...(g.slopes ?? [])]]);
  }
  if (variant.model.family === 'gaussian') out.push(['residual', ['']]);
  return out;
}

/** True SD of a random term: truth.sd for intercepts and the residual, truth.slopes for slopes; 0 when absent. */
function sdTruth(design: SurveyDesign, factor: string, term: string): number {
  if (factor === 'residual') return design.truth.sd.residual ?? design.truth.familyParams.residual ?? 0;
  if (term === 'intercept') return design.truth.sd[factor] ?? 0;
  return design.truth.slopes[factor]?.[term] ?? 0;
}
