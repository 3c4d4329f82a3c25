/**
 * Validate a survey design (object or JSON text) and resolve it: defaults filled in, level
 * labels made, truth terms and random-effect factors worked out, variants parsed and checked
 * against the columns the simulation will produce. Errors are QuadratInputError with the field
 * path first (`design.factors[2].within: unknown factor "sites"; …`); things that do not stop a
 * study (e.g. variant coefficients without truth) are listed in `warnings`.
 */
import { describeValue, listNames } from '../model/errors';
import { INTERCEPT } from '../model/terms';
import { createStream } from '../random/stream';
import { checkChoice, expectArray, expectInRange, expectInteger, expectNonNegative, expectObject, fail, parseJsonText, rejectUnknownKeys } from '../model/option-checks';
import { expectName, keyPath } from './checks';
import { columnCatalog, type ColumnCatalog } from './columns';
import { addTrialsColumn, checkVariantResponseColumns, parseDesignOffset, parseDesignTrials } from './response-columns';
import { parseCovariates } from './covariates';
import { parseFactors } from './factors';
import { RESPONSE_FAMILIES, responseFamily } from '../family/index';
import { resolveGridPath } from './grid-path';
import { buildLayout } from './layout';
import { checkSurveyRows } from './size-limits';
import { parseTruth } from './truth';
import type { GridAxis, GridValue, ResolvedFactor, SurveyDesign, SurveyDesignSpec } from './types';
import { parseVariants } from './variants';

const DESIGN_KEYS = ['seed', 'replicates', 'factors', 'perCell', 'missing', 'response', 'family', 'trials', 'offset', 'covariates', 'unequal', 'truth', 'variants', 'grid', 'plan'];

const DESIGN_DEFAULTS = { perCell: 1, missing: 0, response: 'y', family: 'gaussian' };

export function parseDesign(input: unknown, path = 'design'): SurveyDesign {
  const raw = typeof input === 'string' ? parseJsonText(input, path) : input;
  const obj = expectObject(raw, path);
  rejectUnknownKeys(obj, DESIGN_KEYS, path);
  const warnings: string[] = [];

  const seed = parseSeed(obj.seed, `${path}.seed`);
  const replicates = expectInteger(obj.replicates, `${path}.replicates`, 1);
  const factors = parseFactors(obj.factors, `${path}.factors`);
  const perCell = obj.perCell === undefined ? DESIGN_DEFAULTS.perCell : expectInteger(obj.perCell, `${path}.perCell`, 1);
  const missing = obj.missing === undefined ? DESIGN_DEFAULTS.missing : expectInRange(obj.missing, `${path}.missing`, 0, 1, 'a probability');

  const response = obj.response === undefined ? DESIGN_DEFAULTS.response : expectName(obj.response, `${path}.response`);
  if (response === INTERCEPT) fail(`${path}.response: "${INTERCEPT}" is reserved for the model intercept`, `${path}.response`);
  factors.forEach((f, i) => {
    if (f.name === response) fail(`${path}.factors[${i}].name: "${f.name}" is also the response`, `${path}.factors[${i}].name`);
    if (f.name === INTERCEPT) fail(`${path}.factors[${i}].name: "${INTERCEPT}" is reserved`, `${path}.factors[${i}].name`);
  });

  const familyName = obj.family === undefined ? DESIGN_DEFAULTS.family : checkChoice(obj.family, Object.keys(RESPONSE_FAMILIES), `${path}.family`);
  const family = responseFamily(familyName)!;

  const trialsSpec = parseDesignTrials(obj.trials, `${path}.trials`, family.name);

  const covariates = parseCovariates(obj.covariates, `${path}.covariates`, factors);
  covariates.forEach((c, i) => {
    if (c.name === response || c.name === INTERCEPT) fail(`${path}.covariates[${i}].name: "${c.name}" is reserved or the response`, `${path}.covariates[${i}].name`);
  });

  checkSurveyRows(factors.map((f) => f.levels), perCell, `${path}.factors`);
  const unequal = parseUnequal(obj.unequal, `${path}.unequal`, factors, perCell, seed);
  const layout = buildLayout(factors, perCell, unequal);
  const catalog = columnCatalog(response, factors, covariates);
  addTrialsColumn(catalog, trialsSpec, `${path}.trials`);
  const offset = parseDesignOffset(obj.offset, `${path}.offset`, family.name, catalog, trialsSpec.trialsRange?.column);
  if (obj.truth === undefined) fail(`${path}.truth: expected an object with fixed and sd (required)`, `${path}.truth`);
  const truth = parseTruth(obj.truth, `${path}.truth`, catalog, factors, family, warnings);
  covariates.forEach((c, i) => {
    if (c.kind !== 'normal' || c.between === undefined || c.between.correlation === 0) return;
    if (truth.sd[c.between.factor] === undefined) {
      const field = `${path}.covariates[${i}].between.correlation`;
      fail(`${field}: correlates "${c.name}" with the random intercept of "${c.between.factor}", but truth.sd gives "${c.between.factor}" no SD`, field);
    }
  });
  if (obj.variants === undefined) fail(`${path}.variants: expected an array of { name, model } (required)`, `${path}.variants`);
  const variants = parseVariants(obj.variants, `${path}.variants`, { catalog, factors, layout, truth }, warnings);
  checkVariantFamilies(variants, { family: family.name, ...trialsSpec }, catalog, `${path}.variants`, warnings);
  // The copy kept for the grid has the defaults written out, so a grid can vary them too.
  const source = JSON.parse(JSON.stringify(obj)) as Record<string, unknown>;
  for (const [key, value] of Object.entries(DESIGN_DEFAULTS)) if (source[key] === undefined) source[key] = value;
  const grid = parseGrid(obj.grid, `${path}.grid`, source);

  const design: SurveyDesign = {
    seed,
    replicates,
    response,
    family: family.name,
    ...trialsSpec,
    ...(offset === undefined ? {} : { offset }),
    factors,
    perCell,
    missing,
    covariates,
    truth,
    variants,
    grid,
    warnings,
    source: source as unknown as SurveyDesignSpec,
  };
  if (unequal !== undefined) design.unequal = unequal;
  return design;
}

function parseSeed(value: unknown, path: string): number | string {
  if (typeof value === 'string' && value !== '') return value;
  if (typeof value === 'number' && Number.isFinite(value)) return value;
  return fail(`${path}: expected a number or a non-empty text (required), got ${describeValue(value)}`, path);
}

/** Sizes per level of the factor; from `cv`, drawn once from the design seed (see UnequalSpec). */
function parseUnequal(
  value: unknown,
  path: string,
  factors: readonly ResolvedFactor[],
  perCell: number,
  seed: number | string,
): { factor: string; sizes: number[] } | undefined {
  if (value === undefined) return undefined;
  const obj = expectObject(value, path);
  rejectUnknownKeys(obj, ['factor', 'sizes', 'cv'], path);
  const name = expectName(obj.factor, `${path}.factor`);
  const factor = factors.find((f) => f.name === name);
  if (factor === undefined) fail(`${path}.factor: unknown factor "${name}"; factors: ${listNames(factors.map((f) => f.name))}`, `${path}.factor`);
  if ((obj.sizes === undefined) === (obj.cv === undefined)) fail(`${path}: give exactly one of sizes and cv`, path);
  if (obj.sizes !== undefined) {
    const list = expectArray(obj.sizes, `${path}.sizes`);
    if (list.length !== factor.totalLevels) {
      fail(`${path}.sizes: expected ${factor.totalLevels} sizes (one per level of "${name}"), got ${list.length}`, `${path}.sizes`);
    }
    return { factor: name, sizes: list.map((s, j) => expectInteger(s, `${path}.sizes[${j}]`, 1)) };
  }
  const cv = expectNonNegative(obj.cv, `${path}.cv`);
  // Log-normal with mean 1: sigma² = ln(1 + cv²), m = exp(sigma z - sigma²/2) (Johnson, Kotz and Balakrishnan,
  // Continuous Univariate Distributions vol. 1, 2nd ed., ch. 14).
  const sigma2 = Math.log(1 + cv * cv);
  const sigma = Math.sqrt(sigma2);
  const stream = createStream(seed, 'unequal', name);
  const sizes = new Array<number>(factor.totalLevels);
  for (let j = 0; j < sizes.length; j++) sizes[j] = Math.max(1, Math.round(perCell * Math.exp(sigma * stream.normal() - sigma2 / 2)));
  return { factor: name, sizes };
}

function parseGrid(value: unknown, path: string, source: Record<string, unknown>): GridAxis[] {
  if (value === undefined) return [];
  const obj = expectObject(value, path);
  return Object.keys(obj).map((key) => {
    const p = keyPath(path, key);
    resolveGridPath(source, key, p);
    const list = expectArray(obj[key], p);
    if (list.length === 0) fail(`${p}: expected at least one value`, p);
    const seen = new Set<GridValue>();
    const values = list.map((v, j) => {
      const q = `${p}[${j}]`;
      if (!(typeof v === 'string' || (typeof v === 'number' && Number.isFinite(v)))) fail(`${q}: expected a number or text, got ${describeValue(v)}`, q);
      if (seen.has(v)) fail(`${q}: duplicate value ${describeValue(v)}`, q);
      seen.add(v);
      return v;
    });
    return { path: key, values };
  });
}

const LINKS: Record<string, string> = { gaussian: 'identity', poisson: 'log', 'negative-binomial': 'log', binomial: 'logit' };

/**
 * A variant may fit any family to the simulated data (e.g. counts analysed as normal). When its
 * link differs from the simulated family's, its coefficients are on another scale than the truth:
 * say so. A binomial variant must use the design's trials.
 */
function checkVariantFamilies(
  variants: SurveyDesign['variants'], design: Pick<SurveyDesign, 'family' | 'trials' | 'trialsRange'>, catalog: ColumnCatalog, path: string, warnings: string[],
): void {
  const family = design.family;
  variants.forEach((v, i) => {
    const m = v.model;
    checkVariantResponseColumns(m, design, catalog, `${path}[${i}].model`);
    if (LINKS[m.family] !== LINKS[family]) {
      warnings.push(
        `${path}[${i}] ("${v.name}") fits a ${m.family} model (${LINKS[m.family]} link) to ${family} data (${LINKS[family]} link): its coefficients are on another scale than the truth, ` +
          'so bias, RMSE and coverage compare unlike quantities and are not meaningful; power (a true effect) and type I error (a true zero, zero on every scale) are',
      );
    }
  });
}
