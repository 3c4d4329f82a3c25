import { QuadratInputError } from '../model/errors';
import { PROJECT_VERSION } from '../study/study-folder';
import { fitCommand } from './fit-command';
import { demoCommand } from './demo-command';
import { designCommand } from './design-command';
import { studyCommand } from './study-command';
import { helpText, overviewText, SUBCOMMANDS, usageText } from './help';

type Command = (argv: string[], print: (s: string) => void) => number | Promise<number>;

const COMMANDS: Record<string, Command> = {
  fit: fitCommand,
  study: studyCommand,
  design: designCommand,
  demo: demoCommand,
};

const isHelp = (a: string) => a === '--help' || a === '-h';

/** The help a command line asks for ("study", "study run"), or undefined when it asks for none. */
function helpRequest(name: string, rest: string[]): string | undefined {
  const subs = SUBCOMMANDS[name];
  const sub = subs?.includes(rest[0]) ? rest[0] : undefined;
  if (subs && (rest.length === 0 || rest[0] === 'help')) return helpText(name);
  if (!rest.some(isHelp)) return undefined;
  return helpText(sub ? `${name} ${sub}` : name);
}

let quietPipe = false;

/**
 * A reader that stops early (`quadrat fit … | head -3`) closes our stdout: the next write fails
 * with EPIPE. As other command-line tools do, stop quietly with exit code 0 instead of a stack trace
 * (results already written to files, such as a study's batches, are kept: each is written whole).
 */
function stopQuietlyWhenOutputCloses(): void {
  if (quietPipe) return;
  quietPipe = true;
  process.stdout.on('error', (e: NodeJS.ErrnoException) => {
    if (e.code === 'EPIPE') process.exit(0);
    throw e;
  });
}

/** Run the command line; returns the exit code. Bad input: one line on stderr, exit code 2. */
export async function main(argv: string[]): Promise<number> {
  stopQuietlyWhenOutputCloses();
  const [name, ...rest] = argv;
  const print = (s: string) => process.stdout.write(s.endsWith('\n') ? s : `${s}\n`);
  if (name === '--version' || name === '-V' || name === 'version') {
    print(`quadrat ${PROJECT_VERSION}`);
    return 0;
  }
  if (!name || isHelp(name) || name === 'help') {
    if (name === 'help' && rest.length) {
      const topic = rest.join(' ');
      print(COMMANDS[rest[0]] ? helpText(topic) : overviewText());
      return 0;
    }
    (name ? print : (s: string) => process.stderr.write(`${s}\n`))(overviewText());
    return name ? 0 : 2;
  }
  const command = COMMANDS[name];
  if (!command) {
    process.stderr.write(`quadrat: unknown command "${name}"\n${usageText()}\n`);
    return 2;
  }
  const help = helpRequest(name, rest);
  if (help !== undefined) {
    // "quadrat study" alone is a usage error; asking for help is not
    const asked = rest.length > 0;
    (asked ? print : (s: string) => process.stderr.write(`${s}\n`))(help);
    return asked ? 0 : 2;
  }
  try {
    return await command(joinNegativeValues(rest), print);
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
function joinNegativeValues(argv: string[]): string[] {
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
