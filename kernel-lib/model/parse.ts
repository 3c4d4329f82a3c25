/**
 * Validate a model description (object or JSON text) and fill in every default.
 *
 * Rules beyond the field types (see ./types for the shape):
 * - Unknown keys are rejected, listing the allowed keys.
 * - A fixed term string with ":" is a two-way interaction of exactly two distinct, non-empty
 *   column names; an object term `{ column, reference? }` is a categorical main effect.
 *   The same term twice (also `b:a` after `a:b`) is rejected.
 * - Grouping factor names are unique. A grouping factor may not also be a fixed main effect
 *   (choose `as: "fixed"` instead); it may appear inside an interaction.
 * - `within` names either another group in `groups` (its own nesting is inherited, so the
 *   labels of plot within site within region read "R1/A/1") or any other column of the table;
 *   a missing column is caught when the design is built. It may not name the factor itself,
 *   the response, or close a cycle of groups.
 * - `reference` and `correlated` are kept whatever `as` is, so switching a factor between
 *   fixed and random stays a one-field change; each role uses what applies to it.
 * - `reference` may be given as a number in JSON; it is stored as text, as levels are.
 * - The interval method must suit the family and estimation (./interval-rule, the one place of that rule).
 * - `intercept: false` needs at least one fixed term.
 * - `split` names fixed main-effect terms (numeric columns, checked when the design is built).
 */
import { checkChoice, checkLevel, expectArray, expectBoolean, expectObject, expectText, fail, isPlainObject, parseJsonText, rejectUnknownKeys } from './option-checks';
import { describeValue } from './errors';
import { checkInterval } from './interval-rule';
import { INTERACTION_SEPARATOR, termColumns, termLabel } from './terms';
import { parseResponseFields, responseFieldsToJson } from './response-fields';
import type {
  CategoricalTerm,
  Estimation,
  FixedTerm,
  GroupRole,
  GroupSpec,
  MissingPolicy,
  ModelSpec,
  ResolvedModel,
} from './types';

const MODEL_KEYS = ['response', 'fixed', 'intercept', 'groups', 'estimation', 'categorical', 'missing', 'interval', 'level', 'family', 'trials', 'offset', 'integration', 'nodes'];
const GROUP_KEYS = ['factor', 'as', 'within', 'slopes', 'split', 'correlated', 'reference'];
const CATEGORICAL_TERM_KEYS = ['column', 'reference'];
const ROLES: readonly GroupRole[] = ['random', 'fixed'];
const ESTIMATIONS: readonly Estimation[] = ['REML', 'ML'];
const MISSING_POLICIES: readonly MissingPolicy[] = ['drop', 'reject'];

const MODEL_DEFAULTS = {
  estimation: 'REML' as Estimation,
  missing: 'drop' as MissingPolicy,
  // Wald intervals are too narrow with few groups (Kenward and Roger 1997; tests/integration/coverage.test.ts);
  // Satterthwaite df cost about one more fit (bench/run.js)
  interval: 'satterthwaite',
  level: 0.95,
};

/** Validate `input` (a model object or its JSON text) and return it with every default filled in. */
export function parseModel(input: unknown, path = 'model'): ResolvedModel {
  const raw = typeof input === 'string' ? parseJsonText(input, path) : input;
  const obj = expectObject(raw, path);
  rejectUnknownKeys(obj, MODEL_KEYS, path);

  const response = expectColumn(obj.response, `${path}.response`);
  const categorical = parseNameList(obj.categorical, `${path}.categorical`);
  for (let i = 0; i < categorical.length; i++) {
    if (categorical[i] === response) {
      fail(`${path}.categorical[${i}]: the response "${response}" cannot be categorical`, `${path}.categorical[${i}]`);
    }
  }
  const fixed = parseFixedTerms(obj.fixed, `${path}.fixed`, response);
  const groups = parseGroups(obj.groups, `${path}.groups`, response, fixed, `${path}.fixed`);
  const intercept = parseIntercept(obj.intercept, `${path}.intercept`, fixed.length);
  const { estimation: familyEstimation, interval: familyInterval, ...responseFields } = parseResponseFields(obj, path, response, groups);
  const estimation = familyEstimation ?? parseChoice(obj.estimation, ESTIMATIONS, MODEL_DEFAULTS.estimation, `${path}.estimation`);
  const interval = checkInterval(
    obj.interval ?? familyInterval ?? MODEL_DEFAULTS.interval,
    { family: responseFields.family, estimation, random: groups.some((g) => g.as === 'random') },
    `${path}.interval`, `${path}.estimation`,
  );

  return {
    response,
    ...responseFields,
    fixed,
    intercept,
    groups,
    estimation,
    categorical,
    missing: parseChoice(obj.missing, MISSING_POLICIES, MODEL_DEFAULTS.missing, `${path}.missing`),
    interval,
    level: parseLevel(obj.level, `${path}.level`),
  };
}

/**
 * A plain JSON-ready copy of a model with every default written out.
 * `parseModel(modelToJson(m))` deep-equals `parseModel(m)`.
 */
export function modelToJson(model: ModelSpec | ResolvedModel): ModelSpec {
  const m = parseModel(model);
  return {
    response: m.response,
    ...responseFieldsToJson(m),
    fixed: m.fixed.map((t) => (typeof t === 'string' ? t : copyCategoricalTerm(t))),
    intercept: m.intercept,
    groups: m.groups.map(copyGroup),
    estimation: m.estimation,
    categorical: [...m.categorical],
    missing: m.missing,
    interval: m.interval,
    level: m.level,
  };
}

function copyCategoricalTerm(t: CategoricalTerm): CategoricalTerm {
  return t.reference === undefined ? { column: t.column } : { column: t.column, reference: t.reference };
}

function copyGroup(g: GroupSpec): GroupSpec {
  const out: GroupSpec = { factor: g.factor, as: g.as };
  if (g.within !== undefined) out.within = g.within;
  out.slopes = [...(g.slopes ?? [])];
  if (g.split !== undefined) out.split = [...g.split];
  if (g.correlated !== undefined) out.correlated = g.correlated;
  if (g.reference !== undefined) out.reference = g.reference;
  return out;
}

// ---------------------------------------------------------------------------------------------
// Fields

function parseFixedTerms(value: unknown, path: string, response: string): FixedTerm[] {
  if (value === undefined) return [];
  const list = expectArray(value, path);
  const seen = new Map<string, number>();
  const terms: FixedTerm[] = [];
  list.forEach((item, i) => {
    const itemPath = `${path}[${i}]`;
    const term = parseFixedTerm(item, itemPath);
    const columns = termColumns(term);
    for (const c of columns) {
      if (c === response) fail(`${itemPath}: the response "${response}" cannot be a fixed term`, itemPath);
    }
    const key = [...columns].sort().join('\u0000');
    const earlier = seen.get(key);
    if (earlier !== undefined) {
      fail(`${itemPath}: duplicate term "${termLabel(term)}" (same as ${path}[${earlier}])`, itemPath);
    }
    seen.set(key, i);
    terms.push(term);
  });
  return terms;
}

function parseFixedTerm(value: unknown, path: string): FixedTerm {
  if (typeof value === 'string') {
    const parts = value.split(INTERACTION_SEPARATOR);
    if (parts.length === 1) {
      if (value === '') fail(`${path}: expected a column name, got an empty string`, path);
      return value;
    }
    if (parts.length !== 2 || parts[0] === '' || parts[1] === '') {
      fail(`${path}: an interaction is "a:b" with exactly two non-empty column names, got ${describeValue(value)}`, path);
    }
    if (parts[0] === parts[1]) fail(`${path}: interaction of "${parts[0]}" with itself; name two different columns`, path);
    return value;
  }
  if (isPlainObject(value)) {
    rejectUnknownKeys(value, CATEGORICAL_TERM_KEYS, path);
    const column = expectColumn(value.column, `${path}.column`);
    if (column.includes(INTERACTION_SEPARATOR)) {
      fail(`${path}.column: expected one column name (interactions are written as a string "a:b"), got ${describeValue(column)}`, `${path}.column`);
    }
    const term: CategoricalTerm = { column };
    if (value.reference !== undefined) term.reference = parseReference(value.reference, `${path}.reference`);
    return term;
  }
  return fail(`${path}: expected a column name, "a:b", or { column, reference }, got ${describeValue(value)}`, path);
}

function parseGroups(value: unknown, path: string, response: string, fixed: FixedTerm[], fixedPath: string): GroupSpec[] {
  if (value === undefined) return [];
  const list = expectArray(value, path);
  const groups = list.map((item, i) => parseGroup(item, `${path}[${i}]`, response));

  const indexByFactor = new Map<string, number>();
  groups.forEach((g, i) => {
    const earlier = indexByFactor.get(g.factor);
    if (earlier !== undefined) {
      fail(`${path}[${i}].factor: duplicate grouping factor "${g.factor}" (same as ${path}[${earlier}])`, `${path}[${i}].factor`);
    }
    indexByFactor.set(g.factor, i);
  });

  fixed.forEach((term, j) => {
    if (typeof term === 'string' && term.includes(INTERACTION_SEPARATOR)) return;
    const column = termLabel(term);
    const i = indexByFactor.get(column);
    if (i !== undefined) {
      fail(
        `${path}[${i}].factor: "${column}" is also a fixed term (${fixedPath}[${j}]); ` +
          `to estimate its level effects as fixed use as: "fixed" and remove the fixed term`,
        `${path}[${i}].factor`,
      );
    }
  });

  // A split covariate replaces its own main-effect column, so it must be one.
  groups.forEach((g, i) => {
    (g.split ?? []).forEach((c, j) => {
      if (!fixed.some((t) => t === c)) {
        fail(`${path}[${i}].split[${j}]: "${c}" must also be a fixed term (a numeric column) to be split into its ${g.factor} mean and the deviation from it`, `${path}[${i}].split[${j}]`);
      }
    });
  });

  // A cycle of `within` links (a within b, b within a) has no outermost level.
  groups.forEach((g, i) => {
    const chain = [g.factor];
    let outer = g.within;
    while (outer !== undefined) {
      if (chain.includes(outer)) {
        const loop = [...chain, outer].map((f) => `"${f}"`).join(' within ');
        fail(`${path}[${i}].within: nesting loops back (${loop}); the outermost factor must have no within`, `${path}[${i}].within`);
      }
      chain.push(outer);
      const next = indexByFactor.get(outer);
      outer = next === undefined ? undefined : groups[next].within;
    }
  });
  return groups;
}

function parseGroup(value: unknown, path: string, response: string): GroupSpec {
  const obj = expectObject(value, path);
  rejectUnknownKeys(obj, GROUP_KEYS, path);
  const factor = expectColumn(obj.factor, `${path}.factor`);
  if (factor === response) fail(`${path}.factor: the response "${response}" cannot be a grouping factor`, `${path}.factor`);
  if (obj.as === undefined) fail(`${path}.as: expected "random" or "fixed" (required)`, `${path}.as`);
  const as = parseChoice(obj.as, ROLES, 'random', `${path}.as`);
  const group: GroupSpec = { factor, as };

  if (obj.within !== undefined) {
    const within = expectColumn(obj.within, `${path}.within`);
    if (within === factor) fail(`${path}.within: "${factor}" cannot be nested within itself`, `${path}.within`);
    if (within === response) fail(`${path}.within: cannot nest within the response "${response}"`, `${path}.within`);
    group.within = within;
  }

  const slopes = parseNameList(obj.slopes, `${path}.slopes`);
  slopes.forEach((s, j) => {
    const p = `${path}.slopes[${j}]`;
    if (s.includes(INTERACTION_SEPARATOR)) fail(`${p}: expected one numeric column name, got ${describeValue(s)}`, p);
    if (s === factor) fail(`${p}: "${s}" is the grouping factor itself; a slope needs a numeric column`, p);
    if (s === response) fail(`${p}: the response "${response}" cannot be a slope`, p);
    if (s === group.within) fail(`${p}: "${s}" is the outer factor of this group; a slope needs a numeric column`, p);
  });
  group.slopes = slopes;
  const split = parseNameList(obj.split, `${path}.split`);
  if (split.length > 0) group.split = split;

  if (obj.correlated !== undefined) {
    group.correlated = expectBoolean(obj.correlated, `${path}.correlated`);
  } else if (slopes.length > 0) {
    group.correlated = true;
  }
  if (obj.reference !== undefined) group.reference = parseReference(obj.reference, `${path}.reference`);
  return group;
}

/** Without an intercept the fixed part needs a term of its own (a model of pure noise around 0 is not offered). */
function parseIntercept(value: unknown, path: string, fixedTerms: number): boolean {
  if (value === undefined) return true;
  const intercept = expectBoolean(value, path);
  if (!intercept && fixedTerms === 0) fail(`${path}: a model without an intercept needs at least one fixed term`, path);
  return intercept;
}

function parseLevel(value: unknown, path: string): number {
  return value === undefined ? MODEL_DEFAULTS.level : checkLevel(value, path);
}

function parseReference(value: unknown, path: string): string {
  if (typeof value === 'number' && Number.isFinite(value)) return String(value);
  if (typeof value === 'string' && value !== '') return value;
  return fail(`${path}: expected a level label (text), got ${describeValue(value)}`, path);
}

// ---------------------------------------------------------------------------------------------
// Field shapes of this parser (the checks themselves: ./option-checks)

const expectColumn = (value: unknown, path: string): string => expectText(value, path, 'a column name');

function parseNameList(value: unknown, path: string): string[] {
  if (value === undefined) return [];
  const list = expectArray(value, path);
  const seen = new Map<string, number>();
  return list.map((item, i) => {
    const name = expectColumn(item, `${path}[${i}]`);
    const earlier = seen.get(name);
    if (earlier !== undefined) fail(`${path}[${i}]: duplicate "${name}" (same as ${path}[${earlier}])`, `${path}[${i}]`);
    seen.set(name, i);
    return name;
  });
}

function parseChoice<T extends string>(value: unknown, choices: readonly T[], fallback: T, path: string): T {
  return value === undefined ? fallback : checkChoice(value, choices, path);
}
