import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';
import { pngInfo } from '../../../src/render/figures/index.js';
import { decodePng, isBlank } from './figure-probes.js';
import { svgText } from './figure-probes.js';
import { runCliHere } from '../../support/cli-in-process.js';

const root = resolve(import.meta.dirname, '../../..');
const cli = join(root, 'bin', 'stratotrend');

/** A child process, for what only one shows (which modules a run loads). */
function run(args: string[], extra: string[] = []): string {
  return execFileSync(process.execPath, [...extra, cli, ...args], { cwd: root, encoding: 'utf8' });
}

/** The command line in the test process (runCliHere): its stdout, or a failure showing stderr, like execFileSync. */
async function runHere(args: string[]): Promise<string> {
  const result = await runCliHere(args, root);
  if (result.status !== 0) throw new Error(`stratotrend ${args.join(' ')} exited with ${result.status}: ${result.stderr}`);
  return result.stdout;
}

// --no-trend-test in these fits (issue 22): no figure draws the trend verdict (src/render/figures/
// never reads it), and no check here reads it. The lazy-loading check keeps the trend test on in the
// fit without --out, so that the trend test's code path is watched too.
describe('figures from the command line', () => {
  // One fit without figures (and without intervals) for the two tests that only need a fit.json.
  let plainFit: Promise<string> | undefined;
  const fitWithoutFigures = (): Promise<string> =>
    (plainFit ??= (async () => {
      const out = mkdtempSync(join(tmpdir(), 'stratotrend-figures-'));
      await runHere(['fit', 'sample-data/shell-length.csv', '--out', out, '--no-figures', '--quiet', '--no-intervals', '--no-trend-test']);
      return out;
    })());

  it('fit --out writes a trajectory and a model-support PNG per lineage and the sections figure; redraw redraws without refitting', async () => {
    const out = mkdtempSync(join(tmpdir(), 'stratotrend-figures-'));
    // --no-intervals too (issue 22): no figure draws an interval end (figureLineage reads point estimates only), and no check reads them.
    const printed = await runHere(['fit', 'sample-data/shell-length.csv', '--out', out, '--no-trend-test', '--no-intervals']);
    expect(printed).toMatch(/and 5 figure files to/);
    const files = readdirSync(out).sort();
    expect(files).toEqual(
      expect.arrayContaining([
        'fit.json',
        'models.csv',
        'shell-length.sections.png',
        'tolloway-bluff_shell-length.model-support.png',
        'tolloway-bluff_shell-length.trajectory.png',
        'varnek-draw_shell-length.model-support.png',
        'varnek-draw_shell-length.trajectory.png',
      ]),
    );
    for (const name of files.filter((file) => file.endsWith('.png'))) {
      const bytes = new Uint8Array(readFileSync(join(out, name)));
      const info = pngInfo(bytes);
      expect(info.width, name).toBeGreaterThanOrEqual(1600);
      expect(info.dpiX, name).toBeCloseTo(23622 * 0.0254, 6);
      // Clearly non-blank: at least 2% of a coarse sample of pixels carries ink.
      const pixels = await decodePng(bytes);
      let inked = 0;
      let total = 0;
      for (let y = 0; y < pixels.height; y += 7) for (let x = 0; x < pixels.width; x += 7, total++) if (!isBlank(pixels.at(x, y))) inked++;
      expect(inked / total, name).toBeGreaterThan(0.02);
    }

    const fitJson = readFileSync(join(out, 'fit.json'), 'utf8');
    const redrawn = await runHere(['redraw', join(out, 'fit.json'), '--figure-format', 'svg,pdf', '--orientation', 'horizontal', '--only', 'trajectory', '--lineage', 'Varnek Draw', '--draw-model', 'random-walk']);
    expect(redrawn.trim().split('\n')).toEqual([join(out, 'varnek-draw_shell-length.trajectory.svg'), join(out, 'varnek-draw_shell-length.trajectory.pdf')]);
    const { text } = svgText(readFileSync(join(out, 'varnek-draw_shell-length.trajectory.svg'), 'utf8'));
    expect(text).toContain('Expected trajectory, unbiased random walk');
    expect(readFileSync(join(out, 'varnek-draw_shell-length.trajectory.pdf')).subarray(0, 5).toString()).toBe('%PDF-');
    // Redrawing does not touch the fit.
    expect(readFileSync(join(out, 'fit.json'), 'utf8')).toBe(fitJson);
  });

  it('fit --out --no-figures writes no figures; bad figure options are usage errors (exit 2)', async () => {
    const out = await fitWithoutFigures();
    expect(readdirSync(out).filter((file) => /\.(png|svg|pdf)$/.test(file))).toEqual([]);
    const { status, stderr } = await runCliHere(['redraw', join(out, 'fit.json'), '--dpi', 'many'], root);
    expect(status).toBe(2);
    expect(stderr).toMatch(/--dpi: expected a number/);
  });

  it('a damaged fit.json is a data error (exit 1) whose one line names the file and the bad field', async () => {
    const out = await fitWithoutFigures();
    const document = JSON.parse(readFileSync(join(out, 'fit.json'), 'utf8'));
    document.lineages[0].data.time = 'x';
    const damaged = join(out, 'damaged.json');
    writeFileSync(damaged, JSON.stringify(document));
    const { status, stderr } = await runCliHere(['redraw', damaged], root);
    expect(status).toBe(1);
    // The document is checked on reading (src/data/documents.ts): the path counts from the document's root.
    expect(stderr.trim()).toBe(`stratotrend: ${damaged}: lineages[0].data.time: expected a list, got "x"`);
  });

  it('--help and a fit without --out never load the chart stack', () => {
    const folder = mkdtempSync(join(tmpdir(), 'stratotrend-lazy-'));
    const preload = join(folder, 'watch.cjs');
    writeFileSync(
      preload,
      `process.on('exit', () => { const loaded = Object.keys(require.cache).filter((key) => /node_modules[\\\\/](chart\\.js|chartjs-node-canvas|canvas|@napi-rs)[\\\\/]/.test(key)); require('fs').writeFileSync(${JSON.stringify(join(folder, 'loaded.json'))}, JSON.stringify(loaded)); });\n`,
    );
    run(['--help'], ['--require', preload]);
    expect(JSON.parse(readFileSync(join(folder, 'loaded.json'), 'utf8'))).toEqual([]);
    run(['fit', 'sample-data/shell-length.csv', '--quiet', '--no-intervals'], ['--require', preload]);
    expect(JSON.parse(readFileSync(join(folder, 'loaded.json'), 'utf8'))).toEqual([]);
    // The watch itself works: drawing loads the stack (chartjs-node-canvas drops chart.js itself from the cache after loading it).
    const out = join(folder, 'out');
    // At 72 dpi (issue 22): any drawing loads the whole stack (loadChartStack in chart-backend.ts); 600 dpi only costs pixels.
    run(['fit', 'sample-data/shell-length.csv', '--quiet', '--no-intervals', '--no-trend-test', '--dpi', '72', '--out', out], ['--require', preload]);
    expect(JSON.parse(readFileSync(join(folder, 'loaded.json'), 'utf8')).some((key: string) => key.includes('chartjs-node-canvas'))).toBe(true);
  });
});
