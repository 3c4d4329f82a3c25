/**
 * Checks shared by the plot tests: JSON snapshot (with a -changed copy on mismatch), validation
 * against the Vega-Lite JSON schema shipped in the package, and a headless render with Vega.
 */
import { existsSync, readFileSync, rmSync, writeFileSync } from 'fs';
import { join } from 'path';
import { expect } from 'vitest';
import Ajv from 'ajv';
import type { ValidateFunction } from 'ajv';
import * as vl from 'vega-lite';
import * as vega from 'vega';
import { roundJson } from './round-json';

const SNAPSHOT_DIR = join(__dirname, '..', 'snapshots', 'plots');

let validator: ValidateFunction | undefined;

/** Schema errors of `spec` as "path message" lines; empty when valid. */
export function schemaErrors(spec: unknown): string[] {
  if (validator === undefined) {
    const schema = JSON.parse(readFileSync(require.resolve('vega-lite/build/vega-lite-schema.json'), 'utf8'));
    const ajv = new Ajv({ strict: false, allErrors: true, validateFormats: false, logger: false });
    validator = ajv.compile(schema);
  }
  // Validate what a notebook would receive: the spec after a JSON round trip.
  if (validator(JSON.parse(JSON.stringify(spec)))) return [];
  return (validator.errors ?? []).map((e) => `${e.instancePath} ${e.message ?? ''}`);
}

/** Compares the rounded spec with tests/snapshots/plots/<name>.json; on a mismatch also writes <name>-changed.json. */
export async function expectSpecSnapshot(spec: unknown, name: string): Promise<void> {
  const text = roundJson(spec);
  const file = join(SNAPSHOT_DIR, `${name}.json`);
  const changed = join(SNAPSHOT_DIR, `${name}-changed.json`);
  if (existsSync(file) && readFileSync(file, 'utf8') !== text) writeFileSync(changed, text);
  else if (existsSync(changed)) rmSync(changed);
  await expect(text).toMatchFileSnapshot(file);
}

export interface Rendered {
  view: vega.View;
  svg: string;
  /** Warnings from the Vega-Lite compiler and the Vega runtime. */
  warnings: string[];
}

function collectingLogger(warnings: string[]) {
  const logger = vega.logger(vega.Warn);
  logger.warn = (...args: readonly unknown[]) => {
    warnings.push(args.map(String).join(' '));
    return logger;
  };
  logger.error = (...args: readonly unknown[]) => {
    throw new Error(args.map(String).join(' '));
  };
  return logger;
}

/** Compiles with Vega-Lite, parses with Vega and renders to SVG headlessly. */
export async function renderSpec(spec: vl.TopLevelSpec): Promise<Rendered> {
  const warnings: string[] = [];
  const logger = collectingLogger(warnings);
  const compiled = vl.compile(spec, { logger });
  const view = new vega.View(vega.parse(compiled.spec), { renderer: 'none', logger });
  const svg = await view.toSVG();
  return { view, svg, warnings };
}

export interface SceneItem {
  x?: number;
  y?: number;
  x2?: number;
  y2?: number;
  width?: number;
  height?: number;
  text?: string;
  datum: Record<string, unknown>;
}

interface SceneNode {
  marktype?: string;
  name?: string;
  items?: SceneNode[];
}

/** Every rendered item of the Vega-Lite layer named `name` (across facet cells). */
export function markItems(view: vega.View, name: string): SceneItem[] {
  return itemsWhere(view, (node) => node.name === `${name}_marks`);
}

/**
 * Rendered items of a given mark type inside a composite layer (Vega-Lite expands e.g. a boxplot
 * named `name` into marks named `name_layer_…_marks`).
 */
export function compositeItems(view: vega.View, name: string, marktype: string): SceneItem[] {
  return itemsWhere(view, (node) => node.marktype === marktype && (node.name ?? '').startsWith(`${name}_`));
}

function itemsWhere(view: vega.View, match: (node: SceneNode) => boolean): SceneItem[] {
  const out: SceneItem[] = [];
  const walk = (node: SceneNode) => {
    if (node.marktype !== undefined && match(node)) out.push(...((node.items ?? []) as unknown as SceneItem[]));
    for (const child of node.items ?? []) walk(child);
  };
  walk((view.scenegraph() as unknown as { root: SceneNode }).root);
  return out;
}

/** Pixel position of a value on a named scale. */
export function scaled(view: vega.View, scale: string, value: unknown): number {
  return (view.scale(scale) as unknown as (v: unknown) => number)(value);
}

/** The three checks every spec must pass: schema-valid, renders without warnings, SVG holds the marks. */
export async function expectValidAndRendered(spec: vl.TopLevelSpec, svgMarks: string[]): Promise<Rendered> {
  expect(schemaErrors(spec)).toEqual([]);
  const rendered = await renderSpec(spec);
  expect(rendered.warnings).toEqual([]);
  for (const m of svgMarks) expect(rendered.svg).toContain(m);
  return rendered;
}
