/**
 * The model-support figure at every narrow width the tool allows (4 to 9 cm;
 * 8–9 cm is a journal's single column, 4 cm an inset — common practice):
 * every string drawn, measured by the drawing engine as it is drawn, lies
 * inside the figure's margins and touches no other string, and nothing is
 * lost (every model's name, ΔAICc and weight is drawn). Documents: the five
 * classic models and the extended set with its long names (labels from the
 * model registry; the numbers are invented for drawing).
 */
import { describe, expect, it } from 'vitest';
import { figureLineage } from '../../../src/render/figures/figure-input.js';
import { resolveFigureOptions } from '../../../src/render/figures/figure-options.js';
import { modelSupportPlan, supportLayoutSteps, tableNumber } from '../../../src/render/figures/model-support.js';
import { formatWeight } from '../../../src/render/figures/trajectory.js';
import { extendedModels } from '../../../src/models/registry.js';
import { ridgeDocument } from './documents.js';
import { recordDrawnText, textProblems } from './drawn-text.js';

/** The ridge document with every model of the extended set; the last one not compared, with a long reason. */
function extendedDocument(section = 'Kettlebrook-Whinmoor-Underscar Gully North') {
  const base = ridgeDocument({ section });
  const models = extendedModels.map((model, i) => {
    const compared = i < extendedModels.length - 1;
    const aicc = -34.5 + 7.3 * i;
    return {
      id: model.id,
      label: model.label,
      k: model.parameters.length,
      logLik: compared ? 20.8 - 3.1 * i : null,
      aicc: compared ? aicc : null,
      delta_aicc: compared ? 7.3 * i : null,
      weight: compared ? (i === 0 ? 0.8 : i === 1 ? 0.19 : 0.001) : null,
      converged: compared,
      compared,
      not_compared_reason: compared ? null : 'not fitted: the covariate column is missing from the samples file',
      interval_method: 'none',
      params: {},
      derived: {},
      flags: [],
    };
  });
  return { ...base, models, best_model: models[0].id };
}

const widths = [4, 5, 6, 7, 8, 9];
const cases = [
  { name: 'classic models', document: () => ridgeDocument({ best: 'directional-walk', withOuNotCompared: true }) },
  { name: 'extended models', document: () => extendedDocument() },
];

describe('model-support figure at narrow widths', () => {
  for (const { name, document } of cases) {
    for (const widthCm of widths) {
      it(`${name}, ${widthCm} cm: every string inside the margins, none touching another, none lost`, () => {
        const lineage = figureLineage(document());
        const resolved = resolveFigureOptions({ width: widthCm });
        const plan = modelSupportPlan(lineage, resolved);
        const drawn = recordDrawnText(plan, resolved);
        // The figure's margin is 6 pt; a string may reach it but not the page edge.
        const problems = textProblems(drawn, 5.5);
        expect(problems, problems.join('\n')).toEqual([]);
        const all = drawn.texts.map((text) => text.text);
        const joined = all.join(' ').replace(/\s+/g, '');
        for (const model of lineage.models) {
          // Names (before any gloss) survive wrapping and cutting in order, spaces aside.
          const cut = model.label.indexOf(' (');
          const label = (cut > 0 ? model.label.slice(0, cut) : model.label).replace(/\s+/g, '');
          expect(joined, model.label).toContain(label);
          if (model.compared) {
            expect(all, `${model.id} ΔAICc`).toContain(tableNumber(model.deltaAicc, plan.setting.decimals));
            expect(all, `${model.id} weight`).toContain(formatWeight(model.weight));
          }
        }
      });
    }
  }

  it('9 cm with the classic models keeps the full table (K, logL, AICc, ΔAICc and weight bars); narrower figures step down the stated ladder', () => {
    const lineage = figureLineage(ridgeDocument({ best: 'directional-walk' }));
    const at = (widthCm: number) => modelSupportPlan(lineage, resolveFigureOptions({ width: widthCm })).setting;
    expect(at(9).columns).toEqual(['k', 'logL', 'aicc', 'delta']);
    expect(at(9).bars).toBe(true);
    const ranks = widths.map((widthCm) => supportLayoutSteps.indexOf(at(widthCm)));
    // Narrower never takes an earlier (fuller) step than wider.
    for (let i = 1; i < ranks.length; i++) expect(ranks[i]).toBeLessThanOrEqual(ranks[i - 1]);
    expect(ranks[0]).toBeGreaterThan(ranks[ranks.length - 1]);
  });

  it('the ladder drops logL first, then AICc, then K, and keeps ΔAICc and the weights throughout', () => {
    const columns = supportLayoutSteps.map((step) => step.columns.join(','));
    const order = [...new Set(columns)];
    expect(order).toEqual(['k,logL,aicc,delta', 'k,aicc,delta', 'k,delta', 'delta']);
    // Bars give way to numbers only after the number columns are down to ΔAICc.
    const firstNumbers = supportLayoutSteps.findIndex((step) => !step.bars);
    expect(supportLayoutSteps[firstNumbers].columns).toEqual(['delta']);
  });

  it('leaving out title, subtitle and notes draws none of them and makes the figure shorter', () => {
    const lineage = figureLineage(ridgeDocument());
    const full = resolveFigureOptions({ width: 9 });
    const bare = resolveFigureOptions({ width: 9, leaveOut: ['title', 'subtitle', 'notes'] });
    const drawnFull = recordDrawnText(modelSupportPlan(lineage, full), full);
    const drawnBare = recordDrawnText(modelSupportPlan(lineage, bare), bare);
    const text = (drawn: typeof drawnFull) => drawn.texts.map((item) => item.text).join(' ');
    expect(text(drawnFull)).toContain('Test Ridge / valve width');
    expect(text(drawnFull)).toContain('Weights compare');
    expect(text(drawnBare)).not.toContain('Test Ridge');
    expect(text(drawnBare)).not.toContain('Model support by AICc');
    expect(text(drawnBare)).not.toContain('Weights compare');
    expect(text(drawnBare)).toContain('ΔAICc');
    expect(drawnBare.height).toBeLessThan(drawnFull.height);
    expect(textProblems(drawnBare, 5.5)).toEqual([]);
  });
});
