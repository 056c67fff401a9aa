import type { Chart, ChartConfiguration, Plugin } from 'chart.js';
import { measureText, type FigurePlan } from './chart-backend.js';
import { figureLineageName, type FigureLineage, type FigureModel } from './figure-input.js';
import { pointsPerCm, type ResolvedFigureOptions } from './figure-options.js';
import { font, wrapText } from './marks.js';
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

/** A number with a true minus sign, fixed decimals, "—" when absent. */
export function tableNumber(value: number | null, decimals: number): string {
  if (value === null || !Number.isFinite(value)) return '—';
  const fixed = Math.abs(value).toFixed(decimals);
  const zero = Number(fixed) === 0;
  return value < 0 && !zero ? `−${fixed}` : fixed;
}

/** Models in table order: compared ones by AICc (lowest first), then the others in their original order. */
export function supportRows(lineage: FigureLineage): FigureModel[] {
  const compared = lineage.models.filter((model) => model.compared && model.aicc !== null).sort((a, b) => (a.aicc as number) - (b.aicc as number));
  const others = lineage.models.filter((model) => !(model.compared && model.aicc !== null));
  return [...compared, ...others];
}

interface TableSetting {
  readonly size: number;
  readonly decimals: number;
  readonly glosses: boolean;
  readonly wrapNames: boolean;
}

interface Cell {
  readonly lines: readonly string[];
  /** The gloss in parentheses, on lines of its own in smaller type (kept whenever two models share a name). */
  readonly glossLines: readonly string[];
}

function splitLabel(label: string): { name: string; gloss: string | null } {
  const cut = label.indexOf(' (');
  return cut > 0 ? { name: label.slice(0, cut), gloss: label.slice(cut + 1) } : { name: label, gloss: null };
}

/** Plan the model-support figure of one lineage. */
export function modelSupportPlan(lineage: FigureLineage, options: ResolvedFigureOptions): FigurePlan & { readonly rowCentres: readonly number[] } {
  const rows = supportRows(lineage);
  const widthPoints = options.widthCm * pointsPerCm;
  const inner = widthPoints - 2 * margin;
  const numbers = (setting: TableSetting) =>
    rows.map((model) => [
      model.k === null ? '—' : String(model.k),
      tableNumber(model.logLik, setting.decimals),
      tableNumber(model.aicc, setting.decimals),
      tableNumber(model.deltaAicc, setting.decimals),
    ]);
  const headers = ['K', 'logL', 'AICc', 'ΔAICc'];
  const settings: TableSetting[] = [
    { size: typeSize.table, decimals: 2, glosses: true, wrapNames: false },
    { size: typeSize.table, decimals: 2, glosses: false, wrapNames: false },
    { size: typeSize.table, decimals: 2, glosses: false, wrapNames: true },
    { size: typeSize.table, decimals: 1, glosses: false, wrapNames: true },
    { size: 7, decimals: 1, glosses: false, wrapNames: true },
  ];
  let chosen: { setting: TableSetting; cells: Cell[]; nameWidth: number; numberWidths: number[]; tableWidth: number } | null = null;
  for (const setting of settings) {
    const measureName = (text: string) => measureText(font(setting.size, 'bold'), text);
    const measureNumber = (text: string) => measureText(font(setting.size), text);
    const longestWord = Math.max(...rows.flatMap((model) => splitLabel(model.label).name.split(/[\s]+|(?<=–)/).map(measureName)));
    const nameWidth0 = setting.wrapNames ? Math.max(longestWord, inner * 0.27) : Math.max(...rows.map((model) => measureName(splitLabel(model.label).name)), measureName('Model'));
    const names = rows.map((model) => splitLabel(model.label).name);
    const measureGloss = (text: string) => measureText(font(setting.size - 1), text);
    const cells: Cell[] = rows.map((model, i) => {
      const { name, gloss } = splitLabel(model.label);
      const lines = setting.wrapNames ? wrapText(name.replace(/–/g, '– '), nameWidth0, measureName).map((line) => line.replace(/– /g, '–')) : [name];
      const keepGloss = gloss !== null && (setting.glosses || names.filter((other) => other === names[i]).length > 1);
      const glossLines = !keepGloss ? [] : setting.wrapNames ? wrapText(gloss, nameWidth0, measureGloss) : [gloss];
      return { lines, glossLines };
    });
    const glossWidth = Math.max(0, ...cells.flatMap((cell) => cell.glossLines.map(measureGloss)));
    const nameWidth = Math.max(nameWidth0, glossWidth);
    const table = numbers(setting);
    const numberWidths = headers.map((header, c) => Math.max(measureNumber(header), ...table.map((row) => measureNumber(row[c]))));
    const tableWidth = markerColumn + nameWidth + numberWidths.reduce((sum, w) => sum + w + columnGap, 0) + columnGap;
    chosen = { setting, cells, nameWidth, numberWidths, tableWidth };
    if (inner - tableWidth >= Math.max(60, inner * 0.3)) break;
  }
  const { setting, cells, nameWidth, numberWidths, tableWidth } = chosen!;
  const table = numbers(setting);
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

  const title = figureLineageName(lineage);
  const subtitle = wrapText(
    `Model support by AICc, N = ${lineage.time.length} horizons. ${bestMark} best supported.`,
    inner,
    (text) => measureText(font(typeSize.subtitle), text),
  );
  const notes: string[] = [];
  rows.forEach((model) => {
    if (!(model.compared && model.aicc !== null)) notes.push(`${dagger} ${splitLabel(model.label).name}: ${model.notComparedReason ?? 'not compared'}.`);
  });
  notes.push(
    'Weights compare only the models listed. Support depends on sampling, time-averaging and the age model, and a good fit to a random walk does not by itself tell drift from selection; weigh it with the specialist’s judgement.',
  );
  const noteLines = notes.flatMap((note) => wrapText(note, inner, (text) => measureText(font(typeSize.note), text)));
  const titleHeight = typeSize.title * 1.3;
  const subtitleHeight = subtitle.length * typeSize.subtitle * 1.3;
  const headerHeight = setting.size * 1.25 + 6;
  const top = margin + titleHeight + subtitleHeight + 4 + headerHeight;
  const axisHeight = typeSize.tick * 1.3 + 6;
  const notesHeight = noteLines.length * typeSize.note * 1.3 + 6;
  const heightPoints = Math.round(top + rowsHeight + axisHeight + notesHeight + margin);
  const barLeft = margin + tableWidth + 4;

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
        context.fillStyle = supportInk.track;
        context.fillRect(area.left, centre - 3, area.right - area.left, 6);
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
    context.save();
    context.textBaseline = 'alphabetic';
    context.fillStyle = ink.text;
    context.font = font(typeSize.title, 'bold');
    context.textAlign = 'left';
    context.fillText(title, margin, margin + typeSize.title);
    context.font = font(typeSize.subtitle);
    context.fillStyle = ink.muted;
    subtitle.forEach((line, i) => context.fillText(line, margin, margin + titleHeight + typeSize.subtitle * (1.3 * i + 1)));
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
    context.textAlign = 'center';
    context.fillText('Akaike weight', (area.left + area.right) / 2, headerBaseline);
    rows.forEach((model, i) => {
      const centre = y.getPixelForValue(centres[i]);
      const compared = model.compared && model.aicc !== null;
      const best = model.id === lineage.bestModel;
      const cell = cells[i];
      const lines = cell.lines.length + cell.glossLines.length;
      const firstBaseline = centre - (lines * lineHeight) / 2 + setting.size * 0.92;
      context.fillStyle = compared ? ink.text : ink.muted;
      context.textAlign = 'left';
      if (best) {
        context.font = font(setting.size, 'bold');
        context.fillText(bestMark, margin, firstBaseline);
      }
      context.font = font(setting.size, best ? 'bold' : 'normal', compared ? 'normal' : 'italic');
      cell.lines.forEach((line, k) => context.fillText(k === cell.lines.length - 1 && !compared ? `${line} ${dagger}` : line, margin + markerColumn, firstBaseline + k * lineHeight));
      context.font = font(glossSize);
      context.fillStyle = ink.muted;
      cell.glossLines.forEach((line, k) => context.fillText(line, margin + markerColumn, firstBaseline + (cell.lines.length + k) * lineHeight));
      context.fillStyle = compared ? ink.text : ink.muted;
      context.font = font(setting.size, best ? 'bold' : 'normal');
      context.textAlign = 'right';
      const numberBaseline = centre + setting.size * 0.35;
      table[i].forEach((value, c) => context.fillText(value, columnRights[c], numberBaseline));
      context.textAlign = 'left';
      if (!compared) {
        context.font = font(setting.size, 'normal', 'italic');
        context.fillText('not compared', area.left + 3, numberBaseline);
      } else {
        const end = x.getPixelForValue(model.weight ?? 0);
        const text = formatWeight(model.weight);
        const width = measureText(font(setting.size, best ? 'bold' : 'normal'), text);
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
          data: rows.map((model, i) => ({ x: model.compared && model.aicc !== null ? (model.weight ?? 0) : Number.NaN, y: centres[i] })),
          backgroundColor: rows.map((model) => (model.id === lineage.bestModel ? supportInk.bestBar : supportInk.bar)),
          borderWidth: 0,
          barThickness: Math.min(9, lineHeight * 0.9),
        },
      ],
    },
    options: {
      indexAxis: 'y',
      locale: 'en-US',
      layout: { padding: { left: barLeft, right: margin + 2, top, bottom: notesHeight + margin } },
      scales: {
        x: {
          type: 'linear',
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
  return { widthPoints, heightPoints, title: `${title}: model support`, configuration, rowCentres: centres };
}
