/**
 * Progress on stderr (stdout stays free for results and --json):
 * a one-line bar when stderr is a terminal, or, with --progress-json, one
 * JSON object per line {"progress": 0.42, "stage": "..."} at each whole
 * per cent, for programs that drive thinfoil. Both give an estimate of the
 * time left from the rate so far ("secondsLeft"), after 2 s of work.
 */
export interface ProgressBar {
  update(label: string, fraction: number): void;
  done(): void;
}

export interface ProgressOptions {
  /** Draw the bar on a terminal (default true). */
  bar?: boolean;
  /** JSON lines on stderr instead of the bar. */
  jsonLines?: boolean;
}

export function progressBar(enabled: boolean | ProgressOptions): ProgressBar {
  const o: ProgressOptions = typeof enabled === 'boolean' ? { bar: enabled } : enabled;
  const json = o.jsonLines === true;
  const on = json || (o.bar !== false && process.stderr.isTTY === true);
  let last = -1;
  let lastLabel = '';
  const t0 = performance.now();
  /** Remaining seconds from the rate so far, once there is enough to go on. */
  const left = (f: number): number | undefined => {
    const s = (performance.now() - t0) / 1000;
    return f >= 0.02 && s >= 2 && f < 1 ? Math.round((s * (1 - f)) / f) : undefined;
  };
  return {
    update(label, fraction) {
      if (!on) return;
      const f = Number.isFinite(fraction) ? Math.min(1, Math.max(0, fraction)) : 0;
      const pct = Math.floor(f * 100);
      if (pct === last && label === lastLabel) return;
      last = pct;
      lastLabel = label;
      if (json) {
        const rest = left(f);
        process.stderr.write(`${JSON.stringify({ progress: pct / 100, stage: label, ...(rest === undefined ? {} : { secondsLeft: rest }) })}\n`);
        return;
      }
      const width = 30;
      const n = Math.round(f * width);
      const rest = left(f);
      const eta = rest === undefined ? '' : ` about ${rest < 120 ? `${rest} s` : `${Math.round(rest / 60)} min`} left`;
      process.stderr.write(`\r${label} [${'#'.repeat(n)}${'.'.repeat(width - n)}] ${String(pct).padStart(3)}%${eta}\x1b[K`);
    },
    done() {
      if (on && !json) process.stderr.write('\r\x1b[K');
    },
  };
}
