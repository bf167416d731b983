/**
 * A single live status line on stderr, redrawn in place at most a few times a
 * second. It stays silent when stderr is not a terminal (logs, pipes, CI) or when
 * the user asked for --quiet; `log` lines (stage summaries) still print unless quiet.
 */
export class ProgressLine {
  private readonly live: boolean;
  private lastDraw = 0;
  private shown = false;
  private phaseStarted = performance.now();
  private phase = '';

  constructor(private readonly quiet: boolean, stream: NodeJS.WriteStream = process.stderr) {
    this.live = !quiet && stream.isTTY === true;
    this.stream = stream;
  }

  private readonly stream: NodeJS.WriteStream;

  /** Redraws the line: `label done/total (rate/s, ETA)`; `force` skips throttling. */
  update(phase: string, text: string, done?: number, total?: number, force = false): void {
    if (!this.live) return;
    if (phase !== this.phase) {
      this.phase = phase;
      this.phaseStarted = performance.now();
    }
    const now = performance.now();
    if (!force && now - this.lastDraw < 150) return;
    this.lastDraw = now;
    let line = text;
    if (done !== undefined && total !== undefined && total > 0) {
      const seconds = (now - this.phaseStarted) / 1000;
      const rate = seconds > 0 ? done / seconds : 0;
      const eta = rate > 0 && done < total ? ` · about ${formatDuration((total - done) / rate)} left` : '';
      line += ` ${done}/${total}${rate > 0 ? ` · ${formatCount(rate)}/s` : ''}${eta}`;
    }
    const width = this.stream.columns || 100;
    this.stream.write(`\r${line.slice(0, Math.max(20, width - 1))}\x1b[K`);
    this.shown = true;
  }

  /** Clears the live line (before a log line or at the end). */
  clear(): void {
    if (this.live && this.shown) {
      this.stream.write('\r\x1b[K');
      this.shown = false;
    }
  }

  /** Prints a lasting line on stderr (unless quiet). */
  log(line: string): void {
    if (this.quiet) return;
    this.clear();
    this.stream.write(`${line}\n`);
  }
}

/** 1234567 → "1.23M"; keeps progress lines short. */
export function formatCount(value: number): string {
  if (value >= 1e9) return `${(value / 1e9).toFixed(2)}G`;
  if (value >= 1e6) return `${(value / 1e6).toFixed(2)}M`;
  if (value >= 1e4) return `${(value / 1e3).toFixed(1)}k`;
  return value >= 100 ? value.toFixed(0) : value.toFixed(1);
}

/** Seconds as "42 s", "3 min 5 s" or "1 h 2 min". */
export function formatDuration(seconds: number): string {
  if (seconds < 60) return `${Math.max(0, Math.round(seconds))} s`;
  if (seconds < 3600) return `${Math.floor(seconds / 60)} min ${Math.round(seconds % 60)} s`;
  return `${Math.floor(seconds / 3600)} h ${Math.round((seconds % 3600) / 60)} min`;
}

/** A counter-style view of ProgressLine for loops over a known number of items. */
export interface ItemProgress {
  /** Counts `count` more items done. */
  advance(count?: number): void;
  /** Clears the line. */
  finish(): void;
}

/** `label done/total · rate/s · about … left` on stderr; silent when not a terminal or quiet. */
export function createProgressLine(label: string, total: number, quiet: boolean): ItemProgress {
  const line = new ProgressLine(quiet);
  let done = 0;
  return {
    advance(count = 1) {
      done += count;
      line.update(label, label, done, total, done >= total);
    },
    finish() {
      line.clear();
    },
  };
}
