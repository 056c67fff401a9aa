import { Command } from 'commander';
import { describe, expect, it } from 'vitest';
import { defineFitCommand } from '../../src/cli/commands/fit.js';
import { defineReportCommand } from '../../src/cli/commands/report.js';

// `report` fits exactly as `fit` does, so its fitting options are fit's: one
// definition (addFittingOptions, issue 22), the same flags, help texts and defaults.
const fittingFlags = ['--models', '--min-segment', '--covariate-file', '--rates', '--generation-time', '--adequacy', '--adequacy-draws', '--adequacy-seed', '--no-intervals', '--intervals'];

function optionsOf(name: string): Map<string, { description: string; defaultValue: unknown }> {
  const program = new Command();
  defineFitCommand(program);
  defineReportCommand(program);
  const command = program.commands.find((item) => item.name() === name)!;
  return new Map(command.options.map((option) => [option.long!, { description: option.description, defaultValue: option.defaultValue }]));
}

describe('fit and report share one set of fitting options', () => {
  const fit = optionsOf('fit');
  const report = optionsOf('report');
  it.each(fittingFlags)('%s: same help text and default in both', (flag) => {
    expect(fit.get(flag)).toBeDefined();
    expect(report.get(flag)).toEqual(fit.get(flag));
  });

  it('the --models default is the classic set in both', () => {
    expect(fit.get('--models')!.defaultValue).toBe('classic');
    expect(report.get('--models')!.defaultValue).toBe('classic');
  });
});
