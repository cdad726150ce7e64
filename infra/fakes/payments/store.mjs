// In-memory state of the payments fake, its controllable clock, identifiers, and optional
// persistence to one JSON file (written atomically, shortly after each change).
import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';

const ALPHABET = '0123456789ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz';
const STATE_FORMAT = 1;

/** A new identifier in the provider's style: a prefix and random base-62 characters. */
export function newId(prefix, length = 24) {
  const bytes = crypto.randomBytes(length);
  let out = prefix;
  // The modulo bias of 256 % 62 does not matter for identifiers.
  for (const b of bytes) out += ALPHABET[b % ALPHABET.length];
  return out;
}

/** A fresh, empty state. Objects keep internal fields prefixed with `_` (never sent out). */
export function emptyState() {
  return {
    clockOffsetMs: 0,
    paymentIntents: {},
    charges: {},
    refunds: {},
    checkoutSessions: {},
    events: [],
    deliveries: [],
    idempotency: {},
  };
}

/** Empties a state object in place, so every module holding it sees the reset. */
export function resetState(state) {
  for (const key of Object.keys(state)) delete state[key];
  Object.assign(state, emptyState());
}

/**
 * The fake clock: wall-clock time plus an offset that `POST /__fake/clock` advances, so tests
 * can let holds and sessions expire without waiting. API timestamps (`created`, `expires_at`)
 * use it; webhook signatures use real time because receivers check them against their own.
 */
export function createClock(state) {
  return {
    /** Fake time in milliseconds. */
    nowMs: () => Date.now() + state.clockOffsetMs,
    /** Fake time in Unix seconds, as API objects carry it. */
    now: () => Math.floor((Date.now() + state.clockOffsetMs) / 1000),
    /** Moves fake time forward. */
    advance(seconds) {
      state.clockOffsetMs += seconds * 1000;
    },
  };
}

/** A copy of an object without its internal `_` fields: what the API shows. */
export function publicView(object) {
  return JSON.parse(
    JSON.stringify(object, (key, value) => (key.startsWith('_') ? undefined : value)),
  );
}

/**
 * Persistence to one JSON file, or none when `file` is null. `changed()` schedules a write a
 * moment later (many changes, one write); `flush()` writes now (on shutdown).
 */
export function createPersistence(file, state, log = () => {}) {
  if (!file) {
    return { file: null, changed() {}, flush() {}, load: () => false };
  }
  let timer = null;
  const flush = () => {
    if (timer) clearTimeout(timer);
    timer = null;
    fs.mkdirSync(path.dirname(file), { recursive: true });
    const tmp = `${file}.${process.pid}.tmp`;
    fs.writeFileSync(
      tmp,
      JSON.stringify({ format: STATE_FORMAT, savedAt: new Date().toISOString(), state }),
    );
    // Rename is atomic on one file system, so a crash never leaves half a file behind.
    fs.renameSync(tmp, file);
  };
  return {
    file,
    changed() {
      if (!timer) timer = setTimeout(flush, 50);
    },
    flush,
    load() {
      if (!fs.existsSync(file)) return false;
      try {
        const saved = JSON.parse(fs.readFileSync(file, 'utf8'));
        if (saved.format !== STATE_FORMAT) {
          log(`ignoring ${file}: written in format ${saved.format}, expected ${STATE_FORMAT}`);
          return false;
        }
        Object.assign(state, emptyState(), saved.state);
        return true;
      } catch (err) {
        log(`ignoring ${file}: ${err.message}`);
        return false;
      }
    },
  };
}
