import nodemailer, { type Transporter } from 'nodemailer';
import type { Config } from '../config';

/** One e-mail, already rendered. */
export interface MailMessage {
  to: string;
  subject: string;
  text: string;
  html: string;
  /** Files to attach, e.g. a calendar invite (`text/calendar`). */
  attachments?: { filename: string; content: string; contentType: string }[];
}

/**
 * Sends e-mail. Domain code depends on this interface only, so a transactional outbox (write
 * the message in the business transaction, send from a worker) can replace direct sending
 * without touching the use cases.
 */
export interface Mailer {
  send(message: MailMessage): Promise<void>;
}

/** Sends through SMTP with nodemailer (locally: the maildev catcher on 127.0.0.1:1025). */
export class SmtpMailer implements Mailer {
  private readonly transport: Transporter;

  constructor(private readonly smtp: Config['smtp']) {
    this.transport = nodemailer.createTransport({
      host: smtp.host,
      port: smtp.port,
      secure: smtp.secure,
      // The local catcher speaks plain SMTP; a real relay on 587 upgrades with STARTTLS.
      ignoreTLS: !smtp.secure && (smtp.host === '127.0.0.1' || smtp.host === 'localhost'),
      auth: smtp.user ? { user: smtp.user, pass: smtp.password ?? '' } : undefined,
      connectionTimeout: 10_000,
      greetingTimeout: 10_000,
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
