import { email, isTimeZone, updateProfileRequest } from './identity';

describe('identity contracts', () => {
  it('accepts IANA zone names and refuses others', () => {
    // Zone names from the IANA time zone database (tzdata), as used by the demo sites.
    for (const zone of [
      'America/New_York',
      'America/Chicago',
      'America/Los_Angeles',
      'Europe/Berlin',
      'UTC',
    ]) {
      expect(isTimeZone(zone)).toBe(true);
    }
    for (const zone of ['', 'Mars/Olympus_Mons', 'Europe/Berlin; DROP', '+05:00', 'GMT+1 ']) {
      expect(isTimeZone(zone)).toBe(false);
    }
  });

  it('normalises e-mail addresses to trimmed lower case', () => {
    expect(email.parse('  Buyer@Velmora.EXAMPLE ')).toBe('buyer@velmora.example');
    expect(email.safeParse('not-an-address').success).toBe(false);
  });

  it('wants at least one profile field', () => {
    expect(updateProfileRequest.safeParse({}).success).toBe(false);
    expect(updateProfileRequest.parse({ timeZone: null })).toEqual({ timeZone: null });
  });
});
