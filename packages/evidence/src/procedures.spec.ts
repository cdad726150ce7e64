import { allProcedures, procedureFamilies, procedureLabels, proceduresFor } from './procedures';

describe('procedure families', () => {
  it('labels every family and offers "other" in every category', () => {
    for (const p of allProcedures) expect(procedureLabels[p]).toMatch(/^[A-Z]/);
    for (const list of Object.values(procedureFamilies)) expect(list).toContain('other');
  });

  it('offers the union for a loan of several categories, other last', () => {
    expect(proceduresFor(['laser', 'flexible_endoscope'])).toEqual([
      'ureteroscopic_lithotripsy',
      'percutaneous_lithotripsy',
      'prostate_enucleation',
      'ureteroscopy',
      'cystoscopy',
      'bronchoscopy',
      'upper_gi_endoscopy',
      'colonoscopy',
      'other',
    ]);
    expect(proceduresFor(['unknown'])).toEqual(['other']);
  });
});
