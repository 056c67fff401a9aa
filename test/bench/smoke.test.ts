import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';

// Runs `node dist/bench/run.js --smoke` (built by `npm test`'s pretest) so the
// benchmark keeps working. No timing is asserted: only that every measurement
// is present, and the two facts that do not depend on speed.
const script = fileURLToPath(new URL('../../dist/bench/run.js', import.meta.url));

describe('npm run bench -- --smoke', () => {
  it('measures every section and writes the JSON', () => {
    const folder = mkdtempSync(join(tmpdir(), 'stratotrend-bench-test-'));
    try {
      const out = join(folder, 'results.json');
      const printed = execFileSync(process.execPath, [script, '--smoke', '--out', out], { encoding: 'utf8', stdio: ['ignore', 'pipe', 'pipe'] });
      const results = JSON.parse(readFileSync(out, 'utf8'));
      expect(results.mode).toBe('smoke');
      expect(results.machine.cores).toBeGreaterThanOrEqual(1);
      expect(printed).toContain(`${results.machine.cores} cores`);
      for (const row of results.likelihood) {
        expect(row.filterMicroseconds).toBeGreaterThan(0);
        expect(row.denseMicroseconds).toBeGreaterThan(0);
        // The filter and the dense multivariate normal (ml-matrix Cholesky) give the same logL
        // (closed-form identity: both are the exact Gaussian density; 1e-8 is rounding headroom).
        expect(row.differenceFromDense).toBeLessThan(1e-8);
      }
      // Issue 14's rows: every piece of work measured, in units of the bare filter timed in the same run.
      expect(results.evaluationCost.unitNanoseconds).toBeGreaterThan(0);
      expect(results.evaluationCost.rows).toHaveLength(8);
      for (const row of results.evaluationCost.rows) expect(row.evaluationEquivalents).toBeGreaterThan(1);
      expect(printed).toContain('evaluation-equivalents');
      expect(results.fits.map((row: { horizons: number }) => row.horizons)).toEqual([100, 1000, 100]);
      for (const row of results.fits) expect(row.evaluations).toBeGreaterThan(0);
      expect(results.batch.rows).toHaveLength(2);
      expect(results.batch.rows[1].threads).toBeGreaterThanOrEqual(2);
      // Worker threads must not change a single number of the output.
      expect(results.batch.identical).toBe(true);
      expect(results.startup.helpMilliseconds).toBeGreaterThan(0);
      expect(results.figures.length).toBeGreaterThanOrEqual(1);
      for (const row of results.figures) if (row.available) expect(row.bytes).toBeGreaterThan(0);
      // Every samples-reading command ran on the streamed file (a failing one stops the script).
      expect(results.streaming.commands.map((row: { command: string }) => row.command.split(' ')[1])).toEqual(['fit', 'compare', 'simulate', 'power', 'bootstrap', 'report']);
      expect(results.streaming.rows).toBe(20_000);
      expect(results.calibration).toEqual({ skipped: 'smoke mode' });
      expect(results.sweep).toBeNull();
      expect(results.targets.length).toBeGreaterThanOrEqual(8);
      expect(printed).toContain('Targets (issue 7)');
    } finally {
      rmSync(folder, { recursive: true, force: true });
    }
  }, 120_000);
});
