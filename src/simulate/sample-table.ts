import type { Lineage } from '../lineage.js';
import type { EvolutionModel } from '../models/model.js';
import { neutraliseFormula } from '../data/names.js';
import { createRandom } from '../random/random.js';
import { replicateSeed } from '../random/seeds.js';
import { simulateMeans } from '../random/simulate-lineage.js';

/** What to simulate: a model, its parameters per design lineage, replicates and the form of the file. */
export interface SimulationRequest {
  readonly model: EvolutionModel;
  /** Design lineages (times, n, within-horizon variances; their means are ignored). */
  readonly designs: readonly Lineage[];
  /** Natural parameters per design lineage (same order). */
  readonly parameters: readonly Readonly<Record<string, number>>[];
  readonly replicates: number;
  readonly seed: number;
  /** summary: one row per horizon (n, mean, sd); specimen: one row per specimen (value). */
  readonly form: 'summary' | 'specimen';
}

/**
 * Numbers as text: 10 significant digits, no trailing zeros (deterministic, and read back exactly enough).
 *
 * @example
 * formatValue(1 / 3); // '0.3333333333' (10 significant digits)
 * formatValue(2.5e-12); // '2.5e-12'
 */
export function formatValue(value: number): string {
  return String(Number(value.toPrecision(10)));
}

/** A name cell: neutralised against spreadsheet formulas like every text cell the tool writes, then quoted when needed. */
function quoteCell(text: string): string {
  const safe = neutraliseFormula(text);
  return /[",\n\r]/.test(safe) ? `"${safe.replace(/"/g, '""')}"` : safe;
}

/**
 * Simulated samples as CSV text in the tool's own input format, so the
 * output can be fed straight back to `fit`, `power` or `bootstrap`. Each
 * replicate of each design lineage becomes its own section ("<section>
 * r001"...). Ages are written when the design came with ages (or with heights
 * or depths placed by an age model: their ages), elapsed time otherwise.
 *
 * Summary form: the horizon mean is drawn exactly as the likelihood assumes
 * (sampling error N(0, v_i / n_i)) and sd is the design's within-horizon sd
 * (empty for a horizon of one specimen, which has none; the file then reads
 * back with --pool, as its design did).
 * Specimen form: n_i specimens are drawn around the horizon's latent mean
 * with variance v_i, so their mean has the same sampling variance and their
 * sample variance scatters as a real sample's would.
 *
 * Seeds come from (seed, replicate, lineage) only: same seed, same bytes.
 *
 * @example
 * const design = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1], mean: [0, 0], samplingVariance: [0.1, 0.1], count: [4, 4] });
 * const table = simulatedTable({ model: randomWalk, designs: [design], parameters: [{ ancestral_mean: 5, step_variance: 0.1 }], replicates: 1, seed: 1, form: 'summary' });
 * table.split('\n')[0]; // 'section,trait,time,n,mean,sd'
 * table.split('\n')[1].split(',').slice(-1)[0]; // '0.632455532' (the design's within sd, sqrt(0.4))
 */
export function simulatedTable(request: SimulationRequest): string {
  // Heights and depths placed by an age model are written as those ages (firstAge - t), so the file reads back without the tie file.
  const placed = (design: Lineage): boolean => (design.positionKind === 'height' || design.positionKind === 'depth') && design.firstAge !== undefined;
  const ages = request.designs.every((design) => design.positionKind === 'age' || placed(design));
  const ageOf = (design: Lineage, i: number): number => (design.positionKind === 'age' ? design.position[i] : (design.firstAge ?? 0) - design.time[i]);
  const header = request.form === 'summary' ? ['section', 'trait', ages ? 'age' : 'time', 'n', 'mean', 'sd'] : ['section', 'trait', ages ? 'age' : 'time', 'value'];
  const lines = [header.join(',')];
  const width = String(request.replicates).length;
  for (let replicate = 0; replicate < request.replicates; replicate++) {
    request.designs.forEach((design, lineageIndex) => {
      const random = createRandom(replicateSeed(request.seed, 31, replicate, lineageIndex));
      const baseName = design.section === '' ? 'simulated' : design.section;
      const section = request.replicates > 1 ? `${baseName} r${String(replicate + 1).padStart(Math.max(3, width), '0')}` : baseName;
      const trait = design.trait === '' ? 'trait' : design.trait;
      const size = design.time.length;
      const prefix = (i: number): string => [quoteCell(section), quoteCell(trait), formatValue(ages ? ageOf(design, i) : design.time[i])].join(',');
      if (request.form === 'summary') {
        const means = simulateMeans(request.model, design, { ...request.parameters[lineageIndex] }, random);
        for (let i = 0; i < size; i++) {
          // One specimen has no sd: left empty, as in a real file, so the output reads back (with --pool) like its design.
          const sd = design.count[i] === 1 ? '' : formatValue(Math.sqrt(design.withinVariance[i]));
          lines.push(`${prefix(i)},${design.count[i]},${formatValue(means[i])},${sd}`);
        }
      } else {
        const latentDesign: Lineage = { ...design, samplingVariance: new Float64Array(size) };
        const latent = simulateMeans(request.model, latentDesign, { ...request.parameters[lineageIndex] }, random);
        for (let i = 0; i < size; i++) {
          const sd = Math.sqrt(design.withinVariance[i]);
          for (let specimen = 0; specimen < design.count[i]; specimen++) lines.push(`${prefix(i)},${formatValue(latent[i] + sd * random.normal())}`);
        }
      }
    });
  }
  return lines.join('\n') + '\n';
}
