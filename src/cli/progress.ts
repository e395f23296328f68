/**
 * Text progress for the terminal: a bar redrawn in place on a TTY, and a
 * line every 10% otherwise (logs, CI). Writes to stderr so stdout stays
 * clean for data.
 */
import type { RunReporter } from "../simulation/run.js";
import { formatDuration } from "../core/format.js";

/** The time left, from the time spent on the fraction done so far (shown once 2% and 2 s are behind). */
export function remaining(fraction: number, elapsedS: number): string {
  if (fraction < 0.02 || fraction >= 1 || elapsedS < 2) return "";
  return `, about ${formatDuration((elapsedS * (1 - fraction)) / fraction)} left`;
}

/** A reporter that draws progress on a stream. */
export class TextReporter implements RunReporter {
  private readonly stream: NodeJS.WriteStream;
  private readonly tty: boolean;
  private title = "";
  private lastDecile = -1;
  private drawn = false;
  private started = performance.now();

  constructor(stream: NodeJS.WriteStream = process.stderr) {
    this.stream = stream;
    this.tty = Boolean(stream.isTTY);
  }

  phase(text: string): void {
    this.title = text;
    this.lastDecile = -1;
    this.started = performance.now();
    if (!this.tty) this.stream.write(`${text}\n`);
  }

  progress(fraction: number, status: string): void {
    const f = Math.min(1, Math.max(0, fraction));
    const eta = remaining(f, (performance.now() - this.started) / 1000);
    if (this.tty) {
      const width = 24;
      const full = Math.round(f * width);
      const bar = "#".repeat(full) + "-".repeat(width - full);
      const line = `${this.title} [${bar}] ${(100 * f).toFixed(0).padStart(3)}% ${status}${eta}`;
      const cols = this.stream.columns ?? 100;
      this.stream.write(`\r${line.slice(0, cols - 1).padEnd(cols - 1)}`);
      this.drawn = true;
      return;
    }
    const decile = Math.floor(f * 10);
    if (decile > this.lastDecile) {
      this.lastDecile = decile;
      this.stream.write(`  ${(100 * f).toFixed(0).padStart(3)}% ${status}${eta}\n`);
    }
  }

  warn(text: string): void {
    if (this.tty && this.drawn) this.stream.write("\n");
    this.drawn = false;
    this.stream.write(`warning: ${text}\n`);
  }

  endPhase(): void {
    if (this.tty && this.drawn) this.stream.write("\n");
    this.drawn = false;
  }
}
