import { defaultReportFile, runReport, type ReportCommandOptions } from '../analyses/report-run.js';
import { usageError } from '../data/errors.js';
import { checkOutputFile, inputPaths, prepareOutputFile, releaseOutputLocks, writeAtomically } from '../io/write-output.js';

// `stratotrend report`: the page is made by runReport (src/analyses/report-run.ts);
// this file checks the output name, writes the page and prints.

/**
 * `stratotrend report FILE`: fit FILE (or read a saved fit.json) and write
 * one self-contained HTML report.
 *
 * @example
 * await reportCommand('no-such.json', {});
 * // throws: no-such.json: no such file
 */
export async function reportCommand(file: string, options: ReportCommandOptions): Promise<void> {
  try {
    await reportAndWrite(file, options);
  } finally {
    releaseOutputLocks();
  }
}

async function reportAndWrite(file: string, options: ReportCommandOptions): Promise<void> {
  const path = options.out ?? defaultReportFile;
  if (!/\.html?$/i.test(path)) throw usageError(`--out: the report is one HTML file; give a name ending in .html, got "${path}"`);
  checkOutputFile(path, inputPaths(file, options), '--out file');
  const { html, warningLines } = await runReport(file, options);
  writeAtomically(prepareOutputFile(path, inputPaths(file, options), '--out file'), html);
  if (!options.quiet) process.stdout.write(`Wrote the report to ${path} (${Math.round(Buffer.byteLength(html) / 1024)} kB, one self-contained HTML file)\n`);
  for (const line of warningLines) process.stderr.write(`${line}\n`);
}
