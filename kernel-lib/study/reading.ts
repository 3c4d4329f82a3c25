/**
 * The reading of a study: plain-language statements generated from the metrics by stated rules,
 * so that an analyst gets an answer (which analysis keeps its promise for this design, at what
 * cost) before any table. Pure: metric rows in, sentences out.
 *
 * Coverage rule. A coverage c from n replicates (MCSE s, Morris, White and Crowther 2019,
 * Statistics in Medicine 38:2074, Table 6) is judged against the nominal level L less a tolerance t
 * (default 0.5·(1 − L), Bradley's liberal criterion: Bradley 1978, British Journal of Mathematical
 * and Statistical Psychology 31:144):
 *   covers       c − 2s ≥ L − t   (with 95% Monte Carlo confidence, at most t below nominal)
 *   undercovers  c + 2s < L − t   (with 95% Monte Carlo confidence, more than t below nominal)
 *   undecided    otherwise; more replicates would settle it (their number is estimated).
 * Between "covers" and "undercovers" there is always the undecided band, so the wording never
 * jumps from one verdict to the opposite on a difference smaller than the Monte Carlo error.
 */
import { formatMetric } from './format-metric';
import type { MetricRow } from './metrics';
import { scenarioFieldName } from './scenario-fields';
import type { StudyManifest } from './study-folder';

/** Monte Carlo confidence multiplier of every rule here (≈ 95%). */
const READING_Z = 2;

export const READING_CAUTIONS = [
  'These statements hold for the simulated designs and true values only; a survey that differs (other variances, skewed or count responses, informative gaps) can behave differently.',
  'A factor entered as fixed answers a narrower question: its effects refer to the levels surveyed, not to a wider population of them.',
  'Confounding is a reason to prefer a fixed factor or the within-between split: when a covariate\'s level means go with the levels\' own effects, the random-intercept slope is biased (simulate it with between.correlation; the correlation assumed is a guess to vary, not a fact).',
  'Defer to a qualified statistician and the survey protocol before deciding.',
];

export type CoverageClass = 'covers' | 'undercovers' | 'undecided';

export interface CoverageJudgement {
  class: CoverageClass;
  value: number;
  mcse: number;
  n: number;
  nominal: number;
  tolerance: number;
  /** Replicates to add (about) before the class is settled; 0 when it is. */
  moreReplicates: number;
}

/** Default tolerance below nominal coverage: half the nominal error rate (Bradley 1978, liberal criterion). */
export function defaultTolerance(nominal: number): number {
  return 0.5 * (1 - nominal);
}

/** Total replicates that make z·MCSE of a quantity with per-replicate SD `sd` smaller than `margin`. */
function replicatesFor(sd: number, margin: number, z = READING_Z): number {
  if (!(margin > 0) || !Number.isFinite(sd)) return Infinity;
  // less a hair, so that a product that is whole in exact arithmetic is not pushed up by rounding
  return Math.ceil(((z * sd) / margin) ** 2 - 1e-9);
}

/** Round a replicate count up to two significant digits, as it is quoted ("about 1300 more"). */
export function roundUpCount(n: number): number {
  if (!Number.isFinite(n) || n <= 0) return n;
  const unit = 10 ** Math.max(0, Math.floor(Math.log10(n)) - 1);
  return Math.ceil(n / unit) * unit;
}

/** Judge one coverage row by the rule above (nominal from the row, else 0.95). */
export function judgeCoverage(row: MetricRow, options: { tolerance?: number; z?: number } = {}): CoverageJudgement {
  const z = options.z ?? READING_Z;
  const nominal = row.nominal ?? 0.95;
  const tolerance = options.tolerance ?? defaultTolerance(nominal);
  const c = row.value;
  // an MCSE of 0 (every or no interval covered) says nothing about the spread: use the nominal's
  const sd = c > 0 && c < 1 ? Math.sqrt(c * (1 - c)) : Math.sqrt(nominal * (1 - nominal));
  const s = row.mcse > 0 ? row.mcse : sd / Math.sqrt(Math.max(1, row.n));
  const floor = nominal - tolerance;
  const base = { value: c, mcse: s, n: row.n, nominal, tolerance };
  if (c - z * s >= floor) return { ...base, class: 'covers', moreReplicates: 0 };
  if (c + z * s < floor) return { ...base, class: 'undercovers', moreReplicates: 0 };
  const total = replicatesFor(sd, Math.abs(c - floor), z);
  return { ...base, class: 'undecided', moreReplicates: Number.isFinite(total) ? Math.max(1, total - row.n) : Infinity };
}

/** "91.2% ± 0.6" with the digits the MCSE supports; a share of exactly 0 or 1 as "0%" or "100%". */
export function percentWithError(value: number, mcse: number): string {
  if (value === 0 || value === 1) return `${100 * value}%`;
  const [v, e] = formatMetric(100 * value, 100 * mcse).split(' ');
  return `${v}% ± ${e.slice(1, -1)}`;
}

/** A nominal level as a percentage: 0.95 -> "95%", 0.975 -> "97.5%". */
function percentLevel(level: number): string {
  return `${Number((100 * level).toFixed(1))}%`;
}

const NO_GRID_LABEL = 'the design';

/** "year levels = 3, sd site = 0.5" for each scenario key ("the design" without a grid). */
export function scenarioLabels(scenarios: StudyManifest['scenarios']): Map<string, string> {
  return new Map(
    scenarios.map((s) => [s.key, Object.entries(s.values).map(([p, v]) => `${scenarioFieldName(p)} = ${v}`).join(', ') || NO_GRID_LABEL]),
  );
}

export interface ReadingOptions {
  /** Fixed effects of interest; default: those every variant estimates, the intercept excepted. */
  parameters?: readonly string[];
  /** Coverage tolerance below nominal (absolute, e.g. 0.01); default half the nominal error rate. */
  tolerance?: number;
}

export interface VariantCell {
  variant: string;
  coverage: CoverageJudgement;
  width?: MetricRow;
  rmse?: MetricRow;
  power?: MetricRow;
  typeIError?: MetricRow;
}

export interface CellReading {
  scenario: string;
  label: string;
  parameter: string;
  variants: VariantCell[];
  /** Recommended variant(s) here, or empty when the metrics support none. */
  recommend: string[];
  /** Markdown sentence(s). */
  text: string;
}

export interface StudyReading {
  /** The rule, stated once. */
  rule: string;
  /** One answer per parameter, over all scenarios (Markdown). */
  answers: string[];
  cells: CellReading[];
  cautions: string[];
}

const NONE = '';

function find(metrics: readonly MetricRow[], scenario: string, variant: string, parameter: string, metric: string): MetricRow | undefined {
  return metrics.find((m) => m.scenario === scenario && m.variant === variant && m.parameter === parameter && m.metric === metric && Number.isFinite(m.value));
}

function defaultParameters(cov: readonly MetricRow[]): string[] {
  const variants = new Set(cov.map((m) => m.variant));
  const byParam = new Map<string, Set<string>>();
  for (const m of cov) {
    if (!byParam.has(m.parameter)) byParam.set(m.parameter, new Set());
    byParam.get(m.parameter)!.add(m.variant);
  }
  const common = [...byParam].filter(([p, vs]) => p !== 'intercept' && vs.size === variants.size).map(([p]) => p);
  return common.length ? common : [...byParam.keys()];
}

const list = (names: readonly string[]) =>
  names.length <= 1 ? names.map((n) => `**${n}**`).join('') : `${names.slice(0, -1).map((n) => `**${n}**`).join(', ')} and **${names[names.length - 1]}**`;

/** Relative difference a/b − 1 with its MCSE by the delta method (rows treated as independent: conservative for paired fits). */
function ratio(a: MetricRow, b: MetricRow): { rel: number; se: number } {
  const rel = a.value / b.value - 1;
  const ra = (a.mcse || 0) / a.value;
  const rb = (b.mcse || 0) / b.value;
  return { rel, se: (a.value / b.value) * Math.sqrt(ra * ra + rb * rb) };
}

/** Replicates to add so that a difference `diff` with MCSE `se` at n replicates is beyond z MCSE. */
function moreToTell(diff: number, se: number, n: number): number {
  if (!(se > 0) || !(Math.abs(diff) > 0)) return Infinity;
  const total = Math.ceil(n * ((READING_Z * se) / Math.abs(diff)) ** 2);
  return Math.max(1, total - n);
}

/** Beyond this many times the replicates run, "more replicates" is not a useful answer. */
const MORE_LIMIT = 20;

function needMore(more: number, n: number): string {
  if (!Number.isFinite(more) || more > MORE_LIMIT * n) {
    return `no clear difference at this number of replicates (any difference is too small to tell even with ${MORE_LIMIT} times as many)`;
  }
  return `no clear difference at this number of replicates (need about ${roundUpCount(more)} more per scenario to tell)`;
}

function describeVariant(c: VariantCell): string {
  const j = c.coverage;
  const cov = percentWithError(j.value, j.mcse);
  const verdict =
    j.class === 'covers' ? 'keeps coverage'
    : j.class === 'undercovers' ? `undercovers by ${(100 * (j.nominal - j.value)).toFixed(1)} points`
    : 'not yet clear';
  const power = c.power ? `, power ${percentWithError(c.power.value, c.power.mcse)}`
    : c.typeIError ? `, false-positive rate ${percentWithError(c.typeIError.value, c.typeIError.mcse)}` : NONE;
  return `**${c.variant}** ${cov} (${verdict}${power})`;
}

function readCell(metrics: readonly MetricRow[], scenario: string, label: string, parameter: string, cells: VariantCell[]): CellReading {
  const covers = cells.filter((c) => c.coverage.class === 'covers');
  const under = cells.filter((c) => c.coverage.class === 'undercovers');
  const undecided = cells.filter((c) => c.coverage.class === 'undecided');
  const nominal = percentLevel(cells[0].coverage.nominal);
  const parts = [`${capitalise(where(label))}, intervals for \`${parameter}\` (nominal ${nominal}) cover ${cells.map(describeVariant).join('; ')}.`];
  let recommend: string[] = [];
  const n = Math.max(...cells.map((c) => c.coverage.n));
  if (covers.length && under.length && !undecided.length) {
    recommend = covers.map((c) => c.variant);
    const safe = covers.reduce((a, b) => ((a.width?.value ?? Infinity) <= (b.width?.value ?? Infinity) ? a : b));
    const risky = under.reduce((a, b) => ((a.width?.value ?? Infinity) <= (b.width?.value ?? Infinity) ? a : b));
    const costs: string[] = [];
    if (safe.width && risky.width) costs.push(`${signedPercent(ratio(safe.width, risky.width).rel)} in interval width`);
    if (safe.rmse && risky.rmse) costs.push(`${signedPercent(ratio(safe.rmse, risky.rmse).rel)} in RMSE`);
    parts.push(`Use ${list(recommend)} here${costs.length ? `; against **${risky.variant}** it costs ${costs.join(' and ')}` : NONE}.`);
  } else if (!covers.length && under.length === cells.length) {
    parts.push('No variant keeps coverage here: every interval is too narrow for a survey like this one.');
  } else if (undecided.length) {
    const more = Math.max(...undecided.map((c) => c.coverage.moreReplicates));
    parts.push(`No recommendation: ${needMore(more, n)}.`);
  } else {
    // every variant keeps coverage: a recommendation only if one is clearly more precise
    const withWidth = covers.filter((c) => c.width);
    if (withWidth.length >= 2) {
      const best = withWidth.reduce((a, b) => (a.width!.value <= b.width!.value ? a : b));
      const others = withWidth.filter((c) => c !== best);
      const cmp = others.map((o) => ({ o, r: ratio(o.width!, best.width!) }));
      const clear = cmp.every(({ r }) => r.rel > READING_Z * r.se);
      if (clear) {
        recommend = [best.variant];
        parts.push(`All keep coverage; ${list([best.variant])} gives the narrowest intervals (the others are ${cmp.map(({ o, r }) => `${signedPercent(r.rel)} wider with ${o.variant}`).join(', ')}).`);
      } else {
        const more = Math.max(...cmp.map(({ r }) => moreToTell(r.rel, r.se, n)));
        parts.push(`All keep coverage; ${needMore(more, n)} in interval width.`);
      }
    } else {
      recommend = covers.map((c) => c.variant);
      parts.push('All keep coverage.');
    }
  }
  return { scenario, label, parameter, variants: cells, recommend, text: parts.join(' ') };
}

/** "at year levels = 3", or "in the design" for a study without a grid. */
function where(label: string): string {
  return label === NO_GRID_LABEL ? `in ${label}` : `at ${label}`;
}

const capitalise = (s: string) => s.charAt(0).toUpperCase() + s.slice(1);

function signedPercent(rel: number): string {
  const p = Math.round(100 * rel);
  return p >= 0 ? `+${p}%` : `${p}%`;
}

/** Per parameter: how each variant fared across the scenarios, and the recommendation if one holds everywhere. */
function answerFor(parameter: string, cells: readonly CellReading[], variants: readonly string[]): string {
  const mine = cells.filter((c) => c.parameter === parameter);
  const phrases = variants.map((v) => {
    const classes = mine.map((c) => ({ label: c.label, j: c.variants.find((x) => x.variant === v)?.coverage }));
    const present = classes.filter((c) => c.j);
    const under = present.filter((c) => c.j!.class === 'undercovers');
    const undecided = present.filter((c) => c.j!.class === 'undecided');
    if (!present.length) return `**${v}** has no intervals for it`;
    if (!under.length && !undecided.length) return `**${v}** keeps coverage in ${present.length === 1 ? 'the scenario' : `all ${present.length} scenarios`}`;
    const bits: string[] = [];
    if (under.length) bits.push(`undercovers ${under.map((c) => where(c.label)).join('; ')}`);
    if (undecided.length) bits.push(`is not yet clear ${undecided.map((c) => where(c.label)).join('; ')}`);
    return `**${v}** ${bits.join(' and ')}`;
  });
  const everywhere = variants.filter((v) => mine.length > 0 && mine.every((c) => c.recommend.includes(v)));
  const decided = mine.filter((c) => c.recommend.length > 0).length;
  const verdict =
    everywhere.length === 1 ? ` Recommendation: ${list(everywhere)}, supported in every scenario.`
    : decided === 0 ? ' No recommendation holds: see each scenario below.'
    : ` A recommendation holds in ${decided} of ${mine.length} scenarios: see each below.`;
  return `\`${parameter}\`: ${phrases.join('; ')}.${verdict}`;
}

/**
 * Read a study's metrics: for each scenario and parameter of interest, which variants keep
 * coverage (rule in the module comment), which undercover and by how much, the power of each, the
 * cost in interval width and RMSE of the safer choice, and a recommendation only where the metrics
 * support one.
 */
export function readStudy(metrics: readonly MetricRow[], scenarios: StudyManifest['scenarios'], options: ReadingOptions = {}): StudyReading {
  if (options.tolerance !== undefined && !(options.tolerance > 0 && options.tolerance < 1)) {
    throw new RangeError(`reading tolerance: expected a number in (0, 1), got ${options.tolerance}`);
  }
  const labels = scenarioLabels(scenarios);
  const cov = metrics.filter((m) => m.metric === 'coverage' && m.kind === 'fixed' && Number.isFinite(m.value) && m.n > 0);
  const parameters = options.parameters ?? defaultParameters(cov);
  const variants = [...new Set(cov.map((m) => m.variant))];
  const scenarioKeys = [...new Set([...scenarios.map((s) => s.key), ...cov.map((m) => m.scenario)])];
  const cells: CellReading[] = [];
  for (const parameter of parameters) {
    for (const scenario of scenarioKeys) {
      const here: VariantCell[] = [];
      for (const variant of variants) {
        const row = cov.find((m) => m.scenario === scenario && m.variant === variant && m.parameter === parameter);
        if (!row) continue;
        here.push({
          variant,
          coverage: judgeCoverage(row, { tolerance: options.tolerance }),
          width: find(metrics, scenario, variant, parameter, 'width'),
          rmse: find(metrics, scenario, variant, parameter, 'rmse'),
          power: find(metrics, scenario, variant, parameter, 'power'),
          typeIError: find(metrics, scenario, variant, parameter, 'typeIError'),
        });
      }
      if (here.length) cells.push(readCell(metrics, scenario, labels.get(scenario) ?? scenario, parameter, here));
    }
  }
  const nominals = [...new Set(cov.map((m) => m.nominal ?? 0.95))];
  const tol = options.tolerance;
  const rule =
    `Rule: a variant keeps coverage when its coverage minus 2 Monte Carlo SEs is at least the nominal level less ` +
    (tol !== undefined ? `${Number((100 * tol).toFixed(2))} points` : `half the nominal error rate (${nominals.map((l) => `${percentLevel(l - defaultTolerance(l))} for ${percentLevel(l)} intervals`).join(', ') || '92.5% for 95% intervals'})`) +
    '; it undercovers when coverage plus 2 MCSE is below that; otherwise it is not yet clear. ' +
    'Differences in width or RMSE count only when larger than 2 MCSE.';
  return {
    rule,
    answers: parameters.filter((p) => cells.some((c) => c.parameter === p)).map((p) => answerFor(p, cells, variants)),
    cells,
    cautions: READING_CAUTIONS,
  };
}

/** The reading as Markdown: answers, then one bullet per scenario and parameter, the rule, the cautions. */
export function readingMarkdown(reading: StudyReading): string {
  if (!reading.cells.length) return 'No intervals were studied, so there is no reading of coverage.';
  return [
    ...reading.answers,
    reading.cells.map((c) => `- ${c.text}`).join('\n'),
    `*${reading.rule}*`,
    reading.cautions.map((c) => `- ${c}`).join('\n'),
  ].join('\n\n');
}

/** The reading as plain text for a terminal (Markdown emphasis removed). */
export function readingText(reading: StudyReading): string {
  return readingMarkdown(reading).replace(/\*\*|`/g, '').replace(/^\*(.*)\*$/gm, '$1');
}
