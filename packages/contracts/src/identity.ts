import { z } from 'zod';
import {
  organisationKinds,
  emailMaxLength,
  nameMaxLength,
  passwordRule,
} from './values/identity';
import { id, listOf } from './common';
import { pageOf, pageQuery } from './paging';
import { memberSortFields, roles } from './values/members';

export * from './values/identity';

export * from './values/members';

export const role = z.enum(roles).meta({ id: 'Role' });
export type Role = z.infer<typeof role>;

export const organisationKind = z.enum(organisationKinds).meta({ id: 'OrganisationKind' });

export const email = z
  .string()
  .trim()
  .toLowerCase()
  .email('Enter a valid e-mail address.')
  .max(emailMaxLength);
export const password = z
  .string()
  .min(passwordRule.minLength, passwordRule.tooShort)
  .max(passwordRule.maxLength, passwordRule.tooLong);

/** Whether `zone` is an IANA time zone name this runtime knows (e.g. `Europe/Berlin`). */
export function isTimeZone(zone: string): boolean {
  if (!zone || !/^[A-Za-z_]+(\/[A-Za-z0-9_+-]+)*$/.test(zone)) return false;
  try {
    new Intl.DateTimeFormat('en', { timeZone: zone });
    return true;
  } catch {
    return false;
  }
}

/** An IANA time zone name such as `America/New_York`. */
export const timeZone = z
  .string()
  .trim()
  .max(64)
  .refine(isTimeZone, 'Choose a time zone such as America/New_York or Europe/Berlin.');

export const loginRequest = z
  .object({
    email,
    password: z.string().min(1, 'Enter your password.').max(200),
  })
  .meta({ id: 'LoginRequest' });
export type LoginRequest = z.infer<typeof loginRequest>;

export const membership = z
  .object({
    organisationId: z.number().int(),
    organisationName: z.string(),
    organisationKind,
    role,
  })
  .meta({ id: 'Membership' });
export type Membership = z.infer<typeof membership>;

export const sessionUser = z
  .object({
    id: z.number().int(),
    email: z.string(),
    name: z.string(),
    timeZone: z.string().nullable().optional(),
    memberships: z.array(membership),
  })
  .meta({ id: 'SessionUser' });
export type SessionUser = z.infer<typeof sessionUser>;

/** Answer of `GET /api/auth/me`, `POST /api/auth/login`, accepting an invitation and profile edits. */
export const meResponse = z.object({ user: sessionUser }).meta({ id: 'MeResponse' });
export type MeResponse = z.infer<typeof meResponse>;

/** Answer of `GET /api/auth/csrf`: the same value the `XSRF-TOKEN` cookie carries. */
export const csrfResponse = z.object({ csrfToken: z.string() }).meta({ id: 'CsrfResponse' });
export type CsrfResponse = z.infer<typeof csrfResponse>;

export const inviteRequest = z
  .object({
    email,
    name: z.string().trim().min(1, 'Enter the person’s name.').max(nameMaxLength),
    role,
  })
  .meta({ id: 'InviteRequest' });
export type InviteRequest = z.infer<typeof inviteRequest>;

/** Accepting an invitation or a reset link: the one-time token and a new password. */
export const setPasswordRequest = z
  .object({
    token: z.string().min(20).max(200),
    password,
    name: z.string().trim().min(1).max(nameMaxLength).optional(),
  })
  .meta({ id: 'SetPasswordRequest' });
export type SetPasswordRequest = z.infer<typeof setPasswordRequest>;

/** `POST /api/auth/accept-invitation`: token from the e-mail, a new password, optionally a name. */
export const acceptInvitationRequest = setPasswordRequest;
export type AcceptInvitationRequest = SetPasswordRequest;

/** `POST /api/auth/reset-password`: token from the reset e-mail and the new password. */
export const resetPasswordRequest = z
  .object({ token: z.string().min(20).max(200), password })
  .meta({ id: 'ResetPasswordRequest' });
export type ResetPasswordRequest = z.infer<typeof resetPasswordRequest>;

export const passwordResetRequest = z.object({ email }).meta({ id: 'PasswordResetRequest' });
export type PasswordResetRequest = z.infer<typeof passwordResetRequest>;

/** `POST /api/auth/change-password` (answers 204). */
export const changePasswordRequest = z
  .object({
    currentPassword: z.string().min(1, 'Enter your current password.').max(200),
    newPassword: password,
  })
  .meta({ id: 'ChangePasswordRequest' });
export type ChangePasswordRequest = z.infer<typeof changePasswordRequest>;

/** `PATCH /api/auth/me`: the person's own name and time zone (at least one of them). */
export const updateProfileRequest = z
  .object({
    name: z.string().trim().min(1, 'Enter your name.').max(nameMaxLength).optional(),
    timeZone: timeZone.nullable().optional(),
  })
  .refine((v) => v.name !== undefined || v.timeZone !== undefined, {
    message: 'Change your name or your time zone.',
  })
  .meta({ id: 'UpdateProfileRequest' });
export type UpdateProfileRequest = z.infer<typeof updateProfileRequest>;

export const member = z
  .object({
    userId: z.number().int(),
    membershipId: z.number().int(),
    email: z.string(),
    name: z.string(),
    role,
    /** Whether the person can sign in (false once deactivated). */
    active: z.boolean(),
    /** Whether the person has not yet accepted the invitation. */
    pending: z.boolean(),
    lastSignInAt: z.string().nullable(),
  })
  .meta({ id: 'Member' });
export type Member = z.infer<typeof member>;

/** `GET /api/organisations/:orgId/members`. */
export const memberList = listOf(member).meta({ id: 'MemberList' });
export type MemberList = z.infer<typeof memberList>;

/**
 * `GET /api/organisations/:orgId/members` query: the paging contract; `q` matches name, e-mail,
 * and the words of a role or a status (`roleLabels`, `memberStatusLabels`).
 */
export const memberQuery = pageQuery(memberSortFields, 'name,asc');
export type MemberQuery = z.infer<typeof memberQuery>;

/** Answer of `GET /api/organisations/:orgId/members`: one page and counts of the matches. */
export const memberPage = pageOf(member)
  .extend({
    /** Matching members whose invitation is still open. */
    pending: z.number().int().min(0),
    /** Matching members who were deactivated. */
    deactivated: z.number().int().min(0),
  })
  .meta({ id: 'MemberPage' });
export type MemberPage = z.infer<typeof memberPage>;

/** Answer of inviting, changing a role, deactivating or reactivating: the member as it is now. */
export const memberResponse = z.object({ member }).meta({ id: 'MemberResponse' });
export type MemberResponse = z.infer<typeof memberResponse>;

export const changeRoleRequest = z.object({ role }).meta({ id: 'ChangeRoleRequest' });
export type ChangeRoleRequest = z.infer<typeof changeRoleRequest>;

/** Path parameters of the member routes. */
export const organisationParams = z.object({ orgId: id });
export const membershipParams = z.object({ orgId: id, membershipId: id });

export const organisation = z
  .object({
    id: z.number().int(),
    name: z.string(),
    kind: organisationKind,
    country: z.string().length(2),
  })
  .meta({ id: 'Organisation' });
export type Organisation = z.infer<typeof organisation>;

/** `GET /api/organisations`: every organisation for an admin, otherwise the person's own. */
export const organisationList = listOf(organisation).meta({ id: 'OrganisationList' });
export type OrganisationList = z.infer<typeof organisationList>;

export const site = z
  .object({
    id: z.number().int(),
    organisationId: z.number().int(),
    organisationName: z.string().optional(),
    kind: z.enum(['campus', 'depot']),
    name: z.string(),
    addressLine: z.string(),
    city: z.string(),
    country: z.string().length(2),
    latitude: z.number(),
    longitude: z.number(),
    timeZone: z.string(),
    receivingHours: z.string().nullable().optional(),
    cutoffTime: z.string().nullable().optional(),
  })
  .meta({ id: 'Site' });
export type Site = z.infer<typeof site>;

/** `GET /api/sites`: the person's own organisations' sites plus every lender's depots. */
export const siteList = listOf(site).meta({ id: 'SiteList' });
export type SiteList = z.infer<typeof siteList>;

export const auditEvent = z
  .object({
    id: z.number().int(),
    at: z.string(),
    actorUserId: z.number().int().nullable(),
    organisationId: z.number().int().nullable(),
    action: z.string(),
    subject: z.string(),
    detail: z.unknown().optional(),
  })
  .meta({ id: 'AuditEvent' });
export type AuditEvent = z.infer<typeof auditEvent>;

/** `GET /api/audit` query: newest first, `before` pages back by event id. */
export const auditQuery = z.object({
  organisationId: id.optional(),
  limit: z.coerce.number().int().min(1).max(200).default(50),
  before: id.optional(),
});
export type AuditQuery = z.infer<typeof auditQuery>;

export const auditList = listOf(auditEvent).meta({ id: 'AuditList' });
export type AuditList = z.infer<typeof auditList>;

/**
 * Codes the server puts in `/sign-in?error=...` after a Google sign-in that did not work,
 * with the words to show for each.
 */
export const signInRedirectErrors = {
  google_unknown:
    'No Evalon account uses that Google address. Ask your organisation’s administrator for an invitation.',
  google_unverified: 'Google has not verified that e-mail address, so Evalon cannot use it.',
  google_mismatch:
    'That Google account is not the one linked to this Evalon account. Sign in with your password.',
  google_cancelled: 'Google sign-in was cancelled.',
  google_failed: 'Google sign-in did not work. Try again, or sign in with your password.',
  account_deactivated: 'This account has been deactivated. Ask your organisation’s administrator.',
} as const;
export type SignInRedirectError = keyof typeof signInRedirectErrors;
