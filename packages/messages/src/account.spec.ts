import { invitationEmail, passwordResetEmail } from './account';
import { escapeHtml } from './escape';

describe('e-mail templates', () => {
  it('escapes the five HTML-significant characters', () => {
    expect(escapeHtml(`<a href="x">Tom & Jerry's</a>`)).toBe(
      '&lt;a href=&quot;x&quot;&gt;Tom &amp; Jerry&#39;s&lt;/a&gt;',
    );
  });

  it('puts the link in both parts and escapes names in HTML only', () => {
    const mail = invitationEmail({
      to: 'new@test.example',
      inviteeName: 'Ana <b>',
      inviterName: 'Dana',
      organisationName: 'Harbour & Co',
      role: 'clinician',
      link: 'http://127.0.0.1:8080/accept-invitation?token=abc_DEF-123',
      expiresAt: new Date('2027-03-08T12:00:00Z'),
    });
    expect(mail.subject).toBe('You are invited to join Harbour & Co on Evalon');
    expect(mail.text).toContain('http://127.0.0.1:8080/accept-invitation?token=abc_DEF-123');
    expect(mail.html).toContain('href="http://127.0.0.1:8080/accept-invitation?token=abc_DEF-123"');
    expect(mail.text).toContain('Hello Ana <b>,');
    expect(mail.html).toContain('Hello Ana &lt;b&gt;,');
    expect(mail.html).toContain('Harbour &amp; Co');
    expect(mail.text).toContain('expires on 8 March 2027 at 12:00 UTC');
  });

  it('says how long a reset link lasts', () => {
    const mail = passwordResetEmail({
      to: 'p@test.example',
      name: 'P',
      link: 'http://127.0.0.1:8080/reset-password?token=t',
      expiresAt: new Date('2027-01-05T09:30:00Z'),
    });
    expect(mail.subject).toBe('Reset your Evalon password');
    expect(mail.text).toContain('expires on 5 January 2027 at 09:30 UTC');
  });
});
