import fc from 'fast-check';
import { assertDeidentified, findIdentifiers, IdentifierError } from './deidentify';

// Source for every check here: HIPAA Safe Harbor, 45 CFR 164.514(b)(2), which lists names, all
// date elements (except year) tied to an individual, ages over 89, telephone and fax numbers,
// e-mail addresses, medical record and account numbers, URLs and IP addresses among the 18
// identifier kinds that de-identified data may not contain.

const kinds = (text: string) => findIdentifiers(text).map((f) => f.kind);

describe('findIdentifiers', () => {
  it.each([
    ['Follow-up by mail to j.doe@clinic.example please', 'email'],
    ['Call back on +1 555 010 4477 after the case', 'phone'],
    ['Call back on (555) 010-4477', 'phone'],
    ['ring 555-0104 if needed', 'phone'],
    ['Reachable at 020 7946 0958', 'phone'],
    ['Seen on 2026-03-14 in clinic', 'date'],
    ['Seen on 14/03/2026 in clinic', 'date'],
    ['Seen on 3.14.26', 'date'],
    ['Surgery on 14 March 2026, fine', 'date'],
    ['Surgery on March 14, 2026, fine', 'date'],
    ['Surgery Mar 14 went well', 'date'],
    ['Admitted 12/11, discharged next day', 'date'],
    ['DOB unknown', 'date'],
    ['MRN 4471 noted', 'record_number'],
    ['Ref 48213377 on the label', 'record_number'],
    ['Chart reviewed before the case', 'record_number'],
    ['Bed #4471', 'record_number'],
    ['ID AB123456 on the wristband', 'record_number'],
    ['Patient Smith tolerated the procedure', 'name'],
    ['pt. Jones repositioned', 'name'],
    ['Mrs O’Neil was anxious', 'name'],
    ['name: Lee', 'name'],
    ['A 93-year-old with a lower-pole stone', 'age_over_89'],
    ['aged 91, frail', 'age_over_89'],
    ['Images at https://pacs.example/study/1', 'url'],
    ['Workstation 10.0.12.7 froze', 'ip_address'],
    ['SSN 123-45-6789', 'id_number'],
  ])('refuses %p (%s)', (text, kind) => {
    expect(kinds(text)).toContain(kind);
  });

  it.each([
    '2 x 8 mm stones, 12 Fr sheath, 30 W',
    'Two 8 mm stones, dusting at 0.4 J x 80 Hz, then 1.0 J x 10 Hz fragmentation',
    '12/14 Fr access sheath, 1/3 of the stone left for a second look',
    'Stone sizes 10 12 14 mm in the lower pole',
    'Setup 25 min, docking 12 min, console 95 min; EBL 50 mL',
    'The patient tolerated the procedure well; no device issues.',
    'Laser fibre 200 µm, 30 W, pulse 1.2/1.5 ms',
    'Patient aged 67, BMI 31, ASA II',
    'A 75-year-old with a 15 mm renal pelvis stone',
    'Scope deflection 270°, 3 ports, 8 mm instruments, 2-3 minutes per exchange',
    'Stone-free on CT at the first follow-up; Clavien–Dindo grade II fever, treated orally',
    'The team may try the new sheath next time',
  ])('accepts ordinary clinical text: %p', (text) => {
    expect(findIdentifiers(text)).toEqual([]);
  });

  it('says what it found and where', () => {
    const [finding] = findIdentifiers('Good case. Call 555-010-4477.');
    expect(finding).toMatchObject({ kind: 'phone', index: 16, length: 12 });
    expect(finding!.message).toBe(
      'Character 17 looks like a phone number: leave out phone and fax numbers.',
    );
  });

  it('reports every kind found, in order of position', () => {
    expect(kinds('Patient Smith, MRN 99812, seen 2026-01-02, a@b.example')).toEqual([
      'name',
      'record_number',
      'date',
      'email',
    ]);
  });

  it('throws with all messages from assertDeidentified', () => {
    expect(() => assertDeidentified('fine text')).not.toThrow();
    expect(() => assertDeidentified('x a@b.example')).toThrow(IdentifierError);
  });
});

// Arbitrary filler text around the identifier: letters, spaces and punctuation but no digits
// or "@", so that any refusal comes from the embedded identifier being found (the property
// checks it is found where it was put).
const filler = fc.string({
  unit: fc.constantFrom(...'abcdefghij klmnop,;:!?()XYZ\n'.split('')),
  maxLength: 40,
});
const word = fc.string({
  unit: fc.constantFrom(...'abcdefghijklmnopqrstuvwxyz0123456789'.split('')),
  minLength: 1,
  maxLength: 12,
});
const email = fc
  .tuple(word, word, fc.constantFrom('example', 'example.org', 'hospital.example'))
  .map(([local, host, tld]) => `${local}@${host}.${tld}`);
const digits = (n: number) =>
  fc.string({ unit: fc.constantFrom(...'0123456789'), minLength: n, maxLength: n });
const phone = fc.oneof(
  fc.tuple(digits(3), digits(3), digits(4)).map(([a, b, c]) => `(${a}) ${b}-${c}`),
  fc.tuple(digits(3), digits(3), digits(4)).map(([a, b, c]) => `${a}-${b}-${c}`),
  fc.tuple(digits(3), digits(3), digits(4)).map(([a, b, c]) => `${a}.${b}.${c}`),
  fc
    .tuple(fc.integer({ min: 1, max: 99 }), digits(3), digits(3), digits(4))
    .map(([cc, a, b, c]) => `+${cc} ${a} ${b} ${c}`),
);
const monthNames = [
  'January',
  'Feb',
  'March',
  'Apr',
  'June',
  'Jul',
  'August',
  'Sep',
  'Oct',
  'November',
  'Dec',
];
const date = fc.oneof(
  fc
    .date({ min: new Date('1900-01-01'), max: new Date('2099-12-31'), noInvalidDate: true })
    .map((d) => d.toISOString().slice(0, 10)),
  fc
    .tuple(
      fc.integer({ min: 1, max: 31 }),
      fc.integer({ min: 1, max: 12 }),
      fc.integer({ min: 1900, max: 2099 }),
      fc.constantFrom('/', '.', '-'),
    )
    .map(([d, m, y, sep]) => `${d}${sep}${m}${sep}${y}`),
  fc
    .tuple(
      fc.integer({ min: 1, max: 12 }),
      fc.integer({ min: 1, max: 31 }),
      fc.integer({ min: 0, max: 99 }),
    )
    .map(([m, d, y]) => `${m}/${d}/${String(y).padStart(2, '0')}`),
  fc
    .tuple(
      fc.integer({ min: 1, max: 28 }),
      fc.constantFrom(...monthNames),
      fc.integer({ min: 1900, max: 2099 }),
    )
    .map(([d, m, y]) => `${d} ${m} ${y}`),
  fc
    .tuple(
      fc.constantFrom(...monthNames),
      fc.integer({ min: 1, max: 28 }),
      fc.integer({ min: 1900, max: 2099 }),
    )
    .map(([m, d, y]) => `${m} ${d}, ${y}`),
);

describe('guard properties (fast-check)', () => {
  const embedded = (id: fc.Arbitrary<string>) =>
    fc
      .tuple(filler, id, filler)
      .map(([a, x, b]) => ({ text: `${a} ${x} ${b}`, at: a.length + 1, x }));

  it.each([
    ['e-mail address', email, 'email'],
    ['phone number', phone, 'phone'],
    ['calendar date', date, 'date'],
  ] as const)('refuses any %s embedded in arbitrary text', (_label, id, kind) => {
    fc.assert(
      fc.property(embedded(id), ({ text, at, x }) => {
        const findings = findIdentifiers(text);
        // Found, of the right kind, and pointing inside the embedded identifier.
        const hit = findings.find((f) => f.index < at + x.length && at < f.index + f.length);
        expect(hit?.kind).toBe(kind);
      }),
      { numRuns: 300 },
    );
  });

  it('accepts clinical phrases of measurements, settings and counts', () => {
    const measurement = fc.oneof(
      fc
        .tuple(fc.integer({ min: 1, max: 9 }), fc.integer({ min: 1, max: 30 }))
        .map(([n, s]) => `${n} x ${s} mm stones`),
      fc.integer({ min: 6, max: 30 }).map((fr) => `${fr} Fr sheath`),
      fc.integer({ min: 5, max: 120 }).map((w) => `${w} W`),
      fc
        .tuple(fc.double({ min: 0.2, max: 2, noNaN: true }), fc.integer({ min: 5, max: 120 }))
        .map(([j, hz]) => `${j.toFixed(1)} J x ${hz} Hz`),
      fc.integer({ min: 1, max: 400 }).map((m) => `${m} min`),
      fc.integer({ min: 1, max: 89 }).map((age) => `aged ${age}`),
      fc.constantFrom(
        'Clavien–Dindo grade II',
        'stone-free',
        'residual fragments',
        'no device issues',
      ),
    );
    fc.assert(
      fc.property(fc.array(measurement, { minLength: 1, maxLength: 6 }), (parts) => {
        expect(findIdentifiers(parts.join(', '))).toEqual([]);
      }),
      { numRuns: 500 },
    );
  });
});
