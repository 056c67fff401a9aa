import { describe, expect, it } from 'vitest';
import { ageFunction, interpolateAge, readAgeModel, sedimentationRates } from '../../src/data/age-model.js';
import { InputError } from '../../src/data/errors.js';
import { readTable } from '../../src/data/read-table.js';

const ties = (text: string) => readAgeModel(readTable(text, 'ties.csv'));

describe('age model: piecewise-linear interpolation', () => {
  // Hand-computed: ties (0 m, 10 Ma), (50 m, 8 Ma), (80 m, 5 Ma).
  // 20 m: 10 + 20 * (8 - 10) / 50 = 9.2; 65 m: 8 + 15 * (5 - 8) / 30 = 6.5; at a tie: its age.
  const model = ties('section,height,age\nA,50,8\nA,0,10\nA,80,5\n');
  const section = model.sections.get('A')!;
  it('matches hand-computed ages between ties', () => {
    expect(interpolateAge(section, 20).age).toBeCloseTo(9.2, 14);
    expect(interpolateAge(section, 65).age).toBeCloseTo(6.5, 14);
    expect(interpolateAge(section, 50)).toEqual({ age: 8, extrapolated: false });
    expect(interpolateAge(section, 0)).toEqual({ age: 10, extrapolated: false });
    expect(interpolateAge(section, 80)).toEqual({ age: 5, extrapolated: false });
  });
  // Hand-computed: beyond the top, the last stretch's rate continues: 90 m → 5 + 10 * (-3 / 30) = 4.
  // Below the base: the first stretch: -10 m → 10 + (-10) * (-2 / 50) = 10.4.
  it('extends the outermost stretches and flags the result', () => {
    const above = interpolateAge(section, 90);
    expect(above.age).toBeCloseTo(4, 14);
    expect(above.extrapolated).toBe(true);
    const below = interpolateAge(section, -10);
    expect(below.age).toBeCloseTo(10.4, 14);
    expect(below.extrapolated).toBe(true);
  });
  // Hand-computed: one pair of ties gives a constant rate: (0 m, 3 Ma), (40 m, 1 Ma) → 20 m per Myr; 10 m → 2.5 Ma.
  it('a single pair of ties gives one constant rate', () => {
    const pair = ties('height,age\n0,3\n40,1\n').sections.get('')!;
    expect(sedimentationRates(pair)).toEqual([{ fromHeight: 0, toHeight: 40, olderAge: 3, youngerAge: 1, rate: 20 }]);
    expect(interpolateAge(pair, 10).age).toBeCloseTo(2.5, 14);
  });
  // Hand-computed rates: 50 m / 2 Myr = 25 m per Myr; 30 m / 3 Myr = 10 m per Myr.
  it('sedimentation rates between consecutive ties', () => {
    expect(sedimentationRates(section).map((segment) => segment.rate)).toEqual([25, 10]);
  });
  // Depth d is read as height -d (deeper = lower = older): depths 0 m (2 Ma) and 30 m (5 Ma); 10 m depth → 3 Ma.
  it('reads depths with their sign made explicit', () => {
    const model = ties('section,depth,age\nCore 1,0,2\nCore 1,30,5\n');
    const age = ageFunction(model)('Core 1', -10, 2);
    expect(age.age).toBeCloseTo(3, 14);
    expect(model.sections.get('Core 1')!.map((tie) => tie.height)).toEqual([-30, 0]);
  });
});

describe('age model: errors', () => {
  const model = ties('section,height,age\nA,0,10\nA,50,8\n');
  it('refuses extrapolation without the option, naming the sample line and the tied range', () => {
    const ageOf = ageFunction(model, { samplesFile: 'samples.csv' });
    expect(() => ageOf('A', 60, 7)).toThrow(InputError);
    expect(() => ageOf('A', 60, 7)).toThrow(/samples\.csv line 7: height 60 in section "A" lies outside the age model's ties \(0 to 50\).*--extrapolate/);
    expect(ageFunction(model, { extrapolate: true })('A', 60, 7)).toEqual({ age: 7.6, extrapolated: true });
  });
  it('names both ties of an age reversal', () => {
    expect(() => ties('section,height,age\nA,0,10\nA,50,11\n')).toThrow(/ties\.csv line 3, column "age": age reversal in section "A": the tie at height 50 \(line 3, age 11\) is higher than the tie at height 0 \(line 2, age 10\) but not younger/);
    expect(() => ties('section,height,age\nA,0,10\nA,50,10\n')).toThrow(/age reversal/);
  });
  it('refuses two ties at one height, one tie only, a negative age_sd, an unknown section', () => {
    expect(() => ties('section,height,age\nA,5,10\nA,5,9\n')).toThrow(/two ties at the same height 5 in section "A" \(lines 2 and 3\)/);
    expect(() => ties('section,height,age\nA,5,10\n')).toThrow(/only one tie point for section "A"/);
    expect(() => ties('section,height,age,age_sd\nA,5,10,-1\nA,6,9,0\n')).toThrow(/line 2, column "age_sd": must be zero or positive, got "-1"/);
    // Issue 24: tie ages, heights and age_sd are range-checked like every number of a samples file (numberCell:
    // magnitude 1e-100..1e100 or 0), so subnormal ages (which made figure drawing loop) never reach a lineage.
    expect(() => ties('section,height,age\nA,0,2e-308\nA,50,1e-320\n')).toThrow(
      'ties.csv line 2, column "age": is outside the range the tool computes with (magnitude 1e-100 to 1e100, or 0), got "2e-308"; rescale the column',
    );
    expect(() => ties('section,height,age\nA,0,10\nA,1e101,9\n')).toThrow(/ties\.csv line 3, column "height": is outside the range the tool computes with/);
    expect(() => ties('section,height,age,age_sd\nA,0,10,1e-200\nA,5,9,0\n')).toThrow(/ties\.csv line 2, column "age_sd": is outside the range the tool computes with/);
    expect(() => ties('section,height,age\nA,0,10\nA,5,9 Ma\n')).toThrow('ties.csv line 3, column "age": must be a finite number, got "9 Ma" (remove the unit or text after the number)');
    expect(ties('section,height,age\nA,0,1e-100\nA,5,0\n').sections.get('A')?.map((tie) => tie.age)).toEqual([1e-100, 0]);
    expect(() => ageFunction(model, { samplesFile: 's.csv' })('B', 1, 4)).toThrow(/s\.csv line 4, column "section": section "B" has no ties/);
  });
});

describe('age model through buildLineages', () => {
  // Hand-computed: core ties at depth 0 m (2.0 Ma) and 30 m (5.0 Ma): 0.1 Myr per metre.
  // Samples at depths 25, 10, 4 and 33 m → ages 4.5, 3.0, 2.4 and 5.3 Ma (33 m extrapolated);
  // oldest first: 5.3, 4.5, 3.0, 2.4 → elapsed times 0, 0.8, 2.3, 2.9.
  it('places depth samples in time oldest first and flags the extrapolated horizon', async () => {
    const { readSamples } = await import('../../src/data/samples.js');
    const { buildLineages } = await import('../../src/lineage.js');
    const { WarningLog } = await import('../../src/data/warnings.js');
    const model = ties('section,depth,age\nCore 7,0,2.0\nCore 7,30,5.0\n');
    const samples = readSamples(readTable('section,depth,n,mean,sd\nCore 7,25,10,1,0.2\nCore 7,10,10,1.2,0.2\nCore 7,4,10,1.3,0.2\nCore 7,33,10,0.9,0.2\n', 'core.csv'));
    expect(() => buildLineages(samples, { ageOf: ageFunction(model, { samplesFile: 'core.csv' }) })).toThrow(/core\.csv line 5: depth 33 in section "Core 7" lies outside the age model's ties \(0 to 30\)/);
    const warnings = new WarningLog();
    const [lineage] = buildLineages(samples, { ageOf: ageFunction(model, { extrapolate: true }), warnings });
    const expected = [0, 0.8, 2.3, 2.9];
    Array.from(lineage.time).forEach((t, i) => expect(t).toBeCloseTo(expected[i], 12));
    expect(lineage.firstAge).toBeCloseTo(5.3, 12);
    expect(lineage.extrapolated).toEqual([true, false, false, false]);
    expect(warnings.has('extrapolated-age')).toBe(true);
  });
});
