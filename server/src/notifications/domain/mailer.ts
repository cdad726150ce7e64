import nodemailer, { type Transporter } from 'nodemailer';
import type { Config } from '../../config';

/** A file attached to an e-mail, e.g. a calendar invite (`text/calendar`). */
export interface MailAttachment {
  filename: string;
  contentType: string;
  content: string | Buffer;
}

/** One e-mail, already rendered. */
export interface MailMessage {
  /** One address or several. */
  to: string | string[];
  cc?: string[];
  subject: string;
  text: string;
  html: string;
  /** Files to attach, e.g. a calendar invite (`text/calendar`). */
  attachments?: MailAttachment[];
  /**
   * The Message-ID header, `<uuid@domain>`. The outbox sets it from the row, so a retry of
   * the same row carries the same id and a receiver can spot the duplicate.
   */
  messageId?: string;
  /** Extra header lines (the worker adds `Auto-Submitted`, RFC 3834 §5). */
  headers?: Record<string, string>;
}

/**
 * The transport the outbox worker sends through. Use cases never call it: they write the
 * message into the outbox in their own transaction (`enqueueEmail`), and the worker hands it
 * to a Mailer afterwards (SMTP in the server, a recording mailer in tests).
 */
export interface Mailer {
  send(message: MailMessage): Promise<void>;
}

/** Options of {@link SmtpMailer} beyond the SMTP settings. */
export interface SmtpMailerOptions {
  /**
   * Limit for each phase of one SMTP exchange (connecting, the greeting, socket inactivity).
   * The outbox lease must outlast a whole exchange; the configuration checks that.
   */
  timeoutMs?: number;
}

/** Sends through SMTP with nodemailer (locally: the maildev catcher on 127.0.0.1:1025). */
export class SmtpMailer implements Mailer {
  private readonly transport: Transporter;

  constructor(
    private readonly smtp: Config['smtp'],
    options: SmtpMailerOptions = {},
  ) {
    const timeout = options.timeoutMs ?? 30_000;
    this.transport = nodemailer.createTransport({
      host: smtp.host,
      port: smtp.port,
      secure: smtp.secure,
      // The local catcher speaks plain SMTP; a real relay on 587 upgrades with STARTTLS.
      ignoreTLS: !smtp.secure && (smtp.host === '127.0.0.1' || smtp.host === 'localhost'),
      auth: smtp.user ? { user: smtp.user, pass: smtp.password ?? '' } : undefined,
      connectionTimeout: timeout,
      greetingTimeout: timeout,
      // nodemailer's default is 10 minutes of silence; a hung relay must not hold a lease that long.
      socketTimeout: timeout,
    });
  }

  async send(message: MailMessage): Promise<void> {
    await this.transport.sendMail({ from: this.smtp.from, ...message });
  }

  /** Closes pooled connections (none by default; kept for symmetry at shutdown). */
  close(): void {
    this.transport.close();
  }
}
