/**
 * De-identification guard for free-text notes on case records.
 *
 * HIPAA's Safe Harbor method (45 CFR 164.514(b)(2)) lists 18 kinds of identifiers that must be
 * removed, among them names, all date elements (except the year) tied to a person, ages over 89,
 * telephone and fax numbers, e-mail addresses, medical record and other account numbers, URLs
 * and IP addresses. This guard looks for text shaped like those kinds and refuses the note,
 * saying what it found and where. It is a screen, not a guarantee: it cannot recognise a bare
 * name without a title word, so the form also tells people not to type identifiers.
 *
 * It refuses everything the visits' case-note screen (`findPatientIdentifiers` in contracts)
 * refuses, and more; a property test keeps it a superset.
 */

/** Kinds of identifier-like text the guard recognises. */
export type IdentifierKind =
  | 'email'
  | 'phone'
  | 'date'
  | 'record_number'
  | 'name'
  | 'age_over_89'
  | 'url'
  | 'ip_address'
  | 'id_number';

/** One identifier-like piece of text. */
export interface IdentifierFinding {
  kind: IdentifierKind;
  /** Zero-based character offset in the text. */
  index: number;
  /** Length of the matched text. */
  length: number;
  /** A sentence for the person writing the note, naming the kind and the position. */
  message: string;
}

const advice: Record<IdentifierKind, string> = {
  email: 'an e-mail address: leave out e-mail addresses',
  phone: 'a phone number: leave out phone and fax numbers',
  date: 'a calendar date: use the evaluation day number instead of dates',
  record_number: 'a record number or other long number: leave out record and account numbers',
  name: 'a name after a title word: leave out names',
  age_over_89: 'an age over 89: write "90 or older" instead',
  url: 'a web address: leave out web addresses',
  ip_address: 'an IP address: leave out IP addresses',
  id_number: 'an identity-number-like pattern: leave out identity numbers',
};

const months =
  'jan(?:uary)?|feb(?:ruary)?|mar(?:ch)?|apr(?:il)?|may|june?|july?|aug(?:ust)?|sep(?:t(?:ember)?)?|oct(?:ober)?|nov(?:ember)?|dec(?:ember)?';

/**
 * Patterns, each with the kind it reports. Order matters only for overlapping matches: the first
 * pattern to claim a span wins, so the more specific kinds come first.
 */
const patterns: { kind: IdentifierKind; re: RegExp; accept?: (m: RegExpExecArray) => boolean }[] = [
  { kind: 'email', re: /[\p{L}\p{N}._%+-]+@[\p{L}\p{N}-]+(?:\.[\p{L}\p{N}-]+)+/gu },
  { kind: 'url', re: /\b(?:https?:\/\/|www\.)[^\s]+/gi },
  { kind: 'ip_address', re: /\b(?:\d{1,3}\.){3}\d{1,3}\b/g },
  // US social security number shape 123-45-6789.
  { kind: 'id_number', re: /\b\d{3}-\d{2}-\d{4}\b/g },
  // ISO dates 2025-03-14 and 2025/3/14.
  { kind: 'date', re: /\b\d{4}[-/.](?:0?[1-9]|1[0-2])[-/.](?:0?[1-9]|[12]\d|3[01])\b/g },
  // Numeric day/month/year in any order, the loose shape the visits screen also refuses.
  { kind: 'date', re: /\b\d{1,4}[/.-]\d{1,2}[/.-]\d{2,4}\b/g },
  // Day/month without a year, 14/03 or 3/14, only with a slash (a ratio like 1:1 or 2-3 is not).
  {
    kind: 'date',
    re: /\b(\d{1,2})\/(\d{1,2})\b(?!\s*(?:mm|cm|fr|f|w|j|hz|%))/gi,
    accept: (m) => {
      const a = Number(m[1]);
      const b = Number(m[2]);
      // A fraction like 1/3 is not a date: ask for a two-digit day or month (misses 5/6).
      const valid = a >= 1 && b >= 1 && ((a <= 12 && b <= 31) || (b <= 12 && a <= 31));
      return valid && (a >= 10 || b >= 10);
    },
  },
  // Month names: "14 March 2025", "March 14", "Mar 14, 2025", "14th of March".
  {
    kind: 'date',
    re: new RegExp(
      `\\b\\d{1,2}(?:st|nd|rd|th)?\\s+(?:of\\s+)?(?:${months})\\.?(?:,?\\s+\\d{2,4})?\\b|\\b(?:${months})\\.?\\s+\\d{1,2}(?:st|nd|rd|th)?\\b(?:,?\\s+\\d{4})?`,
      'gi',
    ),
    // "may 5" is too often the verb: require a capital M for May.
    accept: (m) => !/(^|\s)may\s/.test(m[0]),
  },
  {
    kind: 'phone',
    // Optional +country code, optional (area), then groups; checked below for shape.
    re: /(?:\+\d{1,3}[\s.-]?)?(?:\(\d{1,4}\)[\s.-]?)?\d{2,4}(?:[\s.-]\d{2,5}){1,4}/g,
    accept: (m) => {
      const text = m[0];
      const digits = text.replace(/\D/g, '').length;
      if (digits < 7 || digits > 15) return false;
      const groups = text.split(/[\s.-]+|\)/).filter(Boolean);
      const last = groups[groups.length - 1]!.replace(/\D/g, '');
      const marked = /^\+|\(/.test(text) || /\d[.-]\d/.test(text);
      // Space-separated numbers are usually measurements ("10 12 14 mm"): a phone number
      // written with spaces ends in a group of 3–5 digits and has at least three groups.
      return last.length >= 3 && (marked ? groups.length >= 2 : groups.length >= 3);
    },
  },
  // Runs of six or more digits, alone or after a record keyword ("MRN 12345", "#4711").
  { kind: 'record_number', re: /\b\d{6,}\b/g },
  {
    kind: 'record_number',
    re: /\b(?:mrn|medical record|record\s*(?:no|number|#)|chart|acct|account\s*(?:no|number)|case\s*id|patient\s*id)\b/gi,
  },
  { kind: 'record_number', re: /#\s?\d{3,}/g },
  {
    kind: 'record_number',
    re: /\b[A-Z]{1,3}\d{5,}\b/g,
  },
  // Names after a title word: "Patient Smith", "pt. Jones", "Mrs O'Neil", "name: Lee".
  {
    kind: 'name',
    re: /\b(?:patient|pt|mr|mrs|ms|miss|mx|name\s*[:=])\.?\s+(\p{Lu}[\p{Ll}'’-]+)/giu,
    accept: (m) => /^\p{Lu}(?:\p{Ll}|['’]\p{Lu})/u.test(m[1] ?? ''),
  },
  { kind: 'date', re: /\b(?:dob|d\.o\.b|date of birth|born)\b/gi },
  {
    kind: 'age_over_89',
    re: /\b(?:(?:9\d|1[0-4]\d)\s*-?\s*(?:years?|yrs?|y\/o|yo|y\.o\.)(?:\s*-?\s*old)?|aged?\s*(?:9\d|1[0-4]\d))\b/gi,
  },
];

/** The identifier-like pieces of `text`, in order of position; empty when the note is clean. */
export function findIdentifiers(text: string): IdentifierFinding[] {
  const found: IdentifierFinding[] = [];
  const claimed: [number, number][] = [];
  const overlaps = (from: number, to: number) => claimed.some(([a, b]) => from < b && a < to);
  for (const { kind, re, accept } of patterns) {
    re.lastIndex = 0;
    for (let m = re.exec(text); m; m = re.exec(text)) {
      if (m[0].length === 0) {
        re.lastIndex += 1;
        continue;
      }
      const from = m.index;
      const to = from + m[0].length;
      if (accept && !accept(m)) continue;
      if (overlaps(from, to)) continue;
      claimed.push([from, to]);
      found.push({
        kind,
        index: from,
        length: m[0].length,
        message: `Character ${from + 1} looks like ${advice[kind]}.`,
      });
    }
  }
  return found.sort((a, b) => a.index - b.index);
}

/** Thrown by `assertDeidentified`; `findings` say what and where. */
export class IdentifierError extends Error {
  constructor(readonly findings: readonly IdentifierFinding[]) {
    super(findings.map((f) => f.message).join(' '));
    this.name = 'IdentifierError';
  }
}

/** Throws `IdentifierError` when the text holds identifier-like pieces. */
export function assertDeidentified(text: string): void {
  const findings = findIdentifiers(text);
  if (findings.length > 0) throw new IdentifierError(findings);
}
