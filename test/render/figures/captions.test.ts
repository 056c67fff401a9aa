/**
 * Figures for a journal that sets its own captions: `leaveOut` drops the
 * title, subtitle and notes (and their height, so the plot keeps its size),
 * and `traitTitle` replaces the trait axis title. Checked on the strings the
 * figure actually draws (drawn-text.ts) and on the plot area it reports.
 */
import { describe, expect, it } from 'vitest';
import { parseLeaveOut } from '../../../src/analyses/figure-files.js';
import { InputError } from '../../../src/data/errors.js';
import { figureLineage } from '../../../src/render/figures/figure-input.js';
import { resolveFigureOptions, type FigureOptions } from '../../../src/render/figures/figure-options.js';
import { renderTrajectory } from '../../../src/render/figures/index.js';
import { styledWords } from '../../../src/render/figures/marks.js';
import { smallMultiplesPlan } from '../../../src/render/figures/small-multiples.js';
import { trajectoryPlan } from '../../../src/render/figures/trajectory.js';
import { ridgeDocument } from './documents.js';
import { recordDrawnText, textProblems } from './drawn-text.js';

function drawnStrings(options: FigureOptions, together = false) {
  const documents = together ? [ridgeDocument({ section: 'Test Ridge' }), ridgeDocument({ section: 'Fern Hollow', offset: 0.5, ageShift: -0.3 })] : [ridgeDocument()];
  const lineages = documents.map((document) => figureLineage(document));
  const resolved = resolveFigureOptions(options);
  return recordDrawnText(trajectoryPlan(lineages, resolved, together), resolved);
}

describe('captions left out and the trait axis title', () => {
  for (const together of [false, true]) {
    it(`${together ? 'sections figure' : 'trajectory'}: leaving out title and subtitle draws neither and keeps the plot's height`, () => {
      const full = drawnStrings({ width: 9 }, together);
      const bare = drawnStrings({ width: 9, leaveOut: ['title', 'subtitle', 'notes'] }, together);
      const text = (drawn: typeof full) => drawn.texts.map((item) => item.text).join(' | ');
      const title = together ? 'Valve width: 2 sections' : 'Test Ridge / valve width';
      expect(text(full)).toContain(title);
      expect(text(full)).toContain(together ? 'Bars: 95% sampling intervals' : 'best-supported model');
      expect(text(bare)).not.toContain(title);
      expect(text(bare)).not.toContain('Bars: 95%');
      expect(text(bare)).not.toContain('best-supported model');
      // The legend and the axes stay.
      expect(text(bare)).toContain('Age (Ma)');
      expect(bare.height).toBeLessThan(full.height);
      expect(textProblems(bare, 3)).toEqual([]);
    });
  }

  it('the plot area is as tall without the captions as with them (within 3 pt: with nothing above it, the top tick label needs half its height of room)', () => {
    const plot = (options: FigureOptions) => {
      const area = renderTrajectory(ridgeDocument(), { ...options, format: 'svg' }).frame.plotArea;
      return area.bottom - area.top;
    };
    expect(Math.abs(plot({ leaveOut: ['title', 'subtitle'] }) - plot({}))).toBeLessThan(3);
    expect(Math.abs(plot({ leaveOut: ['title'] }) - plot({}))).toBeLessThan(1);
    expect(Math.abs(plot({ leaveOut: ['subtitle'] }) - plot({}))).toBeLessThan(1);
  });

  it('--trait-title replaces the trait axis title in both orientations', () => {
    for (const orientation of ['stratigraphic', 'horizontal'] as const) {
      const drawn = drawnStrings({ width: 9, orientation, traitTitle: 'Valve width of the invented brachiopod (mm)' });
      const strings = drawn.texts.map((item) => item.text);
      expect(strings).toContain('Valve width of the invented brachiopod (mm)');
      expect(strings.join(' ')).not.toContain('mean per horizon');
    }
  });

  it('asterisks in the trait title mark italics (taxon names): those words are drawn in italic type, the rest upright, no asterisk drawn', () => {
    const title = 'Valve width of *Inventa fictiva* (mm)';
    for (const orientation of ['stratigraphic', 'horizontal'] as const) {
      for (const width of [4, 9]) {
        const drawn = drawnStrings({ width, orientation, traitTitle: title });
        const italic = drawn.texts.filter((text) => text.font.startsWith('italic'));
        expect(italic.map((text) => text.text).join(' ')).toBe('Inventa fictiva');
        const all = drawn.texts.map((text) => text.text).join(' ');
        expect(all).not.toContain('*');
        expect(all).toContain('Valve width of');
        expect(all).toContain('(mm)');
        expect(textProblems(drawn, 3), `${orientation} ${width} cm`).toEqual([]);
      }
    }
    // Sections drawn as small multiples carry the italics too.
    const many = Array.from({ length: 7 }, (_, s) => ridgeDocument({ section: `Invented Gully ${s + 1}`, offset: 0.1 * s }));
    const lineages = many.map((document) => figureLineage(document));
    const resolved = resolveFigureOptions({ traitTitle: title });
    const drawn = recordDrawnText(smallMultiplesPlan(lineages, resolved), resolved);
    expect(drawn.texts.filter((text) => text.font.startsWith('italic')).map((text) => text.text)).toEqual(['Inventa fictiva']);
  });

  it('styledWords: italic words between asterisks, a slant change inside a word glued, an unpaired asterisk kept', () => {
    expect(styledWords('*Aus bus* length')).toEqual([{ text: 'Aus', italic: true }, { text: 'bus', italic: true }, { text: 'length', italic: false }]);
    expect(styledWords('*Aus*-like width')).toEqual([{ text: 'Aus', italic: true }, { text: '-like', italic: false, glued: true }, { text: 'width', italic: false }]);
    expect(styledWords('width * 2')).toEqual([{ text: 'width', italic: false }, { text: '*', italic: false }, { text: '2', italic: false }]);
  });

  it('parses --leave-out and refuses an unknown part as a usage error', () => {
    expect(parseLeaveOut('notes, title')).toEqual(['title', 'notes']);
    expect(parseLeaveOut('captions')).toEqual(['title', 'subtitle', 'notes']);
    expect(() => parseLeaveOut('legend')).toThrow(InputError);
    expect(() => parseLeaveOut('legend')).toThrow(/unknown part "legend"/);
    expect(() => resolveFigureOptions({ leaveOut: ['legend' as never] })).toThrow(/leave out/);
  });
});
