import type { MailMessage, Mailer } from '../../src/notifications/domain/mailer';

/**
 * A {@link Mailer} for tests that keeps what would have been sent, so a test can read the
 * one-time link out of it. The outbox worker of the test app hands it the messages; SMTP itself
 * is covered by smtp-mail.test.ts against maildev.
 */
export class RecordingMailer implements Mailer {
  readonly sent: MailMessage[] = [];

  /** @param delayMs How long each send takes (to let concurrent workers interleave). */
  constructor(private readonly delayMs: () => number = () => 0) {}

  async send(message: MailMessage): Promise<void> {
    const delay = this.delayMs();
    if (delay > 0) await new Promise((r) => setTimeout(r, delay));
    this.sent.push(message);
  }

  /** Messages to one address, oldest first. */
  to(address: string): MailMessage[] {
    return this.sent.filter((m) =>
      Array.isArray(m.to) ? m.to.includes(address) : m.to === address,
    );
  }

  /** How many times each Message-ID was sent. */
  countsByMessageId(): Map<string, number> {
    const counts = new Map<string, number>();
    for (const m of this.sent) {
      const id = m.messageId ?? '(none)';
      counts.set(id, (counts.get(id) ?? 0) + 1);
    }
    return counts;
  }

  /** Waits (briefly) for a message to arrive for `address`; some mail leaves in the background. */
  async waitFor(address: string, count = 1, timeoutMs = 3_000): Promise<MailMessage> {
    const until = Date.now() + timeoutMs;
    while (Date.now() < until) {
      const list = this.to(address);
      if (list.length >= count) return list[count - 1]!;
      await new Promise((r) => setTimeout(r, 20));
    }
    throw new Error(`no e-mail number ${count} for ${address} within ${timeoutMs} ms`);
  }
}

/** The `token` query parameter of the first link to `path` in a text, or throws. */
export function tokenFromLink(text: string, path: string): string {
  const match = new RegExp(
    `https?://[^\\s"<>]+${path.replace('/', '\\/')}\\?token=([A-Za-z0-9_%-]+)`,
  ).exec(text);
  if (!match?.[1]) throw new Error(`no ${path} link in: ${text.slice(0, 300)}`);
  return decodeURIComponent(match[1]);
}
