/**
 * Progress of a running grid for people: a bar redrawn in place on a
 * terminal, plain lines at intervals otherwise (log files, Slurm output).
 */
import type { GridProgress } from './run.ts';

/** Redraw a terminal bar at most this often, ms. */
const BAR_REDRAW_MS = 200;
/** Print a plain line at most this often, ms (log files stay short). */
export const LINE_INTERVAL_MS = 30_000;
const BAR_WIDTH = 28;

export function formatDuration(ms: number): string {
  if (!Number.isFinite(ms) || ms < 0) return '?';
  const s = Math.round(ms / 1000);
  if (s < 60) return `${s}s`;
  const m = Math.floor(s / 60);
  if (m < 60) return `${m}m${String(s % 60).padStart(2, '0')}s`;
  const h = Math.floor(m / 60);
  if (h < 48) return `${h}h${String(m % 60).padStart(2, '0')}m`;
  return `${Math.floor(h / 24)}d${String(h % 24).padStart(2, '0')}h`;
}

function formatRate(perMinute: number): string {
  return perMinute >= 100 ? perMinute.toFixed(0) : perMinute >= 10 ? perMinute.toFixed(1) : perMinute.toFixed(2);
}

/** One line: `412/1000 models, 3 failed, 95.2/min, 6m11s left`. */
export function progressLine(p: GridProgress): string {
  const left = p.remainingMs === undefined ? '' : `, ${formatDuration(p.remainingMs)} left`;
  return `${p.done}/${p.total} models, ${p.failed} failed, ${formatRate(p.ratePerMinute)}/min${left}`;
}

export function progressBar(p: GridProgress): string {
  const filled = p.total > 0 ? Math.round((p.done / p.total) * BAR_WIDTH) : BAR_WIDTH;
  return `[${'#'.repeat(filled)}${'.'.repeat(BAR_WIDTH - filled)}] ${progressLine(p)}`;
}

export class ProgressPrinter {
  private last = 0;
  private shown = false;
  /** Latest state not drawn yet. */
  private pending: GridProgress | undefined;
  /** Latest state seen, redrawn under a message. */
  private latest: GridProgress | undefined;
  private readonly stream: NodeJS.WritableStream;
  private readonly tty: boolean;
  private readonly intervalMs: number;

  constructor(stream: NodeJS.WritableStream, options: { tty?: boolean; intervalMs?: number } = {}) {
    this.stream = stream;
    this.tty = options.tty ?? Boolean((stream as NodeJS.WriteStream).isTTY);
    this.intervalMs = options.intervalMs ?? (this.tty ? BAR_REDRAW_MS : LINE_INTERVAL_MS);
  }

  update(p: GridProgress): void {
    this.pending = p;
    this.latest = p;
    const now = Date.now();
    if (now - this.last < this.intervalMs && p.done < p.total) return;
    this.last = now;
    this.draw(p);
  }

  /** Show the final state and end the bar's line. */
  finish(): void {
    if (this.pending) this.draw(this.pending);
    if (this.tty && this.shown) this.stream.write('\n');
    this.shown = false;
  }

  /** Print a message without breaking the bar. */
  message(text: string): void {
    if (this.tty && this.shown) this.stream.write('\r\x1b[K');
    this.stream.write(`${text}\n`);
    if (this.tty && this.latest) this.draw(this.latest);
  }

  private draw(p: GridProgress): void {
    if (this.tty) {
      this.stream.write(`\r\x1b[K${progressBar(p)}`);
      this.shown = true;
    } else {
      this.stream.write(`grid: ${progressLine(p)}\n`);
    }
    this.pending = undefined;
  }
}
