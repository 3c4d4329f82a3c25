/**
 * Help text of every command and subcommand: one place, so `quadrat --help`, `quadrat study
 * --help` and `quadrat study run --help` all read from the same lines the README table follows.
 */

export interface CommandHelp {
  /** One usage line, without the leading "quadrat". */
  usage: string;
  /** What the command does, in a few words (the overview list). */
  short: string;
  /** What the command does, in one or two sentences. */
  about: string;
  /** [option, meaning] pairs. */
  options: [string, string][];
}

const HELP_OPTION: [string, string] = ['-h, --help', 'print this help and exit'];

/** Options of the commands that read a survey CSV. */
const CSV_OPTIONS: [string, string][] = [
  ['--delimiter <char>', 'field separator: "," (default), ";", "tab", …'],
  ['--decimal <. or ,>', 'decimal mark (default "."; with "," the separator defaults to ";")'],
  ['--missing <marker,...>', 'cell texts that mean "not recorded", besides an empty cell (e.g. NA,-)'],
];

export const COMMAND_HELP: Record<string, CommandHelp> = {
  fit: {
    short: 'fit one model to a survey table',
    usage: 'fit --data <survey.csv> --model <model.json> [--json] [--ci <method>] [--level <0..1>] [--delimiter <char>] [--decimal <. or ,>] [--missing <marker,...>]',
    about: 'Fit one model description to a survey table and print the fit (or its JSON).',
    options: [
      ['--data <file.csv>', 'survey table, one row per observation (required)'],
      ['--model <file.json>', 'model description (required)'],
      ['--json', 'print the fit as JSON instead of text'],
      ['--ci <method>', 'interval method: wald, residual-t, satterthwaite, kenward-roger, profile, bootstrap'],
      ['--level <0..1>', 'interval level (default: the model\'s, else 0.95)'],
      ...CSV_OPTIONS,
    ],
  },
  'study run': {
    short: 'simulate and fit a study (resumable)',
    usage: 'study run <design.json> --out <folder> [--replicates R] [--workers W] [--shard i/N]',
    about: 'Simulate data sets from a survey design, fit every variant to each, and write replicates and metrics to a folder. Run the same command again to resume an interrupted study.',
    options: [
      ['--out <folder>', 'study folder (required)'],
      ['--replicates <R>', 'replicates per scenario (default: the design\'s)'],
      ['--workers <W>', 'worker threads (default: cores − 1); results do not depend on it'],
      ['--shard <i/N>', 'run only shard i of N (combine shards with "study merge")'],
    ],
  },
  'study summary': {
    short: "print a study's metrics",
    usage: 'study summary <folder> [--json]',
    about: 'Print the metrics of a finished study: coverage, bias, RMSE, interval width, power and SD recovery, each with its Monte Carlo error.',
    options: [['--json', 'print the metric rows as JSON']],
  },
  'study merge': {
    short: 'combine the shards of a study',
    usage: 'study merge <folder>... --out <folder>',
    about: 'Combine the folders of a sharded study into one, as if it had run in one go.',
    options: [['--out <folder>', 'folder for the combined study (required)']],
  },
  'study report': {
    short: 'write an HTML report of a study',
    usage: 'study report <folder> [--out <file.html>] [--title <text>]',
    about: 'Write a self-contained HTML report of a finished study: the answer in plain words, a summary table with the true values, charts (one colour per variant throughout), fit problems, every metric in a folded appendix, cautions.',
    options: [
      ['--out <file.html>', 'where to write it (default: <folder>/report.html)'],
      ['--title <text>', 'the report\'s title (default: "Simulation study")'],
    ],
  },
  'study plan': {
    short: 'find how many levels (sites, years, …) a goal needs',
    usage: 'study plan <design.json> --out <folder> [--workers W] [--survey <pilot.csv> --model <model.json> --sd-of <factor> [CSV options]]',
    about: "Find the smallest value of the design's plan.vary (sites, years, …) that meets the plan's goals; writes plan.json, the curves and report.html. Run the same command again to resume.",
    options: [
      ['--out <folder>', 'plan folder (required)'],
      ['--workers <W>', 'worker threads; results do not depend on it'],
      ['--survey <pilot.csv>', 'plan from a pilot survey: derive the design from it (the JSON then needs only the plan block)'],
      ['--model <file.json>', 'with --survey: the model fitted to the pilot'],
      ['--sd-of <factor>', "with --survey: plan at both ends and the estimate of this factor's SD (95% profile interval)"],
      ...CSV_OPTIONS,
    ],
  },
  'design from-survey': {
    short: 'derive a survey design from pilot data',
    usage: 'design from-survey <survey.csv> --model <model.json> [--out <design.json>] [--seed S] [--replicates R] [CSV options]',
    about: 'Derive a survey design from pilot data: its factors and level names, rows per cell, missing share, covariates, and as truth the estimates of the model fitted to the pilot. Edit the truth and add a grid before running a study.',
    options: [
      ['--model <file.json>', 'model description fitted to the pilot (required)'],
      ['--out <file.json>', 'where to write the design (default: print it)'],
      ['--seed <S>', 'seed written into the design (default 1)'],
      ['--replicates <R>', 'replicates written into the design (default 1000)'],
      ...CSV_OPTIONS,
    ],
  },
  demo: {
    short: 'run the demo study of an invented survey',
    usage: 'demo [--out <folder>] [--workers W]',
    about: 'Run the bundled study of the invented Larkspur Fen survey (year random or fixed with 3 to 8 survey years), print its key metrics and write an HTML report.',
    options: [
      ['--out <folder>', 'study folder (default: out/demo-study)'],
      ['--workers <W>', 'worker threads'],
    ],
  },
};

/** Subcommands of the commands that have them. */
export const SUBCOMMANDS: Record<string, string[]> = {
  study: ['run', 'summary', 'merge', 'report', 'plan'],
  design: ['from-survey'],
};

function optionLines(options: [string, string][]): string[] {
  const width = Math.max(...options.map(([o]) => o.length));
  return options.map(([o, text]) => `  ${o.padEnd(width)}  ${text}`);
}

/** The help of one command ("fit", "study run"), or of a command with subcommands ("study"). */
export function helpText(name: string): string {
  const one = COMMAND_HELP[name];
  if (one) {
    return [`usage: quadrat ${one.usage}`, '', one.about, '', 'options:', ...optionLines([...one.options, HELP_OPTION])].join('\n');
  }
  const subs = SUBCOMMANDS[name];
  if (subs) {
    const lines = subs.map((s) => COMMAND_HELP[`${name} ${s}`]);
    return [
      'usage:',
      ...lines.map((h) => `  quadrat ${h.usage}`),
      '',
      ...subs.flatMap((s, i) => [`  ${s}: ${lines[i].about}`]),
      '',
      `"quadrat ${name} <subcommand> --help" lists a subcommand's options.`,
    ].join('\n');
  }
  return overviewText();
}

/** `quadrat --help`: every command in one screen. */
export function overviewText(): string {
  const names = Object.keys(COMMAND_HELP);
  const width = Math.max(...names.map((n) => n.length));
  return [
    'usage: quadrat <command> [options]',
    '',
    'commands:',
    ...names.map((n) => `  ${n.padEnd(width)}  ${COMMAND_HELP[n].short}`),
    '',
    'options:',
    ...optionLines([HELP_OPTION, ['-V, --version', 'print the version and exit']]),
    '',
    '"quadrat <command> --help" lists a command\'s options.',
  ].join('\n');
}

/** The usage lines of every command, for error messages. */
export function usageText(): string {
  return ['usage:', ...Object.values(COMMAND_HELP).map((h) => `  quadrat ${h.usage}`)].join('\n');
}
