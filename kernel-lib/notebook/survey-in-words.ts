/** The grouping structure found by describeSurvey, as tables and plain sentences for a notebook. */
import type { FactorPairSummary, SurveySummary } from '../data/describe-survey';

/**
 * Fewer levels than this and a factor's SD is estimated from very little information (a rule of
 * thumb of the trade, common practice, no source): the flag points the reader to a coverage study.
 */
export const FEW_LEVELS = 5;

export interface FactorRow {
  factor: string;
  levels: number;
  /** Rows per level: "24" when all equal, else "min to max (median m)". */
  'rows per level': string;
  'missing labels': number;
  note: string;
}

export interface PairRow {
  factors: string;
  relation: string;
  /** Combinations of levels observed, "present of possible" ('' for nested pairs, where the count means nothing). */
  'combinations observed': string;
  /** Combinations never observed ('–' for nested pairs). */
  'never observed': number | string;
}

export function factorRows(summary: SurveySummary): FactorRow[] {
  return summary.factors.map((f) => ({
    factor: f.factor,
    levels: f.levels,
    'rows per level': f.perLevelMin === f.perLevelMax ? String(f.perLevelMin) : `${f.perLevelMin} to ${f.perLevelMax} (median ${f.perLevelMedian})`,
    'missing labels': f.missing,
    note: f.levels < FEW_LEVELS ? `only ${f.levels} levels: its SD is estimated loosely` : '',
  }));
}

function relationWords(p: FactorPairSummary): string {
  switch (p.relation) {
    case 'nested':
      return `${p.a} nested in ${p.b}`;
    case 'contains':
      return `${p.b} nested in ${p.a}`;
    case 'crossed':
      return 'crossed (every combination observed)';
    default:
      return 'partly crossed (some combinations never observed)';
  }
}

export function pairRows(summary: SurveySummary): PairRow[] {
  return summary.pairs.map((p) => {
    const nested = p.relation === 'nested' || p.relation === 'contains';
    return {
      factors: `${p.a} × ${p.b}`,
      relation: relationWords(p),
      'combinations observed': nested ? '' : `${p.cellsPresent} of ${p.cellsPossible}`,
      'never observed': nested ? '–' : p.cellsPossible - p.cellsPresent,
    };
  });
}

function percent(part: number, whole: number): string {
  return whole > 0 ? `${((100 * part) / whole).toFixed(1)}%` : '0%';
}

/** Plain sentences (Markdown) summarising the structure: size, missing responses, balance, empty cells, few levels. */
export function surveySentences(summary: SurveySummary, response?: string): string[] {
  const names = summary.factors.map((f) => f.factor);
  const lines: string[] = [];
  const levels = summary.factors.map((f) => `${f.levels} ${f.factor}${f.levels === 1 ? '' : ' levels'}`).join(', ');
  lines.push(`${summary.rows} rows; ${levels}.`);
  if (response !== undefined) {
    lines.push(
      summary.responseMissing === 0
        ? `No missing values of \`${response}\`.`
        : `${summary.responseMissing} ${summary.responseMissing === 1 ? 'value' : 'values'} of \`${response}\` ${summary.responseMissing === 1 ? 'is' : 'are'} missing (${percent(summary.responseMissing, summary.rows)}); ${summary.responseMissing === 1 ? 'that row is' : 'those rows are'} left out of fits.`,
    );
  }
  const factorMissing = summary.factors.filter((f) => f.missing > 0);
  if (factorMissing.length) {
    lines.push(`Rows without a label: ${factorMissing.map((f) => `${f.missing} for \`${f.factor}\``).join(', ')}.`);
  }
  if (summary.balanced) {
    lines.push(`Balanced: every combination of ${names.join(', ')} holds ${summary.perCellMin} row${summary.perCellMin === 1 ? '' : 's'}.`);
  } else {
    const sizes = summary.perCellMin === summary.perCellMax ? `${summary.perCellMin}` : `${summary.perCellMin} to ${summary.perCellMax}`;
    lines.push(`Unbalanced: ${sizes} rows per combination of ${names.join(', ')} observed.`);
  }
  for (const p of summary.pairs) {
    if (p.relation === 'partly crossed') {
      lines.push(`\`${p.a}\` and \`${p.b}\`: ${p.cellsPossible - p.cellsPresent} of ${p.cellsPossible} combinations were never observed.`);
    }
  }
  const few = summary.factors.filter((f) => f.levels < FEW_LEVELS);
  if (few.length) {
    lines.push(
      `${few.map((f) => `\`${f.factor}\` (${f.levels})`).join(', ')}: fewer than ${FEW_LEVELS} levels. ` +
        'As a random effect its SD rests on very few values; whether to enter it as random or fixed is what a simulation study of a design like this one checks.',
    );
  }
  return lines;
}
