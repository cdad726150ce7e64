/**
 * Proctor availability from RFC 5545 recurrence rules. rrule expands the recurrences; this module
 * checks the rule text first and handles time zones itself.
 *
 * Why a checker of our own in front of rrule: rrule's parser accepts values RFC 5545 §3.3.10
 * forbids (`INTERVAL=-1`, `COUNT=abc`, `BYDAY=XX`), and a rule that can never occur
 * (`FREQ=MONTHLY;BYMONTH=2;BYMONTHDAY=30`) makes rrule walk every period up to the year 9999
 * (about 16 s for a daily rule on this machine) because it only stops on an occurrence. Rules are
 * typed in by proctors, so they are checked against a grammar subset that cannot loop like that.
 *
 * Why floating time: rrule's own `tzid` support converts through the process's local zone. We
 * expand instead in "floating" wall-clock time (UTC fields standing for local fields, which is
 * what RFC 5545 means by a recurrence in a zone: 09:00 stays 09:00 across daylight-saving
 * changes) and turn each occurrence into an instant with luxon and the IANA data.
 */
import {
  type IsoDate,
  addCalendarDays,
  assertIsoDate,
  assertTimeZone,
  calendarDaysBetween,
  isoWeekday,
} from '@evalon/scheduling';
import { DateTime } from 'luxon';
import { Frequency, RRule, type Weekday } from 'rrule';

import type { DateRange, ProctorAvailability } from './types';

/** Recurrence frequencies allowed in availability rules (a day is the finest unit we count). */
export type AvailabilityFrequency = 'DAILY' | 'WEEKLY' | 'MONTHLY';

/** What a valid availability rule says, as read by {@link validateAvailabilityRule}. */
export interface AvailabilityRuleInfo {
  /**
   * Zone of `DTSTART`: its `TZID`, `UTC` for a start written with `Z`, or `null` for a floating
   * start (read in the proctor's zone).
   */
  zone: string | null;
  /** Wall-clock start as `YYYY-MM-DDTHH:mm:ss` (midnight for a `VALUE=DATE` start). */
  start: string;
  /** Whether `DTSTART` is a date without a time (`VALUE=DATE`). */
  allDay: boolean;
  /** The rule's frequency. */
  frequency: AvailabilityFrequency;
  /** The `RRULE` value with names and values upper-cased. */
  rrule: string;
}

/** Result of {@link validateAvailabilityRule}: the rule read, or one readable error. */
export type AvailabilityRuleValidation =
  | {
      /** Whether the rule is valid: yes. */
      valid: true;
      /** The rule as read. */
      rule: AvailabilityRuleInfo;
    }
  | {
      /** Whether the rule is valid: no. */
      valid: false;
      /** One sentence saying what is wrong and how to put it right (for a 422 response). */
      error: string;
    };

/** Thrown when availability holds a rule that {@link validateAvailabilityRule} refuses. */
export class AvailabilityRuleError extends RangeError {
  /**
   * @param where Which rule, e.g. `Availability rule 2`.
   * @param detail The validation error.
   */
  constructor(
    readonly where: string,
    readonly detail: string,
  ) {
    super(`${where} cannot be read: ${detail}`);
    this.name = 'AvailabilityRuleError';
  }
}

/** One occurrence of a rule: the proctor's calendar day and the instant it starts. */
export interface Occurrence {
  /** Calendar day of the occurrence's start in the proctor's zone. */
  date: IsoDate;
  /** The start as a UTC instant (ISO 8601 with `Z`). */
  start: string;
}

/** Why a day is or is not available. */
export type DayStatus = 'available' | 'not-in-pattern' | 'exception' | 'blackout';

/** One day of a proctor's availability. */
export interface DayAvailability {
  /** The day, in the proctor's zone. */
  date: IsoDate;
  /** `available`, or why not: no rule occurs, an exception takes it out, or a blackout. */
  status: DayStatus;
}

interface WallTime {
  year: number;
  month: number;
  day: number;
  hour: number;
  minute: number;
  second: number;
}

type UntilSpec = { kind: 'instant' | 'floating' | 'date'; wall: WallTime };

/** A rule that passed the checks, ready to expand once the proctor's zone is known. */
interface ParsedRule {
  info: AvailabilityRuleInfo;
  start: WallTime;
  startZone: { kind: 'tzid'; name: string } | { kind: 'utc' } | { kind: 'floating' };
  until: UntilSpec | null;
  freq: AvailabilityFrequency;
  interval: number;
  count: number | null;
  wkst: number | null;
  byDay: { weekday: number; n: number | null }[];
  byMonth: number[];
  byMonthDay: number[];
}

const WEEKDAY_CODES = ['MO', 'TU', 'WE', 'TH', 'FR', 'SA', 'SU'] as const;
const RRULE_WEEKDAYS: readonly Weekday[] = [
  RRule.MO,
  RRule.TU,
  RRule.WE,
  RRule.TH,
  RRule.FR,
  RRule.SA,
  RRule.SU,
];
const RRULE_FREQ: Record<AvailabilityFrequency, Frequency> = {
  DAILY: Frequency.DAILY,
  WEEKLY: Frequency.WEEKLY,
  MONTHLY: Frequency.MONTHLY,
};
/** Parts RFC 5545 §3.3.10 defines. */
const RFC_PARTS = new Set([
  'FREQ',
  'UNTIL',
  'COUNT',
  'INTERVAL',
  'BYSECOND',
  'BYMINUTE',
  'BYHOUR',
  'BYDAY',
  'BYMONTHDAY',
  'BYYEARDAY',
  'BYWEEKNO',
  'BYMONTH',
  'BYSETPOS',
  'WKST',
]);
/** The subset availability rules may use (see the module comment for why). */
const SUPPORTED_PARTS = 'FREQ, INTERVAL, COUNT, UNTIL, WKST, BYDAY, BYMONTHDAY and BYMONTH';
const MAX_RULE_LENGTH = 2000;
const MIN_YEAR = 1900;
const MAX_START_YEAR = 2200;
/**
 * Largest COUNT: a counted rule is expanded from its first occurrence (it cannot be moved
 * forward like the others, see `rebase`), so its length bounds the work.
 */
const MAX_COUNT = 1000;
const EXAMPLE = 'DTSTART;TZID=Europe/Berlin:20270104T080000 and RRULE:FREQ=WEEKLY;BYDAY=MO,TU';
/** Days in each month, February counted as 29 (it has 29 days in leap years). */
const MAX_MONTH_LENGTH = [31, 29, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];

class RuleSyntaxError extends Error {}

function fail(message: string): never {
  throw new RuleSyntaxError(message);
}

function readWallTime(
  text: string,
  what: string,
  maxYear: number,
): { wall: WallTime; kind: 'date' | 'time'; utc: boolean } {
  const match = /^(\d{4})(\d{2})(\d{2})(?:T(\d{2})(\d{2})(\d{2})(Z)?)?$/.exec(text);
  if (!match) {
    fail(
      `${what} "${text}" is not a date (YYYYMMDD) or a date-time (YYYYMMDDTHHMMSS, optionally Z)`,
    );
  }
  const [, y, mo, d, h, mi, s, z] = match;
  const wall: WallTime = {
    year: Number(y),
    month: Number(mo),
    day: Number(d),
    hour: Number(h ?? 0),
    minute: Number(mi ?? 0),
    second: Number(s ?? 0),
  };
  // luxon refuses out-of-range fields (month 13, 30 February, 25 o'clock, second 60).
  if (!DateTime.fromObject(wall, { zone: 'utc' }).isValid) {
    fail(`${what} "${text}" is not a real calendar date and time`);
  }
  // Date.UTC reads years 0–99 as 1900–1999, and far-past starts are never meant.
  if (wall.year < MIN_YEAR || wall.year > maxYear) {
    fail(`${what} year ${wall.year} is outside ${MIN_YEAR}–${maxYear}`);
  }
  return { wall, kind: h === undefined ? 'date' : 'time', utc: z === 'Z' };
}

function readDtstart(line: string): Pick<ParsedRule, 'start' | 'startZone'> & { allDay: boolean } {
  const match = /^DTSTART((?:;[A-Z-]+=(?:"[^"]*"|[^:;"]*))*):(.*)$/i.exec(line);
  if (!match) fail(`The DTSTART line "${line}" is malformed; write it like ${EXAMPLE}`);
  const params = new Map<string, string>();
  for (const param of (match[1] ?? '').split(';').filter(Boolean)) {
    const eq = param.indexOf('=');
    const name = param.slice(0, eq).toUpperCase();
    const value = param.slice(eq + 1).replace(/^"(.*)"$/, '$1');
    if (name !== 'TZID' && name !== 'VALUE') {
      fail(`DTSTART parameter ${name} is not supported; use TZID (and VALUE=DATE for a day)`);
    }
    if (params.has(name)) fail(`DTSTART has ${name} twice`);
    params.set(name, value);
  }
  const valueType = (params.get('VALUE') ?? 'DATE-TIME').toUpperCase();
  if (valueType !== 'DATE' && valueType !== 'DATE-TIME') {
    fail(`DTSTART VALUE must be DATE or DATE-TIME, not ${valueType}`);
  }
  const value = (match[2] ?? '').trim();
  const read = readWallTime(value, 'DTSTART', MAX_START_YEAR);
  if (valueType === 'DATE' && read.kind !== 'date') {
    fail(`DTSTART has VALUE=DATE but "${value}" carries a time; write the date only (YYYYMMDD)`);
  }
  if (valueType === 'DATE-TIME' && read.kind === 'date') {
    fail(`DTSTART "${value}" has no time; add one (T080000) or mark it VALUE=DATE`);
  }
  const tzid = params.get('TZID');
  if (tzid !== undefined) {
    if (read.utc) {
      fail('DTSTART has both TZID and a UTC "Z" time (RFC 5545 §3.3.5 forbids that); drop the Z');
    }
    const name = tzid.replace(/^\//, '');
    try {
      // The scheduling package caches zone checks (luxon's check builds an Intl formatter).
      assertTimeZone(name);
    } catch {
      fail(`DTSTART time zone "${tzid}" is unknown; use an IANA name such as Europe/Berlin`);
    }
    return { start: read.wall, startZone: { kind: 'tzid', name }, allDay: read.kind === 'date' };
  }
  return {
    start: read.wall,
    startZone: read.utc ? { kind: 'utc' } : { kind: 'floating' },
    allDay: read.kind === 'date',
  };
}

function readInteger(text: string, part: string, min: number, max: number, signed = false): number {
  const pattern = signed ? /^[+-]?\d{1,4}$/ : /^\d{1,6}$/;
  const value = Number(text);
  if (!pattern.test(text) || value < min || value > max || (signed && value === 0)) {
    const range = signed ? `${min}..-1 or 1..${max}` : `${min}..${max}`;
    fail(`${part} value "${text}" must be a whole number in ${range}`);
  }
  return value;
}

function readWeekday(text: string, part: string): number {
  const index = (WEEKDAY_CODES as readonly string[]).indexOf(text);
  if (index < 0) fail(`${part} value "${text}" is not a weekday (MO, TU, WE, TH, FR, SA, SU)`);
  return index;
}

type RuleParts = Pick<
  ParsedRule,
  'freq' | 'interval' | 'count' | 'wkst' | 'byDay' | 'byMonth' | 'byMonthDay' | 'until'
>;

function readRrule(value: string): RuleParts & { text: string } {
  const text = value.trim().toUpperCase().replace(/;$/, '');
  if (text === '') fail('The RRULE line is empty; it needs at least FREQ, e.g. RRULE:FREQ=WEEKLY');
  const parts = new Map<string, string>();
  for (const part of text.split(';')) {
    const eq = part.indexOf('=');
    const name = eq < 0 ? part : part.slice(0, eq);
    if (eq < 0 || eq === part.length - 1) fail(`RRULE part "${part}" needs a value (NAME=VALUE)`);
    if (!RFC_PARTS.has(name)) fail(`RRULE part ${name} does not exist in RFC 5545`);
    if (parts.has(name)) fail(`RRULE has ${name} twice (RFC 5545 allows each part once)`);
    parts.set(name, part.slice(eq + 1));
  }
  for (const name of ['BYSECOND', 'BYMINUTE', 'BYHOUR']) {
    if (parts.has(name)) {
      fail(`${name} is not used in availability: days are the unit; put the time in DTSTART`);
    }
  }
  for (const name of ['BYYEARDAY', 'BYWEEKNO', 'BYSETPOS']) {
    if (parts.has(name)) {
      fail(`${name} is not supported in availability rules; use ${SUPPORTED_PARTS}`);
    }
  }
  const freqText = parts.get('FREQ');
  if (freqText === undefined) fail('RRULE needs FREQ (DAILY, WEEKLY or MONTHLY)');
  if (!['DAILY', 'WEEKLY', 'MONTHLY'].includes(freqText)) {
    const known = ['SECONDLY', 'MINUTELY', 'HOURLY', 'YEARLY'].includes(freqText);
    fail(
      known
        ? `FREQ=${freqText} is not supported in availability rules; use DAILY, WEEKLY or MONTHLY`
        : `FREQ "${freqText}" is not a frequency; use DAILY, WEEKLY or MONTHLY`,
    );
  }
  const freq = freqText as AvailabilityFrequency;
  if (parts.has('COUNT') && parts.has('UNTIL')) {
    fail('RRULE has both COUNT and UNTIL; RFC 5545 §3.3.10 allows only one of them');
  }
  const interval = parts.has('INTERVAL')
    ? readInteger(parts.get('INTERVAL') as string, 'INTERVAL', 1, 999_999)
    : 1;
  const count = parts.has('COUNT')
    ? readInteger(parts.get('COUNT') as string, 'COUNT', 1, MAX_COUNT)
    : null;
  const wkst = parts.has('WKST') ? readWeekday(parts.get('WKST') as string, 'WKST') : null;
  const byMonth = parts.has('BYMONTH')
    ? (parts.get('BYMONTH') as string).split(',').map((v) => readInteger(v, 'BYMONTH', 1, 12))
    : [];
  const byMonthDay = parts.has('BYMONTHDAY')
    ? (parts.get('BYMONTHDAY') as string)
        .split(',')
        .map((v) => readInteger(v, 'BYMONTHDAY', -31, 31, true))
    : [];
  const byDay = parts.has('BYDAY')
    ? (parts.get('BYDAY') as string).split(',').map((item) => {
        const match = /^([+-]?\d{1,2})?([A-Z]{2})$/.exec(item);
        if (!match)
          fail(`BYDAY value "${item}" is not a weekday such as MO or, monthly, 1MO / -1FR`);
        const weekday = readWeekday(match[2] as string, 'BYDAY');
        const n =
          match[1] === undefined ? null : readInteger(match[1], 'BYDAY position', -5, 5, true);
        return { weekday, n };
      })
    : [];
  let until: UntilSpec | null = null;
  if (parts.has('UNTIL')) {
    const read = readWallTime(parts.get('UNTIL') as string, 'UNTIL', 9999);
    until = {
      kind: read.kind === 'date' ? 'date' : read.utc ? 'instant' : 'floating',
      wall: read.wall,
    };
  }
  if (byMonthDay.length > 0 && freq !== 'MONTHLY') {
    fail('BYMONTHDAY is only supported with FREQ=MONTHLY in availability rules');
  }
  if (byDay.some((d) => d.n !== null)) {
    if (freq !== 'MONTHLY') {
      fail(`A numbered weekday such as 1MO needs FREQ=MONTHLY (RFC 5545 §3.3.10), not ${freq}`);
    }
    if (byMonthDay.length > 0) {
      fail('Use either a numbered weekday (1MO, -1FR) or BYMONTHDAY, not both');
    }
  }
  return { text, freq, interval, count, wkst, byDay, byMonth, byMonthDay, until };
}

/**
 * Refuses rules that can never occur, which would make rrule walk every period to the year 9999.
 * With the supported parts only three patterns can be empty; everything else occurs at least
 * once every few years (every month has each weekday at least four times).
 */
function assertCanOccur(rule: Omit<ParsedRule, 'info'>): void {
  if (rule.freq === 'DAILY' && rule.byDay.length > 0 && rule.interval % 7 === 0) {
    // Every 7·k days is always the weekday of DTSTART.
    const startDay = isoWeekday(wallDate(rule.start)) - 1;
    if (!rule.byDay.some((d) => d.weekday === startDay)) {
      fail(
        `The rule never occurs: every ${rule.interval} days is always a ` +
          `${WEEKDAY_CODES[startDay]} (the DTSTART weekday), which BYDAY leaves out`,
      );
    }
  }
  if (rule.freq === 'MONTHLY') {
    // Months visited: the DTSTART month plus multiples of INTERVAL, modulo 12.
    const visited = new Set<number>();
    for (let k = 0; k < 12; k += 1)
      visited.add(((rule.start.month - 1 + k * rule.interval) % 12) + 1);
    const months = [...visited].filter(
      (m) => rule.byMonth.length === 0 || rule.byMonth.includes(m),
    );
    if (months.length === 0) {
      fail(
        `The rule never occurs: every ${rule.interval} months from month ${rule.start.month} ` +
          'never reaches a month in BYMONTH',
      );
    }
    if (rule.byMonthDay.length > 0) {
      const fits = months.some((m) =>
        rule.byMonthDay.some((d) => Math.abs(d) <= (MAX_MONTH_LENGTH[m - 1] as number)),
      );
      if (!fits) fail('The rule never occurs: no month it visits has the day in BYMONTHDAY');
    }
  }
}

function wallDate(wall: WallTime): IsoDate {
  const pad = (n: number, w = 2) => String(n).padStart(w, '0');
  return `${pad(wall.year, 4)}-${pad(wall.month)}-${pad(wall.day)}`;
}

function wallString(wall: WallTime): string {
  const pad = (n: number) => String(n).padStart(2, '0');
  return `${wallDate(wall)}T${pad(wall.hour)}:${pad(wall.minute)}:${pad(wall.second)}`;
}

function parseRule(text: string, expectedZone?: string): ParsedRule {
  if (typeof text !== 'string' || text.trim() === '') {
    fail(`The rule is empty; write a DTSTART line and an RRULE line, e.g. ${EXAMPLE}`);
  }
  if (text.length > MAX_RULE_LENGTH) fail(`The rule is longer than ${MAX_RULE_LENGTH} characters`);
  // RFC 5545 §3.1: a line break followed by a space or tab continues the previous line.
  const lines = text
    .replace(/\r?\n[ \t]/g, '')
    .split(/\r?\n/)
    .map((line) => line.trim())
    .filter((line) => line !== '');
  let dtstart: string | undefined;
  let rrule: string | undefined;
  for (const line of lines) {
    const name = /^[A-Za-z-]+/.exec(line)?.[0].toUpperCase() ?? '';
    if (name === 'DTSTART') {
      if (dtstart !== undefined) fail('The rule has two DTSTART lines; give exactly one');
      dtstart = line;
    } else if (name === 'RRULE') {
      if (rrule !== undefined)
        fail('The rule has two RRULE lines; save each pattern as its own rule');
      if (!/^RRULE:/i.test(line)) fail('RRULE takes no parameters; write RRULE:FREQ=...');
      rrule = line.slice('RRULE:'.length);
    } else {
      const shown = line.length > 40 ? `${line.slice(0, 40)}…` : line;
      fail(
        `Only DTSTART and RRULE lines are allowed, found "${shown}"; ` +
          'exceptions and blackouts have their own fields',
      );
    }
  }
  if (dtstart === undefined) {
    fail(`The rule needs a DTSTART line giving the first day and time, e.g. ${EXAMPLE}`);
  }
  if (rrule === undefined) fail('The rule needs an RRULE line, e.g. RRULE:FREQ=WEEKLY;BYDAY=MO,TU');
  const start = readDtstart(dtstart);
  const parts = readRrule(rrule);
  if (expectedZone !== undefined) {
    if (start.startZone.kind === 'utc') {
      fail(
        `DTSTART is in UTC; give it in the proctor's zone (DTSTART;TZID=${expectedZone}:...) so ` +
          'the rule keeps its local time across daylight-saving changes',
      );
    }
    if (start.startZone.kind === 'tzid' && start.startZone.name !== expectedZone) {
      fail(`DTSTART is in ${start.startZone.name} but the proctor's zone is ${expectedZone}`);
    }
  }
  const rule = { ...start, ...parts };
  assertCanOccur(rule);
  assertStartInRule(rule);
  return {
    ...rule,
    info: {
      zone:
        start.startZone.kind === 'tzid'
          ? start.startZone.name
          : start.startZone.kind === 'utc'
            ? 'UTC'
            : null,
      start: wallString(start.start),
      allDay: start.allDay,
      frequency: parts.freq,
      rrule: parts.text,
    },
  };
}

/**
 * Checks one availability rule (a `DTSTART` line and an `RRULE` line, RFC 5545 §3.3.10 and
 * §3.8.5.3) and returns what it says or one readable error, for the API's 422 responses.
 *
 * Accepted: `FREQ` DAILY, WEEKLY or MONTHLY with INTERVAL, COUNT or UNTIL, WKST, BYDAY (numbered
 * weekdays such as `1MO` with MONTHLY only), BYMONTHDAY (MONTHLY) and BYMONTH; `DTSTART` with a
 * `TZID`, floating (read in the proctor's zone), in UTC, or `VALUE=DATE`. Names and values are
 * case-insensitive (RFC 5545 §2). Refused with a reason: time-of-day parts (availability counts
 * whole days), BYYEARDAY, BYWEEKNO, BYSETPOS, YEARLY, and rules that can never occur.
 *
 * @param text The rule text; lines separated by LF or CRLF, folded lines allowed.
 * @param zone The proctor's IANA zone, when known: then a `DTSTART` in another zone or in UTC
 *   is refused, so that saved rules keep local time across daylight-saving changes.
 * @throws RangeError only for an unknown `zone` (a bad rule is a result, not an exception).
 */
export function validateAvailabilityRule(text: string, zone?: string): AvailabilityRuleValidation {
  if (zone !== undefined) assertTimeZone(zone);
  try {
    return { valid: true, rule: parseRule(text, zone).info };
  } catch (error) {
    if (error instanceof RuleSyntaxError) return { valid: false, error: error.message };
    throw error;
  }
}

/**
 * Parsed rules and expansions are pure functions of their inputs, and a ranking of many
 * proctors reads the same few weekly patterns over the same visit days again and again; zone
 * arithmetic in the expansion was most of the time of a 1,000-proctor ranking (profiled). Both
 * are remembered, up to a bound, and handed out as copies so no caller can change a cached one.
 */
const memoLimit = 2_000;
const parsedRules = new Map<string, ParsedRule>();
// Keyed by the parsed rule object (one per rule text while it is remembered), then by window.
const expansions = new WeakMap<ParsedRule, Map<string, readonly Occurrence[]>>();

function remember<T>(memo: Map<string, T>, key: string, value: T): T {
  // Clearing at the bound keeps memory flat; a busy server refills what it uses in one request.
  if (memo.size >= memoLimit) memo.clear();
  memo.set(key, value);
  return value;
}

function parseOrThrow(text: string, where: string): ParsedRule {
  const known = parsedRules.get(text);
  if (known) return known;
  try {
    return remember(parsedRules, text, parseRule(text));
  } catch (error) {
    if (error instanceof RuleSyntaxError) throw new AvailabilityRuleError(where, error.message);
    throw error;
  }
}

function floating(wall: WallTime): Date {
  return new Date(
    Date.UTC(wall.year, wall.month - 1, wall.day, wall.hour, wall.minute, wall.second),
  );
}

function wallOf(dt: DateTime): WallTime {
  return {
    year: dt.year,
    month: dt.month,
    day: dt.day,
    hour: dt.hour,
    minute: dt.minute,
    second: dt.second,
  };
}

function floatingDayStart(date: IsoDate): Date {
  return new Date(`${date}T00:00:00.000Z`);
}

/** The rrule object for a parsed rule, in floating time (see the module comment). */
function toRRule(rule: Omit<ParsedRule, 'info'>, until: Date | null): RRule {
  return new RRule({
    freq: RRULE_FREQ[rule.freq],
    dtstart: floating(rule.start),
    interval: rule.interval,
    count: rule.count,
    until,
    wkst: rule.wkst === null ? null : RRULE_WEEKDAYS[rule.wkst],
    byweekday:
      rule.byDay.length === 0
        ? null
        : rule.byDay.map((d) => {
            const weekday = RRULE_WEEKDAYS[d.weekday] as Weekday;
            return d.n === null ? weekday : weekday.nth(d.n);
          }),
    bymonth: rule.byMonth.length === 0 ? null : rule.byMonth,
    bymonthday: rule.byMonthDay.length === 0 ? null : rule.byMonthDay,
    tzid: null,
  });
}

/**
 * Refuses a DTSTART that the rule itself would not produce (a Thursday start for a Monday
 * rule). RFC 5545 §3.8.5.3 leaves such a recurrence set undefined, and implementations differ:
 * ical.js counts the start as an occurrence, rrule does not. Requiring agreement removes the
 * doubt about whether that first day is available.
 */
function assertStartInRule(rule: Omit<ParsedRule, 'info'>): void {
  const start = floating(rule.start);
  const first = toRRule({ ...rule, count: null }, null).after(start, true);
  if (first === null || first.getTime() !== start.getTime()) {
    fail(
      `DTSTART (${wallDate(rule.start)}) is not a day the rule produces; start on one of its ` +
        'days (RFC 5545 §3.8.5.3 leaves an unmatched start undefined)',
    );
  }
}

/**
 * Moves DTSTART forward to the last start of a period on or before `day`, by whole multiples of
 * INTERVAL periods, so that rrule does not walk every period since a start years ago (a daily
 * rule from 2000 took about 100 ms per expansion). The recurrence is unchanged after `day`:
 * - DAILY and WEEKLY move by INTERVAL days or weeks, which keeps the weekday and the grid of
 *   periods (rrule's week is the one holding DTSTART, counted from WKST);
 * - MONTHLY moves to the 1st of a month INTERVAL·k months later, at the same time of day; the
 *   day of the month that DTSTART implied is then written out as BYMONTHDAY.
 * Every occurrence has DTSTART's time of day (no BYHOUR etc.), and rrule emits only dates that
 * match the rule, so nothing before the new start is lost that the window needs. COUNT rules
 * count from the first occurrence and are left as they are.
 */
function rebase(rule: Omit<ParsedRule, 'info'>, day: IsoDate): Omit<ParsedRule, 'info'> {
  if (rule.count !== null) return rule;
  const startDate = wallDate(rule.start);
  if (rule.freq === 'DAILY' || rule.freq === 'WEEKLY') {
    const period = rule.freq === 'DAILY' ? rule.interval : 7 * rule.interval;
    const shift = Math.floor(calendarDaysBetween(startDate, day) / period) * period;
    if (shift <= 0) return rule;
    const [year, month, date] = addCalendarDays(startDate, shift).split('-').map(Number) as [
      number,
      number,
      number,
    ];
    return { ...rule, start: { ...rule.start, year, month, day: date } };
  }
  const [year, month] = day.split('-').map(Number) as [number, number];
  const startMonth = rule.start.year * 12 + rule.start.month - 1;
  const shift = Math.floor((year * 12 + month - 1 - startMonth) / rule.interval) * rule.interval;
  if (shift <= 0) return rule;
  const target = startMonth + shift;
  return {
    ...rule,
    start: { ...rule.start, year: Math.floor(target / 12), month: (target % 12) + 1, day: 1 },
    byMonthDay:
      rule.byDay.length === 0 && rule.byMonthDay.length === 0 ? [rule.start.day] : rule.byMonthDay,
  };
}

/** Expands a parsed rule between two of the proctor's days (remembered; see `memoLimit`). */
function expand(rule: ParsedRule, proctorZone: string, from: IsoDate, to: IsoDate): Occurrence[] {
  let byWindow = expansions.get(rule);
  if (!byWindow) {
    byWindow = new Map();
    expansions.set(rule, byWindow);
  }
  const key = `${proctorZone}\u0000${from}\u0000${to}`;
  let found = byWindow.get(key);
  if (!found) found = remember(byWindow, key, expandOnce(rule, proctorZone, from, to));
  return found.map((o) => ({ ...o }));
}

function expandOnce(
  rule: ParsedRule,
  proctorZone: string,
  from: IsoDate,
  to: IsoDate,
): Occurrence[] {
  const ruleZone =
    rule.startZone.kind === 'tzid'
      ? rule.startZone.name
      : rule.startZone.kind === 'utc'
        ? 'UTC'
        : proctorZone;
  let until: Date | null = null;
  if (rule.until) {
    const wall =
      rule.until.kind === 'instant'
        ? // An instant bound: take its wall-clock time in the rule's zone.
          wallOf(DateTime.fromObject(rule.until.wall, { zone: 'utc' }).setZone(ruleZone))
        : rule.until.kind === 'date'
          ? // A date bound includes that whole day (RFC 5545: UNTIL is inclusive).
            { ...rule.until.wall, hour: 23, minute: 59, second: 59 }
          : rule.until.wall;
    until = floating(wall);
  }
  const sameZone = ruleZone === proctorZone;
  // Another zone is at most ~26 h away, so two spare days on each side catch every occurrence.
  const spare = sameZone ? 0 : 2;
  const firstDay = addCalendarDays(from, -spare);
  const recurrence = toRRule(rebase(rule, firstDay), until);
  const windowStart = floatingDayStart(firstDay);
  const windowEnd = new Date(floatingDayStart(addCalendarDays(to, spare + 1)).getTime() - 1);
  const result: Occurrence[] = [];
  for (const occurrence of recurrence.between(windowStart, windowEnd, true)) {
    const wall: WallTime = {
      year: occurrence.getUTCFullYear(),
      month: occurrence.getUTCMonth() + 1,
      day: occurrence.getUTCDate(),
      hour: occurrence.getUTCHours(),
      minute: occurrence.getUTCMinutes(),
      second: occurrence.getUTCSeconds(),
    };
    // A wall time skipped by a spring-forward change is moved forward by the gap (luxon's rule).
    const instant = DateTime.fromObject(wall, { zone: ruleZone });
    // In the proctor's own zone the wall-clock date is the day, even for a skipped hour.
    const date = sameZone ? wallDate(wall) : (instant.setZone(proctorZone).toISODate() as string);
    if (date >= from && date <= to) {
      result.push({ date, start: instant.toUTC().toISO({ suppressMilliseconds: true }) as string });
    }
  }
  return result.sort((a, b) => (a.start < b.start ? -1 : a.start > b.start ? 1 : 0));
}

function assertRange(range: DateRange, what: string): void {
  assertIsoDate(range.from);
  assertIsoDate(range.to);
  if (range.to < range.from) {
    throw new RangeError(`${what} ends ${range.to} before it starts ${range.from}`);
  }
}

/**
 * Expands one availability rule: its occurrences whose start falls on a day in `range`, as the
 * proctor's calendar days and UTC instants. A floating `DTSTART` is read in `zone`; a rule in
 * another zone is converted occurrence by occurrence, so its days can shift while the two zones'
 * daylight-saving dates differ.
 * @throws AvailabilityRuleError for a rule {@link validateAvailabilityRule} refuses;
 *   RangeError for a bad zone or range.
 */
export function ruleOccurrences(rule: string, zone: string, range: DateRange): Occurrence[] {
  assertTimeZone(zone);
  assertRange(range, 'The range');
  return expand(parseOrThrow(rule, 'The rule'), zone, range.from, range.to);
}

/** Checks the shape of availability and reads every rule once. */
function readAvailability(availability: ProctorAvailability): {
  rules: ParsedRule[];
  exceptionRules: ParsedRule[];
  exceptionDates: Set<IsoDate>;
  extraDates: Set<IsoDate>;
  blackouts: DateRange[];
} {
  const rules = availability.rules.map((text, i) =>
    parseOrThrow(text, `Availability rule ${i + 1}`),
  );
  const exceptionRules: ParsedRule[] = [];
  const exceptionDates = new Set<IsoDate>();
  const extraDates = new Set<IsoDate>();
  availability.exceptions.forEach((exception, i) => {
    if (exception.kind === 'date') {
      exceptionDates.add(assertIsoDate(exception.date));
    } else if (exception.kind === 'extra') {
      extraDates.add(assertIsoDate(exception.date));
    } else if (exception.kind === 'rule') {
      exceptionRules.push(parseOrThrow(exception.rule, `Exception rule ${i + 1}`));
    } else {
      throw new RangeError(`Exception ${i + 1} is neither a date nor a rule`);
    }
  });
  availability.blackouts.forEach((b, i) => assertRange(b, `Blackout ${i + 1}`));
  return {
    rules,
    exceptionRules,
    exceptionDates,
    extraDates,
    blackouts: availability.blackouts,
  };
}

/**
 * Says for each day of `range` whether the proctor is available: some rule occurs on it (or it
 * is a one-off extra day), and
 * neither an exception date, an exception rule nor a blackout takes it out. Days are the
 * proctor's calendar days in `zone`; an occurrence counts for the day its start falls on.
 * @throws AvailabilityRuleError for an unreadable rule; RangeError for bad dates or zone.
 */
export function availabilityDays(
  availability: ProctorAvailability,
  zone: string,
  range: DateRange,
): DayAvailability[] {
  assertTimeZone(zone);
  assertRange(range, 'The range');
  const read = readAvailability(availability);
  // RFC 5545 §3.8.5.1: the set is the rules' occurrences plus the extra days (RDATE-like),
  // minus the exception days and rules (EXDATE/EXRULE-like); blackouts take out whole days.
  const occurring = new Set<IsoDate>(read.extraDates);
  for (const rule of read.rules) {
    for (const o of expand(rule, zone, range.from, range.to)) occurring.add(o.date);
  }
  const excepted = new Set<IsoDate>(read.exceptionDates);
  for (const rule of read.exceptionRules) {
    for (const o of expand(rule, zone, range.from, range.to)) excepted.add(o.date);
  }
  const days: DayAvailability[] = [];
  const length = calendarDaysBetween(range.from, range.to);
  for (let i = 0; i <= length; i += 1) {
    const date = addCalendarDays(range.from, i);
    const status: DayStatus = read.blackouts.some((b) => b.from <= date && date <= b.to)
      ? 'blackout'
      : excepted.has(date)
        ? 'exception'
        : occurring.has(date)
          ? 'available'
          : 'not-in-pattern';
    days.push({ date, status });
  }
  return days;
}

/**
 * The available days of a proctor in the `weeks` weeks starting on `fromDate` (inclusive), for
 * the availability preview screen (e.g. 8 weeks). Same rules as the matching uses.
 * @param availability Rules, exceptions and blackouts.
 * @param zone The proctor's IANA zone.
 * @param fromDate First day shown (`YYYY-MM-DD`).
 * @param weeks Whole number of weeks, 1 to 104.
 * @returns Available days in ascending order.
 * @throws AvailabilityRuleError for an unreadable rule; RangeError for bad arguments.
 */
export function availabilityPreview(
  availability: ProctorAvailability,
  zone: string,
  fromDate: IsoDate,
  weeks: number,
): IsoDate[] {
  if (!Number.isInteger(weeks) || weeks < 1 || weeks > 104) {
    throw new RangeError(`weeks must be a whole number from 1 to 104, got ${weeks}`);
  }
  const range = { from: assertIsoDate(fromDate), to: addCalendarDays(fromDate, weeks * 7 - 1) };
  return availabilityDays(availability, zone, range)
    .filter((day) => day.status === 'available')
    .map((day) => day.date);
}
