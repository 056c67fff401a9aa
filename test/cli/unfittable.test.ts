import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCliHere } from '../support/cli-in-process.js';

// Zero sampling variance everywhere: the walks' covariance is singular at the
// first horizon (MODELS.md: the walks start exactly at the ancestral mean), so
// they cannot be fitted. That is a fault of the data, not of the options: exit
// code 1 (data), one line naming the file (common practice for this tool's errors).
describe('commands that need a model the data cannot support', () => {
  const folder = mkdtempSync(join(tmpdir(), 'stratotrend-unfittable-'));
  const file = join(folder, 'flat.csv');
  writeFileSync(file, 'time,n,mean,sd\n0,5,1,0\n1,5,1,0\n2,5,1,0\n3,5,2,0\n4,5,2,0\n');
  for (const args of [['power', file], ['simulate', file, '--model', 'random-walk']]) {
    it(`${args[0]}: exit 1 with one line naming the file`, async () => {
      const result = await runCliHere(args, folder);
      expect(result.status).toBe(1);
      const lines = result.stderr.trim().split('\n');
      expect(lines).toHaveLength(1);
      expect(lines[0]).toMatch(new RegExp(`^stratotrend: ${file.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}: .*could not be fitted`));
    });
  }
});
