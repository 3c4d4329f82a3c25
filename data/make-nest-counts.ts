/**
 * Generator of the nest-count survey used by notebook 05 (INVENTED data, not a real survey; see
 * data/README.md).
 *
 * Scenario: nests of a ground-nesting bird counted in 0.25 ha heath quadrats of the fictional
 * Thornby Heath, 14 sites x 5 quadrats, each quadrat searched for 20 to 60 minutes.
 *
 *   nests ~ negative binomial, log E[nests] = log(minutes / 30) + intercept + b_cover * shrub_cover + site effect
 *
 * The counts are clumped beyond Poisson (aggregation k = 3), so a Poisson fit shows overdispersion.
 * Run `npx tsx data/make-nest-counts.ts` to rewrite nest-counts.csv.
 */
import { writeFileSync } from 'fs';
import { join } from 'path';
import { createStream } from '../kernel-lib/random/stream';
import { drawNegativeBinomial } from '../kernel-lib/random/negative-binomial';

export const NEST_TRUTH = { intercept: 0.6, shrubCover: 0.8, sdSite: 0.45, aggregation: 3 };
const SITES = ['alder', 'bramble', 'cotton', 'dodder', 'emberly', 'furzen', 'gorsey', 'heathrow', 'ivyford', 'juniper', 'kestle', 'lingfold', 'mossend', 'nethercombe'];

export function nestCountsCsv(): string {
  const s = createStream('nest-counts', 2026);
  const lines = ['site,quadrat,shrub_cover,minutes,log_effort,nests'];
  for (const site of SITES) {
    const b = NEST_TRUTH.sdSite * s.normal();
    for (let q = 1; q <= 5; q++) {
      const cover = Math.round(100 * s.uniform()) / 100;
      const minutes = 20 + 5 * s.int(9);
      const logEffort = Math.log(minutes / 30);
      const mean = Math.exp(logEffort + NEST_TRUTH.intercept + NEST_TRUTH.shrubCover * cover + b);
      const nests = drawNegativeBinomial(s, mean, NEST_TRUTH.aggregation);
      lines.push(`${site},${q},${cover.toFixed(2)},${minutes},${logEffort.toFixed(6)},${nests}`);
    }
  }
  return lines.join('\n') + '\n';
}

if (require.main === module) writeFileSync(join(__dirname, 'nest-counts.csv'), nestCountsCsv());
