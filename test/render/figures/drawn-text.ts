/**
 * Shared by the figure-width tests: record every string the figure draws
 * (chart.js's own labels and ours) with the box it covers on the page,
 * measured by the drawing engine itself at the moment of drawing (the
 * context's font, alignment, baseline and transform), in points.
 */
import type { Chart, Plugin } from 'chart.js';
import { drawFigure } from '../../../src/render/figures/chart-backend.js';

/** One drawn string and the box it covers, in points from the page's top-left corner. */
export interface DrawnText {
  readonly text: string;
  readonly font: string;
  readonly left: number;
  readonly right: number;
  readonly top: number;
  readonly bottom: number;
}

/** Draw a plan as SVG (drawn in points, so page units are points) and return every string drawn and the page size. */
export function recordDrawnText(plan: Parameters<typeof drawFigure>[0], resolved: Parameters<typeof drawFigure>[1]): { texts: DrawnText[]; width: number; height: number } {
  const texts: DrawnText[] = [];
  const recorder: Plugin = {
    id: 'textRecorder',
    beforeInit(chart: Chart) {
      const context = chart.ctx;
      const original = context.fillText.bind(context);
      context.fillText = (text: string, x: number, y: number, maxWidth?: number) => {
        const metrics = context.measureText(text);
        const matrix = context.getTransform();
        const align = context.textAlign;
        const width = maxWidth === undefined ? metrics.width : Math.min(metrics.width, maxWidth);
        const start = align === 'right' || align === 'end' ? x - width : align === 'center' ? x - width / 2 : x;
        const pageX = (at: number) => matrix.a * at + matrix.c * y + matrix.e;
        const pageY = (at: number) => matrix.b * x + matrix.d * at + matrix.f;
        if (String(text).trim() !== '') {
          texts.push({ text: String(text), font: context.font, left: pageX(start), right: pageX(start + width), top: pageY(y - metrics.actualBoundingBoxAscent), bottom: pageY(y + metrics.actualBoundingBoxDescent) });
        }
        original(text, x, y, maxWidth);
      };
    },
  };
  const configuration = () => {
    const base = plan.configuration();
    return { ...base, plugins: [...(base.plugins ?? []), recorder] };
  };
  const figure = drawFigure({ ...plan, configuration }, { ...resolved, format: 'svg' });
  return { texts, width: figure.width, height: figure.height };
}

/** What is wrong with the drawn text: strings outside [inset, page − inset] or overlapping another by more than `slack` points each way. */
export function textProblems(drawn: { texts: readonly DrawnText[]; width: number; height: number }, inset: number, slack = 0.25): string[] {
  const problems: string[] = [];
  for (const text of drawn.texts) {
    if (text.left < inset - 1e-6 || text.right > drawn.width - inset + 1e-6) problems.push(`"${text.text}" spans ${text.left.toFixed(2)}–${text.right.toFixed(2)} pt across a page of ${drawn.width} pt`);
    if (text.top < 0 || text.bottom > drawn.height) problems.push(`"${text.text}" spans ${text.top.toFixed(2)}–${text.bottom.toFixed(2)} pt down a page of ${drawn.height} pt`);
  }
  drawn.texts.forEach((a, i) => {
    drawn.texts.slice(i + 1).forEach((b) => {
      const across = Math.min(a.right, b.right) - Math.max(a.left, b.left);
      const down = Math.min(a.bottom, b.bottom) - Math.max(a.top, b.top);
      if (across > slack && down > slack) problems.push(`"${a.text}" and "${b.text}" overlap by ${across.toFixed(2)} × ${down.toFixed(2)} pt`);
    });
  });
  return problems;
}
