import type { Chart, ChartConfiguration, Plugin } from 'chart.js';
import { measureText, type FigurePlan } from './chart-backend.js';
import { figureLineageName, type FigureLineage, type FigureModel } from './figure-input.js';
import { pointsPerCm, type ResolvedFigureOptions } from './figure-options.js';
import { drawTitleLines, font, wrapText } from './marks.js';
import { ink, lineWidth, supportInk, typeSize } from './style.js';
import { formatWeight } from './trajectory.js';

/**
 * The model-support figure: a typeset table of the models (K, logL, AICc,
 * ΔAICc) ranked by AICc, with the Akaike weight of each as a bar on a 0–1
 * scale (chart.js draws the bars and their scale; the table is set beside
 * them on the same rows). The best-supported model is marked; a model that
 * was not compared keeps its row, says so, and its reason is a footnote.
 */

const margin = 6;
const columnGap = 6;
const markerColumn = 8;
const bestMark = '▸';
const dagger = '†';

/**
 * A number with a true minus sign, fixed decimals, "—" when absent.
 *
 * @example
 * tableNumber(-0.5, 2); // '−0.50' (a true minus sign)
 * tableNumber(-0.0001, 2); // '0.00' (no minus on a rounded zero)
 * tableNumber(null, 2); // '—'
 */
export function tableNumber(value: number | null, decimals: number): string {
  if (value === null || !Number.isFinite(value)) return '—';
  const fixed = Math.abs(value).toFixed(decimals);
  const zero = Number(fixed) === 0;
  return value < 0 && !zero ? `−${fixed}` : fixed;
}

/**
 * Models in table order: compared ones by AICc (lowest first), then the others in their original order.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] });
 * const view = figureLineage(lineageDocument(fitLineage(lineage, [randomWalk, strictStasis], { intervals: false })));
 * supportRows(view).map((model) => model.id); // ['strict-stasis', 'random-walk'] (lowest AICc first)
 */
export function supportRows(lineage: FigureLineage): FigureModel[] {
  const compared = lineage.models.filter((model) => model.compared && model.aicc !== null).sort((a, b) => (a.aicc as number) - (b.aicc as number));
  const others = lineage.models.filter((model) => !(model.compared && model.aicc !== null));
  return [...compared, ...others];
}

/** A number column of the table. */
export type SupportColumn = 'k' | 'logL' | 'aicc' | 'delta';

const columnHeaders: Record<SupportColumn, string> = { k: 'K', logL: 'logL', aicc: 'AICc', delta: 'ΔAICc' };

/** One way of setting the table; the figure takes the first of `supportLayoutSteps` that fits its width. */
export interface TableSetting {
  /** Type size of the table in points. */
  readonly size: number;
  /** Decimals of logL, AICc and ΔAICc. */
  readonly decimals: number;
  /** Keep every gloss in parentheses (false: only where two models share a name). */
  readonly glosses: boolean;
  /** Wrap model names over several lines. */
  readonly wrapNames: boolean;
  /** Cut a word that is wider than the name column by itself (last resort). */
  readonly breakWords: boolean;
  /** Number columns shown, in order. */
  readonly columns: readonly SupportColumn[];
  /** Akaike weights as bars on a 0–1 scale (false: as a column of numbers). */
  readonly bars: boolean;
}

const allColumns: readonly SupportColumn[] = ['k', 'logL', 'aicc', 'delta'];

/**
 * The settings tried in order, from the full table down to the narrowest:
 * drop the glosses, wrap the model names, one decimal, 7 pt type, leave out
 * the logL column, then the AICc column, then K, show the weights as numbers
 * instead of bars, 6.5 pt then 6 pt type, and at last cut long words. ΔAICc, the model
 * names and the weights are always shown.
 */
export const supportLayoutSteps: readonly TableSetting[] = (() => {
  const steps: TableSetting[] = [];
  let step: TableSetting = { size: typeSize.table, decimals: 2, glosses: true, wrapNames: false, breakWords: false, columns: allColumns, bars: true };
  const push = (change: Partial<TableSetting>) => {
    step = { ...step, ...change };
    steps.push(step);
  };
  push({});
  push({ glosses: false });
  push({ wrapNames: true });
  push({ decimals: 1 });
  push({ size: 7 });
  push({ columns: ['k', 'aicc', 'delta'] });
  push({ columns: ['k', 'delta'] });
  push({ columns: ['delta'] });
  push({ bars: false });
  push({ size: typeSize.note });
  // 6 pt: the smallest type journals commonly accept in figures (common practice).
  push({ size: 6 });
  push({ breakWords: true });
  return steps;
})();

interface Cell {
  readonly lines: readonly string[];
  /** The gloss in parentheses, on lines of its own in smaller type (kept whenever two models share a name). */
  readonly glossLines: readonly string[];
}

function splitLabel(label: string): { name: string; gloss: string | null } {
  const cut = label.indexOf(' (');
  return cut > 0 ? { name: label.slice(0, cut), gloss: label.slice(cut + 1) } : { name: label, gloss: null };
}

/** Header of the weights: in full when it fits over its column, else shortened. */
const weightHeaders = ['Akaike weight', 'weight', 'w'];

/** A laid-out table: the setting chosen and the widths it needs. */
interface TableLayout {
  readonly setting: TableSetting;
  readonly cells: readonly Cell[];
  readonly nameWidth: number;
  readonly numberWidths: readonly number[];
  /** Width of the marker, name and number columns with their gaps (the weights come after). */
  readonly tableWidth: number;
  /** Width of the weight column when weights are numbers (0 with bars). */
  readonly weightWidth: number;
}

/**
 * Plan the model-support figure of one lineage.
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] });
 * const view = figureLineage(lineageDocument(fitLineage(lineage, [strictStasis, randomWalk], { intervals: false })));
 * const plan = modelSupportPlan(view, resolveFigureOptions({}));
 * plan.title; // 'A / length: model support'
 * plan.rowCentres.length; // 2 (one row per model)
 */
export function modelSupportPlan(lineage: FigureLineage, options: ResolvedFigureOptions): FigurePlan & { readonly rowCentres: readonly number[]; readonly setting: TableSetting } {
  const rows = supportRows(lineage);
  const widthPoints = options.widthCm * pointsPerCm;
  const inner = widthPoints - 2 * margin;
  const compared = (model: FigureModel) => model.compared && model.aicc !== null;
  const numberText = (model: FigureModel, column: SupportColumn, decimals: number) =>
    column === 'k' ? (model.k === null ? '—' : String(model.k)) : tableNumber(column === 'logL' ? model.logLik : column === 'aicc' ? model.aicc : model.deltaAicc, decimals);
  const names = rows.map((model) => splitLabel(model.label).name);
  // Bars need room for the scale and a weight label beside or inside every bar.
  const barMinimum = Math.max(60, inner * 0.3);
  const layout = (setting: TableSetting): { fits: boolean; table: TableLayout } => {
    const measureName = (text: string) => measureText(font(setting.size, 'bold'), text);
    // Headers and the best model's row are bold.
    const measureNumber = (text: string, bold: boolean) => measureText(font(setting.size, bold ? 'bold' : 'normal'), text);
    const measureGloss = (text: string) => measureText(font(setting.size - 1), text);
    const isBest = (model: FigureModel) => model.id === lineage.bestModel;
    const numberWidths = setting.columns.map((column) =>
      Math.max(measureNumber(columnHeaders[column], true), ...rows.map((model) => measureNumber(numberText(model, column, setting.decimals), isBest(model)))),
    );
    const weightWidth = setting.bars ? 0 : Math.max(measureNumber(weightHeaders[1], true), ...rows.map((model) => measureNumber(compared(model) ? formatWeight(model.weight) : '—', isBest(model))));
    const fixed = markerColumn + numberWidths.reduce((sum, width) => sum + width + columnGap, 0) + columnGap;
    const weightPart = setting.bars ? barMinimum : weightWidth;
    // Not-compared models carry a dagger after their name: it is wrapped with the name.
    const texts = rows.map((model, i) => (compared(model) ? names[i] : `${names[i]} ${dagger}`));
    const longestWord = Math.max(...texts.flatMap((text) => text.replace(/–/g, '– ').split(/\s+/).map(measureName)));
    const room = inner - fixed - weightPart;
    const nameWidth0 = !setting.wrapNames
      ? Math.max(...texts.map(measureName), measureName('Model'))
      : setting.breakWords
        ? Math.max(room, measureName('Model'))
        : Math.max(longestWord, measureName('Model'), inner * 0.27);
    const cells: Cell[] = rows.map((model, i) => {
      const { gloss } = splitLabel(model.label);
      const lines = setting.wrapNames
        ? wrapText(texts[i].replace(/–/g, '– '), nameWidth0, measureName, { breakWords: setting.breakWords }).map((line) => line.replace(/– /g, '–'))
        : [texts[i]];
      const keepGloss = gloss !== null && (setting.glosses || names.filter((other) => other === names[i]).length > 1);
      const glossLines = !keepGloss ? [] : setting.wrapNames ? wrapText(gloss, nameWidth0, measureGloss, { breakWords: setting.breakWords }) : [gloss];
      return { lines, glossLines };
    });
    const glossWidth = Math.max(0, ...cells.flatMap((cell) => cell.glossLines.map(measureGloss)));
    const lineWidthMax = Math.max(0, ...cells.flatMap((cell) => cell.lines.map(measureName)));
    const nameWidth = Math.max(setting.wrapNames ? Math.min(nameWidth0, Math.max(lineWidthMax, measureName('Model'))) : nameWidth0, glossWidth);
    const tableWidth = fixed + nameWidth;
    return { fits: tableWidth + weightPart <= inner + 1e-9, table: { setting, cells, nameWidth, numberWidths, tableWidth, weightWidth } };
  };
  let chosen: TableLayout | null = null;
  for (const setting of supportLayoutSteps) {
    const attempt = layout(setting);
    chosen = attempt.table;
    if (attempt.fits) break;
  }
  const { setting, cells, nameWidth, numberWidths, tableWidth, weightWidth } = chosen!;
  const table = rows.map((model) => setting.columns.map((column) => numberText(model, column, setting.decimals)));
  const headers = setting.columns.map((column) => columnHeaders[column]);
  const lineHeight = setting.size * 1.22;
  const glossSize = setting.size - 1;
  // Rows are as tall as their own text, so one long model name does not space out the whole table.
  const rowHeights = cells.map((cell) => (cell.lines.length + cell.glossLines.length) * lineHeight + 5);
  const centres: number[] = [];
  rowHeights.reduce((top, height) => {
    centres.push(top + height / 2);
    return top + height;
  }, 0);
  const rowsHeight = rowHeights.reduce((sum, height) => sum + height, 0);

  const show = options.show;
  const title = figureLineageName(lineage);
  const titleLines = show.title ? wrapText(title, inner, (text) => measureText(font(typeSize.title, 'bold'), text), { breakWords: true }) : [];
  const subtitle = show.subtitle
    ? wrapText(`Model support by AICc, N = ${lineage.time.length} horizons. ${bestMark} best supported.`, inner, (text) => measureText(font(typeSize.subtitle), text), { breakWords: true })
    : [];
  const notes: string[] = [];
  if (show.notes) {
    rows.forEach((model) => {
      if (!compared(model)) notes.push(`${dagger} ${splitLabel(model.label).name}: ${model.notComparedReason ?? 'not compared'}.`);
    });
    notes.push(
      'Weights compare only the models listed. Support depends on sampling, time-averaging and the age model, and a good fit to a random walk does not by itself tell drift from selection; weigh it with the specialist’s judgement.',
    );
  }
  const noteLines = notes.flatMap((note) => wrapText(note, inner, (text) => measureText(font(typeSize.note), text), { breakWords: true }));
  const titleHeight = titleLines.length * typeSize.title * 1.3;
  const subtitleHeight = subtitle.length * typeSize.subtitle * 1.3;
  const headerHeight = setting.size * 1.25 + 6;
  const top = margin + titleHeight + subtitleHeight + (titleLines.length + subtitle.length > 0 ? 4 : 0) + headerHeight;
  // Bars have their 0–1 scale under them; numbers need only a little space below the last rule.
  const axisHeight = setting.bars ? typeSize.tick * 1.3 + 6 : 4;
  const notesHeight = noteLines.length > 0 ? noteLines.length * typeSize.note * 1.3 + 6 : 0;
  const heightPoints = Math.round(top + rowsHeight + axisHeight + notesHeight + margin);
  const barLeft = margin + tableWidth + (setting.bars ? 4 : 0);
  // The weight header in full when it fits over the bars (or the column of numbers), else shortened.
  const weightRoom = setting.bars ? widthPoints - barLeft - margin - 2 : weightWidth;
  const weightHeader = weightHeaders.find((header) => measureText(font(setting.size, 'bold'), header) <= weightRoom) ?? weightHeaders[weightHeaders.length - 1];

  const plugin: Plugin<'bar'> = {
    id: 'stratotrendSupportTable',
    beforeDatasetsDraw(chart) {
      const context = chart.ctx;
      const area = chart.chartArea;
      const y = chart.scales.y;
      context.save();
      const stretch = (area.bottom - area.top) / rowsHeight;
      rows.forEach((model, i) => {
        const centre = y.getPixelForValue(centres[i]);
        if (model.id === lineage.bestModel) {
          context.fillStyle = '#f1f4f8';
          context.fillRect(margin, centre - (rowHeights[i] * stretch) / 2, area.right - margin, rowHeights[i] * stretch);
        }
        if (setting.bars) {
          context.fillStyle = supportInk.track;
          context.fillRect(area.left, centre - 3, area.right - area.left, 6);
        }
      });
      context.restore();
    },
    afterDraw(chart) {
      drawTable(chart);
    },
  };

  const drawTable = (chart: Chart) => {
    const context = chart.ctx;
    const area = chart.chartArea;
    const y = chart.scales.y;
    const x = chart.scales.x;
    drawTitleLines(context, titleLines, subtitle, margin, margin);
    context.save();
    context.textBaseline = 'alphabetic';
    // Rules of a typeset table: above the header, below it, and below the last row.
    const headerTop = area.top - headerHeight;
    const rule = (atY: number, width: number) => {
      context.strokeStyle = supportInk.rule;
      context.lineWidth = width;
      context.beginPath();
      context.moveTo(margin, atY);
      context.lineTo(area.right, atY);
      context.stroke();
    };
    rule(headerTop, lineWidth.rule * 1.4);
    rule(area.top, lineWidth.rule);
    rule(area.bottom, lineWidth.rule * 1.4);
    const headerBaseline = area.top - 4;
    context.fillStyle = ink.text;
    context.font = font(setting.size, 'bold');
    context.textAlign = 'left';
    context.fillText('Model', margin + markerColumn, headerBaseline);
    let right = margin + markerColumn + nameWidth + columnGap;
    const columnRights: number[] = [];
    numberWidths.forEach((width, c) => {
      right += width;
      columnRights.push(right);
      context.textAlign = 'right';
      context.fillText(headers[c], right, headerBaseline);
      right += columnGap;
    });
    if (setting.bars) {
      context.textAlign = 'center';
      context.fillText(weightHeader, (area.left + area.right) / 2, headerBaseline);
    } else {
      context.textAlign = 'right';
      context.fillText(weightHeader, area.right, headerBaseline);
    }
    rows.forEach((model, i) => {
      const centre = y.getPixelForValue(centres[i]);
      const isCompared = compared(model);
      const best = model.id === lineage.bestModel;
      const cell = cells[i];
      const lines = cell.lines.length + cell.glossLines.length;
      const firstBaseline = centre - (lines * lineHeight) / 2 + setting.size * 0.92;
      context.fillStyle = isCompared ? ink.text : ink.muted;
      context.textAlign = 'left';
      if (best) {
        context.font = font(setting.size, 'bold');
        context.fillText(bestMark, margin, firstBaseline);
      }
      context.font = font(setting.size, best ? 'bold' : 'normal', isCompared ? 'normal' : 'italic');
      cell.lines.forEach((line, k) => context.fillText(line, margin + markerColumn, firstBaseline + k * lineHeight));
      context.font = font(glossSize);
      context.fillStyle = ink.muted;
      cell.glossLines.forEach((line, k) => context.fillText(line, margin + markerColumn, firstBaseline + (cell.lines.length + k) * lineHeight));
      context.fillStyle = isCompared ? ink.text : ink.muted;
      const numberFont = font(setting.size, best ? 'bold' : 'normal');
      context.font = numberFont;
      context.textAlign = 'right';
      const numberBaseline = centre + setting.size * 0.35;
      table[i].forEach((value, c) => context.fillText(value, columnRights[c], numberBaseline));
      if (!setting.bars) {
        context.fillText(isCompared ? formatWeight(model.weight) : '—', area.right, numberBaseline);
        return;
      }
      context.textAlign = 'left';
      if (!isCompared) {
        context.font = font(setting.size, 'normal', 'italic');
        context.fillText('not compared', area.left + 3, numberBaseline);
      } else {
        const end = x.getPixelForValue(model.weight ?? 0);
        const text = formatWeight(model.weight);
        const width = measureText(numberFont, text);
        // Beside the bar when there is room, else inside it in paper colour.
        const inside = end + 3 + width > area.right;
        context.fillStyle = inside ? ink.background : ink.text;
        context.textAlign = inside ? 'right' : 'left';
        context.fillText(text, inside ? end - 3 : end + 3, numberBaseline);
      }
    });
    context.font = font(typeSize.note);
    context.fillStyle = ink.muted;
    context.textAlign = 'left';
    const notesTop = area.bottom + axisHeight + 4;
    noteLines.forEach((line, k) => context.fillText(line, margin, notesTop + typeSize.note * (1.3 * k + 1)));
    context.restore();
  };

  const configuration = (): ChartConfiguration => ({
    type: 'bar',
    data: {
      datasets: [
        {
          label: 'Akaike weight',
          data: rows.map((model, i) => ({ x: setting.bars && compared(model) ? (model.weight ?? 0) : Number.NaN, y: centres[i] })),
          backgroundColor: rows.map((model) => (model.id === lineage.bestModel ? supportInk.bestBar : supportInk.bar)),
          borderWidth: 0,
          barThickness: Math.min(9, lineHeight * 0.9),
        },
      ],
    },
    options: {
      indexAxis: 'y',
      locale: 'en-US',
      // Without bars the plot area is the column of weights (right-aligned at its right edge) and the scale is hidden.
      layout: { padding: { left: barLeft, right: setting.bars ? margin + 2 : margin, top, bottom: notesHeight + margin + (setting.bars ? 0 : axisHeight) } },
      scales: {
        x: {
          type: 'linear',
          display: setting.bars,
          min: 0,
          max: 1,
          ticks: { stepSize: 0.25, color: ink.text, font: { size: typeSize.tick }, padding: 2, maxRotation: 0, autoSkip: false, callback: (value) => (Number(value) === 0.5 ? '0.5' : Number(value) === 0 || Number(value) === 1 ? String(value) : '') },
          grid: { color: ink.grid, lineWidth: lineWidth.grid, tickLength: 3, tickColor: ink.axis },
          border: { display: false },
        },
        // Rows sit at their centres in points from the top of the table (first row at the top).
        y: { type: 'linear', display: false, reverse: true, min: 0, max: rowsHeight, offset: false, grid: { display: false } },
      },
      plugins: { legend: { display: false }, tooltip: { enabled: false }, title: { display: false } },
    },
    plugins: [plugin as Plugin],
  });
  return { widthPoints, heightPoints, title: `${title}: model support`, configuration, rowCentres: centres, setting };
}
