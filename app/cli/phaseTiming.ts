/**
 * Phase timings of the threaded Ewald run, for measuring (env TORUSGRAV_TIMING=1; stderr, one line per
 * phase). Per phase: wall ms, this thread's CPU ms and the ms it waited for a core (Linux
 * /proc/thread-self/schedstat; NaN elsewhere), so that figures taken on a busy machine can be read.
 */
import { readFileSync } from 'node:fs';

/** Whether TORUSGRAV_TIMING=1 asked for phase timings. */
export function timingEnabled(): boolean {
  return process.env.TORUSGRAV_TIMING === '1';
}

/** [cpu ms, wait ms] of the calling thread so far (NaN when the kernel does not say). */
export function threadTimes(): [number, number] {
  try {
    const f = readFileSync('/proc/thread-self/schedstat', 'utf8').split(' ');
    return [Number(f[0]) / 1e6, Number(f[1]) / 1e6];
  } catch {
    return [NaN, NaN];
  }
}

/** One recorded phase: name, wall, CPU and wait ms, and the process's minor page faults meanwhile (all threads). */
export interface PhaseRecord {
  name: string;
  wall: number;
  cpu: number;
  wait: number;
  faults?: number;
}

/** Minor page faults of the whole process so far (fresh memory touched: ~3 ms per MB on the project machine). */
function processFaults(): number {
  return process.resourceUsage().minorPageFault;
}

/** Records consecutive phases of one thread (no-op unless enabled). */
export class PhaseClock {
  readonly records: PhaseRecord[] = [];
  private wall = performance.now();
  private times = threadTimes();
  private faults = processFaults();
  constructor(readonly enabled = timingEnabled()) {}

  /** Closes the phase that began at the previous mark (or construction). */
  mark(name: string): void {
    if (!this.enabled) return;
    const wall = performance.now();
    const times = threadTimes();
    const faults = processFaults();
    this.records.push({ name, wall: wall - this.wall, cpu: times[0] - this.times[0], wait: times[1] - this.times[1], faults: faults - this.faults });
    this.wall = wall;
    this.times = times;
    this.faults = faults;
  }
}

/** Sums records of the same name (first-appearance order), with the count in the name. */
export function phaseTotals(records: readonly PhaseRecord[]): PhaseRecord[] {
  const by = new Map<string, PhaseRecord & { count: number }>();
  for (const r of records) {
    const t = by.get(r.name) ?? { name: r.name, wall: 0, cpu: 0, wait: 0, count: 0 };
    t.wall += r.wall;
    t.cpu += r.cpu;
    t.wait += r.wait;
    t.count++;
    by.set(r.name, t);
  }
  return [...by.values()].map((t) => ({ name: t.count > 1 ? `${t.name}×${t.count}` : t.name, wall: t.wall, cpu: t.cpu, wait: t.wait }));
}

/** Formats records as lines `timing <who> <phase>: wall W ms, cpu C ms, waited X ms`. */
export function phaseLines(who: string, records: readonly PhaseRecord[]): string {
  return records
    .map((r) => `timing ${who} ${r.name}: wall ${r.wall.toFixed(1)} ms, cpu ${r.cpu.toFixed(1)} ms, waited ${r.wait.toFixed(1)} ms${r.faults !== undefined ? `, page faults ${r.faults}` : ''}\n`)
    .join('');
}
