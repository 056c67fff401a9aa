/**
 * Issue 24 / issue 23: the tick helpers end for any finite input, and axis
 * limits the chart library cannot lay out are refused with a message instead
 * of being handed to it (its decimal counter never ends near the double's
 * underflow). Before the fix, a span below about 1e-308 made the step
 * underflow to 0 and `roundTicks` loop for ever; so every call here runs in a
 * child process with a time limit, and a hang fails the test instead of
 * stopping the suite (the limit only detects a hang; no timing is asserted).
 *
 * Expected values are closed forms: on the 1–2–5 ladder (common practice) the
 * k-th tick of a step m × 10^e is the double nearest the decimal "k·m e e"
 * (IEEE 754 round-to-nearest of a decimal string, as Number() parses it).
 */
import { spawnSync } from 'node:child_process';
import { copyFileSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { describe, expect, it } from 'vitest';
import { root, runCli } from '../../robustness/cli.js';
import { runCliHere } from '../../support/cli-in-process.js';

const ticksModule = pathToFileURL(join(root, 'dist', 'src', 'render', 'figures', 'ticks.js')).href;
const sketchModule = pathToFileURL(join(root, 'dist', 'src', 'render', 'report', 'sketch-figure.js')).href;

/** Run `body` (an async function body using `ticks` and `sketch`) in a child process; its JSON result. */
function inChild(body: string): unknown {
  const script = `const ticks = await import(${JSON.stringify(ticksModule)}); const sketch = await import(${JSON.stringify(sketchModule)});
const result = await (async () => { ${body} })(); process.stdout.write(JSON.stringify(result));`;
  const run = spawnSync(process.execPath, ['--input-type=module', '-e', script], { encoding: 'utf8', timeout: 60_000 });
  expect(run.signal, 'the helper did not end (killed by the hang detector)').toBeNull();
  expect(run.stderr).toBe('');
  return JSON.parse(run.stdout);
}

describe('tick helpers end for any finite input', () => {
  it('a subnormal span gets 1–2–5 ticks written as decimals (closed form) and labels that are not all 0', () => {
    const result = inChild(`
      const step = ticks.roundStep(3e-311, 6);
      return { step, values: ticks.roundTicks(0, 3e-311, step), labels: ticks.roundTicks(0, 3e-311, step).map((v) => ticks.tickLabel(v, step)) };`) as { step: { multiple: number; exponent: number }; values: number[]; labels: string[] };
    // 3e-311 / 6 = 5e-312: the step 5 × 10^-312 gives 7 ticks, the closest count to 6.
    expect(result.step).toEqual({ multiple: 5, exponent: -312 });
    expect(result.values).toEqual([0, 1, 2, 3, 4, 5, 6].map((k) => Number(`${5 * k}e-312`)));
    expect(result.labels).toEqual(['0', '5e-312', '10e-312', '15e-312', '20e-312', '25e-312', '30e-312']);
  });

  it('spans of 0, the smallest subnormal, and beyond the largest double end with finite ticks (or none)', () => {
    const result = inChild(`
      // The last two: a span below the values' rounding (multiples k beyond 2^53, where k + 1 rounds back to k).
      const cases = [[1, 1], [0, 5e-324], [-1e308, 1e308], [1.7e308, 1.79e308], [-5e-324, 5e-324], [1e17, 1e17 + 16], [-1e100, -1e100 + 2e84]];
      return cases.map(([min, max]) => {
        const step = ticks.roundStep(max - min, 6);
        const fitted = ticks.fittedTicks({ min, max }, 6, 200, () => 12);
        return { exponent: step.exponent, values: ticks.roundTicks(min, max, step), fitted: fitted.values };
      });`) as { exponent: number; values: number[]; fitted: number[] }[];
    for (const item of result) {
      expect(Number.isFinite(item.exponent)).toBe(true);
      for (const value of [...item.values, ...item.fitted]) expect(Number.isFinite(value)).toBe(true);
      expect(item.values.length).toBeLessThanOrEqual(1000);
    }
    // -1e308..1e308: the span overflows to Infinity; the step is clamped to 1e306 (and coarsened by fittedTicks).
    expect(result[2].values[0]).toBe(-1e308);
    expect(result[2].values.at(-1)).toBe(1e308);
  });

  it("the report sketch's ticks end when the step is below the values' rounding or underflows", () => {
    const result = inChild(`return [sketch.niceTicks(1e17, 1e17 + 16), sketch.niceTicks(0, 3e-311), sketch.niceTicks(-1e308, 1e308)];`) as number[][];
    // 1e17 + 5 rounds back to 1e17 (the spacing of doubles there is 16): the old loop stood still.
    for (const list of result) {
      expect(list.length).toBeGreaterThan(0);
      expect(list.length).toBeLessThanOrEqual(101);
      for (const value of list) expect(Number.isFinite(value)).toBe(true);
    }
    // 3e-311 / 5 = 6e-312: the sketch's first step of 1, 2, 5 or 10 × 10^-312 at least that is 1e-311, ticks k × 1e-311 for
    // k = 0..3; subnormal doubles near 1e-311 keep only about 12 significant digits, hence the tolerance.
    expect(result[1]).toHaveLength(4);
    result[1].forEach((value, k) => expect(Math.abs(value - k * 1e-311)).toBeLessThanOrEqual(1e-9 * 1e-311 * k));
  });

  it('drawableLimits refuses axes the chart library cannot lay out, naming the axis and its ends', () => {
    const result = inChild(`
      const out = [];
      for (const limits of [{ min: 7.9e-310, max: 1.3e-309 }, { min: 0, max: 1e201 }, { min: 0, max: 1e-200 }]) {
        try { ticks.drawableLimits(limits, 'time axis'); out.push('drawn'); } catch (error) { out.push(error.message); }
      }
      return out;`) as string[];
    expect(result[0]).toBe('cannot draw the time axis: its values run from 7.9e-310 to 1.3e-309; a figure shows spans of at least 1e-200 and values up to 1e+200 in magnitude; rescale the unit');
    expect(result[1]).toMatch(/^cannot draw the time axis: its values run from 0 to 1e\+201/);
    expect(result[2]).toBe('drawn');
  });
});

describe('the power curve refuses a drift axis chart.js cannot lay out', () => {
  it('drifts near 1e-310 (a hand-edited power document) give one message, no hang', () => {
    const power = pathToFileURL(join(root, 'dist', 'src', 'render', 'figures', 'power-curve.js')).href;
    const script = `const { renderPowerCurve } = await import(${JSON.stringify(power)});
const grid = [0, 1, 2, 3].map((k) => ({ drift: k * 1e-310, drift_sd: 0, p_best: 0.1 * k, p_weight: 0.1 * k, p_lrt: 0.1 * k }));
try { renderPowerCurve({ grid, lineage: 'invented', horizons: 20, replicates: 20, timeUnit: 'Myr', weightThreshold: 0.9, targetPower: 0.8, level: 0.05, withinSd: 1 }); process.stdout.write('drawn'); }
catch (error) { process.stdout.write(error.message); }`;
    const run = spawnSync(process.execPath, ['--input-type=module', '-e', script], { encoding: 'utf8', timeout: 60_000 });
    expect(run.signal, 'the drawing did not end (killed by the hang detector)').toBeNull();
    expect(run.stdout).toMatch(/^cannot draw the drift axis: its values run from 0 to 3e-310; /);
  });
});

describe('redraw and report on a fit.json with subnormal times end with one message (issue 23)', () => {
  it('exit 1, one line, no hang', async () => {
    const folder = mkdtempSync(join(tmpdir(), 'stratotrend-subnormal-'));
    copyFileSync(join(root, 'sample-data', 'shell-length.csv'), join(folder, 'shell-length.csv'));
    // --no-trend-test and in the test process (runCliHere): this fit only makes the fit.json whose times are then damaged (issue 22);
    // redraw and report on it run in child processes, so a hang would be a failure, not a stopped suite.
    expect((await runCliHere(['fit', 'shell-length.csv', '--out', 'fitted', '--no-intervals', '--no-figures', '--no-trend-test', '--quiet'], folder)).status).toBe(0);
    const document = JSON.parse(readFileSync(join(folder, 'fitted', 'fit.json'), 'utf8')) as { lineages: { data: { time: number[]; position: number[] } }[] };
    for (const lineage of document.lineages) {
      lineage.data.time = lineage.data.time.map((t) => t * 1e-310);
      lineage.data.position = lineage.data.position.map((p) => p * 1e-310);
    }
    writeFileSync(join(folder, 'subnormal.json'), JSON.stringify(document));
    for (const args of [['redraw', 'subnormal.json', '--out', 'drawn'], ['report', 'subnormal.json', '--out', 'subnormal.html']]) {
      const run = runCli(args, folder);
      expect(run.status, args.join(' ')).toBe(1);
      // One line naming the document (the issue 23 validator may refuse these times first, in its own words).
      expect(run.stderr).toMatch(/^stratotrend: subnormal\.json[: ][^\n]+\n$/);
    }
  });
});
