/**
 * Which figures a fit gets and what their files are called, worked out
 * from the lineage documents without drawing anything (so the CLI can
 * claim the file names in the output folder before the chart stack loads).
 */

/** The kinds of figure: one trajectory and one model-support figure per lineage, one sections figure per trait with two or more sections. */
export type FigureKind = 'trajectory' | 'model-support' | 'sections';

export const figureKinds: readonly FigureKind[] = ['trajectory', 'model-support', 'sections'];

/** One figure to draw: its kind, the lineages it shows (indexes into the document's `lineages`) and its file stem. */
export interface FigureJob {
  readonly kind: FigureKind;
  readonly lineages: readonly number[];
  /** File name without the extension, e.g. "varnek-draw_shell-length.trajectory". */
  readonly stem: string;
}

/**
 * A name for a file: lower case, accents dropped, every run of other
 * characters one hyphen.
 *
 * @example
 * fileSlug('Varnek Draw'); // "varnek-draw"
 */
export function fileSlug(text: string): string {
  const slug = text
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '');
  return slug.slice(0, 80);
}

interface NamedLineage {
  readonly section: string;
  readonly trait: string;
}

function nameOf(document: unknown): NamedLineage {
  const doc = (document ?? {}) as Record<string, unknown>;
  return { section: typeof doc.section === 'string' ? doc.section : '', trait: typeof doc.trait === 'string' ? doc.trait : '' };
}

/**
 * The figures of a set of lineage documents, in drawing order: per lineage
 * its trajectory and model support, then per trait with two or more
 * sections the sections-together figure. File stems say the lineage
 * (section_trait) and the kind; clashes get -2, -3, ….
 *
 * @param documents - fit.json `lineages`
 * @param kinds - kinds to include (default all)
 */
export function figureJobs(documents: readonly unknown[], kinds: readonly FigureKind[] = figureKinds): FigureJob[] {
  const names = documents.map(nameOf);
  const used = new Set<string>();
  const unique = (stem: string) => {
    let candidate = stem;
    for (let k = 2; used.has(candidate); k++) candidate = `${stem}-${k}`;
    used.add(candidate);
    return candidate;
  };
  const lineageSlug = (name: NamedLineage) => [fileSlug(name.section), fileSlug(name.trait)].filter((part) => part !== '').join('_') || 'lineage';
  const slugs = names.map(lineageSlug);
  const jobs: FigureJob[] = [];
  names.forEach((_name, index) => {
    if (kinds.includes('trajectory')) jobs.push({ kind: 'trajectory', lineages: [index], stem: unique(`${slugs[index]}.trajectory`) });
    if (kinds.includes('model-support')) jobs.push({ kind: 'model-support', lineages: [index], stem: unique(`${slugs[index]}.model-support`) });
  });
  if (kinds.includes('sections')) {
    const byTrait = new Map<string, number[]>();
    names.forEach((name, index) => {
      const list = byTrait.get(name.trait) ?? [];
      list.push(index);
      byTrait.set(name.trait, list);
    });
    for (const [trait, indexes] of byTrait) {
      const sections = new Set(indexes.map((index) => names[index].section));
      if (sections.size < 2) continue;
      jobs.push({ kind: 'sections', lineages: indexes, stem: unique(`${fileSlug(trait) || 'trait'}.sections`) });
    }
  }
  return jobs;
}
