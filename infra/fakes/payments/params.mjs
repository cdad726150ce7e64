// Readers for form-encoded parameters. The SDK sends everything as strings in bracket notation
// (`metadata[loanId]=5`, `line_items[0][quantity]=1`); Express's extended parser turns that into
// nested objects and arrays. These readers convert and validate, answering the provider's
// parameter errors.
import { invalidParam } from './errors.mjs';
import { isKnownCurrency } from './money.mjs';

/** Whether a value was supplied (the SDK sends `null` as an empty string). */
function given(value) {
  return value !== undefined && value !== null;
}

/** Turns a qs array, or an object keyed by indices (qs does that past its array limit), into a list. */
export function asList(value) {
  if (!given(value) || value === '') return [];
  if (Array.isArray(value)) return value;
  if (typeof value === 'object') {
    return Object.keys(value)
      .filter((k) => /^\d+$/.test(k))
      .sort((a, b) => Number(a) - Number(b))
      .map((k) => value[k]);
  }
  return [value];
}

/** Reads an integer parameter; undefined when absent and not required. */
export function readInteger(source, key, { label = key, required = false, min } = {}) {
  const value = source?.[key];
  if (!given(value) || value === '') {
    if (required)
      throw invalidParam(`Missing required param: ${label}.`, label, 'parameter_missing');
    return undefined;
  }
  const text = String(value);
  if (!/^-?\d+$/.test(text) || !Number.isSafeInteger(Number(text))) {
    throw invalidParam(`Invalid integer: ${text}`, label, 'parameter_invalid_integer');
  }
  const n = Number(text);
  if (min !== undefined && n < min) {
    throw invalidParam(
      `This value must be greater than or equal to ${min}.`,
      label,
      'parameter_invalid_integer',
    );
  }
  return n;
}

/** Reads a string parameter; undefined when absent and not required. */
export function readString(source, key, { label = key, required = false, oneOf, maxLength } = {}) {
  const value = source?.[key];
  if (!given(value) || value === '') {
    if (required)
      throw invalidParam(`Missing required param: ${label}.`, label, 'parameter_missing');
    return undefined;
  }
  if (typeof value !== 'string') throw invalidParam(`Invalid string: ${label}`, label);
  if (oneOf && !oneOf.includes(value)) {
    throw invalidParam(
      `Invalid ${label}: must be one of ${oneOf.join(', ')}`,
      label,
      'parameter_invalid_string',
    );
  }
  if (maxLength !== undefined && value.length > maxLength) {
    throw invalidParam(`Invalid ${label}: must be at most ${maxLength} characters`, label);
  }
  return value;
}

/** Reads a boolean sent as `true`/`false`. */
export function readBoolean(source, key, { label = key } = {}) {
  const value = source?.[key];
  if (!given(value) || value === '') return undefined;
  if (value === true || value === 'true') return true;
  if (value === false || value === 'false') return false;
  throw invalidParam(`Invalid boolean: ${value}`, label);
}

/** Reads an absolute http(s) URL. */
export function readUrl(source, key, options = {}) {
  const value = readString(source, key, options);
  if (value === undefined) return undefined;
  try {
    const url = new URL(value.replace('{CHECKOUT_SESSION_ID}', 'x'));
    if (url.protocol !== 'http:' && url.protocol !== 'https:') throw new Error('scheme');
  } catch {
    throw invalidParam('Not a valid URL', options.label ?? key, 'url_invalid');
  }
  return value;
}

/** Reads a lowercase ISO 4217 currency. */
export function readCurrency(source, key, { label = key, required = false } = {}) {
  const value = readString(source, key, { label, required });
  if (value === undefined) return undefined;
  if (!isKnownCurrency(value)) throw invalidParam(`Invalid currency: ${value}.`, label);
  return value.toLowerCase();
}

// Metadata limits as the provider documents them (from memory: 50 keys, key up to 40
// characters, value up to 500 characters).
const METADATA_MAX_KEYS = 50;
const METADATA_MAX_KEY_LENGTH = 40;
const METADATA_MAX_VALUE_LENGTH = 500;

/**
 * Applies a metadata parameter to existing metadata, as the provider does: keys merge, an
 * empty value removes its key, and an empty string for the whole parameter clears everything.
 */
export function applyMetadata(existing, value, label = 'metadata') {
  if (!given(value)) return existing;
  if (value === '') return {};
  if (typeof value !== 'object' || Array.isArray(value)) {
    throw invalidParam(`Invalid object: ${label}`, label);
  }
  const next = { ...existing };
  for (const [key, raw] of Object.entries(value)) {
    if (key.length > METADATA_MAX_KEY_LENGTH) {
      throw invalidParam(
        `Metadata keys can have up to ${METADATA_MAX_KEY_LENGTH} characters.`,
        `${label}[${key}]`,
      );
    }
    if (typeof raw === 'object' && raw !== null) {
      throw invalidParam(`Metadata values must be strings.`, `${label}[${key}]`);
    }
    const text = raw === null ? '' : String(raw);
    if (text.length > METADATA_MAX_VALUE_LENGTH) {
      throw invalidParam(
        `Metadata values can have up to ${METADATA_MAX_VALUE_LENGTH} characters.`,
        `${label}[${key}]`,
      );
    }
    if (text === '') delete next[key];
    else next[key] = text;
  }
  if (Object.keys(next).length > METADATA_MAX_KEYS) {
    throw invalidParam(`Metadata can have up to ${METADATA_MAX_KEYS} keys.`, label);
  }
  return next;
}

/** The `expand` list of a request (`expand[]=a` or `expand[0]=a`). */
export function readExpand(source) {
  return asList(source?.expand).map(String);
}
