// Progress on stderr for the command line: on a terminal, a redrawn bar per stage through the
// cli-progress library; otherwise plain lines (one per stage start, every 10%, and at the end),
// so logs stay readable.

import cliProgress from 'cli-progress';

export interface ProgressEvent { stage: string; done: number; total: number }

const STAGE_WORDS: Record<string, string> = {
  import: 'Reading the data',
  store: 'Saving to the workspace',
  propensity: 'Computing propensity scores',
  estimate: 'Estimating',
  checks: 'Running design checks',
  memo: 'Writing the memo',
};

export function stageWords(stage: string): string {
  return STAGE_WORDS[stage] ?? stage;
}

export interface ProgressPrinter {
  (e: ProgressEvent): void;
  /** Close the bar (or line) left open, before the command prints its summary or a message. */
  finish(): void;
}

export interface ProgressOptions {
  /** Print nothing at all (--quiet). Default true. */
  enabled?: boolean;
  /** Draw a bar (true) or plain lines (false); default: whether the stream is a terminal. */
  tty?: boolean;
}

const WORDS_WIDTH = 30;

/** A bar per stage, redrawn in place (cli-progress's SingleBar on the given stream). */
function barPrinter(stream: NodeJS.WriteStream): ProgressPrinter {
  let bar: cliProgress.SingleBar | null = null;
  let stage = '';
  let total = 0;
  const close = (completed = false) => {
    if (bar !== null) {
      // a stage that hands over to the next one is done, whatever its last report said
      if (completed) bar.update(total);
      bar.stop();
    }
    bar = null;
    stage = '';
  };
  const print = (e: ProgressEvent) => {
    const target = Math.max(1, e.total);
    const done = Math.min(target, Math.max(0, e.done));
    if (bar === null || e.stage !== stage) {
      close(true);
      bar = new cliProgress.SingleBar({
        stream,
        format: `${stageWords(e.stage).padEnd(WORDS_WIDTH)} {bar} {percentage}%`,
        barsize: 28,
        hideCursor: false,
        clearOnComplete: false,
        fps: 12,
      }, cliProgress.Presets.shades_classic);
      bar.start(target, done);
      stage = e.stage;
      total = target;
    } else {
      if (target !== total) {
        bar.setTotal(target);
        total = target;
      }
      bar.update(done);
    }
    if (e.done >= e.total) close();
  };
  const printer = print as ProgressPrinter;
  printer.finish = () => close(false);
  return printer;
}

/** Plain lines: one when a stage starts, then at each further tenth, and at the end. */
function linePrinter(stream: NodeJS.WritableStream): ProgressPrinter {
  let lastStage = '';
  let lastDecile = -1;
  const print = (e: ProgressEvent) => {
    const fraction = e.total > 0 ? Math.min(1, e.done / e.total) : 0;
    const decile = Math.floor(fraction * 10);
    if (e.stage !== lastStage) { lastStage = e.stage; lastDecile = -1; }
    if (decile === lastDecile) return;
    lastDecile = decile;
    stream.write(`${stageWords(e.stage)}: ${Math.round(fraction * 100)}%\n`);
  };
  const printer = print as ProgressPrinter;
  printer.finish = () => {};
  return printer;
}

export function progressPrinter(stream: NodeJS.WriteStream, enabledOrOptions: boolean | ProgressOptions = true): ProgressPrinter {
  const options = typeof enabledOrOptions === 'boolean' ? { enabled: enabledOrOptions } : enabledOrOptions;
  if (options.enabled === false) {
    const silent = (() => {}) as unknown as ProgressPrinter;
    silent.finish = () => {};
    return silent;
  }
  return (options.tty ?? Boolean(stream.isTTY)) ? barPrinter(stream) : linePrinter(stream);
}
