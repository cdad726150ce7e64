import { timeLeft } from './visit-rules';

describe('timeLeft', () => {
  const now = Date.parse('2027-03-01T12:00:00Z');
  it('counts down in days and hours, hours and minutes, or minutes', () => {
    expect(timeLeft('2027-03-03T12:00:00Z', now)).toBe('2 d 0 h');
    expect(timeLeft('2027-03-02T16:30:00Z', now)).toBe('1 d 4 h');
    expect(timeLeft('2027-03-01T15:12:00Z', now)).toBe('3 h 12 min');
    expect(timeLeft('2027-03-01T12:00:20Z', now)).toBe('1 min');
  });
  it('says when the deadline has passed', () => {
    expect(timeLeft('2027-03-01T12:00:00Z', now)).toBe('passed');
    expect(timeLeft('2027-02-28T12:00:00Z', now)).toBe('passed');
  });
});
