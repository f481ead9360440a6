// The command line (docs/cli.md): evaluate, check, demo. It adapts main/api.ts and holds no
// analysis logic. Exit status: 0 done; 2 the input is wrong (one message naming where and what to
// do, never a stack trace); 1 an internal fault (with its stack trace).

import { availableParallelism } from 'node:os';
import { parseArgs } from 'node:util';
import { OUTPUT_FORMATS, type ApiResult, type OutputFormat, type SettingsOverrides } from './contract/api.ts';
import type { Problem } from './rules/types.ts';
import { workersProblem } from './api/args.ts';
import type { ProgressPrinter } from './cli/progress.ts';
import { formatCheckReport, formatEvaluateSummary } from './cli/summaries.ts';
import { AVAILABLE_MEMO_FORMATS } from './report/memo-names.ts';

// The api (and through it the data readers, the store, the estimators) and the progress bar load
// only once a command is known to run: `--help` and a wrong command line answer without them;
// `check` loads its own module (api/check.ts: the data readers and the rule, no estimator, no
// store). The memo renderers load later still, when a memo is written (main/report/memo-files.ts).

const USAGE = `Fenceline — evaluate a program whose eligibility is set by a formula.

Usage:
  npm run --silent cli -- evaluate <study.json> --out <dir> [--deltas 0.05,0.1] [--draws N] [--seed N]
                                    [--workspace <file.db>] [--formats pdf,html,docx,xlsx|none] [--workers N] [--quiet]
  npm run --silent cli -- check <study.json>
  npm run --silent cli -- demo --out <dir> [--formats ...]
  npm run --silent cli -- <command> --help      the usage of one command

Flags override the study's settings. Progress goes to stderr; stdout carries only the summary.
Exit status: 0 done; 2 the input is wrong (the message names the file, sheet, column, row or
JSON path and what to do); 1 an internal fault.`;

const EXIT_STATUS = `Exit status: 0 done; 2 the input is wrong (one message naming the file, sheet, column, row or
JSON path and what to do); 1 an internal fault (a bug: please report it with the lines printed).`;

const COMMAND_USAGE: Record<string, string> = {
  evaluate: `Usage: npm run --silent cli -- evaluate <study.json> --out <dir> [options]

Run a study end to end: read the data, compute each unit's approximate propensity score at
every delta, estimate the effect, run the design checks, and write the results to <dir>.

Options:
  --out <dir>             folder for the outputs; created if missing (required)
  --deltas 0.05,0.1,...   neighbourhood radii to estimate at (instead of settings.deltas)
  --draws N               simulation budget per unit, where simulation is needed (instead of settings.draws)
  --seed N                seed for every random choice (instead of settings.seed)
  --formats pdf,html,...  memo formats to write besides results.json and units.csv:
                          pdf, html, docx, xlsx, or none (default: every format this version writes)
  --workspace <file.db>   also save the study, its data and this run in a workspace file
  --workers N             worker threads for the propensity stage (0 = none; default: one per core)
  --quiet                 no progress on stderr
  -h, --help              this text

Writes to <dir>: results.json, units.csv and the memo files asked for; each is written under a
temporary name and renamed when complete. Stdout gets a short summary; progress goes to stderr.

${EXIT_STATUS}`,
  check: `Usage: npm run --silent cli -- check <study.json> [--quiet]

Validate the study file and its data without estimating anything: the rows read, used and
excluded (each reason with its spreadsheet rows), missing outcomes, the rule in plain words, how
many units the formula makes eligible, and how the recorded decisions agree with it.

Options:
  --quiet                 no progress on stderr
  -h, --help              this text

${EXIT_STATUS}`,
  demo: `Usage: npm run --silent cli -- demo --out <dir> [--formats pdf,html,...|none] [--workers N] [--quiet]

Run the bundled sample study (sample-programs/winter-credit: invented households with a known
effect of -40 USD) end to end and write its results to <dir>, exactly as evaluate does.

Options:
  --out <dir>             folder for the outputs; created if missing (required)
  --formats pdf,html,...  memo formats besides results.json and units.csv, or none
  --workers N             worker threads for the propensity stage (0 = none)
  --quiet                 no progress on stderr
  -h, --help              this text

${EXIT_STATUS}`,
};

/** The usage text for `command` (the general one when there is no such command). */
function usageOf(command: string | undefined): string {
  return (command !== undefined ? COMMAND_USAGE[command] : undefined) ?? USAGE;
}

/** The progress display in use, closed before any message is printed. */
let activePrinter: ProgressPrinter | null = null;

class InputError extends Error {
  constructor(readonly problems: Problem[]) { super('input'); }
}

function fail(where: string, message: string): never {
  throw new InputError([{ path: where, message }]);
}

function parseNumberList(text: string, flag: string): number[] {
  const parts = text.split(',').map((p) => p.trim()).filter((p) => p !== '');
  if (parts.length === 0) fail(flag, `${flag} needs a comma-separated list of numbers, e.g. ${flag} 0.05,0.1,0.2.`);
  return parts.map((p) => {
    const v = Number(p);
    if (!Number.isFinite(v)) fail(flag, `${flag}: "${p}" is not a number; write e.g. ${flag} 0.05,0.1,0.2.`);
    return v;
  });
}

function parseWhole(text: string | undefined, flag: string): number | undefined {
  if (text === undefined) return undefined;
  const v = Number(text);
  if (!Number.isInteger(v)) fail(flag, `${flag} needs a whole number; "${text}" is not one.`);
  return v;
}

function parseFormats(text: string | undefined, fallback: OutputFormat[]): OutputFormat[] {
  if (text === undefined) return fallback;
  if (text.trim().toLowerCase() === 'none') return [];
  const list = text.split(',').map((f) => f.trim().toLowerCase()).filter(Boolean);
  for (const f of list) if (!OUTPUT_FORMATS.includes(f as OutputFormat)) fail('--formats', `"${f}" is not a memo format: choose from ${OUTPUT_FORMATS.join(', ')}, or none.`);
  return [...new Set(list)] as OutputFormat[];
}

function unwrap<T>(r: ApiResult<T>): T {
  if (r.ok) return r.value;
  if (r.error.kind === 'cancelled') { activePrinter?.finish(); process.stderr.write('Cancelled.\n'); process.exit(130); }
  throw new InputError(r.error.problems);
}

async function main(argv: string[]): Promise<number> {
  let parsed;
  try {
    parsed = parseArgs({
      args: argv,
      allowPositionals: true,
      options: {
        out: { type: 'string' }, deltas: { type: 'string' }, draws: { type: 'string' }, seed: { type: 'string' },
        workspace: { type: 'string' }, formats: { type: 'string' }, workers: { type: 'string' },
        quiet: { type: 'boolean' }, help: { type: 'boolean', short: 'h' },
      },
    });
  } catch (e) {
    const first = argv.find((a) => !a.startsWith('-'));
    fail('command line', `${(e as Error).message}\n\n${usageOf(first)}`);
  }
  const { values, positionals } = parsed;
  const [command, ...rest] = positionals;
  if (command === 'help') {
    const topic = rest[0];
    if (topic !== undefined && !(topic in COMMAND_USAGE)) fail('command line', `"${topic}" is not a command: use evaluate, check or demo.\n\n${USAGE}`);
    process.stdout.write(usageOf(topic) + '\n');
    return 0;
  }
  if (command !== undefined && values.help) {
    if (!(command in COMMAND_USAGE)) fail('command line', `"${command}" is not a command: use evaluate, check or demo.\n\n${USAGE}`);
    process.stdout.write(usageOf(command) + '\n');
    return 0;
  }
  if (values.help || !command) { process.stdout.write(USAGE + '\n'); return values.help ? 0 : 2; }
  const { progressPrinter } = await import('./cli/progress.ts');
  const printer = progressPrinter(process.stderr, !values.quiet);
  activePrinter = printer;
  const controller = new AbortController();
  process.once('SIGINT', () => controller.abort());
  const ctx = { onProgress: printer, signal: controller.signal };
  // default: every memo format this version can write (results.json and units.csv are always written)
  const formats = parseFormats(values.formats, [...AVAILABLE_MEMO_FORMATS]);
  const workers = parseWhole(values.workers, '--workers');
  const tooMany = workersProblem(workers, '--workers', availableParallelism());
  if (tooMany) throw new InputError([tooMany]);

  switch (command) {
    case 'check': {
      if (rest.length !== 1) fail('command line', `check takes one study file: npm run --silent cli -- check <study.json> (see check --help)`);
      // check needs the data readers and the rule only (api/check.ts), not the run's estimators or the store
      const { checkStudy } = await import('./api/check.ts');
      const report = unwrap(await checkStudy({ studyPath: rest[0]! }, ctx));
      printer.finish();
      process.stdout.write(formatCheckReport(report));
      return 0;
    }
    case 'evaluate': {
      if (rest.length !== 1) fail('command line', `evaluate takes one study file: npm run --silent cli -- evaluate <study.json> --out <dir> (see evaluate --help)`);
      if (!values.out) fail('--out', 'evaluate needs an output folder: add --out <dir> (it is created if missing).');
      const overrides: SettingsOverrides = {
        ...(values.deltas !== undefined ? { deltas: parseNumberList(values.deltas, '--deltas') } : {}),
        ...(values.draws !== undefined ? { draws: parseWhole(values.draws, '--draws')! } : {}),
        ...(values.seed !== undefined ? { seed: parseWhole(values.seed, '--seed')! } : {}),
      };
      const { evaluateStudy } = await import('./api/evaluate.ts');
      const report = unwrap(await evaluateStudy({
        studyPath: rest[0]!, outDir: values.out, overrides, formats,
        ...(values.workspace ? { workspacePath: values.workspace } : {}),
        ...(workers !== undefined ? { workers } : {}),
      }, ctx));
      printer.finish();
      process.stdout.write(formatEvaluateSummary(report));
      return 0;
    }
    case 'demo': {
      if (!values.out) fail('--out', 'demo needs an output folder: add --out <dir>.');
      const { runDemo } = await import('./api/evaluate.ts');
      const report = unwrap(await runDemo({ outDir: values.out, formats, ...(workers !== undefined ? { workers } : {}) }, ctx));
      printer.finish();
      process.stdout.write(formatEvaluateSummary(report));
      return 0;
    }
    default:
      fail('command line', `"${command}" is not a command: use evaluate, check or demo.\n\n${USAGE}`);
  }
}

main(process.argv.slice(2)).then(
  (code) => process.exit(code),
  (e: unknown) => {
    activePrinter?.finish();
    if (e instanceof InputError) {
      const lines = e.problems.map((p) => (p.path ? `${p.path}: ${p.message}` : p.message));
      process.stderr.write(`\n${lines.length > 1 ? `${lines.length} problems stop this study:\n  - ${lines.join('\n  - ')}` : lines[0]}\n`);
      process.exit(2);
    }
    process.stderr.write(`\nFenceline hit an internal fault (this is a bug; please report it with the lines below).\n${(e as Error)?.stack ?? String(e)}\n`);
    process.exit(1);
  },
);
