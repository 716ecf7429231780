/** Progress of a long run, shown on standard error. */
export interface Progress {
  /** Start a phase; `total` when the amount of work is known. */
  phase(name: string, total?: number): void;
  /** Work done so far in the current phase. */
  tick(done: number): void;
  /** End of the run: clear the bar. */
  done(): void;
}

export const silentProgress: Progress = { phase() {}, tick() {}, done() {} };

function fmtDuration(s: number): string {
  if (!Number.isFinite(s) || s < 0) return '?';
  if (s < 60) return `${Math.round(s)}s`;
  const m = Math.floor(s / 60);
  return m < 60 ? `${m}m${String(Math.round(s % 60)).padStart(2, '0')}s` : `${Math.floor(m / 60)}h${String(m % 60).padStart(2, '0')}m`;
}

/**
 * A progress display on a stream: a bar redrawn in place (versions done of total, rate, time
 * left) when the stream is a terminal; otherwise plain lines, only for a phase that runs longer
 * than two seconds, then at most one every five seconds (short runs print nothing).
 */
export function streamProgress(stream: NodeJS.WriteStream, now: () => number = () => Date.now()): Progress {
  const tty = !!stream.isTTY;
  let name = '';
  let total: number | undefined;
  let started = now();
  let lastDraw = 0;
  let lastDone = 0;
  let drawn = false;
  const draw = (done: number, force = false): void => {
    const t = now();
    if (!force && t - lastDraw < (tty ? 100 : 5000)) return;
    if (!tty && !force && t - started < 2000) return;
    lastDraw = t;
    const elapsed = (t - started) / 1000;
    const rate = elapsed > 0 ? done / elapsed : 0;
    let line: string;
    if (total !== undefined && total > 0) {
      const frac = Math.min(1, done / total);
      const left = rate > 0 ? (total - done) / rate : NaN;
      if (tty) {
        const width = 24;
        const fill = Math.round(frac * width);
        line = `${name} [${'#'.repeat(fill)}${'.'.repeat(width - fill)}] ${done}/${total} ${rate.toFixed(1)}/s ${fmtDuration(left)} left`;
      } else {
        line = `${name}: ${done}/${total} (${Math.round(frac * 100)}%), ${rate.toFixed(1)}/s, about ${fmtDuration(left)} left`;
      }
    } else {
      line = `${name}: ${done}`;
    }
    if (tty) {
      const cols = stream.columns || 80;
      stream.write(`\r${line.slice(0, cols - 1).padEnd(Math.min(cols - 1, line.length + 8))}`);
      drawn = true;
    } else {
      stream.write(line + '\n');
    }
  };
  return {
    phase(n, tot) {
      if (name && tty && drawn) draw(lastDone, true);
      if (tty && drawn) stream.write('\n');
      drawn = false;
      name = n;
      total = tot;
      started = now();
      lastDone = 0;
      lastDraw = 0;
      // plain lines: the first after two seconds of this phase
      lastDraw = tty ? now() : now() - 3000;
    },
    tick(done) {
      lastDone = done;
      draw(done);
    },
    done() {
      if (tty && drawn) {
        draw(lastDone, true);
        stream.write('\n');
      }
      drawn = false;
    },
  };
}
