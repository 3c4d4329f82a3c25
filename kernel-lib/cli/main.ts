import { QuadratInputError } from '../model/errors';
import { fitCommand, FIT_USAGE } from './fit-command';
import { demoCommand } from './demo-command';
import { studyCommand, STUDY_USAGE } from './study-command';

type Command = (argv: string[], print: (s: string) => void) => number | Promise<number>;

const COMMANDS: Record<string, { run: Command; usage: string }> = {
  fit: { run: fitCommand, usage: FIT_USAGE },
  study: { run: studyCommand, usage: STUDY_USAGE },
  demo: { run: demoCommand, usage: 'quadrat demo [--out <folder>]' },
};

const USAGE = ['usage:', ...Object.values(COMMANDS).map((c) => `  ${c.usage}`)].join('\n');

/** Register a sub-command (used by modules that add commands, e.g. studies). */
export function registerCommand(name: string, run: Command, usage: string): void {
  COMMANDS[name] = { run, usage };
}

/** Run the command line; returns the exit code. Bad input: one line on stderr, exit code 2. */
export async function main(argv: string[]): Promise<number> {
  const [name, ...rest] = argv;
  const print = (s: string) => process.stdout.write(s.endsWith('\n') ? s : `${s}\n`);
  if (!name || name === '--help' || name === '-h' || name === 'help') {
    print(USAGE);
    return name ? 0 : 2;
  }
  const command = COMMANDS[name];
  if (!command) {
    process.stderr.write(`quadrat: unknown command "${name}"\n${USAGE}\n`);
    return 2;
  }
  try {
    return await command.run(joinNegativeValues(rest), print);
  } catch (e) {
    const err = e as Error & { code?: string };
    if (e instanceof QuadratInputError || err.code?.startsWith('ERR_PARSE_ARGS')) {
      process.stderr.write(`quadrat ${name}: ${err.message.split('\n')[0]}\n`);
      return 2;
    }
    process.stderr.write(`quadrat ${name}: ${err.message.split('\n')[0]}\n`);
    return 1;
  }
}

/**
 * "--workers -1" as "--workers=-1": the argument parser would take "-1" for an option and answer
 * "argument is ambiguous"; joined, the value reaches the option's own check and its message.
 */
export function joinNegativeValues(argv: string[]): string[] {
  const out: string[] = [];
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    const next = argv[i + 1];
    if (/^--[a-z][a-z-]*$/.test(a) && next !== undefined && /^-[\d.]/.test(next)) {
      out.push(`${a}=${next}`);
      i++;
    } else out.push(a);
  }
  return out;
}

if (require.main === module) {
  main(process.argv.slice(2)).then((code) => { process.exitCode = code; });
}
