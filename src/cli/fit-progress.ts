/**
 * A progress bar for fitting many lineages, drawn on stderr only when it is a
 * terminal (never in pipes, logs or with --quiet), and only for batches long
 * enough to be worth watching. Cleared when done, so the table that follows
 * starts on a clean line.
 */
export function fittingProgress(
  total: number,
  options: { quiet?: boolean } = {},
  stream: NodeJS.WriteStream = process.stderr,
): ((done: number, total: number) => void) | undefined {
  if (options.quiet || !stream.isTTY || total < 2) return undefined;
  const started = Date.now();
  let drawn = false;
  return (done) => {
    if (done >= total) {
      if (drawn) stream.write('\r\u001b[K');
      drawn = false;
      return;
    }
    const elapsed = (Date.now() - started) / 1000;
    if (!drawn && elapsed < 0.5) return;
    drawn = true;
    const width = 30;
    const filled = Math.round((done / total) * width);
    const remaining = done > 0 ? (elapsed * (total - done)) / done : null;
    stream.write(`\rfitting lineages [${'#'.repeat(filled)}${'.'.repeat(width - filled)}] ${done}/${total}${remaining === null ? '' : `, about ${Math.ceil(remaining)} s left`}\u001b[K`);
  };
}
