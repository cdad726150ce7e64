import fc from 'fast-check';
import { findIdentifiers, procedureFamilies } from '@evalon/evidence';
import { caseInput, casePatch, decisionInput, feedbackInput } from './evidence';
import { modelCategories } from './values/catalog';
import { findPatientIdentifiers } from './visits';

const good = {
  caseNumber: 1,
  evaluationDay: 1,
  procedure: 'ureteroscopic_lithotripsy',
  unitIds: [3],
  setupMinutes: 20,
  operativeMinutes: 75,
  energyMinutes: 18.5,
  target: { lengthMm: 12, widthMm: 8, heightMm: 6 },
  complicationGrade: '0',
  note: '2 x 8 mm stones, 12 Fr sheath, 30 W',
};

const fields = (r: { success: boolean; error?: { issues: { path: PropertyKey[] }[] } }) =>
  r.error?.issues.map((i) => i.path.join('.')) ?? [];

describe('case record contract', () => {
  it('accepts a de-identified case', () => {
    expect(caseInput.safeParse(good).success).toBe(true);
  });

  it.each([
    [{ setupMinutes: -1 }, 'setupMinutes'],
    [{ operativeMinutes: 0 }, 'operativeMinutes'],
    // Below a tenth it would be stored as 0 (DECIMAL(6,1)).
    [{ operativeMinutes: 0.04 }, 'operativeMinutes'],
    [{ target: { lengthMm: 0.04, widthMm: 8, heightMm: 6 } }, 'target.lengthMm'],
    [{ energyMinutes: -2 }, 'energyMinutes'],
    [{ energyMinutes: 80 }, 'energyMinutes'],
    [{ target: { lengthMm: 0, widthMm: 8, heightMm: 6 } }, 'target.lengthMm'],
    [{ target: { lengthMm: 12, widthMm: 101, heightMm: 6 } }, 'target.widthMm'],
    [{ evaluationDay: 0 }, 'evaluationDay'],
    [{ procedure: 'teleportation' }, 'procedure'],
    [{ complicationGrade: 'VI' }, 'complicationGrade'],
    [{ unitIds: [] }, 'unitIds'],
    [{ note: 'Seen 2026-03-14, MRN 4471123' }, 'note'],
    [{ deviceIssues: 'Call the rep on 555-010-4477' }, 'deviceIssues'],
  ])('refuses %p at %s', (change, field) => {
    expect(fields(caseInput.safeParse({ ...good, ...change }))).toContain(field);
  });

  it('gives one message per identifier found, naming the position', () => {
    const r = caseInput.safeParse({ ...good, note: 'Patient Smith, call 555-010-4477' });
    expect(r.error?.issues.map((i) => i.message)).toEqual([
      'Character 1 looks like a name after a title word: leave out names.',
      'Character 21 looks like a phone number: leave out phone and fax numbers.',
    ]);
  });

  it('checks a patch field by field, energy against operative minutes when both are given', () => {
    expect(casePatch.safeParse({ note: 'fine' }).success).toBe(true);
    expect(fields(casePatch.safeParse({ energyMinutes: 50, operativeMinutes: 40 }))).toEqual([
      'energyMinutes',
    ]);
  });

  it('offers procedure families for exactly the catalogue’s categories', () => {
    expect(Object.keys(procedureFamilies).sort()).toEqual([...modelCategories].sort());
  });
});

describe('feedback and decision contracts', () => {
  const ratings = {
    setup: 4,
    handling: 5,
    visualisation: 4,
    ergonomics: 3,
    reliability: 5,
    would_use_again: 5,
  };
  it('takes every Likert item 1–5', () => {
    expect(feedbackInput.safeParse({ ratings }).success).toBe(true);
    expect(fields(feedbackInput.safeParse({ ratings: { ...ratings, setup: 6 } }))).toEqual([
      'ratings.setup',
    ]);
    expect(
      fields(feedbackInput.safeParse({ ratings: { ...ratings, handling: undefined } })),
    ).toEqual(['ratings.handling']);
  });

  it('needs a decision with at least one reason, each once', () => {
    expect(decisionInput.safeParse({ decision: 'buy', reasons: ['workflow_fit'] }).success).toBe(
      true,
    );
    expect(fields(decisionInput.safeParse({ decision: 'maybe', reasons: ['other'] }))).toEqual([
      'decision',
    ]);
    expect(fields(decisionInput.safeParse({ decision: 'no', reasons: [] }))).toEqual(['reasons']);
    expect(
      fields(decisionInput.safeParse({ decision: 'no', reasons: ['other', 'other'] })),
    ).toEqual(['reasons']);
  });
});

describe('evidence guard vs the visits case-note screen', () => {
  // HIPAA Safe Harbor (45 CFR 164.514(b)(2)): the evidence guard must refuse at least what the
  // visits' screen refuses. Text is drawn from an alphabet rich in the characters both look at.
  const alphabet = 'aAbdDeEhiMmnNoOprRsStTxy0123456789 ./-:,@#()'.split('');
  const words = [
    'patient ',
    'Patient ',
    'pt. ',
    'Mr ',
    'Mrs ',
    'Smith ',
    'Jones ',
    'MRN ',
    'chart ',
    'DOB ',
    'born ',
    'record no ',
    'medical record ',
    '12/03/1961 ',
    '1234567 ',
    '4.5.26 ',
  ];
  const text = fc
    .array(fc.oneof(fc.constantFrom(...alphabet), fc.constantFrom(...words)), { maxLength: 30 })
    .map((parts) => parts.join(''));

  it('refuses every text the visits screen refuses', () => {
    let refusedByVisits = 0;
    fc.assert(
      fc.property(text, (t) => {
        if (findPatientIdentifiers(t).length > 0) {
          refusedByVisits += 1;
          expect(findIdentifiers(t).length).toBeGreaterThan(0);
        }
      }),
      { numRuns: 3000 },
    );
    // The property is only worth something when many generated texts trip the visits screen.
    expect(refusedByVisits).toBeGreaterThan(1000);
  });

  it('refuses the visits screen’s own examples', () => {
    for (const t of [
      'Patient Smith tolerated the procedure.',
      'pt. Jones was repositioned',
      'MRN 48213377, docking smooth',
      'Chart no. reviewed before the case',
      'DOB 04/12/1961',
      'born in spring, fine',
    ]) {
      expect(findIdentifiers(t).length).toBeGreaterThan(0);
    }
  });
});
