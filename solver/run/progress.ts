import cliProgress from 'cli-progress';

export type ProgressOption = 'auto' | 'bar' | 'lines' | 'none';

/** A run's progress display: time reached and stepping rate. */
export interface Progress {
  update(time: number, stepsPerSecond: number): void;
  stop(): void;
}

/** A duration for people: seconds, minutes, hours, days or years. */
export function formatDuration(s: number): string {
  if (!Number.isFinite(s)) return '?';
  if (s < 90) return `${s.toFixed(0)} s`;
  if (s < 5400) return `${(s / 60).toFixed(1)} min`;
  if (s < 2 * 86400) return `${(s / 3600).toFixed(1)} h`;
  if (s < 2 * 365.25 * 86400) return `${(s / 86400).toFixed(1)} days`;
  return `${(s / (365.25 * 86400)).toPrecision(3)} years`;
}

/** The progress display a --progress option asks for: auto is a bar on a terminal, plain lines otherwise. */
export function progressMode(option: ProgressOption | undefined): 'bar' | 'lines' | 'none' {
  return option === 'auto' || option === undefined ? (process.stderr.isTTY ? 'bar' : 'lines') : option;
}

/**
 * Progress from time `start` to `end` on stderr: a bar (time, steps/s, ETA)
 * on a terminal, else a plain line at most every 2 s (and at the first update,
 * so a log shows at once that stepping has begun).
 */
export function makeProgress(option: ProgressOption | undefined, log: (line: string) => void, start: number, end: number): Progress {
  const mode = progressMode(option);
  if (mode === 'none') return { update() {}, stop() {} };
  const started = performance.now();
  if (mode === 'bar') {
    const bar = new cliProgress.SingleBar({
      format: 't {time}/{end} |{bar}| {percentage}% | {rate} steps/s | ETA {eta_formatted}',
      hideCursor: true,
      stream: process.stderr,
      etaBuffer: 50,
    }, cliProgress.Presets.shades_classic);
    bar.start(end, start, { time: start, end, rate: 0 });
    let stopped = false;
    return {
      update(time, rate) { if (!stopped) bar.update(Math.min(time, end), { time: Number(time.toPrecision(6)), rate: rate.toFixed(0) }); },
      stop() { if (!stopped) { stopped = true; bar.stop(); } },
    };
  }
  let last = -Infinity;
  return {
    update(time, rate) {
      const now = performance.now();
      if (now - last < 2000 && time < end) return;
      last = now;
      const elapsed = (now - started) / 1000;
      const eta = time > start ? (elapsed * (end - time)) / (time - start) : Infinity;
      log(`  t=${time.toPrecision(6)}/${end} (${((100 * time) / end).toFixed(1)}%)  ${rate.toFixed(0)} steps/s  ETA ${formatDuration(eta)}`);
    },
    stop() {},
  };
}
