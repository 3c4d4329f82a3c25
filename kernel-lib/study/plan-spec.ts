/**
 * The `plan` block of a survey design: which setting to vary over which values, and the goals a
 * value must meet (a metric of one parameter in one analysis variant, at least or at most a
 * threshold). Errors are QuadratInputError naming the field (`plan.goals[1].metric`).
 */
import { describeValue, listNames } from '../model/errors';
import { expectArray, expectInteger, expectNumber, expectObject, fail, isPlainObject, rejectUnknownKeys } from '../model/option-checks';
import { expandGrid } from '../design/grid';
import { resolveGridPath } from '../design/grid-path';
import { parseDesign } from '../design/parse';
import type { ResolvedVariant, SurveyDesign } from '../design/types';
import type { MetricName } from './metrics';
import { sdParameterName } from './replicate-runner';

export interface PlanGoal {
  variant: string;
  /** Coefficient ("treatment=unburned"), SD ("sd(site)") or "*" for the fit shares. */
  parameter: string;
  metric: MetricName;
  direction: 'atLeast' | 'atMost';
  threshold: number;
}

export interface PlanSpec {
  /** Dotted path into the design, as the grid takes it. */
  vary: string;
  /** Strictly increasing candidate values. */
  values: number[];
  goals: PlanGoal[];
  /** Replicates at a value's first look (a multiple of the batch size). */
  firstReplicates: number;
  /** Most replicates spent on one value before it is called undecided. */
  maxReplicates: number;
}

/** Metrics a goal may name, by the kind of parameter (as study/metrics computes them). */
export const GOAL_METRICS: Record<'fixed' | 'sd' | 'fit', readonly MetricName[]> = {
  fixed: ['power', 'typeIError', 'coverage', 'width', 'rmse', 'bias', 'relativeBias', 'empiricalSE', 'modelSE'],
  sd: ['sdMean', 'sdMedian', 'sdRMSE', 'bias', 'relativeBias', 'empiricalSE'],
  fit: ['singularShare', 'nonconvergedShare', 'failureShare'],
};

/** Metrics that are shares (binomial): their decisions use the MCSE at the threshold. */
export const PROPORTION_METRICS: readonly MetricName[] = ['power', 'typeIError', 'coverage', 'singularShare', 'nonconvergedShare', 'failureShare'];

const PLAN_KEYS = ['vary', 'values', 'from', 'to', 'step', 'variant', 'parameter', 'metric', 'atLeast', 'atMost', 'goals', 'replicates', 'maxReplicates'];
const GOAL_KEYS = ['variant', 'parameter', 'metric', 'atLeast', 'atMost'];
const PLAN_DEFAULTS = { replicates: 100, maxReplicates: 3200 };

/** SD parameters a variant estimates: one per random term, and the residual. */
function sdParameters(variant: ResolvedVariant): string[] {
  const out: string[] = [];
  for (const g of variant.model.groups) {
    if (g.as === 'random') for (const term of ['intercept', ...(g.slopes ?? [])]) out.push(sdParameterName(g.factor, term));
  }
  out.push(sdParameterName('residual', ''));
  return out;
}

function parseValues(obj: Record<string, unknown>, path: string): number[] {
  const listed = obj.values !== undefined;
  const ranged = obj.from !== undefined || obj.to !== undefined || obj.step !== undefined;
  if (listed === ranged) fail(`${path}: give either values (a list) or from, to and step`, `${path}.values`);
  let values: number[];
  if (listed) {
    values = expectArray(obj.values, `${path}.values`).map((v, j) => expectNumber(v, `${path}.values[${j}]`));
  } else {
    const from = expectNumber(obj.from, `${path}.from`);
    const to = expectNumber(obj.to, `${path}.to`);
    const step = expectNumber(obj.step, `${path}.step`);
    if (!(step > 0)) fail(`${path}.step: expected a number > 0, got ${step}`, `${path}.step`);
    if (!(to > from)) fail(`${path}.to: expected a number greater than from (${from}), got ${to}`, `${path}.to`);
    const count = Math.floor((to - from) / step + 1e-9) + 1;
    if (count > 1000) fail(`${path}.step: ${count} values from ${from} to ${to}; at most 1000`, `${path}.step`);
    // rounded so that 0.1-steps give 0.3, not 0.30000000000000004
    values = Array.from({ length: count }, (_, i) => Number((from + i * step).toPrecision(12)));
  }
  if (values.length < 2) fail(`${path}.values: expected at least two values to choose between`, `${path}.values`);
  for (let j = 1; j < values.length; j++) {
    if (!(values[j] > values[j - 1])) {
      fail(`${path}.values[${j}]: values must increase, got ${values[j]} after ${values[j - 1]}`, `${path}.values[${j}]`);
    }
  }
  return values;
}

function parseGoal(obj: Record<string, unknown>, path: string, design: SurveyDesign): PlanGoal {
  const names = design.variants.map((v) => v.name);
  if (typeof obj.variant !== 'string') fail(`${path}.variant: expected the name of a variant (${listNames(names)}), got ${describeValue(obj.variant)}`, `${path}.variant`);
  const variant = design.variants.find((v) => v.name === obj.variant);
  if (!variant) fail(`${path}.variant: unknown variant ${describeValue(obj.variant)}; variants: ${listNames(names)}`, `${path}.variant`);
  if (typeof obj.metric !== 'string') fail(`${path}.metric: expected a metric name, got ${describeValue(obj.metric)}`, `${path}.metric`);
  const metric = obj.metric as MetricName;
  const isShare = (GOAL_METRICS.fit as readonly string[]).includes(metric);
  const parameter = obj.parameter === undefined && isShare ? '*' : obj.parameter;
  const sds = sdParameters(variant);
  const fixed = variant.coefficients;
  if (typeof parameter !== 'string') fail(`${path}.parameter: expected a parameter name, got ${describeValue(parameter)}`, `${path}.parameter`);
  const kind = parameter === '*' ? 'fit' : fixed.includes(parameter) ? 'fixed' : sds.includes(parameter) ? 'sd' : null;
  if (kind === null) {
    fail(`${path}.parameter: variant "${variant.name}" has no parameter ${describeValue(parameter)}; it estimates ${listNames([...fixed, ...sds])}`, `${path}.parameter`);
  }
  const allowed = GOAL_METRICS[kind];
  if (!allowed.includes(metric)) {
    const what = kind === 'fit' ? 'the fit shares (parameter "*")' : kind === 'sd' ? `an SD parameter ("${parameter}")` : `a fixed effect ("${parameter}")`;
    fail(`${path}.metric: ${describeValue(metric)} does not exist for ${what}; metrics there: ${listNames(allowed)}`, `${path}.metric`);
  }
  if (kind === 'fixed' && (metric === 'power' || metric === 'typeIError') && !variant.realised.includes(parameter)) {
    const truth = variant.truth[parameter] ?? 0;
    if (metric === 'power' && truth === 0) fail(`${path}.metric: the true value of "${parameter}" is 0, so it has a type I error rate, not power`, `${path}.metric`);
    if (metric === 'typeIError' && truth !== 0) fail(`${path}.metric: the true value of "${parameter}" is ${truth}, so it has power, not a type I error rate`, `${path}.metric`);
  }
  if ((obj.atLeast === undefined) === (obj.atMost === undefined)) fail(`${path}: give exactly one of atLeast and atMost`, `${path}.atLeast`);
  const direction = obj.atLeast !== undefined ? 'atLeast' : 'atMost';
  const threshold = expectNumber(obj[direction], `${path}.${direction}`);
  if (PROPORTION_METRICS.includes(metric) && !(threshold > 0 && threshold < 1)) {
    fail(`${path}.${direction}: ${metric} is a share; expected a threshold strictly between 0 and 1, got ${threshold}`, `${path}.${direction}`);
  }
  return { variant: variant.name, parameter, metric, direction, threshold };
}

/** The design without its plan block, and the plan block parsed and checked against the design. */
export function parsePlan(input: unknown, path = 'plan'): { design: Record<string, unknown>; plan: PlanSpec } {
  const raw = typeof input === 'string' ? (JSON.parse(input) as unknown) : input;
  const source = expectObject(raw, 'design');
  if (source.plan === undefined) fail(`${path}: the design has no plan block (see the README: vary, values, variant, parameter, metric, atLeast or atMost)`, path);
  const { plan: block, ...design } = source;
  const obj = expectObject(block, path);
  rejectUnknownKeys(obj, PLAN_KEYS, path);
  if (design.grid !== undefined) fail(`design.grid: a plan varies one setting (${path}.vary); remove the grid from the design`, 'design.grid');
  const resolved = parseDesign(design);
  if (typeof obj.vary !== 'string') fail(`${path}.vary: expected a dotted path such as "factors.site.levels", got ${describeValue(obj.vary)}`, `${path}.vary`);
  resolveGridPath(resolved.source, obj.vary, `${path}.vary`);
  const values = parseValues(obj, path);
  // the goals are checked against the design at the first value (coefficient names can depend on it)
  const first = expandGrid(parseDesign({ ...design, grid: { [obj.vary]: [values[0]] } }))[0].design;
  const single = GOAL_KEYS.some((k) => obj[k] !== undefined);
  if (single && obj.goals !== undefined) fail(`${path}: give one goal (variant, parameter, metric, atLeast/atMost) or a goals list, not both`, `${path}.goals`);
  let goals: PlanGoal[];
  if (obj.goals !== undefined) {
    const list = expectArray(obj.goals, `${path}.goals`);
    if (!list.length) fail(`${path}.goals: expected at least one goal`, `${path}.goals`);
    goals = list.map((g, j) => {
      const p = `${path}.goals[${j}]`;
      if (!isPlainObject(g)) fail(`${p}: expected an object, got ${describeValue(g)}`, p);
      rejectUnknownKeys(g, GOAL_KEYS, p);
      return parseGoal(g, p, first);
    });
  } else {
    goals = [parseGoal(obj, path, first)];
  }
  const firstReplicates = obj.replicates === undefined ? PLAN_DEFAULTS.replicates : expectInteger(obj.replicates, `${path}.replicates`, 25);
  const maxReplicates = obj.maxReplicates === undefined ? Math.max(PLAN_DEFAULTS.maxReplicates, firstReplicates) : expectInteger(obj.maxReplicates, `${path}.maxReplicates`, firstReplicates);
  return { design, plan: { vary: obj.vary, values, goals, firstReplicates, maxReplicates } };
}
