/**
 * The curve behind a plan: one goal's metric against the varied value, a ±1.96 MCSE band, the
 * goal as a horizontal line and the answer as a vertical one. Pure: points in, spec out.
 */
import { BAND_COLOUR, FONT, MARK_COLOUR, REFERENCE_COLOUR, VEGA_LITE_SCHEMA } from './theme';
import type { InlineRow, VegaLiteSpec } from './types';

export interface PlanCurvePoint {
  value: number;
  estimate: number;
  mcse: number;
  replicates: number;
  /** 'meets', 'fails' or 'undecided'. */
  verdict: string;
}

export interface PlanCurveOptions {
  /** The goal's threshold, drawn as a horizontal line. */
  threshold: number;
  /** The answer, drawn as a vertical line (none when null). */
  answer: number | null;
  /** Axis titles, e.g. "site levels" and "power of treatment=unburned". */
  xTitle: string;
  yTitle: string;
  title?: string;
  width?: number;
  height?: number;
}

/** Band half-width in MCSE: 95% Monte Carlo confidence (normal quantile 0.975). */
const BAND_Z = 1.96;

export function planCurve(points: readonly PlanCurvePoint[], options: PlanCurveOptions): VegaLiteSpec {
  if (!Array.isArray(points) || points.length === 0) throw new TypeError('planCurve: expected at least one evaluated point');
  if (!Number.isFinite(options.threshold)) throw new TypeError(`planCurve: options.threshold must be a finite number, got ${String(options.threshold)}`);
  const rows: InlineRow[] = [...points]
    .sort((a, b) => a.value - b.value)
    .filter((p) => Number.isFinite(p.estimate))
    .map((p) => {
      const half = Number.isFinite(p.mcse) ? BAND_Z * p.mcse : 0;
      return { value: p.value, estimate: p.estimate, low: p.estimate - half, high: p.estimate + half, replicates: p.replicates, verdict: p.verdict };
    });
  const x = { field: 'value', type: 'quantitative' as const, title: options.xTitle, scale: { zero: false } };
  const layers: unknown[] = [
    { mark: { type: 'area', color: BAND_COLOUR, opacity: 0.8 }, encoding: { x, y: { field: 'low', type: 'quantitative', title: options.yTitle }, y2: { field: 'high' } } },
    { mark: { type: 'line', color: MARK_COLOUR }, encoding: { x, y: { field: 'estimate', type: 'quantitative' } } },
    {
      mark: { type: 'point', filled: true, size: 60 },
      encoding: {
        x,
        y: { field: 'estimate', type: 'quantitative' },
        shape: { field: 'verdict', type: 'nominal', title: 'goal', scale: { domain: ['meets', 'undecided', 'fails'], range: ['circle', 'diamond', 'cross'] } },
        color: { field: 'verdict', type: 'nominal', title: 'goal', scale: { domain: ['meets', 'undecided', 'fails'], range: [MARK_COLOUR, '#E69F00', '#D55E00'] } },
        tooltip: [
          { field: 'value', type: 'quantitative', title: options.xTitle },
          { field: 'estimate', type: 'quantitative', format: '.3f' },
          { field: 'replicates', type: 'quantitative' },
          { field: 'verdict', type: 'nominal', title: 'goal' },
        ],
      },
    },
    { data: { values: [{ threshold: options.threshold }] }, mark: { type: 'rule', color: REFERENCE_COLOUR, strokeDash: [6, 4] }, encoding: { y: { field: 'threshold', type: 'quantitative' } } },
  ];
  if (options.answer !== null && Number.isFinite(options.answer)) {
    const answer = [{ answer: options.answer, label: `answer: ${options.answer}` }];
    layers.push(
      { data: { values: answer }, mark: { type: 'rule', color: REFERENCE_COLOUR, strokeWidth: 2 }, encoding: { x: { field: 'answer', type: 'quantitative' } } },
      {
        data: { values: answer },
        mark: { type: 'text', align: 'left', dx: 4, dy: -6, baseline: 'bottom', color: REFERENCE_COLOUR, font: FONT },
        encoding: { x: { field: 'answer', type: 'quantitative' }, y: { value: 0 }, text: { field: 'label' } },
      },
    );
  }
  return {
    $schema: VEGA_LITE_SCHEMA,
    title: { text: options.title ?? `${options.yTitle} by ${options.xTitle}`, subtitle: `band: ±${BAND_Z} Monte Carlo SE; dashed line: the goal`, font: FONT },
    width: options.width ?? 480,
    height: options.height ?? 260,
    data: { values: rows },
    layer: layers,
    config: { font: FONT, view: { stroke: null } },
  } as unknown as VegaLiteSpec;
}
