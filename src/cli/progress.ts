/**
 * Progress on stderr for long work: a bar with bytes done, rate and ETA, drawn only on a terminal,
 * only after 2 s, at most ten times a second; per-file lines in batch mode. Silent when stderr is not
 * a terminal, with --quiet, or when NO_COLOR or CI is set. Never writes to stdout.
 */
export interface Progress {
  /** Bytes done out of the total, for the bar. */
  update(done: number, total: number): void;
  /** A finished file, in batch mode. */
  line(text: string): void;
  end(): void;
}

const SILENT: Progress = { update() {}, line() {}, end() {} };

export function progressEnabled(isTTY: boolean, quiet: boolean, env: NodeJS.ProcessEnv): boolean {
  return isTTY && !quiet && env.NO_COLOR === undefined && env.CI === undefined;
}

function mb(bytes: number): string {
  return bytes >= 1e9 ? `${(bytes / 1e9).toFixed(2)} GB` : `${(bytes / 1e6).toFixed(1)} MB`;
}

export function createProgress(
  enabled: boolean,
  write: (s: string) => void,
  now: () => number = () => performance.now(),
  columns = 80,
): Progress {
  if (!enabled) return SILENT;
  const start = now();
  let last = 0;
  let drawn = false;
  const clear = () => {
    if (drawn) write("\r\x1b[2K");
    drawn = false;
  };
  return {
    update(done, total) {
      const t = now();
      if (t - start < 2000 || t - last < 100) return;
      last = t;
      const frac = total > 0 ? Math.min(1, done / total) : 0;
      const rate = done / ((t - start) / 1000);
      const eta = rate > 0 ? (total - done) / rate : 0;
      const width = Math.max(10, Math.min(30, columns - 50));
      const fill = Math.round(frac * width);
      write(
        `\r\x1b[2K[${"=".repeat(fill)}${" ".repeat(width - fill)}] ${(100 * frac).toFixed(0).padStart(3)} %  ${mb(done)} of ${mb(total)}  ${mb(rate)}/s  ${eta >= 1 ? `ETA ${eta.toFixed(0)} s` : ""}`,
      );
      drawn = true;
    },
    line(text) {
      clear();
      write(`${text}\n`);
    },
    end() {
      clear();
    },
  };
}
