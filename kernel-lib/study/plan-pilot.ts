/**
 * Planning from a pilot survey: the design derived from the pilot (design/from-survey), planned
 * over more levels of a factor, once with each end of the pilot's 95% profile-likelihood interval
 * for one SD and once with its estimate, because an SD estimated from few levels is itself
 * uncertain and the number needed depends on it.
 */
import { planCaseFolder } from './folder-layout';
import { toColumns, type Columns } from '../data/columns';
import { designFromSurvey, type DesignFromSurveyOptions } from '../design/from-survey';
import { fitResolvedModel, type SurveyData } from '../analyse/fit-model';
import { QuadratInputError } from '../model/errors';
import { parseModel } from '../model/parse';
import type { ModelSpec } from '../model/types';
import { runPlan, type PlanResult } from './plan-run';
import { scenarioFieldName } from './scenario-fields';

export interface PilotPlanOptions extends DesignFromSurveyOptions {
  /** Output folder: one plan per case in <out>/<case>/. */
  out: string;
  /** Random factor whose SD is taken at its interval ends (e.g. "site"). */
  sdOf: string;
  workers?: number;
  onProgress?: (line: string) => void;
}

export interface PilotPlanCase {
  /** 'lower end', 'estimate' or 'upper end'. */
  case: 'lower end' | 'estimate' | 'upper end';
  sd: number;
  result: PlanResult;
}

export interface PilotPlan {
  factor: string;
  /** The pilot's estimate and 95% profile interval of the SD. */
  sd: { estimate: number; lower: number; upper: number };
  cases: PilotPlanCase[];
  /** "32 site levels if the SD of site is as estimated (0.81); …" */
  sentence: string;
  /** What designFromSurvey assumed. */
  notes: string[];
}

const round = (v: number) => Number(v.toPrecision(3));

/**
 * Derive a design from the pilot, attach `plan` (the plan block of a design JSON, whose variants
 * are the derived ones: "as in the pilot model", "<factor> fixed"), and run it at the lower end,
 * the estimate and the upper end of the pilot's 95% profile interval for the SD of `sdOf`.
 */
export async function planFromPilot(data: SurveyData, model: ModelSpec, plan: Record<string, unknown>, options: PilotPlanOptions): Promise<PilotPlan> {
  const resolved = parseModel(model);
  const group = resolved.groups.find((g) => g.factor === options.sdOf && g.as === 'random');
  if (!group) {
    const random = resolved.groups.filter((g) => g.as === 'random').map((g) => g.factor);
    throw new QuadratInputError(`sdOf: "${options.sdOf}" is not a random factor of the model (random factors: ${random.join(', ') || 'none'})`, { field: 'sdOf' });
  }
  const derived = designFromSurvey(data, model, options);
  // profile-likelihood interval of the SD (fit/inference/profile), at 95%
  const profiled = fitResolvedModel(toColumns(data as Columns), { ...resolved, interval: 'profile', level: 0.95 });
  const row = profiled.random.find((r) => r.factor === options.sdOf && r.term === 'intercept');
  const estimate = derived.design.truth.sd[options.sdOf];
  const lower = row?.lower;
  const upper = row?.upper;
  const cases: PilotPlanCase[] = [];
  const notes = [...derived.notes];
  const ends: [PilotPlanCase['case'], number | undefined][] = [['lower end', lower], ['estimate', estimate], ['upper end', upper]];
  for (const [name, sd] of ends) {
    if (sd === undefined || !Number.isFinite(sd)) {
      notes.push(`the ${name} of the profile interval for the SD of ${options.sdOf} could not be found; that case is left out`);
      continue;
    }
    const design = { ...derived.design, truth: { ...derived.design.truth, sd: { ...derived.design.truth.sd, [options.sdOf]: round(sd) } }, plan };
    const result = await runPlan(design, { out: planCaseFolder(options.out, name), workers: options.workers, onProgress: options.onProgress });
    cases.push({ case: name, sd: round(sd), result });
  }
  const what = cases.length ? scenarioFieldName(cases[0].result.vary) : '';
  const answer = (c: PilotPlanCase) => {
    const r = c.result;
    if (!r.decided && r.between) return `${r.between[0]} to ${r.between[1]} ${what} (not decided within the replicate cap)`;
    return r.answer === null ? `none of the candidate ${what}` : `${r.answer} ${what}`;
  };
  const phrase = (c: PilotPlanCase) =>
    c.case === 'estimate' ? `${answer(c)} if the SD of ${options.sdOf} is as estimated (${c.sd})`
    : `${answer(c)} if it is at the ${c.case} of its 95% interval (${c.sd})`;
  const ordered = [...cases].sort((a, b) => ['estimate', 'upper end', 'lower end'].indexOf(a.case) - ['estimate', 'upper end', 'lower end'].indexOf(b.case));
  return {
    factor: options.sdOf,
    sd: { estimate, lower: lower ?? NaN, upper: upper ?? NaN },
    cases,
    sentence: ordered.length ? `${ordered.map(phrase).join('; ')}.` : 'No case could be planned.',
    notes,
  };
}
