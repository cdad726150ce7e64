import type { Role } from '@evalon/contracts';
import { escapeHtml } from './escape';

/**
 * The account e-mails (invitation, added to an organisation, password reset): a simple layout of
 * their own with one action button. The loan e-mails are in `templates.ts`.
 */

/** An account e-mail, ready for the outbox (the server's `AccountEmail` takes it as it is). */
export interface AccountEmail {
  to: string;
  subject: string;
  html: string;
  text: string;
}

/** Plain-language role names used in e-mails. */
export const roleNames: Readonly<Record<Role, string>> = {
  admin: 'marketplace admin',
  buyer: 'hospital buyer',
  clinician: 'clinician',
  proctor: 'proctor',
  coordinator: 'logistics coordinator',
  fleet_manager: 'fleet manager',
};

/** A date and time in UTC, written out so it reads the same in every mail client. */
function utcWords(at: Date): string {
  return `${at.toLocaleString('en-GB', {
    timeZone: 'UTC',
    day: 'numeric',
    month: 'long',
    year: 'numeric',
    hour: '2-digit',
    minute: '2-digit',
  })} UTC`;
}

interface Layout {
  to: string;
  subject: string;
  /** Paragraphs before the button (plain text; escaped for HTML). */
  intro: string[];
  action: { label: string; url: string };
  /** Paragraphs after the button. */
  outro: string[];
}

// Colours are our own palette: deep teal header, warm off-white page, ink text.
const colours = {
  brand: '#0f5257',
  page: '#f6f4ef',
  ink: '#1f2a2e',
  muted: '#5b6b70',
  button: '#0f5257',
};

/** Renders the shared Evalon layout as HTML and plain text. */
function render(layout: Layout): AccountEmail {
  const p = (t: string) =>
    `<p style="margin:0 0 16px;font-size:16px;line-height:24px;color:${colours.ink}">${escapeHtml(t)}</p>`;
  const small = (t: string) =>
    `<p style="margin:0 0 12px;font-size:13px;line-height:20px;color:${colours.muted}">${escapeHtml(t)}</p>`;
  const url = escapeHtml(layout.action.url);
  const html = `<!doctype html>
<html lang="en">
<head><meta charset="utf-8"><meta name="viewport" content="width=device-width"><title>${escapeHtml(layout.subject)}</title></head>
<body style="margin:0;padding:0;background:${colours.page};font-family:'Work Sans',Helvetica,Arial,sans-serif">
<table role="presentation" width="100%" cellpadding="0" cellspacing="0" style="background:${colours.page};padding:24px 0">
<tr><td align="center">
<table role="presentation" width="560" cellpadding="0" cellspacing="0" style="max-width:560px;width:100%;background:#ffffff;border-radius:8px;overflow:hidden">
<tr><td style="background:${colours.brand};padding:20px 32px;color:#ffffff;font-size:22px;font-weight:600;letter-spacing:0.5px">Evalon</td></tr>
<tr><td style="padding:32px">
${layout.intro.map(p).join('\n')}
<p style="margin:24px 0"><a href="${url}" style="display:inline-block;background:${colours.button};color:#ffffff;text-decoration:none;font-weight:600;padding:12px 24px;border-radius:6px">${escapeHtml(layout.action.label)}</a></p>
${small(`If the button does not work, copy this address into your browser: ${layout.action.url}`)}
${layout.outro.map(small).join('\n')}
</td></tr>
<tr><td style="padding:16px 32px;background:${colours.page};font-size:12px;line-height:18px;color:${colours.muted}">Evalon schedules and documents evaluation loans and proctoring visits. This message was sent to ${escapeHtml(layout.to)}.</td></tr>
</table>
</td></tr>
</table>
</body>
</html>`;
  const text = [
    'Evalon',
    '',
    ...layout.intro.flatMap((t) => [t, '']),
    `${layout.action.label}: ${layout.action.url}`,
    '',
    ...layout.outro.flatMap((t) => [t, '']),
    '--',
    `Evalon schedules and documents evaluation loans and proctoring visits. This message was sent to ${layout.to}.`,
  ].join('\n');
  return { to: layout.to, subject: layout.subject, html, text };
}

/** Invitation with a one-time link to set a password. */
export function invitationEmail(input: {
  to: string;
  inviteeName: string;
  inviterName: string;
  organisationName: string;
  role: Role;
  link: string;
  expiresAt: Date;
}): AccountEmail {
  return render({
    to: input.to,
    subject: `You are invited to join ${input.organisationName} on Evalon`,
    intro: [
      `Hello ${input.inviteeName},`,
      `${input.inviterName} invited you to join ${input.organisationName} on Evalon as ${roleNames[input.role]}.`,
      'Choose a password to accept the invitation and sign in.',
    ],
    action: { label: 'Accept the invitation', url: input.link },
    outro: [
      `The link works once and expires on ${utcWords(input.expiresAt)}.`,
      'If you were not expecting this invitation, you can ignore this e-mail.',
    ],
  });
}

/** Notice to someone who already has an account that they were added to another organisation. */
export function addedToOrganisationEmail(input: {
  to: string;
  name: string;
  inviterName: string;
  organisationName: string;
  role: Role;
  link: string;
}): AccountEmail {
  return render({
    to: input.to,
    subject: `You now have access to ${input.organisationName} on Evalon`,
    intro: [
      `Hello ${input.name},`,
      `${input.inviterName} added you to ${input.organisationName} on Evalon as ${roleNames[input.role]}.`,
      'Sign in with your usual account to see it.',
    ],
    action: { label: 'Sign in to Evalon', url: input.link },
    outro: ['If you think this is a mistake, tell your organisation’s administrator.'],
  });
}

/** Password reset with a one-time link. */
export function passwordResetEmail(input: {
  to: string;
  name: string;
  link: string;
  expiresAt: Date;
}): AccountEmail {
  return render({
    to: input.to,
    subject: 'Reset your Evalon password',
    intro: [
      `Hello ${input.name},`,
      'Someone asked to reset the password of your Evalon account. If it was you, choose a new password here.',
    ],
    action: { label: 'Choose a new password', url: input.link },
    outro: [
      `The link works once and expires on ${utcWords(input.expiresAt)}.`,
      'If you did not ask for this, ignore this e-mail: your password stays as it is.',
    ],
  });
}
