// Progress on stderr for the command line: a redrawn bar on a terminal, plain lines otherwise
// (one per stage start, every 10%, and at the end), so logs stay readable.

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
  finish(): void;
}

export function progressPrinter(stream: NodeJS.WriteStream, enabled = true): ProgressPrinter {
  const tty = Boolean(stream.isTTY);
  let lastStage = '';
  let lastDecile = -1;
  let lastDraw = 0;
  let open = false;
  const print = (e: ProgressEvent) => {
    if (!enabled) return;
    const fraction = e.total > 0 ? Math.min(1, e.done / e.total) : 0;
    if (tty) {
      const now = Date.now();
      if (e.stage === lastStage && now - lastDraw < 80 && e.done < e.total) return;
      lastDraw = now;
      const width = 28;
      const filled = Math.round(fraction * width);
      const bar = '█'.repeat(filled) + '░'.repeat(width - filled);
      if (e.stage !== lastStage && open) stream.write('\n');
      stream.write(`\r${stageWords(e.stage).padEnd(30)} ${bar} ${String(Math.round(fraction * 100)).padStart(3)}%`);
      open = true;
      if (e.done >= e.total) { stream.write('\n'); open = false; }
      lastStage = e.done >= e.total ? '' : e.stage;
      return;
    }
    const decile = Math.floor(fraction * 10);
    if (e.stage !== lastStage) { lastStage = e.stage; lastDecile = -1; }
    if (decile === lastDecile) return;
    lastDecile = decile;
    stream.write(`${stageWords(e.stage)}: ${Math.round(fraction * 100)}%\n`);
  };
  const printer = print as ProgressPrinter;
  printer.finish = () => { if (open) { stream.write('\n'); open = false; } };
  return printer;
}
