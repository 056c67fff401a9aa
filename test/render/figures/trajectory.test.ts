import { describe, expect, it } from 'vitest';
import { fitLineage } from '../../../src/fit/fit-lineage.js';
import { lineageFromArrays } from '../../../src/lineage.js';
import { classicModels } from '../../../src/models/registry.js';
import { lineageDocument } from '../../../src/render/fit-document.js';
import { pngInfo, renderTrajectory, type FigureFrame, type RenderedFigure } from '../../../src/render/figures/index.js';
import { ridgeDocument } from './documents.js';
import { darkestNear, decodePng, insidePolygon, isBlank, keepChanged, luma, scalePixel, segmentDistance, type Pixels } from './figure-probes.js';

/** Two-sided 95% normal quantile Φ⁻¹(0.975) (closed form; tables give 1.959964). */
const z95 = 1.959963984540054;

type Point = { x: number; y: number };

/**
 * Where the figure must have put its marks, computed here from the document
 * and the chart's reported scales, with the models' expected trajectories
 * written out from their closed forms (MODELS.md: random walk a, σ²t;
 * stasis θ, ω) rather than taken from src/models.
 */
function expectedMarks(document: ReturnType<typeof ridgeDocument>, frame: FigureFrame, stratigraphic: boolean, model: 'random-walk' | 'stasis') {
  const at = (time: number, value: number): Point => ({
    x: scalePixel(frame, 'x', stratigraphic ? value : time),
    y: scalePixel(frame, 'y', stratigraphic ? time : value),
  });
  const { position, mean, sampling_variance: variance, time } = document.data;
  const markers = mean.map((m, i) => at(position[i], m));
  const intervals = mean.map((m, i) => [at(position[i], m - z95 * Math.sqrt(variance[i])), at(position[i], m + z95 * Math.sqrt(variance[i]))] as const);
  const params = Object.fromEntries(Object.entries(document.models.find((row) => row.id === model)!.params).map(([name, entry]) => [name, entry.estimate]));
  const span = time[time.length - 1];
  const samples = Array.from({ length: 401 }, (_, k) => (span * k) / 400);
  const centre = model === 'random-walk' ? params.ancestral_mean : params.stasis_mean;
  const half = (t: number) => z95 * Math.sqrt(model === 'random-walk' ? params.step_variance * t : params.stasis_variance);
  const age = (t: number) => position[0] - t;
  const line = samples.map((t) => at(age(t), centre));
  const lower = samples.map((t) => at(age(t), centre - half(t)));
  const upper = samples.map((t) => at(age(t), centre + half(t)));
  return { markers, intervals, line, lower, upper, envelope: [...lower, ...[...upper].reverse()], join: markers };
}

function polylineDistance(point: Point, line: readonly Point[]): number {
  let best = Number.POSITIVE_INFINITY;
  for (let i = 1; i < line.length; i++) best = Math.min(best, segmentDistance(point, line[i - 1], line[i]));
  return best;
}

interface ProbeResult {
  markers: number;
  intervals: number;
  envelope: number;
  blank: number;
  failures: string[];
}

/**
 * Probe the pixels: markers and intervals inked, the envelope tinted, and
 * every point far (> `clearance` px) from anything drawn left blank.
 */
function probe(pixels: Pixels, frame: FigureFrame, marks: ReturnType<typeof expectedMarks>, clearance: number): ProbeResult {
  const result: ProbeResult = { markers: 0, intervals: 0, envelope: 0, blank: 0, failures: [] };
  const markerRadius = 2.3 * (pixels.width / 255);
  for (const marker of marks.markers) {
    const dark = darkestNear(pixels, marker.x, marker.y, 1);
    if (dark < 90) result.markers++;
    else result.failures.push(`marker at (${marker.x.toFixed(0)}, ${marker.y.toFixed(0)}) has luma ${dark.toFixed(0)}`);
  }
  marks.intervals.forEach(([low, high], i) => {
    const centre = marks.markers[i];
    for (const end of [low, high]) {
      const length = Math.hypot(end.x - centre.x, end.y - centre.y);
      if (length < markerRadius + 12) continue;
      const along = { x: centre.x + (end.x - centre.x) * 0.8, y: centre.y + (end.y - centre.y) * 0.8 };
      const dark = darkestNear(pixels, along.x, along.y, 3);
      if (dark < 110) result.intervals++;
      else result.failures.push(`interval ${i} at (${along.x.toFixed(0)}, ${along.y.toFixed(0)}) has luma ${dark.toFixed(0)}`);
    }
  });
  const area = frame.plotArea;
  const step = Math.max(8, Math.round(pixels.width / 120));
  for (let y = area.top + 12; y < area.bottom - 12; y += step) {
    for (let x = area.left + 12; x < area.right - 12; x += step) {
      const point = { x, y };
      const near =
        Math.min(
          ...marks.markers.map((marker) => Math.hypot(marker.x - x, marker.y - y)),
          ...marks.intervals.map(([a, b]) => segmentDistance(point, a, b)),
          polylineDistance(point, marks.join),
          polylineDistance(point, marks.line),
          polylineDistance(point, marks.lower),
          polylineDistance(point, marks.upper),
        ) < clearance;
      if (near) continue;
      const pixel = pixels.at(x, y);
      if (insidePolygon(point, marks.envelope)) {
        const tinted = !isBlank(pixel) && pixel[2] > pixel[0] + 15 && luma(pixel) > 170;
        if (tinted) result.envelope++;
        else result.failures.push(`envelope at (${x}, ${y}) is ${pixel.slice(0, 3).join(',')}`);
      } else if (isBlank(pixel)) {
        result.blank++;
      } else {
        result.failures.push(`empty region at (${x}, ${y}) is inked ${pixel.slice(0, 3).join(',')}`);
      }
    }
  }
  return result;
}

async function checkFigure(name: string, figure: RenderedFigure, document: ReturnType<typeof ridgeDocument>, stratigraphic: boolean, model: 'random-walk' | 'stasis') {
  const pixels = await decodePng(figure.bytes);
  const marks = expectedMarks(document, figure.frame, stratigraphic, model);
  const result = probe(pixels, figure.frame, marks, Math.max(24, pixels.width / 70));
  if (result.failures.length > 0) {
    const path = keepChanged(name, figure.bytes);
    expect.fail(`${result.failures.length} probes failed (figure kept at ${path}); first: ${result.failures.slice(0, 5).join('; ')}`);
  }
  return result;
}

describe('trajectory figure (PNG)', () => {
  it('defaults: one journal column at 600 dpi, pHYs written, decodes, marks where the scales put them', async () => {
    const document = ridgeDocument({ best: 'random-walk' });
    const figure = renderTrajectory(document);
    expect(figure.mime).toBe('image/png');
    // 9 cm at 600 dpi = 9 / 2.54 × 600 = 2125.98 → 2126 px (closed form); the issue asks for at least 1600.
    expect(figure.width).toBe(2126);
    const info = pngInfo(figure.bytes);
    expect(info.width).toBe(2126);
    expect(info.height).toBe(figure.height);
    // pHYs stores pixels per metre: round(600 / 0.0254) = 23622 (PNG spec 11.3.5.3); read back as dpi.
    expect(info.dpiX).toBeCloseTo(23622 * 0.0254, 6);
    expect(info.dpiY).toBeCloseTo(23622 * 0.0254, 6);
    const pixels = await decodePng(figure.bytes);
    expect(pixels.width).toBe(2126);
    expect(pixels.height).toBe(figure.height);
    // Stratigraphic: the oldest horizon (10 Ma) below the youngest (6 Ma).
    expect(scalePixel(figure.frame, 'y', 10)).toBeGreaterThan(scalePixel(figure.frame, 'y', 6));
    const result = await checkFigure('trajectory-default', figure, document, true, 'random-walk');
    expect(result.markers).toBe(12);
    expect(result.intervals).toBeGreaterThan(12);
    expect(result.envelope).toBeGreaterThan(50);
    expect(result.blank).toBeGreaterThan(200);
  });

  it('horizontal orientation: oldest at the left; the stasis band θ ± 1.96√ω is tinted and the rest of the plot blank', async () => {
    const document = ridgeDocument({ best: 'stasis' });
    const figure = renderTrajectory(document, { orientation: 'horizontal', dpi: 300 });
    // 9 cm at 300 dpi: 1062.99 → 1063 px (closed form).
    expect(figure.width).toBe(1063);
    expect(pngInfo(figure.bytes).dpiX).toBeCloseTo(Math.round(300 / 0.0254) * 0.0254, 6);
    expect(scalePixel(figure.frame, 'x', 10)).toBeLessThan(scalePixel(figure.frame, 'x', 6));
    const result = await checkFigure('trajectory-horizontal', figure, document, false, 'stasis');
    expect(result.markers).toBe(12);
    expect(result.envelope).toBeGreaterThan(30);
    expect(result.blank).toBeGreaterThan(100);
  });

  it('draws the model asked for instead of the best one', async () => {
    const document = ridgeDocument({ best: 'random-walk' });
    const figure = renderTrajectory(document, { model: 'stasis', dpi: 200 });
    const result = await checkFigure('trajectory-chosen-model', figure, document, true, 'stasis');
    expect(result.envelope).toBeGreaterThan(20);
  });

  it('draws horizons with extrapolated ages as open markers (white centre, inked ring)', async () => {
    const document = ridgeDocument();
    document.data.extrapolated = document.data.extrapolated.map((_, i) => i === 11);
    const figure = renderTrajectory(document, { dpi: 300 });
    const pixels = await decodePng(figure.bytes);
    const x = scalePixel(figure.frame, 'x', document.data.mean[11]);
    const y = scalePixel(figure.frame, 'y', document.data.position[11]);
    // Marker radius 2.3 pt at 300 dpi ≈ 9.6 px: the centre is paper, the ring at about 9 px is ink.
    expect(luma(pixels.at(x, y))).toBeGreaterThan(200);
    const ring = Math.min(...[0, 1, 2, 3, 4, 5, 6, 7].map((k) => darkestNear(pixels, x + 9 * Math.cos((k * Math.PI) / 4), y + 9 * Math.sin((k * Math.PI) / 4), 1)));
    expect(ring).toBeLessThan(120);
    // A horizon whose age is not extrapolated stays filled.
    expect(darkestNear(pixels, scalePixel(figure.frame, 'x', document.data.mean[5]), scalePixel(figure.frame, 'y', document.data.position[5]), 0)).toBeLessThan(90);
  });

  it('renders deterministically: the same document and options give the same bytes', () => {
    const document = ridgeDocument();
    const first = renderTrajectory(document, { dpi: 150, smoothed: true });
    const second = renderTrajectory(document, { dpi: 150, smoothed: true });
    expect(Buffer.from(first.bytes).equals(Buffer.from(second.bytes))).toBe(true);
  });

  it('double-column width and the dpi option set the pixel size (18 cm at 300 dpi = 2126 px; 12 cm at 1200 dpi = 5669 px)', () => {
    const double = renderTrajectory(ridgeDocument(), { width: 'double', dpi: 300 });
    expect(pngInfo(double.bytes).width).toBe(Math.round((18 / 2.54) * 300));
    expect(double.widthCm).toBe(18);
    const custom = renderTrajectory(ridgeDocument(), { width: 12, dpi: 1200, orientation: 'horizontal' });
    const info = pngInfo(custom.bytes);
    expect(info.width).toBe(Math.round((12 / 2.54) * 1200));
    expect(info.dpiX).toBeCloseTo(Math.round(1200 / 0.0254) * 0.0254, 6);
  });

  it('refuses options out of range with a usage error', () => {
    expect(() => renderTrajectory(ridgeDocument(), { dpi: 20 })).toThrow(/dpi/);
    expect(() => renderTrajectory(ridgeDocument(), { width: 2 })).toThrow(/width/);
    expect(() => renderTrajectory(ridgeDocument(), { format: 'gif' as never })).toThrow(/format/);
    // A document without horizon data is refused where a fit.json is read (checkFitDocument; geometry.test.ts), not by the figures (issue 22).
  });

  it('draws a document made by lineageDocument from a real fit (the fit.json contract)', async () => {
    // Invented lineage for the contract check: elapsed time, means rising with noise, equal sampling variances.
    const time = [0, 0.4, 0.9, 1.3, 1.8, 2.2, 2.9, 3.3, 3.8, 4.5];
    const mean = [2.0, 2.1, 2.05, 2.3, 2.35, 2.3, 2.55, 2.6, 2.7, 2.75];
    const lineage = lineageFromArrays({ time, mean, samplingVariance: time.map(() => 0.004), count: time.map(() => 15), section: 'Contract Gap', trait: 'rib count' });
    const fit = fitLineage(lineage, classicModels, { intervals: false });
    const document = JSON.parse(JSON.stringify(lineageDocument(fit)));
    const figure = renderTrajectory(document, { dpi: 150 });
    const pixels = await decodePng(figure.bytes);
    // Elapsed time runs up the page: t = 0 at the bottom.
    expect(scalePixel(figure.frame, 'y', 0)).toBeGreaterThan(scalePixel(figure.frame, 'y', 4.5));
    mean.forEach((m, i) => {
      const x = scalePixel(figure.frame, 'x', m);
      const y = scalePixel(figure.frame, 'y', time[i]);
      expect(darkestNear(pixels, x, y, 1), `horizon ${i}`).toBeLessThan(90);
    });
  });
});
