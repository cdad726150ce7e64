/**
 * `@evalon/messages`: the e-mails Evalon sends about loans and the calendar invite attached to
 * them. Pure: functions take plain data and return strings and objects; the server writes them
 * into its outbox and sends them with nodemailer.
 *
 * - Templates, one per loan event: {@link loanRequested}, {@link loanApproved},
 *   {@link loanConfirmed}, {@link loanDeclined}, {@link loanCancelled}, {@link loanExpired}.
 *   Each returns `{subject, html, text, attachments?}` for one recipient: instants in the
 *   recipient's zone, milestones as the site's calendar days.
 * - Calendar invite (RFC 5545 / RFC 5546): {@link buildLoanInvite}, {@link nextSequence},
 *   {@link loanEventUids}.
 * - Helpers: {@link escapeHtml}, date formatting, the wording shared with the invite.
 *
 * Every message carries the short cautions: Evalon schedules and documents, it does not certify;
 * computed dates and deposits are estimates until the lender confirms.
 * @packageDocumentation
 */

/** Loan e-mail templates and their data shapes. */
export {
  type EmailAttachment,
  type LoanApprovedData,
  type LoanCancelledData,
  type LoanConfirmedData,
  type LoanDeclinedData,
  type LoanEmail,
  type LoanExpiredData,
  type LoanInviteDetails,
  type LoanMessageData,
  loanApproved,
  loanCancelled,
  loanConfirmed,
  loanDeclined,
  loanExpired,
  loanRequested,
} from './templates';

/** The loan's calendar invite (`.ics`) and its SEQUENCE rule. */
export {
  EVALON_PRODID,
  INVITE_MILESTONES,
  type InviteAttendee,
  type InviteMethod,
  type InvitePerson,
  type InviteRole,
  type LoanInviteInput,
  type ReceivingHours,
  buildLoanInvite,
  loanEventUids,
  nextSequence,
} from './ics';

/** VTIMEZONE generation for timed invite values (RFC 5545 §3.6.5). */
export { buildVTimezone, formatUtcOffset } from './vtimezone';

/** Layout: the message model and its HTML and text renderers. */
export {
  type Block,
  type Fact,
  type MessageContent,
  PALETTE,
  type RenderedMessage,
  render,
  renderHtml,
  renderText,
} from './layout';

/** Account e-mails: invitation, added to an organisation, password reset. */
export {
  type AccountEmail,
  addedToOrganisationEmail,
  invitationEmail,
  passwordResetEmail,
  roleNames,
} from './account';

/** Escaping and link checks. */
export { assertHttpUrl, escapeHtml, oneLine } from './escape';

/** Instants in the reader's zone, calendar dates as they are. */
export {
  DEFAULT_LOCALE,
  type Instant,
  type Recipient,
  formatCalendarDate,
  formatInstant,
  normaliseRecipient,
} from './format';

/** Shared wording: milestone names in plain words, cautions, links. */
export {
  CAUTIONS_SHORT,
  CLINICAL_CAUTIONS,
  DEPOT_MILESTONES,
  MILESTONE_LABELS,
  SITE_MILESTONES,
  loanUrl,
  unitLine,
} from './wording';

/** Proctoring visit e-mails and the visit's calendar invite. */
export {
  type VisitInviteInput,
  type VisitMessageData,
  type VisitSummary,
  VISIT_CAUTIONS,
  buildVisitInvite,
  credentialExpiring,
  visitAccepted,
  visitCancelled,
  visitWithdrawn,
  visitEventUid,
  visitOfferAnswered,
  visitOffered,
  visitSignedOff,
  visitUnfilled,
  visitUrl,
} from './visits';
/** Shipment alerts and the deposit statement. */
export {
  type DepositStatementData,
  type ShipmentAlertData,
  type ShipmentAlertKind,
  depositStatement,
  shipmentAlert,
} from './shipments';
