import { describe, expect, it } from 'vitest';
import { offscreenViewSupported } from '../../app/web/view3d/viewBackend';
import { handOver } from '../../app/web/view3d/viewInWorker';

describe('the view worker backend', () => {
  it('hands over an array whose buffer it owns whole, and nothing else', () => {
    const own = new Float32Array(6);
    expect(handOver(own)).toEqual([own.buffer]);
    // a view into a larger buffer would detach the rest of it
    const big = new Float32Array(12);
    expect(handOver(big.subarray(3, 9))).toEqual([]);
    expect(handOver(big.subarray(0, 6))).toEqual([]);
    expect(handOver(null)).toEqual([]);
    // a shared buffer cannot be transferred
    if (typeof SharedArrayBuffer !== 'undefined') expect(handOver(new Float32Array(new SharedArrayBuffer(24)))).toEqual([]);
  });

  it('falls back to drawing on the page where there is no OffscreenCanvas (Node has none)', () => {
    expect(typeof OffscreenCanvas).toBe('undefined');
    expect(offscreenViewSupported()).toBe(false);
  });
});
