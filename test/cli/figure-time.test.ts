/**
 * Issue 24: drawing figures for very many lineages is announced, with a
 * rough time and how to draw fewer, before it starts. The per-figure cost is
 * our own measurement (see secondsPerFigure); the checks here are that the
 * warning follows the stated formula and threshold, not a timing.
 */
import { describe, expect, it } from 'vitest';
import { figureTimeWarning, longDrawingSeconds, planFigureFiles, secondsPerFigure } from '../../src/analyses/figure-files.js';
import { durationWords } from '../../src/analyses/run-cost.js';

/** Invented lineage documents: only the names matter for the plan. */
const documents = (count: number) => Array.from({ length: count }, (_, i) => ({ section: `Ridge ${i + 1}`, trait: 'width', models: [] }));

describe('figureTimeWarning', () => {
  it('a 20,000-lineage file at the default options: 40,001 figures, hours, and the way round', () => {
    const plan = planFigureFiles(documents(20_000), {});
    // Two figures per lineage plus one sections figure for the one trait.
    expect(plan.names).toHaveLength(40_001);
    const warning = figureTimeWarning(plan, 'to skip them, run with --no-figures');
    expect(warning).toBe(`drawing 40,001 figure files will take roughly ${durationWords(40_001 * secondsPerFigure(plan.request))} (an estimate); to skip them, run with --no-figures`);
    // 0.75 s per PNG at 9 cm, 600 dpi (the stated measurement): 40,001 × 0.75 s ≈ 8 hours.
    expect(secondsPerFigure(plan.request)).toBeCloseTo(0.75, 12);
    expect(warning).toContain('roughly 8 hours');
  });

  it('nothing for a few lineages, and the estimate follows format, width and dpi', () => {
    expect(figureTimeWarning(planFigureFiles(documents(20), {}), 'x')).toBeNull();
    const many = planFigureFiles(documents(100), {});
    // 201 figures × 0.75 s = 150.75 s, above the 120 s threshold; as SVG 201 × 0.25 s = 50.25 s, below it.
    expect(many.jobs.length * secondsPerFigure(many.request)).toBeGreaterThan(longDrawingSeconds);
    expect(figureTimeWarning(many, 'x')).not.toBeNull();
    // Pixel count: 18 cm at 600 dpi has four times the pixels of 9 cm (0.1 + 0.65 × 4); SVG is 0.25 s whatever the size.
    expect(secondsPerFigure(planFigureFiles(documents(1), { figureWidth: 'double' }).request)).toBeCloseTo(0.1 + 0.65 * 4, 12);
    expect(secondsPerFigure(planFigureFiles(documents(1), { figureFormat: 'svg' }).request)).toBe(0.25);
    expect(figureTimeWarning(planFigureFiles(documents(100), { figureFormat: 'svg' }), 'x')).toBeNull();
  });
});
