/**
 * SVG text a vector editor can edit: every drawn string is one `<text>`
 * element with its whole string, placed by one x and one y (SVG 1.1 §10.4:
 * x and y may be lists, one value per glyph, which editors show as loose
 * glyphs; a single value places the string's start), and there are no empty
 * `<text>` elements. The strings expected are the ones the figure draws,
 * recorded as drawn (drawn-text.ts).
 */
import { describe, expect, it } from 'vitest';
import { wholeTextElements } from '../../../src/render/figures/chart-backend.js';
import { figureLineage } from '../../../src/render/figures/figure-input.js';
import { resolveFigureOptions } from '../../../src/render/figures/figure-options.js';
import { renderModelSupport, renderSectionsTogether, renderTrajectory } from '../../../src/render/figures/index.js';
import { modelSupportPlan } from '../../../src/render/figures/model-support.js';
import { trajectoryPlan } from '../../../src/render/figures/trajectory.js';
import { ridgeDocument } from './documents.js';
import { recordDrawnText } from './drawn-text.js';
import { svgText } from './figure-probes.js';

function textElements(svg: string): { x: string; y: string; text: string }[] {
  return [...svg.matchAll(/<text\b([^>]*)>([^<]*)<\/text>/g)].map((match) => ({
    x: /\sx="([^"]*)"/.exec(match[1])?.[1] ?? '',
    y: /\sy="([^"]*)"/.exec(match[1])?.[1] ?? '',
    text: match[2].replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&quot;/g, '"').replace(/&apos;/g, "'").replace(/&amp;/g, '&'),
  }));
}

describe('SVG text as whole strings', () => {
  const sections = [ridgeDocument({ section: 'Test Ridge' }), ridgeDocument({ section: 'Fern Hollow', offset: 0.5, ageShift: -0.3 })];
  const cases = [
    { name: 'trajectory', svg: () => renderTrajectory(sections[0], { format: 'svg', smoothed: true }), plan: () => trajectoryPlan([figureLineage(sections[0])], resolveFigureOptions({ smoothed: true }), false) },
    { name: 'sections', svg: () => renderSectionsTogether(sections, { format: 'svg' }), plan: () => trajectoryPlan(sections.map((d) => figureLineage(d)), resolveFigureOptions({}), true) },
    { name: 'model support', svg: () => renderModelSupport(sections[0], { format: 'svg' }), plan: () => modelSupportPlan(figureLineage(sections[0]), resolveFigureOptions({})) },
  ];
  for (const { name, svg, plan } of cases) {
    it(`${name}: one element per drawn string, placed by one x and one y, none empty`, () => {
      const file = new TextDecoder().decode(svg().bytes);
      svgText(file); // well-formed
      const elements = textElements(file);
      const number = /^-?\d+(\.\d+)?(e-?\d+)?$/;
      for (const element of elements) {
        expect(element.text.trim(), JSON.stringify(element)).not.toBe('');
        expect(element.x, element.text).toMatch(number);
        expect(element.y, element.text).toMatch(number);
      }
      const drawn = recordDrawnText(plan(), resolveFigureOptions({})).texts.map((item) => item.text);
      expect(elements.map((element) => element.text).sort()).toEqual([...drawn].sort());
    });
  }

  it('joins only the words of one string: separate strings side by side on one baseline stay apart', () => {
    const a = '<text fill="#000" x="1, 5, " y="9, ">ab</text><text fill="#000" x="" y=""></text><text fill="#000" x="14, " y="9, ">c</text>';
    expect(wholeTextElements(a)).toBe('<text fill="#000" x="1" y="9">ab c</text>');
    // Two numbers of one table row: same look, same baseline, no space element between them.
    const b = '<text fill="#000" x="10, " y="9, ">3</text><text fill="#000" x="20, 25, " y="9, ">−3</text>';
    expect(wholeTextElements(b)).toBe('<text fill="#000" x="10" y="9">3</text><text fill="#000" x="20" y="9">−3</text>');
    // A different look after a space element starts a new string.
    const c = '<text fill="#000" x="1, " y="9, ">a</text><text fill="#000" x="" y=""></text><text fill="#fff" x="9, " y="9, ">b</text>';
    expect(wholeTextElements(c)).toBe('<text fill="#000" x="1" y="9">a</text><text fill="#fff" x="9" y="9">b</text>');
    // A ligature glyph reads as its letters (Unicode U+FB01 is "fi").
    expect(wholeTextElements('<text x="1, " y="2, ">a \uFB01t</text>')).toBe('<text x="1" y="2">a fit</text>');
    // Other elements pass through untouched.
    expect(wholeTextElements('<svg><path d="M0 0"/></svg>')).toBe('<svg><path d="M0 0"/></svg>');
  });
});
