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
  /** File name without the extension, e.g. "varnek-draw_shell-length.trajectory" (the format's extension follows). */
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

/** What the file names are made of: a lineage document's section and trait. */
interface NamedLineage {
  readonly section: string;
  readonly trait: string;
}

/**
 * The figures of a set of lineage documents, in drawing order: per lineage
 * its trajectory and model support, then per trait with two or more
 * sections the sections-together figure. File stems say the lineage
 * (section_trait) and the kind. Names that coincide after cleaning (`A/B`
 * and `A-B`) are numbered in document order: the second lineage's figures
 * are all `a-b_x-2.<kind>`, the second trait's sections figure `a-b-2.sections`.
 *
 * This is the one naming rule of every command that writes figures (`fit`,
 * `redraw`, `compare`): stems are always worked out over all documents and
 * all kinds, and only then narrowed to `kinds` and `selected`, so a figure
 * keeps its name whichever subset is drawn (a redraw of one lineage
 * overwrites that lineage's figure, never another's).
 *
 * @param documents - fit.json `lineages`
 * @param kinds - kinds to include (default all)
 * @param selected - whether the lineage at an index is drawn (default all); a sections figure keeps the selected sections and is left out when fewer than two remain
 *
 * @example
 * figureJobs([{ section: 'A/B', trait: 'x' }, { section: 'A-B', trait: 'x' }], ['trajectory']).map((job) => job.stem); // ['a-b_x.trajectory', 'a-b_x-2.trajectory'] (equal slugs numbered)
 */
export function figureJobs(documents: readonly NamedLineage[], kinds: readonly FigureKind[] = figureKinds, selected: (index: number) => boolean = () => true): FigureJob[] {
  const names = documents.map((document) => ({ section: document.section, trait: document.trait }));
  const used = new Set<string>();
  const unique = (stem: string) => {
    let candidate = stem;
    for (let k = 2; used.has(candidate); k++) candidate = `${stem}-${k}`;
    used.add(candidate);
    return candidate;
  };
  const lineageSlug = (name: NamedLineage) => [fileSlug(name.section), fileSlug(name.trait)].filter((part) => part !== '').join('_') || 'lineage';
  // A lineage's number goes on its name, so all its figures carry the same one.
  const slugs = names.map((name) => unique(lineageSlug(name)));
  const jobs: FigureJob[] = [];
  names.forEach((_name, index) => {
    jobs.push({ kind: 'trajectory', lineages: [index], stem: `${slugs[index]}.trajectory` });
    jobs.push({ kind: 'model-support', lineages: [index], stem: `${slugs[index]}.model-support` });
  });
  const byTrait = new Map<string, number[]>();
  names.forEach((name, index) => {
    const list = byTrait.get(name.trait) ?? [];
    list.push(index);
    byTrait.set(name.trait, list);
  });
  // Trait names are numbered among themselves (a trait "x" beside a lineage called "x" is no clash: the kinds differ).
  used.clear();
  const traitSlugs = new Map([...byTrait.keys()].map((trait) => [trait, unique(fileSlug(trait) || 'trait')]));
  for (const [trait, indexes] of byTrait) {
    const sections = new Set(indexes.map((index) => names[index].section));
    if (sections.size < 2) continue;
    jobs.push({ kind: 'sections', lineages: indexes, stem: `${traitSlugs.get(trait)}.sections` });
  }
  return jobs.flatMap((job) => {
    if (!kinds.includes(job.kind)) return [];
    const kept = job.lineages.filter(selected);
    if (job.kind !== 'sections') return kept.length === 1 ? [job] : [];
    const sections = new Set(kept.map((index) => names[index].section));
    return sections.size >= 2 ? [{ ...job, lineages: kept }] : [];
  });
}
