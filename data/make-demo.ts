/**
 * Generator of the bundled demo survey (INVENTED data, not a real survey; see data/README.md).
 *
 * Scenario: tussock-sedge height in plots of the fictional Larkspur Fen reserve, six sites
 * (three grazed, three ungrazed), 2021-2024, three plots per site, two visits per plot-year.
 *
 *   sedge_height = intercept + b_moisture * soil_moisture + b_ungrazed * [ungrazed]
 *                  + site effect + year effect + plot-within-site effect + residual
 *
 * Each random part is drawn from its own keyed stream, so changing one part of the design
 * does not reshuffle the others. Run `npx tsx data/make-demo.ts` to rewrite demo-survey.csv.
 */
import { writeFileSync } from 'fs';
import { join } from 'path';
import { createStream } from '../kernel-lib/random/stream';

/** Seed of every stream used here. */
export const DEMO_SEED = 20240611;

/** The invented truth used to generate the data (also stated in data/README.md). */
export const DEMO_TRUTH = {
  /** Mean height (cm) at grazed sites with soil_moisture 0. */
  intercept: 48,
  /** cm per unit of soil_moisture. */
  soilMoisture: 4,
  /** Ungrazed minus grazed (cm). */
  ungrazed: 12,
  sdSite: 4,
  sdYear: 3,
  sdPlot: 2.5,
  sdResidual: 3,
} as const;

export const DEMO_SITES: ReadonlyArray<{ site: string; grazing: 'grazed' | 'ungrazed' }> = [
  { site: 'ashpool', grazing: 'grazed' },
  { site: 'brackenway', grazing: 'ungrazed' },
  { site: 'curlewflat', grazing: 'grazed' },
  { site: 'dunlinbank', grazing: 'ungrazed' },
  { site: 'eelmere', grazing: 'grazed' },
  { site: 'fernholt', grazing: 'ungrazed' },
];
export const DEMO_YEARS: readonly number[] = [2021, 2022, 2023, 2024];
export const PLOTS_PER_SITE = 3;
export const VISITS_PER_PLOT_YEAR = 2;
/** Responses blanked at random: 4 of 144 rows (2.8%). */
export const MISSING_RESPONSES = 4;

/** Share of soil_moisture variance that is a fixed trait of the plot (wet vs dry plots). */
const PLOT_WETNESS_SHARE = 0.5;

export const DEMO_COLUMNS = ['site', 'grazing', 'year', 'plot', 'visit', 'soil_moisture', 'sedge_height'] as const;

export interface DemoRow {
  site: string;
  grazing: 'grazed' | 'ungrazed';
  year: number;
  plot: number;
  visit: number;
  /** Standardised-ish soil moisture index (no unit), 2 decimals. */
  soil_moisture: number;
  /** Mean tiller height in cm, 1 decimal; null when missing. */
  sedge_height: number | null;
}

function round(x: number, decimals: number): number {
  const f = 10 ** decimals;
  const r = Math.round(x * f) / f;
  return r === 0 ? 0 : r; // no "-0"
}

/** The demo rows, ordered by site, year, plot, visit. Deterministic. */
export function makeDemoRows(): DemoRow[] {
  const t = DEMO_TRUTH;
  const siteStream = createStream('quadrat-demo', DEMO_SEED, 'site');
  const yearStream = createStream('quadrat-demo', DEMO_SEED, 'year');
  const plotStream = createStream('quadrat-demo', DEMO_SEED, 'plot');
  const moistureStream = createStream('quadrat-demo', DEMO_SEED, 'soil_moisture');
  const residualStream = createStream('quadrat-demo', DEMO_SEED, 'residual');
  const missingStream = createStream('quadrat-demo', DEMO_SEED, 'missing');

  const siteEffect = DEMO_SITES.map(() => t.sdSite * siteStream.normal());
  const yearEffect = DEMO_YEARS.map(() => t.sdYear * yearStream.normal());
  const plotEffect: number[][] = [];
  const plotWetness: number[][] = [];
  for (let s = 0; s < DEMO_SITES.length; s++) {
    plotEffect.push([]);
    plotWetness.push([]);
    for (let p = 0; p < PLOTS_PER_SITE; p++) {
      plotEffect[s].push(t.sdPlot * plotStream.normal());
      plotWetness[s].push(moistureStream.normal());
    }
  }

  const rows: DemoRow[] = [];
  const a = Math.sqrt(PLOT_WETNESS_SHARE);
  const b = Math.sqrt(1 - PLOT_WETNESS_SHARE);
  DEMO_SITES.forEach(({ site, grazing }, s) => {
    DEMO_YEARS.forEach((year, y) => {
      for (let p = 0; p < PLOTS_PER_SITE; p++) {
        for (let v = 0; v < VISITS_PER_PLOT_YEAR; v++) {
          // Unit variance overall: a plot trait plus visit-to-visit variation.
          const moisture = round(a * plotWetness[s][p] + b * moistureStream.normal(), 2);
          const mean =
            t.intercept +
            t.soilMoisture * moisture +
            (grazing === 'ungrazed' ? t.ungrazed : 0) +
            siteEffect[s] +
            yearEffect[y] +
            plotEffect[s][p];
          const height = round(mean + t.sdResidual * residualStream.normal(), 1);
          rows.push({ site, grazing, year, plot: p + 1, visit: v + 1, soil_moisture: moisture, sedge_height: height });
        }
      }
    });
  });

  // Blank a few responses, chosen without replacement.
  let blanked = 0;
  while (blanked < MISSING_RESPONSES) {
    const i = missingStream.int(rows.length);
    if (rows[i].sedge_height === null) continue;
    rows[i].sedge_height = null;
    blanked++;
  }
  return rows;
}

/** CSV text of the rows: header, "\n" line ends, empty cell for missing, trailing newline. */
export function demoRowsToCsv(rows: readonly DemoRow[]): string {
  const lines = [DEMO_COLUMNS.join(',')];
  for (const r of rows) {
    lines.push(DEMO_COLUMNS.map((c) => (r[c] === null ? '' : String(r[c]))).join(','));
  }
  return lines.join('\n') + '\n';
}

export const DEMO_CSV_PATH = join(__dirname, 'demo-survey.csv');

// Write the file only when run as a script, not when imported (e.g. by the tests).
if (typeof require !== 'undefined' && typeof module !== 'undefined' && require.main === module) {
  const rows = makeDemoRows();
  writeFileSync(DEMO_CSV_PATH, demoRowsToCsv(rows));
  process.stdout.write(`wrote ${rows.length} rows to ${DEMO_CSV_PATH}\n`);
}
