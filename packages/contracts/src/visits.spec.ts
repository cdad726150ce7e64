import { caseRecordInput, findPatientIdentifiers } from './visits';

describe('findPatientIdentifiers', () => {
  // HIPAA Safe Harbor (45 CFR 164.514(b)(2)) lists names, medical record numbers and dates
  // tied to an individual among the 18 identifier kinds; the screen catches the obvious ones.
  it.each([
    ['Patient Smith tolerated the procedure.', /names/],
    ['pt. Jones was repositioned', /names/],
    ['MRN 48213377, docking smooth', /record numbers/],
    ['Chart no. reviewed before the case', /record numbers/],
    ['DOB 04/12/1961', /dates of birth/],
    ['born in spring, fine', /dates of birth/],
  ])('flags %s', (text, message) => {
    expect(findPatientIdentifiers(text).join(' ')).toMatch(message);
  });

  it.each([
    'Docking took two attempts; good team communication.',
    'The patient tolerated the procedure well.',
    'Operative time 95 min, 3 ports.',
  ])('lets de-identified notes through: %s', (text) => {
    expect(findPatientIdentifiers(text)).toEqual([]);
  });

  it('makes the case record contract refuse such notes with a field message', () => {
    const result = caseRecordInput.safeParse({
      caseNumber: 1,
      traineeUserId: 5,
      traineeRole: 'assisted',
      ratings: {
        setup: 3,
        docking: 3,
        instrument_handling: 3,
        troubleshooting: 3,
        team_communication: 3,
      },
      notes: 'Patient Miller, MRN 1234567',
    });
    expect(result.success).toBe(false);
    expect(result.error?.issues.map((i) => i.path.join('.'))).toEqual(['notes', 'notes']);
  });
});
