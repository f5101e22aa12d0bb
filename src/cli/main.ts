/**
 * valleyscope: the command-line twin of the editor extension.
 * Every failure ends in one sentence on stderr and a non-zero exit code; never a stack trace.
 */
import { UsageError } from './args';
import { drained, processIO, type CliIO } from './io';
import { ANALYZE_HELP, runAnalyze } from './commands/analyze';
import { COMPARE_HELP, runCompare } from './commands/compare';
import { ANNOTATE_HELP, runAnnotate } from './commands/annotate';
import { CHECK_HELP, runCheck } from './commands/check';
import { TENSOR_KPOINTS_HELP, runTensorKpoints } from './commands/tensorKpoints';
import { isValleyscopeError } from '../core/errors';
import { TOOL_VERSION } from '../core/version';
import { prepareSymmetryOnDemand } from '../core/lattice/symmetry';
import { installNativeSha256 } from './nativeHash';
import { fsErrorCode, fsErrorSentence } from './fsErrors';
import { raiseEngineBudgets } from './engineBudgets';

export interface Command {
  help: string;
  run(argv: string[], io: CliIO): Promise<number>;
}

export const COMMANDS: Record<string, Command> = {
  analyze: { help: ANALYZE_HELP, run: runAnalyze },
  compare: { help: COMPARE_HELP, run: runCompare },
  annotate: { help: ANNOTATE_HELP, run: runAnnotate },
  check: { help: CHECK_HELP, run: runCheck },
  'tensor-kpoints': { help: TENSOR_KPOINTS_HELP, run: runTensorKpoints },
};

export function usage(): string {
  return [
    'valleyscope: band gaps, band edges, effective masses and valley degeneracy from eigenvalue files.',
    '',
    ...Object.values(COMMANDS).map((c) => c.help),
    '',
    'valleyscope <command> --help shows one command.',
  ].join('\n');
}

export async function main(argv: string[], io: CliIO = processIO): Promise<number> {
  const [name, ...rest] = argv;
  if (!name || name === '--help' || name === '-h' || name === 'help') {
    io.out(usage());
    return name ? 0 : 2;
  }
  if (name === '--version') {
    io.out(VERSION);
    return 0;
  }
  const cmd = COMMANDS[name];
  if (!cmd) {
    io.err(`valleyscope: unknown command "${name}". Commands: ${Object.keys(COMMANDS).join(', ')}.`);
    return 2;
  }
  if (rest.includes('--help') || rest.includes('-h')) {
    io.out(cmd.help);
    return 0;
  }
  try {
    // Crystal symmetry (valley degeneracy, label recognition) is synchronous once its module is loaded; it is
    // compiled on its first use (many path runs never need the library), and for the batch pool when it starts.
    installNativeSha256();
    await prepareSymmetryOnDemand();
    return await cmd.run(rest, io);
  } catch (e) {
    if (e instanceof UsageError) {
      io.err(`valleyscope ${name}: ${e.message}. See "valleyscope ${name} --help".`);
      return 2;
    }
    if (isValleyscopeError(e)) {
      io.err(`valleyscope: ${e.message}`);
      return 1;
    }
    if (fsErrorCode(e)) {
      // A file-system failure as a sentence (permission denied, ...), never the raw system message.
      io.err(`valleyscope: ${fsErrorSentence((e as NodeJS.ErrnoException).path ?? 'a file', e).message}`);
      return 1;
    }
    io.err(`valleyscope: internal error: ${(e as Error)?.message ?? String(e)}. Please report this with the input file.`);
    return 3;
  }
}

const VERSION = TOOL_VERSION;

// Run when executed as the CLI entry point (bundled dist/cli.js or tsx src/cli/main.ts).
const isEntry = typeof require !== 'undefined' && typeof module !== 'undefined' && require.main === module;
if (isEntry) {
  // Before the symmetry module is compiled (the setting applies to modules compiled afterwards; workers share it).
  raiseEngineBudgets();
  // A reader that stops early (`| head`) is not an error of ours.
  process.stdout.on('error', (e: NodeJS.ErrnoException) => {
    if (e.code !== 'EPIPE') process.stderr.write(`valleyscope: cannot write the output: ${e.message}\n`);
  });
  // Exit only once standard output and standard error have drained: a pipe takes the output more slowly than
  // it is written, and exiting earlier would cut it.
  const exit = async (code: number): Promise<never> => {
    await Promise.all([drained(process.stdout), drained(process.stderr)]);
    process.exit(code);
  };
  main(process.argv.slice(2)).then(
    (code) => exit(code),
    (e: unknown) => {
      process.stderr.write(`valleyscope: internal error: ${(e as Error)?.message ?? String(e)}\n`);
      return exit(3);
    },
  );
}
