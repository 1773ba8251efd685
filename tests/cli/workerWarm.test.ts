/** forcesPrestartThreads: which raw argument lists start a forces run's workers before parsing, and how many. */
import { describe, expect, it } from 'vitest';
import { defaultThreads, forcesPrestartThreads } from '../../app/cli/workerWarm';

describe('forcesPrestartThreads', () => {
  it('a direct-Ewald forces run: its --threads (both spellings), else all cores', () => {
    expect(forcesPrestartThreads(['forces', 'a.csv', '--box', '1', '--threads', '3', '--out', 'o.csv'])).toBe(3);
    expect(forcesPrestartThreads(['forces', 'a.csv', '--threads=4', '--method', 'ewald'])).toBe(4);
    expect(forcesPrestartThreads(['forces', 'a.csv', '--box', '1'])).toBe(defaultThreads() > 1 ? defaultThreads() : 0);
  });

  it('nothing for one thread, other methods, other commands, help, or a --threads value that is not a count', () => {
    expect(forcesPrestartThreads(['forces', 'a.csv', '--threads', '1'])).toBe(0);
    expect(forcesPrestartThreads(['forces', 'a.csv', '--method', 'pme', '--threads', '2'])).toBe(0);
    expect(forcesPrestartThreads(['forces', 'a.csv', '--method=direct', '--order', 'sphere'])).toBe(0);
    expect(forcesPrestartThreads(['check', 'a.csv', '--threads', '2'])).toBe(0);
    expect(forcesPrestartThreads(['forces', '--help'])).toBe(0);
    expect(forcesPrestartThreads(['forces', 'a.csv', '--threads', 'two'])).toBe(0);
    expect(forcesPrestartThreads(['forces', 'a.csv', '--threads'])).toBe(0);
  });
});
