import { retryDelayMs } from './backoff';

// "Equal jitter" from the AWS Architecture Blog post "Exponential Backoff And Jitter"
// (M. Brooker, 2015): temp = min(cap, base · 2^attempt); sleep = temp/2 + random(0, temp/2).
// The post counts attempts from 0; we count failures from 1, so our attempt n uses 2^(n−1).
// (Formula quoted from memory of the post.)
const settings = { baseMs: 2_000, capMs: 15 * 60_000 };

describe('retryDelayMs', () => {
  it('doubles the ceiling per attempt: 2 s, 4 s, 8 s … with the lower half kept', () => {
    expect(retryDelayMs(1, settings, () => 0)).toBe(1_000);
    expect(retryDelayMs(2, settings, () => 0)).toBe(2_000);
    expect(retryDelayMs(3, settings, () => 0)).toBe(4_000);
    expect(retryDelayMs(3, settings, () => 0.5)).toBe(6_000);
    expect(retryDelayMs(3, settings, () => 0.999999)).toBe(8_000);
  });

  it('stops growing at the cap (15 min): from attempt 10 on, 2 s · 2^9 = 1024 s > 900 s', () => {
    expect(retryDelayMs(9, settings, () => 0.999999)).toBe(512_000);
    for (const attempt of [10, 11, 50, 10_000]) {
      expect(retryDelayMs(attempt, settings, () => 0)).toBe(450_000);
      expect(retryDelayMs(attempt, settings, () => 0.999999)).toBe(900_000);
    }
  });

  it('spreads workers that failed together over the upper half of the ceiling', () => {
    const delays = Array.from({ length: 200 }, () => retryDelayMs(4, settings));
    expect(Math.min(...delays)).toBeGreaterThanOrEqual(8_000);
    expect(Math.max(...delays)).toBeLessThanOrEqual(16_000);
    // 200 draws of a continuous uniform: practically never fewer than 100 distinct values.
    expect(new Set(delays).size).toBeGreaterThan(100);
  });
});
