import { createRequire } from 'node:module';
import type { SingleBar } from 'cli-progress';

/**
 * The one progress bar of the command line, on the `cli-progress` library:
 * drawn on stderr only when it is a terminal and `--quiet` is not given
 * (never in pipes, logs or files), so it changes no output. Every bar of
 * the tool goes through here: reading a large file, fitting many lineages,
 * a long shift search, drawing many figures, and the stages of power,
 * bootstrap and age draws.
 */

/** Options of {@link terminalBar}. */
export interface TerminalBarOptions {
  /** `--quiet`: no bar at all. */
  readonly quiet?: boolean;
  /** Where to draw (default stderr); nothing is drawn unless `stream.isTTY`. */
  readonly stream?: NodeJS.WriteStream;
  /** Draw nothing until this many ms after the bar was made (default 0), so quick runs stay silent. */
  readonly delayMs?: number;
  /** Wipe the line when the bar stops (default true), so the table that follows starts on a clean line; false leaves it as a record. */
  readonly clearOnStop?: boolean;
  /** Show the remaining time at the average pace so far after the count (default false). */
  readonly eta?: boolean;
  /** Extra text after the count, e.g. "12,345 rows" (default none); can be changed on each update. */
  readonly detail?: boolean;
}

/** A bar that may be drawn: update it with work done, stop it once at the end. */
export interface TerminalBar {
  /** Work done so far out of `total`; `label` and `detail` replace the texts drawn before the bar and after the count. */
  update(done: number, total: number, texts?: { label?: string; detail?: string }): void;
  /** End the bar (clears the line unless `clearOnStop: false`); safe to call more than once or before anything was drawn. */
  stop(): void;
}

const require = createRequire(import.meta.url);

/**
 * A progress bar labelled `label`, or null when none may be drawn (`quiet`,
 * or the stream is not a terminal). The library is loaded only when a bar
 * is really drawn, so `--help` and runs in pipes never load it. Its redraw
 * timer is unref'd, so a bar left running by an error never keeps the
 * process alive.
 *
 * @param label text before the bar, e.g. "fitting lineages"
 *
 * @example
 * // A stand-in terminal that records what is drawn (a bar is drawn only on a terminal).
 * const written = [];
 * const stream = { isTTY: true, columns: 80, write: (text) => { written.push(text); return true; }, cursorTo() {}, clearLine() {}, moveCursor() {}, on() {}, removeListener() {} };
 * const bar = terminalBar('fitting lineages', { stream });
 * bar.update(3, 10);
 * bar.stop();
 * written.includes('fitting lineages [█████████░░░░░░░░░░░░░░░░░░░░░] 3/10'); // true (3/10 of 30 cells)
 * terminalBar('fitting lineages', { stream: { isTTY: false } }); // null (a pipe or file: no bar)
 * terminalBar('fitting lineages', { stream, quiet: true }); // null
 */
export function terminalBar(label: string, options: TerminalBarOptions = {}): TerminalBar | null {
  const stream = options.stream ?? process.stderr;
  if (options.quiet || !stream.isTTY) return null;
  const made = Date.now();
  let bar: SingleBar | null = null;
  let stopped = false;
  const format = `{label} [{bar}] {value}/{total}${options.eta ? '{remaining}' : ''}${options.detail ? '{detail}' : ''}`;
  return {
    update(done, total, texts = {}) {
      if (stopped || Date.now() - made < (options.delayMs ?? 0)) return;
      const payload = {
        label: texts.label ?? label,
        detail: texts.detail ? `, ${texts.detail}` : '',
        // Remaining time at the average pace so far, from when the bar was made.
        remaining: options.eta && done > 0 && done < total ? `, about ${Math.ceil(((Date.now() - made) / 1000) * ((total - done) / done))} s left` : '',
      };
      if (bar === null) {
        const cliProgress = require('cli-progress') as typeof import('cli-progress');
        bar = new cliProgress.SingleBar(
          { stream, format, barsize: 30, hideCursor: true, clearOnComplete: options.clearOnStop ?? true, stopOnComplete: false, etaBuffer: 20 },
          cliProgress.Presets.shades_classic,
        );
        keepUnreferenced(bar);
        bar.start(total, done, payload);
        return;
      }
      bar.setTotal(total);
      bar.update(done, payload);
    },
    stop() {
      if (stopped) return;
      stopped = true;
      bar?.stop();
    },
  };
}

/** cli-progress re-arms a redraw timer on every render; unref each one so it never holds the event loop open. */
function keepUnreferenced(bar: SingleBar): void {
  const internal = bar as unknown as { render(): void; timer: NodeJS.Timeout | null };
  const render = internal.render.bind(bar);
  internal.render = () => {
    render();
    internal.timer?.unref?.();
  };
}

/**
 * The bar of a batch of lineages (`fit` on many lineages), after half a
 * second, with the time left; cleared when the last lineage is done. None
 * for a single lineage.
 *
 * @example
 * fittingProgress(1); // undefined (a single lineage gets no bar)
 * fittingProgress(5, { quiet: true }); // undefined
 * const stream = { isTTY: true, columns: 80, write: () => true, cursorTo() {}, clearLine() {}, moveCursor() {}, on() {}, removeListener() {} };
 * typeof fittingProgress(5, {}, stream); // 'function' (called with (done, total); the last call clears the bar)
 */
export function fittingProgress(total: number, options: { quiet?: boolean } = {}, stream: NodeJS.WriteStream = process.stderr, label = 'fitting lineages'): ((done: number, total: number) => void) | undefined {
  if (total < 2) return undefined;
  const bar = terminalBar(label, { quiet: options.quiet, stream, delayMs: 500, eta: true });
  if (bar === null) return undefined;
  return (done) => (done >= total ? bar.stop() : bar.update(done, total));
}

/** What a long shift search reports (`SearchProgress` of `fit/fit-configurations.ts`, repeated so this file loads nothing of the fitter). */
interface ShiftSearchProgress {
  readonly model: string;
  readonly stage: 'screen' | 'refine';
  readonly done: number;
  readonly total: number;
}

/**
 * The bar of a long shift search (one lineage fitted in this thread), after
 * a second; the label names the model and the stage; cleared when the full
 * search ends.
 *
 * @example
 * searchProgress({ quiet: true }); // undefined
 * searchProgress({}, { isTTY: false }); // undefined (not a terminal)
 */
export function searchProgress(options: { quiet?: boolean } = {}, stream: NodeJS.WriteStream = process.stderr): ((progress: ShiftSearchProgress) => void) | undefined {
  const bar = terminalBar('', { quiet: options.quiet, stream, delayMs: 1000 });
  if (bar === null) return undefined;
  return (progress) => {
    if (progress.stage === 'refine' && progress.done >= progress.total) return bar.stop();
    bar.update(progress.done, progress.total, { label: `${progress.model}: ${progress.stage === 'screen' ? 'scoring shift positions' : 'full search'}` });
  };
}

/** What the streaming reader reports (`StreamProgress` of `data/stream-samples.ts`). */
interface ReadingProgress {
  readonly bytes: number;
  readonly totalBytes: number | null;
  readonly rows: number;
  readonly done: boolean;
}

/**
 * The bar of reading a samples file: shown only for files past 4 MB, as
 * bytes read of the file's size with the rows so far (stdin, size unknown:
 * the rows alone, as the count); cleared when reading ends.
 *
 * @example
 * readingProgress('samples.csv', { quiet: true }); // undefined
 * readingProgress('samples.csv', {}, { isTTY: false }); // undefined (not a terminal)
 */
export function readingProgress(file: string, options: { quiet?: boolean } = {}, stream: NodeJS.WriteStream = process.stderr): ((progress: ReadingProgress) => void) | undefined {
  const bar = terminalBar(`reading ${file}`, { quiet: options.quiet, stream, detail: true });
  if (bar === null) return undefined;
  let drawn = false;
  return ({ bytes, totalBytes, rows, done }) => {
    if (done) return bar.stop();
    if (!drawn && (totalBytes !== null ? totalBytes < 4_000_000 : bytes < 4_000_000)) return;
    drawn = true;
    const rowsText = `${rows.toLocaleString('en-US')} rows`;
    if (totalBytes !== null && totalBytes > 0) bar.update(Math.min(bytes, totalBytes), totalBytes, { detail: rowsText });
    else bar.update(rows, rows, { detail: 'size unknown' });
  };
}

/**
 * The bar of drawing a folder's figures, for sets of more than 12 (hundreds
 * of lineages mean hundreds of figures at about half a second each at 600
 * dpi); the last state is left on its line.
 *
 * @example
 * const written = [];
 * const stream = { isTTY: true, columns: 80, write: (text) => { written.push(text); return true; }, cursorTo() {}, clearLine() {}, moveCursor() {}, on() {}, removeListener() {} };
 * drawingProgress(12, {}, stream); // undefined (12 figures or fewer: no bar)
 * const progress = drawingProgress(20, {}, stream);
 * progress(1);
 * progress(20);
 * written.includes('drawing figures [██████████████████████████████] 20/20'); // true (left on its line as a record)
 */
export function drawingProgress(total: number, options: { quiet?: boolean } = {}, stream: NodeJS.WriteStream = process.stderr): ((done: number) => void) | undefined {
  if (total <= 12) return undefined;
  const bar = terminalBar('drawing figures', { quiet: options.quiet, stream, clearOnStop: false });
  if (bar === null) return undefined;
  return (done) => {
    bar.update(done, total);
    if (done >= total) bar.stop();
  };
}

/** Progress of a run in stages (`PowerProgress` of `simulate/power.ts`): a stage starts with its number of tasks, then reports tasks done. */
export interface StageProgress {
  stage(label: string, total: number): (done: number) => void;
}

/**
 * One bar per stage of a long run (power, bootstrap, age draws), each left
 * on its own line as a record; `stop` ends the last. Without a terminal, or
 * with `quiet`, `progress` is undefined and `stop` does nothing.
 *
 * @example
 * const quiet = stageProgress(true);
 * quiet.progress; // undefined
 * quiet.stop(); // undefined (does nothing)
 * const stream = { isTTY: true, columns: 80, write: () => true, cursorTo() {}, clearLine() {}, moveCursor() {}, on() {}, removeListener() {} };
 * typeof stageProgress(false, stream).progress.stage; // 'function'
 */
export function stageProgress(quiet: boolean | undefined, stream: NodeJS.WriteStream = process.stderr): { progress: StageProgress | undefined; stop(): void } {
  if (quiet || !stream.isTTY) return { progress: undefined, stop: () => {} };
  let current: TerminalBar | null = null;
  const stop = (): void => {
    current?.stop();
    current = null;
  };
  const progress: StageProgress = {
    stage(label, total) {
      stop();
      const bar = terminalBar(`  ${label.padEnd(40)}`, { stream, clearOnStop: false });
      current = bar;
      bar?.update(0, total);
      return (done) => bar?.update(done, total);
    },
  };
  return { progress, stop };
}
