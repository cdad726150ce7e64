/** Settings of {@link retryDelayMs}. */
export interface BackoffSettings {
  /** Delay ceiling before the first retry; it doubles per attempt. */
  baseMs: number;
  /** Largest ceiling. */
  capMs: number;
}

/**
 * Delay before retry number `attempt` (1 after the first failure): exponential backoff with
 * "equal jitter" as described in the AWS Architecture Blog post "Exponential Backoff And Jitter"
 * (M. Brooker, 2015): ceiling = min(cap, base · 2^(attempt−1)), delay = ceiling/2 + random
 * in [0, ceiling/2). Half the ceiling is kept so a retry never comes right back; the random half
 * spreads workers that failed together (e.g. all of them when the mail server went away).
 *
 * @param attempt Attempts made so far (≥ 1).
 * @param random A source of numbers in [0, 1); `Math.random` by default.
 */
export function retryDelayMs(
  attempt: number,
  settings: BackoffSettings,
  random: () => number = Math.random,
): number {
  const exponent = Math.max(0, Math.floor(attempt) - 1);
  // 2^exponent overflows nothing before the cap applies: cap first, then halve.
  const ceiling = Math.min(settings.capMs, settings.baseMs * 2 ** Math.min(exponent, 52));
  const half = ceiling / 2;
  return Math.round(half + random() * half);
}
