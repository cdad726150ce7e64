import { credentialCoverage, jurisdictionCovers, normaliseJurisdiction } from './jurisdiction';
import { licence } from './test-support';

// Which licence covers which campus is common practice (from memory), not a published table:
// US medical licences are granted by state boards, Canadian ones by provincial colleges; the
// German Approbation is granted under federal law and valid in every Land.
const PER_STATE = ['US', 'CA'];

describe('jurisdictionCovers', () => {
  it.each([
    ['DE', { country: 'DE', subdivision: 'DE-BY' }, true],
    ['DE', { country: 'DE' }, true],
    ['DE-BY', { country: 'DE', subdivision: 'DE-BY' }, true],
    ['DE-BY', { country: 'DE', subdivision: 'DE-BE' }, false],
    ['DE-BY', { country: 'DE' }, false],
    ['US-IL', { country: 'US', subdivision: 'US-IL' }, true],
    ['us-il', { country: 'us', subdivision: 'US-il' }, true],
    ['US-IL', { country: 'US', subdivision: 'US-NY' }, false],
    ['US', { country: 'US', subdivision: 'US-IL' }, false],
    ['US', { country: 'US' }, false],
    ['CA', { country: 'CA', subdivision: 'CA-ON' }, false],
    ['FR', { country: 'DE', subdivision: 'DE-BY' }, false],
  ])('a %s credential covers %j: %s', (code, campus, expected) => {
    expect(jurisdictionCovers(code, campus, PER_STATE)).toBe(expected);
  });

  it('lets an operator treat the US as one jurisdiction by setting', () => {
    expect(jurisdictionCovers('US', { country: 'US', subdivision: 'US-IL' }, [])).toBe(true);
  });

  it('rejects codes that are not ISO 3166', () => {
    expect(() => normaliseJurisdiction('Illinois')).toThrow(RangeError);
    expect(() => normaliseJurisdiction('U')).toThrow(RangeError);
    expect(normaliseJurisdiction(' de-by ')).toBe('DE-BY');
  });
});

describe('credentialCoverage', () => {
  const campus = { country: 'US', subdivision: 'US-IL' };
  const footprint = { from: '2027-06-29', to: '2027-07-02' };

  it('names the footprint days no licence covers', () => {
    const cover = credentialCoverage(
      [licence('US-IL', '2025-07-01', '2027-06-30'), licence('US', '2020-01-01', '2030-12-31')],
      'licence',
      campus,
      footprint,
      PER_STATE,
    );
    expect(cover.matching).toHaveLength(1);
    expect(cover.uncoveredDays).toEqual(['2027-07-01', '2027-07-02']);
    expect(cover.coveredUntil).toBeNull();
  });

  it('follows a renewal that starts the day after the old licence ends', () => {
    const cover = credentialCoverage(
      [
        licence('US-IL', '2025-07-01', '2027-06-30'),
        licence('US-IL', '2027-07-01', '2029-06-30'),
        // A later, unconnected licence does not extend the unbroken cover.
        licence('US-IL', '2029-08-01', '2031-06-30'),
      ],
      'licence',
      campus,
      footprint,
      PER_STATE,
    );
    expect(cover.uncoveredDays).toEqual([]);
    expect(cover.coveredUntil).toBe('2029-06-30');
  });

  it('only counts the asked kind', () => {
    const cover = credentialCoverage(
      [
        {
          kind: 'privileges',
          jurisdiction: 'US-IL',
          validFrom: '2027-01-01',
          validTo: '2027-12-31',
        },
      ],
      'licence',
      campus,
      footprint,
      PER_STATE,
    );
    expect(cover.matching).toEqual([]);
    expect(cover.uncoveredDays).toHaveLength(4);
  });
});
