// The command line (docs/cli.md): evaluate, check, demo. It adapts main/api.ts and holds no
// analysis logic. Exit status: 0 done; 2 the input is wrong (one message naming where and what to
// do, never a stack trace); 1 an internal fault (with its stack trace).

import { parseArgs } from 'node:util';
import { OUTPUT_FORMATS, type ApiResult, type OutputFormat, type SettingsOverrides } from './contract/api.ts';
import type { Problem } from './rules/types.ts';
import { checkStudy, evaluateStudy, runDemo } from './api.ts';
import { AVAILABLE_MEMO_FORMATS } from './api/evaluate.ts';
import { progressPrinter } from './cli/progress.ts';
import { formatCheckReport, formatEvaluateSummary } from './cli/summaries.ts';

const USAGE = `Fenceline — evaluate a program whose eligibility is set by a formula.

Usage:
  npm run --silent cli -- evaluate <study.json> --out <dir> [--deltas 0.05,0.1] [--draws N] [--seed N]
                                    [--workspace <file.db>] [--formats pdf,html,docx,xlsx|none] [--workers N] [--quiet]
  npm run --silent cli -- check <study.json>
  npm run --silent cli -- demo --out <dir> [--formats ...]

Flags override the study's settings. Progress goes to stderr; stdout carries only the summary.`;

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
  if (r.error.kind === 'cancelled') { process.stderr.write('Cancelled.\n'); process.exit(130); }
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
    fail('command line', `${(e as Error).message}\n\n${USAGE}`);
  }
  const { values, positionals } = parsed;
  const [command, ...rest] = positionals;
  if (values.help || !command) { process.stdout.write(USAGE + '\n'); return command || values.help ? 0 : 2; }
  const printer = progressPrinter(process.stderr, !values.quiet);
  const controller = new AbortController();
  process.once('SIGINT', () => controller.abort());
  const ctx = { onProgress: printer, signal: controller.signal };
  // default: every memo format this version can write (results.json and units.csv are always written)
  const formats = parseFormats(values.formats, [...AVAILABLE_MEMO_FORMATS]);
  const workers = parseWhole(values.workers, '--workers');

  switch (command) {
    case 'check': {
      if (rest.length !== 1) fail('command line', `check takes one study file: npm run --silent cli -- check <study.json>`);
      const report = unwrap(await checkStudy({ studyPath: rest[0]! }, ctx));
      printer.finish();
      process.stdout.write(formatCheckReport(report));
      return 0;
    }
    case 'evaluate': {
      if (rest.length !== 1) fail('command line', `evaluate takes one study file: npm run --silent cli -- evaluate <study.json> --out <dir>`);
      if (!values.out) fail('--out', 'evaluate needs an output folder: add --out <dir> (it is created if missing).');
      const overrides: SettingsOverrides = {
        ...(values.deltas !== undefined ? { deltas: parseNumberList(values.deltas, '--deltas') } : {}),
        ...(values.draws !== undefined ? { draws: parseWhole(values.draws, '--draws')! } : {}),
        ...(values.seed !== undefined ? { seed: parseWhole(values.seed, '--seed')! } : {}),
      };
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
    if (e instanceof InputError) {
      const lines = e.problems.map((p) => (p.path ? `${p.path}: ${p.message}` : p.message));
      process.stderr.write(`\n${lines.length > 1 ? `${lines.length} problems stop this study:\n  - ${lines.join('\n  - ')}` : lines[0]}\n`);
      process.exit(2);
    }
    process.stderr.write(`\nFenceline hit an internal fault (this is a bug; please report it with the lines below).\n${(e as Error)?.stack ?? String(e)}\n`);
    process.exit(1);
  },
);
