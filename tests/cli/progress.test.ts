import { describe, expect, it } from 'vitest';
import type { CliIo } from '../../app/cli/cliIo';
import { progressLine } from '../../app/cli/progress';

function fakeIo(tty: boolean): CliIo & { err: string[]; clock: { t: number } } {
  const err: string[] = [];
  const clock = { t: 0 };
  return { stdout: () => undefined, stderr: (s) => void err.push(s), stderrIsTTY: tty, now: () => clock.t, err, clock };
}

describe('progressLine(io, label)', () => {
  it('draws a percentage on a terminal, at most every 100 ms, always 100 %, and clears the line at the end', () => {
    const io = fakeIo(true);
    const p = progressLine(io, 'work');
    p.update(0.1);
    io.clock.t = 50;
    p.update(0.2); // too soon: skipped
    io.clock.t = 150;
    p.update(0.5);
    io.clock.t = 160;
    p.update(1);
    p.done();
    expect(io.err).toEqual(['\rwork  10%', '\rwork  50%', '\rwork 100%', '\r\x1b[K']);
  });

  it('writes nothing when stderr is not a terminal', () => {
    const io = fakeIo(false);
    const p = progressLine(io, 'work');
    p.update(0.5);
    p.update(1);
    p.done();
    expect(io.err).toEqual([]);
  });
});
