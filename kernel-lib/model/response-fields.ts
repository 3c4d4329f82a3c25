/**
 * The response part of a model description: family, binomial trials, offset, and how a non-normal
 * mixed model's likelihood is integrated. Checked here so every error names its field; the
 * numbers behind each family live in family/ and fit/estimate/.
 */
import { describeValue } from './errors';
import { checkChoice, expectInteger, fail } from './option-checks';
import type { GroupSpec, Integration, ResponseFamilyName } from './types';

const RESPONSE_FAMILY_NAMES: readonly ResponseFamilyName[] = ['gaussian', 'poisson', 'binomial', 'negative-binomial'];
const INTEGRATIONS: readonly Integration[] = ['laplace', 'quadrature'];
/** Default adaptive Gauss-Hermite nodes (Pinheiro and Bates 1995 found a handful of nodes ample for one random intercept). */
const DEFAULT_NODES = 9;
const MAX_NODES = 50;
/** Interval methods of the count and detection families: Wald z (default), profile likelihood, parametric bootstrap. */

export interface ResponseFields {
  family: ResponseFamilyName;
  trials?: string | number;
  offset?: string;
  integration?: Integration;
  nodes?: number;
}

/**
 * Parse the response fields of a model object. `estimation` and `interval` are the defaults of a
 * non-normal family (fitted by ML with Wald z intervals), undefined for the normal one; which
 * interval methods a family allows is ./interval-rule.
 */
export function parseResponseFields(
  obj: Record<string, unknown>, path: string, response: string, groups: GroupSpec[],
): ResponseFields & { estimation?: 'ML'; interval?: string } {
  const name = obj.family === undefined ? 'gaussian' : checkChoice(obj.family, RESPONSE_FAMILY_NAMES, `${path}.family`);
  const out: ResponseFields & { estimation?: 'ML'; interval?: string } = { family: name };
  if (name === 'gaussian') {
    for (const key of ['trials', 'offset', 'integration', 'nodes']) {
      if (obj[key] !== undefined) {
        fail(`${path}.${key}: only used with a count or detection family ("poisson", "binomial", "negative-binomial"); this model is "gaussian"${key === 'offset' ? ' (for a normal response, subtract the offset from the response instead)' : ''}`, `${path}.${key}`);
      }
    }
    return out;
  }
  if (obj.estimation !== undefined && obj.estimation !== 'ML') {
    fail(`${path}.estimation: the "${name}" family is fitted by maximum likelihood; REML is defined for normal responses only: use "ML" or leave it out`, `${path}.estimation`);
  }
  out.estimation = 'ML';
  out.interval = 'wald';
  if (obj.trials !== undefined) {
    if (name !== 'binomial') fail(`${path}.trials: only used with the "binomial" family`, `${path}.trials`);
    const t = obj.trials;
    const ok = (typeof t === 'string' && t !== '') || (typeof t === 'number' && Number.isInteger(t) && t >= 1);
    if (!ok) fail(`${path}.trials: expected a column name or a positive whole number, got ${describeValue(t)}`, `${path}.trials`);
    if (t === response) fail(`${path}.trials: the response "${response}" cannot also be the trials column`, `${path}.trials`);
    out.trials = t as string | number;
  } else if (name === 'binomial') {
    out.trials = 1;
  }
  if (obj.offset !== undefined) {
    if (typeof obj.offset !== 'string' || obj.offset === '') fail(`${path}.offset: expected a column name (e.g. of log survey effort), got ${describeValue(obj.offset)}`, `${path}.offset`);
    if (obj.offset === response) fail(`${path}.offset: the response "${response}" cannot be the offset`, `${path}.offset`);
    out.offset = obj.offset as string;
  }
  const integration = obj.integration === undefined ? 'laplace' : checkChoice(obj.integration, INTEGRATIONS, `${path}.integration`);
  out.integration = integration;
  if (integration === 'quadrature') {
    const random = groups.filter((g) => g.as === 'random');
    if (random.length !== 1 || (random[0].slopes?.length ?? 0) > 0) {
      fail(`${path}.integration: "quadrature" needs exactly one random grouping factor with a random intercept only (this model has ${random.length === 1 ? 'random slopes' : `${random.length} random factors`}); use "laplace"`, `${path}.integration`);
    }
    out.nodes = obj.nodes === undefined ? DEFAULT_NODES : expectInteger(obj.nodes, `${path}.nodes`, 1, MAX_NODES);
  } else if (obj.nodes !== undefined) {
    fail(`${path}.nodes: only used with "integration": "quadrature"`, `${path}.nodes`);
  }
  return out;
}

/** The response fields as written back to JSON (nothing for a normal model, so its JSON is unchanged). */
export function responseFieldsToJson(m: ResponseFields): Partial<ResponseFields> {
  if (m.family === 'gaussian') return {};
  const out: Partial<ResponseFields> = { family: m.family };
  if (m.trials !== undefined) out.trials = m.trials;
  if (m.offset !== undefined) out.offset = m.offset;
  out.integration = m.integration;
  if (m.integration === 'quadrature') out.nodes = m.nodes;
  return out;
}
