/**
 * What a local sweep shows of one entry's run while it runs. The run writes
 * its progress to stderr, a line at every tenth of its span when stderr is
 * not a terminal (cli/progress.ts); the sweep passes those lines on, with the
 * entry's name, once the entry has run a while (short entries show only the
 * line that they completed), and the run's warnings at once. The run's last
 * error line is kept for a failure's reason.
 */

/** Seconds an entry runs before its progress lines are shown. */
export const PROGRESS_AFTER_S = 10;

export class EntryProgress {
  private pending = "";
  private lastError: string | undefined;
  private lastLine: string | undefined;

  /** @param startedS when the entry's run started (seconds on the clock `take` is given) */
  constructor(
    private readonly name: string,
    private readonly startedS: number,
    private readonly afterS = PROGRESS_AFTER_S,
  ) {}

  /** The lines to show for a chunk of the run's stderr received at `nowS` (a line cut by the chunk waits for its end). */
  take(chunk: string, nowS: number): string[] {
    const lines = (this.pending + chunk).split("\n");
    this.pending = lines.pop() ?? "";
    const out: string[] = [];
    for (const line of lines) {
      if (line.trim() !== "") this.lastLine = line.trim();
      if (line.startsWith("psibox: ")) this.lastError = line.slice("psibox: ".length);
      const p = /^\s*(\d+)% (.*)$/.exec(line);
      // the 100% line says no more than the completion line that follows
      if (p) {
        if (p[1] !== "100" && nowS - this.startedS >= this.afterS) out.push(`${this.name}: ${p[1]}% ${p[2]}`);
      } else if (line.startsWith("warning: ")) out.push(`${this.name}: ${line}`);
    }
    return out;
  }

  /** The reason to record for a failed run: its last error line, else its last line of stderr. */
  get reason(): string | undefined {
    return this.lastError ?? this.lastLine;
  }
}
