import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { fitLineage } from '../../src/fit/fit-lineage.js';
import { readTable } from '../../src/data/read-table.js';
import { readSamples } from '../../src/data/samples.js';
import { buildLineages, type Lineage } from '../../src/lineage.js';
import { classicModels } from '../../src/models/registry.js';
import { summariseCompilation } from '../../src/compare/compilation.js';
import { compilationTable } from '../../src/render/compilation-table.js';
import { lineageDocument } from '../../src/render/fit-document.js';
import { figureLineage } from '../../src/render/figures/figure-input.js';
import { traitAxisTitle } from '../../src/render/figures/geometry.js';
import { renderTrajectory } from '../../src/render/figures/index.js';
import { powerCurvePlan, type PowerCurveInput } from '../../src/render/figures/power-curve.js';
import { asFitDocument, type LineageView } from '../../src/render/report/document-view.js';
import { lineageSection } from '../../src/render/report/lineage-section.js';
import { methodsText } from '../../src/render/report/methods.js';
import { comparisonDocumentBlock, powerDocumentBlock } from '../../src/render/report/optional-blocks.js';
import { estimatesTable } from '../../src/render/report/support-table.js';
import { lineageTable } from '../../src/render/text-table.js';
import { squaredLabel, traitUnitLabel, unitLabel } from '../../src/render/units.js';
import { ridgeDocument } from './figures/documents.js';
import { svgText } from './figures/figure-probes.js';

// Unit algebra (common practice, dimensional analysis): a mean is in the
// trait's unit, a variance in its square, a drift in trait per time, a step
// variance in trait squared per time; ln values of a trait measured in mm are
// "ln mm". Without --trait-unit every output keeps the words it had before the
// option existed ("trait units", "ln units"), which the no-unit checks below
// compare against outputs made without the option.

const sampleText = readFileSync(new URL('../../sample-data/shell-length.csv', import.meta.url), 'utf8');

function sampleLineages(traitUnit: string | null | undefined, log = false): Lineage[] {
  const samples = readSamples(readTable(sampleText, 'shell-length.csv'), { log });
  return buildLineages(samples, traitUnit === undefined ? {} : { traitUnit });
}

/** The lineage as made before the option existed: no traitUnit property at all. */
function withoutUnitProperty(lineage: Lineage): Lineage {
  const { traitUnit: _dropped, ...rest } = lineage;
  return rest as Lineage;
}

describe('unit labels', () => {
  it('compose trait and time powers (common practice: variance squared, rates per time)', () => {
    expect(unitLabel({ trait: 1, time: 0 }, 'Myr', 'mm')).toBe('mm');
    expect(unitLabel({ trait: 2, time: 0 }, 'Myr', 'mm')).toBe('mm²');
    expect(unitLabel({ trait: 1, time: -1 }, 'Myr', 'mm')).toBe('mm per Myr');
    expect(unitLabel({ trait: 2, time: -1 }, 'kyr', 'mm')).toBe('mm² per kyr');
    expect(unitLabel({ trait: 0, time: -1 }, 'Myr', 'mm')).toBe('per Myr');
    // The acceleration of a trend (moving-optimum's limit_acceleration, issue 16) is per time squared; it read "mm Myr".
    expect(unitLabel({ trait: 1, time: -2 }, 'Myr', 'mm')).toBe('mm per Myr²');
    // A label that is not one word is bracketed, so the square covers all of it.
    expect(unitLabel({ trait: 2, time: -1 }, 'Myr', 'ln mm')).toBe('(ln mm)² per Myr');
    expect(squaredLabel('µm²')).toBe('(µm²)²');
    expect(squaredLabel('µm')).toBe('µm²');
  });

  it('keep the wording of before the option when no unit is given', () => {
    expect(unitLabel({ trait: 2, time: -1 }, 'Myr')).toBe('(trait units)² per Myr');
    expect(unitLabel({ trait: 1, time: -1 }, 'Myr')).toBe('trait units per Myr');
    expect(unitLabel({ trait: 2, time: -1 }, 'Myr', 'ln units')).toBe('(ln units)² per Myr');
    expect(traitUnitLabel(null, true, 'ln units')).toBe('ln units');
    expect(traitUnitLabel(undefined, false, 'trait units')).toBe('trait units');
    expect(traitUnitLabel('mm', true, 'ln units')).toBe('ln mm');
    expect(traitUnitLabel('mm', false, 'trait units')).toBe('mm');
  });
});

describe('terminal table', () => {
  const [withUnit] = sampleLineages('mm');
  const [without] = sampleLineages(undefined);
  const fitWith = fitLineage(withUnit, classicModels, { intervals: false });
  const fitWithout = fitLineage(without, classicModels, { intervals: false });
  const tableWith = lineageTable(fitWith);
  const tableWithout = lineageTable(fitWithout);

  it('prints every estimate in the trait unit', () => {
    expect(tableWith).toContain('untransformed trait in mm)');
    expect(tableWith).toMatch(/stasis_mean [\d.]+ mm \[/);
    expect(tableWith).toMatch(/stasis_variance [\d.]+ mm² \[/);
    expect(tableWith).toMatch(/drift [\d.]+ mm per Myr \[/);
    expect(tableWith).toMatch(/step_variance [\d.e-]+ mm² per Myr \[/);
    expect(tableWith).toMatch(/alpha [\d.e-]+ per Myr \[/);
    expect(tableWith).toMatch(/half_life [\d.e-]+ Myr \[/);
    expect(tableWith).not.toContain('trait units');
  });

  it('without a unit is identical to the table of a lineage made before the option existed', () => {
    const old = lineageTable({ ...fitWithout, lineage: withoutUnitProperty(fitWithout.lineage) });
    expect(tableWithout).toBe(old);
    expect(tableWithout).toContain('(trait units)² per Myr');
    expect(tableWithout).toMatch(/drift [\d.]+ trait units per Myr \[/);
    expect(tableWithout).toMatch(/stasis_mean [\d.]+ \[/);
    expect(tableWithout).not.toMatch(/\bmm\b/);
  });

  it('the label changes words only: model rows are the same with and without it', () => {
    const rows = (table: string) => table.split('\n').slice(1, 7);
    expect(rows(tableWith)).toEqual(rows(tableWithout));
  });

  it('with --log reads ln mm', () => {
    const [logged] = sampleLineages('mm', true);
    const table = lineageTable(fitLineage(logged, classicModels, { intervals: false }));
    expect(table).toContain('natural-log trait in ln mm)');
    expect(table).toMatch(/drift [\d.]+ ln mm per Myr \[/);
    expect(table).toMatch(/step_variance [\d.e-]+ \(ln mm\)² per Myr \[/);
  });
});

describe('fit.json document', () => {
  const [withUnit] = sampleLineages('mm');
  const [without] = sampleLineages(undefined);
  const documentWith = lineageDocument(fitLineage(withUnit, classicModels, { intervals: false }));
  const documentWithout = lineageDocument(fitLineage(without, classicModels, { intervals: false }));

  it('carries trait_unit, null when not given', () => {
    expect(documentWith.trait_unit).toBe('mm');
    expect(documentWithout.trait_unit).toBeNull();
    expect(lineageDocument(fitLineage(withoutUnitProperty(without), classicModels, { intervals: false })).trait_unit).toBeNull();
  });

  it('the unit is a label only: every number is the same with and without it', () => {
    const { trait_unit: _a, ...restWith } = documentWith;
    const { trait_unit: _b, ...restWithout } = documentWithout;
    expect(JSON.stringify(restWith)).toBe(JSON.stringify(restWithout));
  });

  it('is read back for figures (absent, null or blank: no unit)', () => {
    expect(figureLineage(documentWith).traitUnit).toBe('mm');
    expect(figureLineage(documentWithout).traitUnit).toBeNull();
    expect(figureLineage(ridgeDocument()).traitUnit).toBeNull();
    expect(figureLineage({ ...ridgeDocument(), trait_unit: '  ' }).traitUnit).toBeNull();
  });
});

describe('figure trait axis', () => {
  it('titles name the unit; without one they are as before', () => {
    expect(traitAxisTitle({ trait: 'valve width', transform: 'none', traitUnit: 'mm' })).toBe('Valve width (mm, mean per horizon)');
    expect(traitAxisTitle({ trait: 'valve width', transform: 'ln', traitUnit: 'mm' })).toBe('ln valve width (ln mm, mean per horizon)');
    expect(traitAxisTitle({ trait: 'valve width', transform: 'none', traitUnit: null })).toBe('Valve width (mean per horizon)');
    expect(traitAxisTitle({ trait: 'valve width', transform: 'ln' })).toBe('ln valve width (mean per horizon)');
  });

  it('the drawn SVG carries "Valve width (mm, mean per horizon)" as text', () => {
    const figure = renderTrajectory({ ...ridgeDocument(), trait_unit: 'mm' }, { format: 'svg' });
    const { text } = svgText(new TextDecoder().decode(figure.bytes));
    expect(text).toContain('Valve width (mm, mean per horizon)');
  });

  it('trait_unit null draws byte for byte the figure of a document without the key (a fit.json from before the option)', () => {
    for (const format of ['svg', 'png'] as const) {
      const old = renderTrajectory(ridgeDocument(), { format, dpi: 150 });
      const current = renderTrajectory({ ...ridgeDocument(), trait_unit: null }, { format, dpi: 150 });
      expect(Buffer.from(current.bytes).equals(Buffer.from(old.bytes)), format).toBe(true);
    }
    const labelled = renderTrajectory({ ...ridgeDocument(), trait_unit: 'mm' }, { format: 'svg' });
    expect(Buffer.from(labelled.bytes).equals(Buffer.from(renderTrajectory(ridgeDocument(), { format: 'svg' }).bytes))).toBe(false);
  });
});

describe('power curve', () => {
  const input: PowerCurveInput = {
    grid: [0, 0.5, 1].map((drift) => ({ drift, drift_sd: drift, p_best: drift, p_weight: drift, p_lrt: drift })),
    lineage: 'Test Ridge / valve width', horizons: 12, replicates: 20, timeUnit: 'Myr', weightThreshold: 0.5, targetPower: 0.8, level: 0.05, withinSd: 0.5,
  };
  const axisTitle = (traitUnit?: string | null): string => {
    const configuration = powerCurvePlan({ ...input, traitUnit }).plan.configuration() as { options: { scales: { x: { title: { text: string } } } } };
    return configuration.options.scales.x.title.text;
  };
  it('the drift axis is in the trait unit per time unit; without one as before', () => {
    expect(axisTitle('mm')).toBe('true drift (mm per Myr)');
    expect(axisTitle('ln mm')).toBe('true drift (ln mm per Myr)');
    expect(axisTitle(null)).toBe('true drift (trait units per Myr)');
    expect(axisTitle(undefined)).toBe('true drift (trait units per Myr)');
  });
});

describe('compilation summary', () => {
  it('states the drift distribution in the trait unit', () => {
    const fits = sampleLineages('mm').map((lineage) => fitLineage(lineage, classicModels, { intervals: false }));
    expect(compilationTable(summariseCompilation(fits))).toContain('(mm per Myr), over 2 lineages');
    const plain = sampleLineages(undefined).map((lineage) => fitLineage(lineage, classicModels, { intervals: false }));
    expect(compilationTable(summariseCompilation(plain))).toContain('(trait units per Myr), over 2 lineages');
  });
});

describe('report', () => {
  const documentOf = (traitUnit: string | undefined, log = false) => {
    const fits = sampleLineages(traitUnit, log).map((lineage) => fitLineage(lineage, classicModels, { intervals: false }));
    return asFitDocument({
      provenance: { tool: 'stratotrend', version: 'test', inputs: [], options: { log } },
      model_set: 'classic',
      lineages: fits.map(lineageDocument),
      warnings: [],
    });
  };
  const unitCells = (lineage: LineageView): string[] => [...estimatesTable(lineage).matchAll(/<\/td><td>([^<]*)<\/td><td>[^<]*<\/td><\/tr>/g)].map((match) => match[1]);

  it('the estimates table gives each parameter its unit', () => {
    const cells = unitCells(documentOf('mm').lineages[0]);
    expect(cells).toContain('mm');
    expect(cells).toContain('mm²');
    expect(cells).toContain('mm per Myr');
    expect(cells).toContain('mm² per Myr');
    expect(cells.join('|')).not.toContain('trait units');
    const logged = unitCells(documentOf('mm', true).lineages[0]);
    expect(logged).toContain('(ln mm)² per Myr');
  });

  it('without a unit the report is as before: "trait units", "ln units", and no unit key shown as a further result', () => {
    const plain = documentOf(undefined);
    const cells = unitCells(plain.lineages[0]);
    expect(cells).toContain('(trait units)² per Myr');
    expect(cells).toContain('trait units per Myr');
    expect(unitCells(documentOf(undefined, true).lineages[0])).toContain('(ln units)² per Myr');
    // A lineage document without the key (a fit.json from before the option) gives the same block.
    const { trait_unit: _dropped, ...old } = plain.lineages[0];
    expect(lineageSection(plain.lineages[0], 0, plain, [])).toBe(lineageSection(old as LineageView, 0, plain, []));
    expect(lineageSection(plain.lineages[0], 0, plain, [])).not.toContain('trait_unit');
    expect(methodsText(plain).sentences.map((sentence) => sentence.text).join(' ')).not.toContain('Trait values were measured in');
  });

  it('the data facts and the methods text name the unit', () => {
    const document = documentOf('mm');
    const section = lineageSection(document.lineages[0], 0, document, []);
    expect(section).toMatch(/<dd data-field="net_change"[^>]*>[\d.]+ mm<\/dd>/);
    expect(section).toContain('untransformed trait in mm, per-horizon sampling variance');
    const methods = methodsText(document).sentences.map((sentence) => sentence.text).join(' ');
    expect(methods).toContain('Trait values were measured in mm; the unit is as recorded with the data and no values were converted.');
  });

  it('the comparison block reads the unit of each trait from the compare document', () => {
    const trait = (traitUnit: string | null) => ({ trait: 'rib density', horizons: 38, time_unit: 'Myr', trait_unit: traitUnit, sections: [], hypotheses: [], tests: [] });
    const block = (log: boolean, traitUnit: string | null) => comparisonDocumentBlock({ provenance: { options: { log } }, traits: [trait(traitUnit)] });
    expect(block(false, 'ribs per cm')).toContain('horizons in all, time in Myr, trait in ribs per cm.');
    expect(block(true, 'mm')).toContain('time in Myr, trait in ln mm.');
    expect(block(false, null)).toContain('horizons in all, time in Myr.');
  });

  it('the power block reads the unit from the power document', () => {
    const power = {
      input: { lineage: 'Test Ridge / valve width', trait_unit: 'mm', transform: 'none' },
      settings: { replicates: 20, horizons: 12, span: 4, time_unit: 'Myr', seed: 1, weight_threshold: 0.5 },
      generator: { step_variance: 0.01, step_variance_source: 'fitted', fitted_drift: 0.3, drift_standard_error: 0.1 },
      grid: [{ drift: 0, drift_sd: 0, p_best: 0.05, p_weight: 0, p_lrt: 0.05 }],
      smallest_drift: { power: 0.8, p_best: 0.2, p_weight: 0.3, p_lrt: 0.25 },
    };
    const block = powerDocumentBlock(power);
    expect(block).toContain('<th class="number">drift (mm per Myr)</th>');
    expect(block).toContain('step variance 0.01 mm² per Myr (fitted)');
    expect(block).toContain('(standard error) mm per Myr.');
    const plain = powerDocumentBlock({ ...power, input: { lineage: 'Test Ridge / valve width' } });
    expect(plain).toContain('<th class="number">drift per Myr</th>');
    expect(plain).toContain('step variance 0.01 (fitted)');
  });
});
