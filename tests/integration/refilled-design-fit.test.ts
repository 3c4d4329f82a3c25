import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { buildDesign } from '../../kernel-lib/data/build-design';
import type { Columns } from '../../kernel-lib/data/columns';
import { fillDesign, planDesign } from '../../kernel-lib/data/design-plan';
import { parseDesign } from '../../kernel-lib/design/parse';
import { fitDesign, type IntervalMethod } from '../../kernel-lib/fit/fit-design';
import { parseModel } from '../../kernel-lib/model/parse';
import { ReplicateRunner } from '../../kernel-lib/study/replicate-runner';

// A design refilled in place (one design object across replicates, its engine rebuilt when X
// changes) must fit exactly as a freshly built design: same numbers to the last bit (common
// practice, no source: the engine kept per design object is a cache). Invented demo survey.
const demo = JSON.parse(readFileSync(join(__dirname, '..', '..', 'data', 'demo-study.json'), 'utf8'));

describe('fits of a refilled design equal fits of a freshly built one', () => {
  // the study's own replicates of its first scenario (3 survey years): replicate 28 changes which
  // (plot, year) cells hold observations, which once left a stale entry in a refilled engine
  const runner = new ReplicateRunner(parseDesign(demo));
  for (const variant of runner.scenarios[0].design.variants) {
    for (const interval of ['satterthwaite', 'kenward-roger'] as IntervalMethod[]) {
      it(`${variant.name}, ${interval}: 30 replicates with missing rows`, () => {
        const model = parseModel(variant.model);
        let plan = null;
        let compared = 0;
        for (let r = 0; r < 30; r++) {
          const data = runner.simulate(0, r);
          const columns = data.columns as Columns;
          const built = buildDesign(columns, model);
          plan ??= planDesign(columns, model, built, data.n + data.dropped);
          const filled = plan && fillDesign(plan, columns);
          if (!filled) continue;
          compared++;
          const options = { interval, modes: true, fitted: true };
          expect(JSON.stringify(fitDesign(filled, options))).toBe(JSON.stringify(fitDesign(built, options)));
        }
        expect(compared).toBeGreaterThan(25);
      });
    }
  }
});
