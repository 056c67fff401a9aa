import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { runFit } from '../../../src/analyses/fit-run.js';
import { buildReport } from '../../../src/analyses/report-run.js';
import { asFitDocument } from '../../../src/render/report/document-view.js';
import { browserDecision, chromiumArgs, findChromium, onCi } from './browser.js';

// The report opened in a real browser (system Chromium driven by
// playwright-core), from a file:// URL with every non-file request refused.
// The expected numbers are those of fit.json, written exactly as
// `fit --out` writes it, and read back with JSON.parse: the page must show
// the same doubles (data-value attributes) and their rounded forms.

const executable = findChromium();
const decision = browserDecision(executable, onCi);
const missing = 'report browser test: no Chromium found (install the Debian package "chromium": apt-get install -y chromium)';
if (decision === 'skip') console.warn(`\n!!!!!!!!\n!!! SKIPPED: ${missing}\n!!!!!!!!\n`);

describe('browser availability', () => {
  it('finds no browser where there is none, and then skips outside CI but fails on CI', () => {
    expect(findChromium(['/nonexistent/chromium'], '/nonexistent')).toBeNull();
    expect(browserDecision(null, false)).toBe('skip');
    expect(browserDecision(null, true)).toBe('fail');
    expect(browserDecision('/usr/bin/chromium', true)).toBe('run');
  });

  it.runIf(decision === 'fail')('Chromium is installed on CI', () => {
    throw new Error(`${missing}; CI=true, so this is a failure, not a skip`);
  });
});

interface PageLog {
  consoleErrors: string[];
  failedRequests: string[];
  refusedRequests: string[];
}

let sharedBrowser: Promise<Browser> | undefined;

/** One Chromium for the whole file, launched on first use (each describe opens its own context); closed after all. */
function launchedBrowser(): Promise<Browser> {
  sharedBrowser ??= import('playwright-core').then(({ chromium }) => chromium.launch({ executablePath: executable!, args: chromiumArgs }));
  return sharedBrowser;
}

afterAll(async () => {
  if (sharedBrowser) await (await sharedBrowser).close();
});

async function openOffline(context: BrowserContext, url: string): Promise<{ page: Page; log: PageLog }> {
  const log: PageLog = { consoleErrors: [], failedRequests: [], refusedRequests: [] };
  const page = await context.newPage();
  page.on('console', (message) => {
    if (message.type() === 'error') log.consoleErrors.push(message.text());
  });
  page.on('pageerror', (error) => log.consoleErrors.push(String(error)));
  page.on('requestfailed', (request) => {
    if (!log.refusedRequests.includes(request.url())) log.failedRequests.push(`${request.url()}: ${request.failure()?.errorText}`);
  });
  await page.route('**/*', async (route) => {
    const requested = route.request().url();
    if (requested.startsWith('file:')) return route.continue();
    log.refusedRequests.push(requested);
    return route.abort('internetdisconnected');
  });
  await page.goto(url, { waitUntil: 'load' });
  return { page, log };
}

/**
 * A screenshot of the page brought to the front. Headless Chromium on a
 * loaded machine can refuse a capture of a page that is not composited yet
 * ("Unable to capture screenshot"); that is retried, never the assertions.
 */
async function capture(target: Page, locator?: string): Promise<Buffer> {
  let lastError: unknown;
  for (let attempt = 0; attempt < 3; attempt++) {
    try {
      await target.bringToFront();
      return locator ? await target.locator(locator).first().screenshot() : await target.screenshot({ fullPage: false });
    } catch (error) {
      lastError = error;
      await new Promise((resolve) => setTimeout(resolve, 500));
    }
  }
  throw lastError;
}

/** Pixel variance of a PNG, decoded by the browser itself on a blank page (no image library needed). */
async function pixelStatistics(context: BrowserContext, png: Buffer): Promise<{ variance: number; inked: number }> {
  const page = await context.newPage();
  await page.setContent('<canvas id="c"></canvas>');
  const result = await page.evaluate(async (base64) => {
    const image = new Image();
    image.src = `data:image/png;base64,${base64}`;
    await image.decode();
    const canvas = document.getElementById('c') as HTMLCanvasElement;
    canvas.width = image.naturalWidth;
    canvas.height = image.naturalHeight;
    const context2d = canvas.getContext('2d')!;
    context2d.drawImage(image, 0, 0);
    const { data } = context2d.getImageData(0, 0, canvas.width, canvas.height);
    let sum = 0;
    let sumSquares = 0;
    let inked = 0;
    const pixels = data.length / 4;
    for (let i = 0; i < data.length; i += 4) {
      const grey = (data[i] + data[i + 1] + data[i + 2]) / 3;
      sum += grey;
      sumSquares += grey * grey;
      if (grey < 200) inked += 1;
    }
    const mean = sum / pixels;
    return { variance: sumSquares / pixels - mean * mean, inked: inked / pixels };
  }, png.toString('base64'));
  await page.close();
  return result;
}

describe.skipIf(!executable)('HTML report in headless Chromium, offline', () => {
  let folder: string;
  let browser: Browser;
  let context: BrowserContext;
  let fitJson: { lineages: { models: Record<string, unknown>[] }[] };
  let page: Page;
  let log: PageLog;

  beforeAll(async () => {
    folder = mkdtempSync(join(tmpdir(), 'stratotrend-report-'));
    const run = runFit('sample-data/shell-length.csv', {});
    const fitText = JSON.stringify(run.document, null, 2) + '\n';
    writeFileSync(join(folder, 'fit.json'), fitText);
    fitJson = JSON.parse(readFileSync(join(folder, 'fit.json'), 'utf8'));
    const html = await buildReport(asFitDocument(run.document), {});
    writeFileSync(join(folder, 'report.html'), html);
    browser = await launchedBrowser();
    context = await browser.newContext({ viewport: { width: 1280, height: 900 }, offline: true });
    ({ page, log } = await openOffline(context, pathToFileURL(join(folder, 'report.html')).href));
  });

  afterAll(async () => {
    await context?.close();
    if (folder) rmSync(folder, { recursive: true, force: true });
  });

  it('loads with no console errors, no failed and no refused requests', () => {
    expect(log.consoleErrors).toEqual([]);
    expect(log.failedRequests).toEqual([]);
    expect(log.refusedRequests).toEqual([]);
  });

  it('the offline guard does catch a network request (control: a page that asks for one)', async () => {
    const probe = join(folder, 'probe.html');
    writeFileSync(probe, '<!DOCTYPE html><title>probe</title><img src="http://203.0.113.7/figure.png">');
    const opened = await openOffline(context, pathToFileURL(probe).href);
    expect(opened.log.refusedRequests).toEqual(['http://203.0.113.7/figure.png']);
    await opened.page.close();
  });

  it('every figure is loaded: images decoded with a size, inline SVG with content', async () => {
    const figures = await page.evaluate(() => ({
      images: [...document.images].map((image) => ({ complete: image.complete, width: image.naturalWidth, height: image.naturalHeight, source: image.src.slice(0, 30) })),
      svgs: [...document.querySelectorAll('svg')].map((svg) => svg.childElementCount),
    }));
    // One trajectory per lineage plus the sections-together figure of the trait (two sections in the demo file),
    // drawn by the figure module, not the stand-in sketches.
    expect(figures.images.length + figures.svgs.length).toBeGreaterThanOrEqual(fitJson.lineages.length + 1);
    expect(await page.locator('text=plain sketches').count()).toBe(0);
    for (const image of figures.images) {
      expect(image.complete).toBe(true);
      expect(image.width).toBeGreaterThan(0);
      expect(image.height).toBeGreaterThan(0);
      expect(image.source.startsWith('data:image/')).toBe(true);
    }
    for (const count of figures.svgs) expect(count).toBeGreaterThan(0);
  });

  it('the model-support tables show exactly the numbers of fit.json', async () => {
    const tables = await page.evaluate(() =>
      [...document.querySelectorAll('section.lineage')].map((section) =>
        [...section.querySelectorAll('table.support tbody tr')].map((row) => ({
          model: (row as HTMLElement).dataset.model,
          cells: Object.fromEntries([...row.querySelectorAll('td[data-field]')].map((cell) => [(cell as HTMLElement).dataset.field, { value: (cell as HTMLElement).dataset.value, text: cell.textContent ?? '' }])),
        })),
      ),
    );
    expect(tables.length).toBe(fitJson.lineages.length);
    tables.forEach((rows, index) => {
      const models = fitJson.lineages[index].models;
      expect(rows.map((row) => row.model)).toEqual(models.map((model) => model.id));
      rows.forEach((row, j) => {
        for (const [field, decimals] of [['k', 0], ['logLik', 3], ['aicc', 3], ['delta_aicc', 3], ['weight', 3]] as const) {
          const expected = models[j][field] as number | null;
          const shown = row.cells[field];
          if (expected === null) {
            expect(shown.value).toBe('');
            continue;
          }
          // The exact double, then the rounded text to half a unit of its last decimal.
          expect(Number(shown.value)).toBe(expected);
          expect(Math.abs(Number.parseFloat(shown.text.replace('−', '-')) - expected)).toBeLessThanOrEqual(0.5 * 10 ** -decimals + 1e-12);
        }
      });
    });
  });

  it('the estimates tables show the estimates of fit.json', async () => {
    const shown = await page.evaluate(() =>
      [...document.querySelectorAll('section.lineage')].map((section) =>
        [...section.querySelectorAll('table.estimates tr[data-parameter]')].map((row) => ({
          model: (row as HTMLElement).dataset.model!,
          parameter: (row as HTMLElement).dataset.parameter!,
          value: (row.querySelector('td[data-field="estimate"]') as HTMLElement).dataset.value!,
        })),
      ),
    );
    shown.forEach((rows, index) => {
      const models = fitJson.lineages[index].models as { id: string; params: Record<string, { estimate: number | null }>; derived: Record<string, { estimate: number | null }> }[];
      const expected = models.flatMap((model) => [...Object.entries(model.params), ...Object.entries(model.derived)].map(([parameter, estimate]) => ({ model: model.id, parameter, value: estimate.estimate === null ? '' : String(estimate.estimate) })));
      expect(rows).toEqual(expected);
    });
  });

  it('a screenshot is not blank (and a blank page is recognised as blank)', async () => {
    const shot = await capture(page);
    const statistics = await pixelStatistics(context, shot);
    const blankPage = await context.newPage();
    await blankPage.setContent('<body style="background:#fff"></body>');
    const blank = await pixelStatistics(context, await capture(blankPage));
    await blankPage.close();
    expect(blank.variance).toBeLessThan(1);
    expect(statistics.variance).toBeGreaterThan(100);
    expect(statistics.inked).toBeGreaterThan(0.01);
    // The figure itself is drawn: screenshot of the first figure, inked pixels present.
    const figure = await pixelStatistics(context, await capture(page, 'figure img'));
    expect(figure.variance).toBeGreaterThan(100);
  });

  it('prints: a PDF in print media with the methods and references', async () => {
    await page.emulateMedia({ media: 'print' });
    const pdf = await page.pdf({ format: 'A4', printBackground: true });
    expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    expect(pdf.length).toBeGreaterThan(20_000);
    const contentsShown = await page.evaluate(() => getComputedStyle(document.querySelector('nav.contents')!).display);
    expect(contentsShown).toBe('none');
    await page.emulateMedia({ media: 'screen' });
  });
});

describe.skipIf(!executable)('HTML report with the optional analyses (section comparison, power), offline', () => {
  let folder: string;
  let browser: Browser;
  let context: BrowserContext;
  let page: Page;
  let log: PageLog;
  let comparison: { traits: { hypotheses: Record<string, unknown>[] }[] };
  let power: { grid: Record<string, number>[] };

  beforeAll(async () => {
    const { runCompare } = await import('../../../src/analyses/compare-run.js');
    const { runPower } = await import('../../../src/analyses/power-run.js');
    folder = mkdtempSync(join(tmpdir(), 'stratotrend-report-analyses-'));
    const run = runFit('sample-data/shell-length.csv', { intervals: false });
    // Round trips through JSON text, as saved files would be.
    comparison = JSON.parse(JSON.stringify((await runCompare('sample-data/shell-length.csv', { intervals: false })).document));
    // One assumed step variance (issue 22): the page shows the grid whichever step variance is
    // assumed, and the second assumption (the default's upper end) doubles the simulations.
    power = JSON.parse(JSON.stringify((await runPower('sample-data/shell-length.csv', { replicates: '20', seed: '3', coverage: false, stepVariance: '0.05' })).document));
    const html = await buildReport(asFitDocument(run.document), {}, { analyses: { comparison, power: [power], seeds: { power: '3' } } });
    writeFileSync(join(folder, 'report.html'), html);
    browser = await launchedBrowser();
    context = await browser.newContext({ viewport: { width: 1280, height: 900 }, offline: true });
    ({ page, log } = await openOffline(context, pathToFileURL(join(folder, 'report.html')).href));
  });

  afterAll(async () => {
    await context?.close();
    if (folder) rmSync(folder, { recursive: true, force: true });
  });

  it('loads cleanly, with the power curve among the loaded figures', async () => {
    expect(log.consoleErrors).toEqual([]);
    expect(log.failedRequests).toEqual([]);
    expect(log.refusedRequests).toEqual([]);
    const curves = await page.evaluate(() => [...document.querySelectorAll('#power figure img')].map((image) => (image as HTMLImageElement).naturalWidth));
    expect(curves.length).toBe(1);
    expect(curves[0]).toBeGreaterThan(0);
  });

  it('the comparison table shows the numbers of the comparison document', async () => {
    const rows = await page.evaluate(() =>
      [...document.querySelectorAll('#comparison table.comparison tbody tr')].map((row) => ({
        id: (row as HTMLElement).dataset.hypothesis,
        model: (row as HTMLElement).dataset.model,
        values: Object.fromEntries([...row.querySelectorAll('td[data-field]')].map((cell) => [(cell as HTMLElement).dataset.field, (cell as HTMLElement).dataset.value])),
      })),
    );
    const expected = comparison.traits[0].hypotheses;
    expect(rows.length).toBe(expected.length);
    rows.forEach((row, index) => {
      expect(row.id).toBe(expected[index].id);
      expect(row.model).toBe(expected[index].model);
      for (const field of ['k', 'logLik', 'aicc', 'delta_aicc', 'weight']) {
        const value = expected[index][field] as number | null;
        expect(row.values[field]).toBe(value === null ? '' : String(value));
      }
    });
  });

  it('the power table shows the grid of the power document, and the seed is in the provenance', async () => {
    const rows = await page.evaluate(() =>
      [...document.querySelectorAll('#power table.power tbody tr')].map((row) => Object.fromEntries([...row.querySelectorAll('td[data-field]')].map((cell) => [(cell as HTMLElement).dataset.field, Number((cell as HTMLElement).dataset.value)]))),
    );
    expect(rows).toEqual(power.grid.map((row) => ({ drift: row.drift, drift_sd: row.drift_sd, p_best: row.p_best, p_weight: row.p_weight, p_lrt: row.p_lrt })));
    expect(await page.locator('#provenance').innerText()).toContain('power: 3');
    expect(await page.locator('#methods').innerText()).toContain('power of this sampling design');
  });
});
