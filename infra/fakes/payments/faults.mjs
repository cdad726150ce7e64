// Fault switches for /v1 (never for /__fake or the hosted page): a fraction of calls failing
// with 500 `api_error`, added latency, and "down" (503, or the socket closed). With
// `rngStart` the failures follow a repeatable pseudo-random sequence, so tests are repeatable.

/**
 * A small 32-bit pseudo-random generator (the public-domain "mulberry32" mixing function).
 * Written here rather than imported because the only such package in node_modules comes in
 * as an undeclared dependency of a test tool.
 */
function sequence(start) {
  let a = start | 0;
  return () => {
    a = (a + 0x6d2b79f5) | 0;
    let t = Math.imul(a ^ (a >>> 15), 1 | a);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const DEFAULTS = Object.freeze({
  errorRate: 0,
  errorMode: 'before',
  latencyMs: 0,
  down: false,
  downMode: '503',
  rngStart: null,
});

/** Creates the switch board. `configure` validates and merges; `reset` turns everything off. */
export function createFaults() {
  const settings = { ...DEFAULTS };
  let random = Math.random;
  let injected = 0;

  return {
    settings,

    /** Applies a partial setting; throws an Error naming the bad value. */
    configure(body) {
      const next = { ...settings };
      if (body.errorRate !== undefined) {
        const rate = Number(body.errorRate);
        if (!(rate >= 0 && rate <= 1)) throw new Error('errorRate must be a number from 0 to 1');
        next.errorRate = rate;
      }
      if (body.errorMode !== undefined) {
        if (!['before', 'after'].includes(body.errorMode))
          throw new Error("errorMode must be 'before' or 'after'");
        next.errorMode = body.errorMode;
      }
      if (body.latencyMs !== undefined) {
        const ms = Number(body.latencyMs);
        if (!(Number.isInteger(ms) && ms >= 0 && ms <= 120_000)) {
          throw new Error('latencyMs must be an integer from 0 to 120000');
        }
        next.latencyMs = ms;
      }
      if (body.down !== undefined) {
        if (typeof body.down !== 'boolean') throw new Error('down must be true or false');
        next.down = body.down;
      }
      if (body.downMode !== undefined) {
        if (!['503', 'close'].includes(String(body.downMode)))
          throw new Error("downMode must be '503' or 'close'");
        next.downMode = String(body.downMode);
      }
      if (body.rngStart !== undefined) {
        if (body.rngStart !== null && !Number.isInteger(body.rngStart)) {
          throw new Error('rngStart must be an integer (or null for Math.random)');
        }
        next.rngStart = body.rngStart;
        random = body.rngStart === null ? Math.random : sequence(body.rngStart);
      }
      Object.assign(settings, next);
    },

    /** Whether this call should fail (draws one number per /v1 call while errorRate > 0). */
    draw() {
      if (settings.errorRate <= 0) return false;
      const hit = random() < settings.errorRate;
      if (hit) injected += 1;
      return hit;
    },

    /** How many failures have been injected since the last reset. */
    get injected() {
      return injected;
    },

    /** Turns every switch off. */
    reset() {
      Object.assign(settings, DEFAULTS);
      random = Math.random;
      injected = 0;
    },
  };
}
