/**
 * @jest-environment jsdom
 */
// DOM types for the jsdom environment of this file (the packages' tsconfig has no DOM lib).
/// <reference lib="dom" />
/// <reference lib="dom.iterable" />
import ICAL from 'ical.js';

import { ATTENDEES, MILESTONES, ORGANIZER, SITE_ADDRESS, makeLoan } from './__fixtures__/loan';
import type { Recipient } from './format';
import {
  type LoanEmail,
  type LoanInviteDetails,
  loanApproved,
  loanCancelled,
  loanConfirmed,
  loanDeclined,
  loanExpired,
  loanRequested,
} from './templates';

// HTML parts are read back with jsdom's DOMParser (the WHATWG HTML parsing algorithm), calendar
// attachments with ical.js: both general-purpose parsers this project did not write.

const PUBLIC_URL = 'https://evalon.example';
const NEW_YORK: Recipient = {
  name: 'Dana Orrin',
  email: 'dana.orrin@quillfield.example',
  timeZone: 'America/New_York',
  locale: 'en-US',
};
const BERLIN: Recipient = {
  name: 'Jonas Feld',
  email: 'jonas.feld@brightlathe.example',
  timeZone: 'Europe/Berlin',
  locale: 'en-GB',
};
const INVITE: LoanInviteDetails = {
  siteAddress: SITE_ADDRESS,
  organizer: ORGANIZER,
  attendees: ATTENDEES,
  sequence: 0,
  now: '2027-02-10T12:00:00Z',
};

/** The cautions' short form, as the brief words it (docs/design/product.md, "Cautions the product shows"). */
const CAUTIONS =
  'Evalon schedules and documents; it does not certify. Computed dates and deposits are estimates until the lender confirms; local rules, contracts and licensed practice prevail.';

/** One message of every template, for the checks that apply to all of them. */
function everyTemplate(
  loan = makeLoan(),
  recipient: Recipient = NEW_YORK,
): Record<string, LoanEmail> {
  const base = { loan, publicUrl: PUBLIC_URL };
  return {
    loanRequested: loanRequested(base, recipient),
    loanApproved: loanApproved({ ...base, depositDueBy: '2027-03-14T15:00:00Z' }, recipient),
    loanConfirmed: loanConfirmed({ ...base, invite: INVITE }, recipient),
    loanDeclined: loanDeclined({ ...base, reason: 'Both units are in maintenance.' }, recipient),
    loanCancelled: loanCancelled(
      {
        ...base,
        reason: 'Surgeon unavailable.',
        cancelledBy: 'Dana Orrin',
        invite: { ...INVITE, sequence: 1 },
      },
      recipient,
    ),
    loanExpired: loanExpired(
      { ...base, expiredAt: '2027-03-14T15:00:00Z', expiredFrom: 'approved' },
      recipient,
    ),
  };
}

function parseHtml(html: string): Document {
  return new DOMParser().parseFromString(html, 'text/html');
}

/** Text of an element with `<br>` read as a line break (jsdom has no innerText). */
function textOf(element: Element): string {
  const clone = element.cloneNode(true) as Element;
  clone.querySelectorAll('br').forEach((br) => br.replaceWith('\n'));
  return clone.textContent ?? '';
}

function squash(text: string): string {
  return text.replace(/\s+/g, ' ').trim();
}

/**
 * Body text a reader sees (without the hidden preheader), with a space after each block or cell
 * the way a renderer separates them.
 */
function readableText(doc: Document): string {
  const clone = doc.body.cloneNode(true) as HTMLElement;
  clone.querySelectorAll('[aria-hidden="true"]').forEach((el) => el.remove());
  clone.querySelectorAll('th, td, li, p, h1, h2, blockquote').forEach((el) => el.append(' '));
  return squash(textOf(clone));
}

/** The value cell of the fact row labelled `label`. */
function factValue(doc: Document, label: string): string | undefined {
  const row = [...doc.querySelectorAll('tr')].find(
    (tr) => tr.querySelector('th')?.textContent === label,
  );
  const cell = row?.querySelector('td');
  return cell ? textOf(cell) : undefined;
}

describe('instants are shown in the recipient’s zone', () => {
  // Reference values (docs/references.md, derived from 15 U.S.C. 260a, EU Directive 2000/84/EC
  // and the IANA tz database): New York moves to EDT (UTC−4) at 2027-03-14 07:00Z; Berlin stays
  // on CET (UTC+1) until 2027-03-28. So 2027-03-14 15:00Z is 11:00 EDT and 16:00 CET.
  const data = { loan: makeLoan(), publicUrl: PUBLIC_URL, depositDueBy: '2027-03-14T15:00:00Z' };

  it('New York reads the deadline as 11:00 AM EDT on March 14, 2027', () => {
    const mail = loanApproved(data, NEW_YORK);
    const html = readableText(parseHtml(mail.html));
    for (const part of [html, mail.text]) {
      expect(part).toMatch(/Sunday, March 14, 2027,? at 11:00\sAM EDT/u);
      expect(part).not.toMatch(/10:00\sAM EST/u); // what a missed DST change would show
    }
    expect(mail.subject).toMatch(/due by Mar 14, 2027,? 11:00\sAM EDT/u);
  });

  it('Berlin reads the same deadline as 16:00 CET', () => {
    const mail = loanApproved(data, BERLIN);
    const html = readableText(parseHtml(mail.html));
    for (const part of [html, mail.text]) {
      expect(part).toMatch(/Sunday, 14 March 2027,? at 16:00 CET/u);
    }
  });

  it('shows the New York clock jump at the change: 06:59Z is 1:59 AM EST, 07:00Z is 3:00 AM EDT (derived)', () => {
    const before = loanApproved({ ...data, depositDueBy: '2027-03-14T06:59:00Z' }, NEW_YORK);
    const after = loanApproved({ ...data, depositDueBy: '2027-03-14T07:00:00Z' }, NEW_YORK);
    expect(before.text).toMatch(/1:59\sAM EST/u);
    expect(after.text).toMatch(/3:00\sAM EDT/u);
  });

  it('shows the request time to the lender in the lender’s zone (2027-02-01 14:00Z = 15:00 CET)', () => {
    const mail = loanRequested({ loan: makeLoan(), publicUrl: PUBLIC_URL }, BERLIN);
    expect(mail.text).toMatch(/Requested on: Monday, 1 February 2027,? at 15:00 CET/u);
  });

  it('falls back to en-US when the recipient has no locale', () => {
    const mail = loanApproved(data, { ...BERLIN, locale: undefined });
    // en-US has no abbreviation for Berlin in the runtime's Intl data and writes GMT+1.
    expect(mail.text).toMatch(/March 14, 2027,? at 4:00\sPM GMT\+1/u);
  });
});

describe('milestones stay the site’s calendar days', () => {
  // A first case day is a day on the hospital's calendar, not an instant: readers at UTC−11 and
  // UTC+14 (Pacific/Pago_Pago, Pacific/Kiritimati; IANA tz, from memory) must see the same day.
  // Treating "2027-03-15" as midnight UTC and converting it would show 14 March at UTC−11.
  it.each(['Pacific/Pago_Pago', 'Pacific/Kiritimati', 'America/New_York'])(
    'a reader in %s sees first case day Monday, March 15, 2027, labelled with the site zone',
    (timeZone) => {
      const mail = loanConfirmed(
        { loan: makeLoan(), publicUrl: PUBLIC_URL, invite: INVITE },
        { ...NEW_YORK, timeZone },
      );
      const doc = parseHtml(mail.html);
      expect(factValue(doc, 'First case day')).toBe('Monday, March 15, 2027');
      expect(factValue(doc, 'Last case day')).toBe('Friday, March 19, 2027');
      expect(mail.text).toContain('First case day: Monday, March 15, 2027');
      expect(mail.text).toContain('Last case day: Friday, March 19, 2027');
      for (const part of [readableText(doc), mail.text]) {
        expect(part).toContain('Calendar days at East Campus, site time zone America/New_York.');
      }
    },
  );

  it('names every milestone in plain words', () => {
    const mail = loanConfirmed(
      { loan: makeLoan(), publicUrl: PUBLIC_URL, invite: INVITE },
      NEW_YORK,
    );
    for (const label of [
      'Ship by',
      'Arrives by',
      'First case day',
      'Last case day',
      'Ships back by',
      'Back at depot',
      'Ready again',
    ]) {
      expect(mail.text).toContain(`${label}: `);
    }
    // Depot days in the fixture: 2027-03-08 is a Monday, 2027-03-29 a Monday (Gregorian calendar).
    expect(mail.text).toContain('Ship by: Monday, March 8, 2027');
    expect(mail.text).toContain('Ready again: Monday, March 29, 2027');
    expect(MILESTONES.readyAgain).toBe('2027-03-29');
  });
});

describe('escaping hostile values', () => {
  const hostile = '<script>alert("x")</script>';
  const attribute = `"><img src=x onerror=alert(1)>`;
  const loan = makeLoan({
    hospitalName: `Clinic ${hostile}`,
    siteName: `Site ${attribute}`,
    lenderName: `Lender ${hostile}`,
    requestedBy: `Req ${attribute}`,
    note: `Note ${hostile}\nsecond line ${attribute}`,
    units: makeLoan().units.map((u) => ({ ...u, modelName: `Model ${hostile}` })),
  });
  const recipient = { ...NEW_YORK, name: `Name ${hostile}` };
  const mails: Record<string, LoanEmail> = {
    ...everyTemplate(loan, recipient),
    loanDeclined: loanDeclined(
      { loan, publicUrl: PUBLIC_URL, reason: `Because ${hostile}` },
      recipient,
    ),
  };

  it.each(Object.keys(mails))(
    '%s: no element or handler comes from the data, the text survives',
    (name) => {
      const mail = mails[name];
      const doc = parseHtml(mail.html);
      expect(doc.querySelectorAll('script, img')).toHaveLength(0);
      const handlers = [...doc.querySelectorAll('*')].flatMap((el) =>
        [...el.attributes].filter((a) => a.name.toLowerCase().startsWith('on')),
      );
      expect(handlers).toHaveLength(0);
      const text = readableText(doc);
      expect(text).toContain(`Hello Name ${hostile},`);
      expect(text).toContain(`Clinic ${hostile}`);
      expect(text).toContain(`Model ${hostile}`);
      expect(text).toContain(`Site ${attribute}`);
      // The title is the subject, as text.
      expect(doc.title).toBe(mail.subject);
      // The text part is not HTML: values appear as written.
      expect(mail.text).toContain(`Hello Name ${hostile},`);
      expect(mail.text).not.toContain('&lt;');
    },
  );

  it('keeps the line breaks of a note as <br> and the quote in the text part', () => {
    const mail = mails.loanRequested;
    const quote = parseHtml(mail.html).querySelector('blockquote');
    expect(quote && textOf(quote)).toBe(`Note ${hostile}\nsecond line ${attribute}`);
    expect(mail.text).toContain(`> Note ${hostile}\n> second line ${attribute}`);
  });

  it('keeps subjects on one line whatever the names contain', () => {
    const crlf = makeLoan({ hospitalName: 'Clinic\r\nBcc: someone@elsewhere.example' });
    for (const mail of Object.values(everyTemplate(crlf))) {
      expect(mail.subject).not.toMatch(/[\r\n]/);
    }
    expect(loanRequested({ loan: crlf, publicUrl: PUBLIC_URL }, NEW_YORK).subject).toBe(
      'New loan request EV-2027-000042 from Clinic Bcc: someone@elsewhere.example',
    );
  });
});

describe('the text part mirrors the HTML part', () => {
  it.each(Object.entries(everyTemplate()))('%s', (_name, mail) => {
    const doc = parseHtml(mail.html);
    const text = mail.text;
    // Heading, paragraphs, section titles.
    expect(text).toContain(doc.querySelector('h1')?.textContent ?? '<missing h1>');
    for (const p of doc.querySelectorAll('td > p')) {
      expect(squash(text)).toContain(
        squash(textOf(p)).replace(/^If the button does not work, open this address: /, ''),
      );
    }
    for (const h2 of doc.querySelectorAll('h2')) {
      expect(text).toContain((h2.textContent ?? '').toUpperCase());
    }
    // Every fact row as "label: value".
    const rows = doc.querySelectorAll('table:not([role]) tr');
    expect(rows.length).toBeGreaterThan(0);
    for (const row of rows) {
      const label = row.querySelector('th')?.textContent ?? '';
      const value = textOf(row.querySelector('td') as Element);
      expect(text).toContain(`${label}: ${value}`);
    }
    // Every list item and every link.
    for (const li of doc.querySelectorAll('li')) expect(text).toContain(`- ${li.textContent}`);
    const links = [...doc.querySelectorAll('a[href]')].map((a) => a.getAttribute('href') ?? '');
    expect(links.length).toBeGreaterThan(0);
    for (const href of links) expect(text).toContain(href);
    // The cautions, word for word, in both.
    expect(readableText(doc)).toContain(CAUTIONS);
    expect(text).toContain(CAUTIONS);
    // And the other way round: every word of the text part is in the HTML's readable text.
    const html = readableText(doc).toLowerCase();
    const missing = text
      .split(/\s+/)
      .filter((word) => word && !/^(=+|--|>|-)$/.test(word))
      // The text part writes "label: value"; the HTML puts label and value in two cells.
      .map((word) => word.replace(/:$/, ''))
      .filter((word) => !html.includes(word.toLowerCase()));
    expect(missing).toEqual([]);
  });
});

describe('loanApproved', () => {
  it('shows the deposit from integer minor units: 250000 USD = $2,500.00 (ISO 4217 exponent 2; provider docs: 1000 = 10.00 USD)', () => {
    const mail = loanApproved(
      { loan: makeLoan(), publicUrl: PUBLIC_URL, depositDueBy: '2027-03-14T15:00:00Z' },
      NEW_YORK,
    );
    expect(mail.text).toContain('Deposit due: $2,500.00');
    expect(mail.subject).toContain('deposit of $2,500.00');
  });

  it('shows a zero-decimal currency without decimals: 250000 JPY = ¥250,000 (ISO 4217 exponent 0)', () => {
    const loan = makeLoan({ deposit: { amount: 250_000, currency: 'JPY' } });
    const mail = loanApproved(
      { loan, publicUrl: PUBLIC_URL, depositDueBy: '2027-03-14T15:00:00Z' },
      NEW_YORK,
    );
    expect(mail.text).toContain('Deposit due: ¥250,000');
  });

  it('links the button to the pay page when given, else to the loan', () => {
    const data = { loan: makeLoan(), publicUrl: PUBLIC_URL, depositDueBy: '2027-03-14T15:00:00Z' };
    const withPay = parseHtml(
      loanApproved({ ...data, actionUrl: 'https://pay.evalon.example/d/abc?x=1&y=2' }, NEW_YORK)
        .html,
    );
    const button = [...withPay.querySelectorAll('a')].find(
      (a) => a.textContent === 'Pay the deposit',
    );
    expect(button?.getAttribute('href')).toBe('https://pay.evalon.example/d/abc?x=1&y=2');
    const plain = parseHtml(loanApproved(data, NEW_YORK).html);
    const fallback = [...plain.querySelectorAll('a')].find(
      (a) => a.textContent === 'Pay the deposit',
    );
    expect(fallback?.getAttribute('href')).toBe('https://evalon.example/loans/42');
  });

  it('asks to confirm instead of pay when no deposit is due', () => {
    const loan = makeLoan({ deposit: { amount: 0, currency: 'USD' } });
    const mail = loanApproved(
      { loan, publicUrl: PUBLIC_URL, depositDueBy: '2027-03-14T15:00:00Z' },
      NEW_YORK,
    );
    expect(mail.text).toContain('Confirm the loan: https://evalon.example/loans/42');
    expect(mail.text).toContain('Deposit: None due');
    expect(mail.text).not.toContain('Pay the deposit');
    expect(mail.subject).toMatch(/please confirm by Mar 14, 2027,? 11:00\sAM EDT/u);
  });

  it('refuses a javascript: link and a deadline without an offset', () => {
    const data = { loan: makeLoan(), publicUrl: PUBLIC_URL, depositDueBy: '2027-03-14T15:00:00Z' };
    expect(() => loanApproved({ ...data, actionUrl: 'javascript:alert(1)' }, NEW_YORK)).toThrow(
      TypeError,
    );
    expect(() => loanApproved({ ...data, depositDueBy: '2027-03-14T15:00:00' }, NEW_YORK)).toThrow(
      RangeError,
    );
  });
});

describe('calendar attachments', () => {
  function mediaType(contentType: string): { type: string; params: Record<string, string> } {
    const [type, ...rest] = contentType.split(';').map((s) => s.trim());
    const params = Object.fromEntries(
      rest.map((p) => {
        const [k, v] = p.split('=');
        return [k.toLowerCase(), v];
      }),
    );
    return { type: type.toLowerCase(), params };
  }

  it('the confirmation carries the .ics as text/calendar; method=REQUEST (RFC 6047 §2.4: equals METHOD, from memory)', () => {
    const mail = loanConfirmed(
      { loan: makeLoan(), publicUrl: PUBLIC_URL, invite: INVITE },
      NEW_YORK,
    );
    expect(mail.attachments).toHaveLength(1);
    const [ics] = mail.attachments ?? [];
    expect(ics.filename).toBe('evalon-loan-EV-2027-000042.ics');
    const { type, params } = mediaType(ics.contentType);
    expect(type).toBe('text/calendar');
    expect(params.method).toBe('REQUEST');
    expect(params.charset).toBe('utf-8');
    const calendar = new ICAL.Component(ICAL.parse(ics.content));
    expect(calendar.getFirstPropertyValue('method')).toBe(params.method);
    expect(calendar.getAllSubcomponents('vevent')).toHaveLength(2);
    expect(mail.text).toContain('evalon-loan-EV-2027-000042.ics');
  });

  it('every recipient gets the same invite revision (same UIDs, DTSTAMP and SEQUENCE)', () => {
    const data = { loan: makeLoan(), publicUrl: PUBLIC_URL, invite: INVITE };
    const a = loanConfirmed(data, NEW_YORK).attachments?.[0].content;
    const b = loanConfirmed(data, BERLIN).attachments?.[0].content;
    expect(a).toBeDefined();
    expect(b).toBe(a);
  });

  it('a cancellation of a confirmed loan carries METHOD:CANCEL; one without invite carries nothing', () => {
    const base = { loan: makeLoan(), publicUrl: PUBLIC_URL, reason: 'Surgeon unavailable.' };
    const withInvite = loanCancelled({ ...base, invite: { ...INVITE, sequence: 1 } }, NEW_YORK);
    const [ics] = withInvite.attachments ?? [];
    expect(mediaType(ics.contentType).params.method).toBe('CANCEL');
    const calendar = new ICAL.Component(ICAL.parse(ics.content));
    expect(calendar.getFirstPropertyValue('method')).toBe('CANCEL');
    for (const event of calendar.getAllSubcomponents('vevent')) {
      expect(event.getFirstPropertyValue('status')).toBe('CANCELLED');
      expect(event.getFirstPropertyValue('sequence')).toBe(1);
    }
    const without = loanCancelled(base, NEW_YORK);
    expect(without.attachments).toBeUndefined();
    expect(without.text).not.toContain('.ics');
  });

  it('no other template attaches anything', () => {
    const mails = everyTemplate();
    for (const name of ['loanRequested', 'loanApproved', 'loanDeclined', 'loanExpired']) {
      expect(mails[name].attachments).toBeUndefined();
    }
  });
});

describe('content of each template', () => {
  it('loanRequested shows requester, deposit, both date groups, the note and a review link', () => {
    const mail = loanRequested({ loan: makeLoan(), publicUrl: PUBLIC_URL }, BERLIN);
    expect(mail.subject).toBe('New loan request EV-2027-000042 from Quillfield Teaching Hospital');
    expect(mail.text).toContain('Requested by: Dana Orrin');
    expect(mail.text).toContain('Deposit (computed): US$2,500.00'); // en-GB writes USD as US$
    expect(mail.text).toContain('DATES AT THE LENDER’S DEPOT');
    expect(mail.text).toContain('> Cases are booked in OR 4.');
    expect(mail.text).toContain('Review the request: https://evalon.example/loans/42');
  });

  it('loanConfirmed lists the units and the clinical cautions', () => {
    const mail = loanConfirmed(
      { loan: makeLoan(), publicUrl: PUBLIC_URL, invite: INVITE },
      NEW_YORK,
    );
    expect(mail.text).toContain(
      '- Calder arm robotic platform, serial CA-0007 (from Lakeside depot)',
    );
    expect(mail.text).toContain(
      '- Tessel flexible ureteroscope, serial TF-0119 (from Ridgeway depot)',
    );
    expect(mail.text).toContain('used only by trained clinicians');
    expect(mail.text).toContain('contaminated on arrival');
    expect(mail.text).toContain('de-identified');
    expect(mail.subject).toBe(
      'Loan EV-2027-000042 confirmed: arrives at East Campus by Thursday, March 11, 2027',
    );
  });

  it('loanDeclined and loanCancelled quote the reason', () => {
    const declined = loanDeclined(
      { loan: makeLoan(), publicUrl: PUBLIC_URL, reason: 'Both units are in maintenance.' },
      NEW_YORK,
    );
    expect(declined.text).toContain('REASON GIVEN\n> Both units are in maintenance.');
    const cancelled = loanCancelled(
      {
        loan: makeLoan(),
        publicUrl: PUBLIC_URL,
        reason: 'Surgeon unavailable.',
        cancelledBy: 'Dana Orrin',
      },
      NEW_YORK,
    );
    expect(cancelled.text).toContain('was cancelled by Dana Orrin');
    expect(cancelled.text).toContain('> Surgeon unavailable.');
  });

  it('loanExpired says why, for each state it can expire from', () => {
    const base = { loan: makeLoan(), publicUrl: PUBLIC_URL, expiredAt: '2027-03-14T15:00:00Z' };
    const fromApproved = loanExpired({ ...base, expiredFrom: 'approved' }, BERLIN);
    expect(fromApproved.text).toContain('The deposit was not secured by the deadline.');
    expect(fromApproved.text).toMatch(/Expired: Sunday, 14 March 2027,? at 16:00 CET/u);
    const fromRequested = loanExpired({ ...base, expiredFrom: 'requested' }, NEW_YORK);
    expect(fromRequested.text).toContain('did not answer the request in time');
  });

  it('refuses a recipient with an unknown zone or a malformed locale, and a malformed loan', () => {
    const data = { loan: makeLoan(), publicUrl: PUBLIC_URL };
    expect(() => loanRequested(data, { ...NEW_YORK, timeZone: 'Eastern' })).toThrow(RangeError);
    expect(() => loanRequested(data, { ...NEW_YORK, locale: 'not a locale' })).toThrow(RangeError);
    expect(() => loanRequested(data, { ...NEW_YORK, email: 'nobody' })).toThrow(TypeError);
    expect(() =>
      loanRequested(
        { ...data, loan: makeLoan({ deposit: { amount: 1.5, currency: 'USD' } }) },
        NEW_YORK,
      ),
    ).toThrow();
  });
});

describe('HTML layout', () => {
  const mails = Object.entries(everyTemplate());

  it.each(mails)('%s: accessible, inline-styled, table-based', (_name, mail) => {
    const doc = parseHtml(mail.html);
    expect(doc.documentElement.getAttribute('lang')).toBe('en');
    expect(doc.title).toBe(mail.subject);
    // Inline styles only: mail clients drop <style> blocks and external sheets.
    expect(doc.querySelectorAll('style, link, script')).toHaveLength(0);
    // Layout tables are presentational; data tables have row headers.
    const layout = doc.querySelectorAll('table[role="presentation"]');
    expect(layout.length).toBeGreaterThanOrEqual(3);
    for (const table of doc.querySelectorAll('table:not([role])')) {
      for (const row of table.querySelectorAll('tr')) {
        expect(row.querySelector('th')?.getAttribute('scope')).toBe('row');
      }
    }
    // One heading, the type face with a fallback, a descriptive call to action.
    expect(doc.querySelectorAll('h1')).toHaveLength(1);
    expect(mail.html).toContain("font-family:'Work Sans', system-ui, sans-serif");
    const cta = doc.querySelector('table[role="presentation"] td > a');
    expect(cta?.textContent).toMatch(
      /^(Review the request|Pay the deposit|Open the loan|Open the request)$/,
    );
    expect(cta?.getAttribute('href')).toBe('https://evalon.example/loans/42');
  });
});
