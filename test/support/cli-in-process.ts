/**
 * Run a stratotrend command line inside the test process instead of a child
 * `node bin/stratotrend`: the same commander program (`runCommandLine` of
 * src/cli/main.ts, the code `main` runs), with process.stdout and
 * process.stderr captured, the working folder, `process.argv` and the exit
 * code as a child would see them. A child costs 0.3–1 s of start-up and
 * module loading on the 2-core machine; here the modules load once per file.
 *
 * What only a real process shows stays on `runCli` (test/robustness/cli.ts):
 * standard input, signals and broken pipes, the launcher's own messages,
 * process exit (locks released at exit, a command that never settles), and
 * locks held by another process.
 */
import { releaseOutputLocks } from '../../src/io/write-output.js';
import { runCommandLine } from '../../src/cli/main.js';
import type { CliRun } from '../robustness/cli.js';

let running = false;

type Write = typeof process.stdout.write;

function capture(stream: NodeJS.WriteStream, into: string[]): () => void {
  const write = stream.write;
  const tty = Object.getOwnPropertyDescriptor(stream, 'isTTY');
  stream.write = ((chunk: string | Uint8Array, encoding?: BufferEncoding | ((error?: Error | null) => void), callback?: (error?: Error | null) => void): boolean => {
    into.push(typeof chunk === 'string' ? chunk : Buffer.from(chunk).toString('utf8'));
    const done = typeof encoding === 'function' ? encoding : callback;
    if (done) queueMicrotask(() => done(null));
    return true;
  }) as Write;
  // A child's stdout and stderr are pipes: no progress bars.
  Object.defineProperty(stream, 'isTTY', { value: false, configurable: true, writable: true });
  return () => {
    stream.write = write;
    if (tty) Object.defineProperty(stream, 'isTTY', tty);
    else delete (stream as { isTTY?: boolean }).isTTY;
  };
}

/**
 * `stratotrend ARGS` run in this process from folder `cwd`: what it printed and
 * its exit code, as `runCli` reports them for a child process. Runs one at a
 * time (the streams are shared); relative paths resolve against `cwd`.
 */
export async function runCliHere(args: readonly string[], cwd: string): Promise<CliRun> {
  if (running) throw new Error('runCliHere: one command line at a time (stdout and stderr are captured process-wide)');
  running = true;
  const stdout: string[] = [];
  const stderr: string[] = [];
  const saved = { cwd: process.cwd(), argv: process.argv, exitCode: process.exitCode, noColor: process.env.NO_COLOR };
  const argv = [process.execPath, 'bin/stratotrend', ...args];
  const restoreOut = capture(process.stdout, stdout);
  const restoreErr = capture(process.stderr, stderr);
  let status: number;
  try {
    process.chdir(cwd);
    process.argv = argv;
    process.env.NO_COLOR = '1';
    status = await runCommandLine(argv);
  } finally {
    releaseOutputLocks();
    restoreOut();
    restoreErr();
    process.chdir(saved.cwd);
    process.argv = saved.argv;
    process.exitCode = saved.exitCode;
    if (saved.noColor === undefined) delete process.env.NO_COLOR;
    else process.env.NO_COLOR = saved.noColor;
    running = false;
  }
  return { status, stdout: stdout.join(''), stderr: stderr.join('') };
}
