import { usageError } from '../../data/errors.js';

/** Output format of a figure. */
export type FigureFormat = 'png' | 'svg' | 'pdf';

/** Where time runs: up the page (stratigraphic, the default) or along the horizontal axis. */
export type FigureOrientation = 'stratigraphic' | 'horizontal';

/** What a caller may ask of a figure; every field has a default. */
export interface FigureOptions {
  /** 'png' (default), 'svg' or 'pdf'. */
  readonly format?: FigureFormat;
  /** 'single' journal column (9 cm, default), 'double' (18 cm), or a width in centimetres. */
  readonly width?: 'single' | 'double' | number;
  /** Resolution of PNG output in dots per inch (default 600; 72–1200). Vector output ignores it. */
  readonly dpi?: number;
  /** 'stratigraphic' (default: time up the page, oldest at the bottom) or 'horizontal'. */
  readonly orientation?: FigureOrientation;
  /** Id of the model whose expected trajectory and envelope are drawn (default: the best-supported model). */
  readonly model?: string;
  /** Draw the smoothed lineage mean and its 95% band (default false). */
  readonly smoothed?: boolean;
  /** Parts of the figure left out, for a journal that sets its own caption: any of 'title', 'subtitle', 'notes' (default none). */
  readonly leaveOut?: readonly FigurePart[];
  /** Title of the trait axis in place of the one made from the trait's name and unit (default: made). */
  readonly traitTitle?: string;
  /** Sections figure: what the lines are, in words, in place of "each section's best-supported model" (compare names its winning hypothesis). */
  readonly linesCaption?: string;
  /** Marker area proportional to the horizon's specimen count n (default false: one size). */
  readonly markerByCount?: boolean;
}

/** A part of a figure that can be left out: its title, the subtitle under it, the notes at its foot. */
export type FigurePart = 'title' | 'subtitle' | 'notes';

/** The parts that can be left out, in the order they appear on the page. */
export const figureParts: readonly FigurePart[] = ['title', 'subtitle', 'notes'];

/** Options with defaults applied and sizes worked out. */
export interface ResolvedFigureOptions {
  readonly format: FigureFormat;
  readonly widthCm: number;
  readonly dpi: number;
  readonly orientation: FigureOrientation;
  readonly model: string | null;
  readonly smoothed: boolean;
  /** Which of the title, subtitle and notes are drawn. */
  readonly show: { readonly title: boolean; readonly subtitle: boolean; readonly notes: boolean };
  /** The trait axis title asked for, or null for the one made from the trait's name and unit. */
  readonly traitTitle: string | null;
  readonly linesCaption: string | null;
  readonly markerByCount: boolean;
}

/** Single journal column width in cm (common practice: most journals ask for 8–9 cm). */
export const singleColumnCm = 9;
/** Double column (full page) width in cm (common practice: 17–18 cm). */
export const doubleColumnCm = 18;
/** Default PNG resolution (journals ask for 300–1200 dpi for line art with shading; common practice). */
export const defaultDpi = 600;

/** Points (1/72 inch) per centimetre: the drawing unit of every figure, so font sizes are print sizes. */
export const pointsPerCm = 72 / 2.54;

/**
 * Apply defaults and check ranges.
 *
 * @throws InputError (usage) for an unknown format, orientation, width or part to leave out, or a dpi outside 72–1200
 * @example
 * resolveFigureOptions({ width: 'double' }).widthCm; // 18
 */
export function resolveFigureOptions(options: FigureOptions = {}): ResolvedFigureOptions {
  const format = options.format ?? 'png';
  if (format !== 'png' && format !== 'svg' && format !== 'pdf') throw usageError(`figure format must be png, svg or pdf, got "${String(format)}"`);
  const orientation = options.orientation ?? 'stratigraphic';
  if (orientation !== 'stratigraphic' && orientation !== 'horizontal') {
    throw usageError(`figure orientation must be stratigraphic or horizontal, got "${String(orientation)}"`);
  }
  const width = options.width ?? 'single';
  const widthCm = width === 'single' ? singleColumnCm : width === 'double' ? doubleColumnCm : width;
  if (typeof widthCm !== 'number' || !Number.isFinite(widthCm) || widthCm < 4 || widthCm > 50) {
    throw usageError(`figure width must be single, double or a width in cm from 4 to 50, got "${String(width)}"`);
  }
  const dpi = options.dpi ?? defaultDpi;
  if (!Number.isFinite(dpi) || dpi < 72 || dpi > 1200) throw usageError(`figure dpi must be a number from 72 to 1200 (journals ask for 300–1200), got "${String(dpi)}"`);
  const leaveOut = options.leaveOut ?? [];
  for (const part of leaveOut) {
    if (!figureParts.includes(part)) throw usageError(`figure part to leave out must be ${figureParts.join(', ')}, got "${String(part)}"`);
  }
  const show = { title: !leaveOut.includes('title'), subtitle: !leaveOut.includes('subtitle'), notes: !leaveOut.includes('notes') };
  const traitTitle = options.traitTitle === undefined || options.traitTitle.trim() === '' ? null : options.traitTitle.trim();
  return { format, widthCm, dpi, orientation, model: options.model ?? null, smoothed: options.smoothed === true, show, traitTitle, linesCaption: options.linesCaption ?? null, markerByCount: options.markerByCount === true };
}

/**
 * Parse the text of a `--figure-width` option: "single", "double", or a
 * number of centimetres (a trailing "cm" is allowed).
 *
 * @throws InputError (usage) for anything else
 * @example
 * parseFigureWidth('12cm'); // 12
 */
export function parseFigureWidth(value: string): 'single' | 'double' | number {
  const trimmed = value.trim().toLowerCase();
  if (trimmed === 'single' || trimmed === 'double') return trimmed;
  const match = /^(\d+(?:\.\d+)?)\s*(cm)?$/.exec(trimmed);
  if (!match) throw usageError(`--figure-width: expected single, double or a width in cm, got "${value}"`);
  return Number(match[1]);
}
