/** A one-line progress report on stderr: items done / total, rate and time left. */
export interface ProgressLine {
  /** Counts `count` more items done. */
  advance(count?: number): void;
  /** Clears the line. */
  finish(): void;
}

/**
 * Shows `label done/total, N/s, about Ms left` on stderr, redrawn at most ten
 * times a second. Silent when stderr is not a terminal or `quiet` is set
 * (DESIGN §2), so logs and pipes stay clean.
 */
export function createProgressLine(label: string, total: number, quiet: boolean): ProgressLine {
  const enabled = !quiet && process.stderr.isTTY === true;
  const start = performance.now();
  let done = 0;
  let lastDraw = 0;
  const draw = (): void => {
    const seconds = (performance.now() - start) / 1000;
    const rate = seconds > 0 ? done / seconds : 0;
    const left = rate > 0 ? Math.ceil((total - done) / rate) : 0;
    process.stderr.write(`\r${label} ${done}/${total}, ${rate.toFixed(1)}/s, about ${left} s left\u001b[K`);
  };
  return {
    advance(count = 1) {
      done += count;
      if (!enabled) return;
      const now = performance.now();
      if (now - lastDraw < 100 && done < total) return;
      lastDraw = now;
      draw();
    },
    finish() {
      if (enabled) process.stderr.write('\r\u001b[K');
    },
  };
}
