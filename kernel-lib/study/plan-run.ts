/**
 * Run a plan: for each candidate value the search asks about, simulate and fit replicates from
 * the same seeded streams as a study whose grid holds that value (scenario key "vary=value"),
 * checkpointed in batches under <out>/values/<value>-<design fingerprint>/ (./folder-layout), so a plan is
 * reproducible, resumes after an interruption and reuses every replicate already on disk. Writes <out>/plan.json.
 */
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { join } from 'node:path';
import { Worker } from 'node:worker_threads';
import { parseDesign } from '../design/parse';
import { scenarioKey } from '../design/grid';
import { QuadratInputError } from '../model/errors';
import { batchFileName, batchPath, batchesFolder, planFilePath, planValueFolder, planValueIdentityPath } from './folder-layout';
import { summarise } from './metrics';
import { parseReplicateCsv } from './replicate-csv';
import type { ReplicateRow } from './replicate-row';
import type { ReplicateRunner } from './replicate-runner';
import { DEFAULT_BATCH_SIZE } from './run-study';
import { scenarioFieldName } from './scenario-fields';
import { variantLevels } from './variant-levels';
import { fingerprintOf, finishedBatches, writeAtomic } from './study-folder';
import { parsePlan, type PlanGoal, type PlanSpec } from './plan-spec';
import { searchPlan, PLAN_Z, type GoalEstimate, type SearchOutcome } from './plan-search';
import { runPlanBatch, type PlanBatchReply, type PlanBatchTask } from './plan-worker';

export interface RunPlanOptions {
  /** Output folder (created; an existing folder of the same plan is resumed). */
  out: string;
  /** Worker threads. Default: all cores. 1 runs in this thread. */
  workers?: number;
  /** One line per look at a value. */
  onProgress?: (line: string) => void;
  signal?: AbortSignal;
}

export interface PlanResult extends SearchOutcome {
  format: 'quadrat-plan/1';
  vary: string;
  /** The answer, under the name the plan file promises (for find 'largest' the largest value meeting the goals). */
  smallest: number | null;
  goals: PlanGoal[];
  values: number[];
  /** One sentence saying the answer. */
  sentence: string;
  interrupted: boolean;
  seconds: number;
  /** Replicates simulated and fitted in this run (not those reused from disk). */
  replicatesRun: number;
}

/** Where the compiled worker lives: beside this file when compiled, else in dist/ (tests run on sources). */
function workerPath(): string {
  const here = join(__dirname, 'plan-worker.js');
  if (existsSync(here)) return here;
  const built = join(__dirname, '..', '..', 'dist', 'study', 'plan-worker.js');
  if (existsSync(built)) return built;
  throw new Error('the compiled plan worker is missing: run "npm run build" first');
}

/** Persistent worker threads that run batch tasks (or this thread, with one worker). */
class BatchPool {
  private readonly workers: Worker[] = [];
  private readonly local = new Map<string, ReplicateRunner>();
  private pending = new Map<number, { resolve: () => void; reject: (e: Error) => void }>();
  private nextId = 0;

  constructor(private readonly count: number) {}

  private start(): void {
    if (this.workers.length || this.count <= 1) return;
    for (let i = 0; i < this.count; i++) {
      const w = new Worker(workerPath(), { resourceLimits: { maxYoungGenerationSizeMb: 64 } });
      w.on('message', (reply: PlanBatchReply) => {
        const p = this.pending.get(reply.id);
        this.pending.delete(reply.id);
        if (!p) return;
        if ('error' in reply) p.reject(new Error(`batch failed: ${reply.error}`));
        else p.resolve();
      });
      w.on('error', (e) => { for (const p of this.pending.values()) p.reject(e); this.pending.clear(); });
      this.workers.push(w);
    }
  }

  /** Run the tasks; with workers, all at once spread over them (each worker queues its own). */
  async run(tasks: Omit<PlanBatchTask, 'id'>[], signal?: AbortSignal): Promise<void> {
    if (this.count <= 1) {
      for (const t of tasks) {
        if (signal?.aborted) return;
        runPlanBatch(this.local, { ...t, id: 0 });
        await new Promise((resolve) => setImmediate(resolve));
      }
      return;
    }
    this.start();
    await Promise.all(tasks.map((t, i) => new Promise<void>((resolve, reject) => {
      const id = this.nextId++;
      this.pending.set(id, { resolve, reject });
      this.workers[i % this.workers.length].postMessage({ ...t, id } satisfies PlanBatchTask);
    })));
  }

  close(): void {
    for (const w of this.workers) void w.terminate();
  }
}

function formatNumber(v: number): string {
  return Number.isFinite(v) ? String(Number(v.toPrecision(3))) : 'NA';
}

function goalText(g: PlanGoal): string {
  const where = g.parameter === '*' ? `with ${g.variant}` : `of ${g.parameter} (${g.variant})`;
  return `${g.metric} ${where} ${g.direction === 'atLeast' ? '≥' : '≤'} ${g.threshold}`;
}

/** The answer in one sentence. */
export function planSentence(r: Pick<PlanResult, 'vary' | 'find' | 'answer' | 'decided' | 'between' | 'reason' | 'goals' | 'probes'>): string {
  const what = scenarioFieldName(r.vary);
  const goals = r.goals.map(goalText).join(' and ');
  const look = (value: number | null) => {
    const p = value === null ? undefined : r.probes.find((q) => q.value === value);
    return p ? p.goals.map((g) => `${formatNumber(g.estimate)} ± ${formatNumber(g.mcse)}`).join(', ') + ` at ${value} (${p.replicates} replicates)` : '';
  };
  if (r.decided && r.answer === null) return `No ${what} among the candidates meets the goal (${goals}): ${r.reason}.`;
  if (r.decided) {
    const sorted = r.probes.map((p) => p.value);
    const i = sorted.indexOf(r.answer!);
    const neighbour = r.find === 'smallest' ? sorted[i - 1] : sorted[i + 1];
    const detail = [look(r.answer), neighbour !== undefined ? look(neighbour) : ''].filter(Boolean).join('; ');
    return `The ${r.find} ${what} meeting the goal (${goals}) is ${r.answer}, decided at 95% Monte Carlo confidence (${detail}).`;
  }
  const [a, b] = r.between!;
  return `Undecided between ${a} and ${b} ${what} for the goal (${goals}): ${r.reason}` +
    (r.answer !== null ? `; ${r.answer} meets it with 95% Monte Carlo confidence.` : '.');
}

/** Each goal's estimate, MCSE and replicates from the rows of one value. */
function estimatesOf(rows: readonly ReplicateRow[], goals: readonly PlanGoal[], levels: Record<string, Record<string, number>>): GoalEstimate[] {
  const metrics = summarise(rows, { levels });
  return goals.map((g) => {
    const m = metrics.find((x) => x.variant === g.variant && x.parameter === g.parameter && x.metric === g.metric);
    return m ? { estimate: m.value, mcse: m.mcse, n: m.n } : { estimate: NaN, mcse: NaN, n: 0 };
  });
}

export async function runPlan(input: unknown, options: RunPlanOptions): Promise<PlanResult> {
  const started = Date.now();
  const { design, plan } = parsePlan(input);
  // only the variants the goals name are fitted: the simulated data do not depend on the others
  const used = new Set(plan.goals.map((g) => g.variant));
  const base = { ...design, replicates: 1, variants: (design.variants as { name: string }[]).filter((v) => used.has(v.name)) };
  const variants = parseDesign(base).variants.map((v) => ({ name: v.name, model: v.model }));
  const batchSize = DEFAULT_BATCH_SIZE;
  mkdirSync(options.out, { recursive: true });
  const pool = new BatchPool(Math.max(1, options.workers ?? availableParallelism()));
  const cache = new Map<number, { folder: string; source: unknown; rows: ReplicateRow[][]; levels: Record<string, Record<string, number>> }>();
  let replicatesRun = 0;

  /** The value's folder, checked to hold replicates of this design and value only. */
  const open = (index: number) => {
    let entry = cache.get(index);
    if (entry) return entry;
    const value = plan.values[index];
    const source = { ...base, grid: { [plan.vary]: [value] } };
    const fingerprint = fingerprintOf(source, 0, batchSize, variants);
    // one folder per value and design: another design (or other variants) never mixes into it
    const folder = planValueFolder(options.out, value, fingerprint);
    mkdirSync(batchesFolder(folder), { recursive: true });
    const identity = { format: 'quadrat-plan-value/1', key: scenarioKey({ [plan.vary]: value }, [plan.vary]), value, batchSize, fingerprint };
    const path = planValueIdentityPath(folder);
    if (existsSync(path)) {
      const old = JSON.parse(readFileSync(path, 'utf8')) as typeof identity;
      if (old.fingerprint !== identity.fingerprint) {
        throw new QuadratInputError(`--out: "${folder}" holds replicates of a different design; choose another folder or delete it`, { field: '--out' });
      }
    } else {
      writeAtomic(path, JSON.stringify(identity, null, 2));
    }
    // each variant's own interval level, for coverage and type I error
    entry = { folder, source, rows: [], levels: variantLevels(parseDesign(source)) };
    cache.set(index, entry);
    return entry;
  };

  const evaluate = async (index: number, replicates: number): Promise<GoalEstimate[]> => {
    const entry = open(index);
    const batches = Math.ceil(replicates / batchSize);
    const onDisk = finishedBatches(entry.folder);
    const todo: Omit<PlanBatchTask, 'id'>[] = [];
    for (let b = 0; b < batches; b++) {
      if (!onDisk.has(batchFileName({ scenario: 0, batch: b }))) {
        todo.push({ design: entry.source, folder: entry.folder, batch: b, from: b * batchSize, to: (b + 1) * batchSize });
      }
    }
    await pool.run(todo, options.signal);
    replicatesRun += todo.length * batchSize;
    for (let b = entry.rows.length; b < batches; b++) {
      const file = batchPath(entry.folder, batchFileName({ scenario: 0, batch: b }));
      if (!existsSync(file)) break; // interrupted
      entry.rows.push(parseReplicateCsv(readFileSync(file, 'utf8'), file));
    }
    const estimates = estimatesOf(entry.rows.slice(0, batches).flat(), plan.goals, entry.levels);
    options.onProgress?.(
      `${scenarioFieldName(plan.vary)} = ${plan.values[index]}: ${Math.min(batches, entry.rows.length) * batchSize} replicates, ` +
        estimates.map((e) => `${formatNumber(e.estimate)} ± ${formatNumber(e.mcse)}`).join(', '),
    );
    return estimates;
  };

  let outcome: SearchOutcome;
  try {
    outcome = await searchPlan(
      plan.values, plan.goals, { firstReplicates: plan.firstReplicates, maxReplicates: plan.maxReplicates, step: batchSize },
      evaluate, () => Boolean(options.signal?.aborted),
    );
  } finally {
    pool.close();
  }
  const interrupted = Boolean(options.signal?.aborted);
  const result: PlanResult = {
    format: 'quadrat-plan/1', vary: plan.vary, ...outcome, smallest: outcome.answer, goals: plan.goals, values: plan.values,
    sentence: '', interrupted: interrupted, seconds: (Date.now() - started) / 1000, replicatesRun,
  };
  result.sentence = planSentence(result);
  writePlanFile(options.out, result, plan);
  return result;
}

/** plan.json: the answer first, then every evaluated value. */
function writePlanFile(out: string, r: PlanResult, plan: PlanSpec): void {
  const file = {
    format: r.format, smallest: r.smallest, find: r.find, decided: r.decided, between: r.between, sentence: r.sentence, reason: r.reason,
    vary: r.vary, values: r.values, goals: r.goals, confidence: { z: PLAN_Z, level: 0.95 },
    replicates: { first: plan.firstReplicates, max: plan.maxReplicates },
    evaluated: r.probes.map((p) => ({
      value: p.value, replicates: p.replicates, verdict: p.verdict,
      goals: p.goals.map((g) => ({ estimate: finite(g.estimate), mcse: finite(g.mcse), n: g.n, verdict: g.verdict })),
    })),
    interrupted: r.interrupted, seconds: r.seconds,
  };
  writeFileSync(planFilePath(out), JSON.stringify(file, null, 2) + '\n');
}

const finite = (v: number) => (Number.isFinite(v) ? v : null);
