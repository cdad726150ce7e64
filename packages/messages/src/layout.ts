import { assertHttpUrl, escapeHtml, oneLine } from './escape';
import { CAUTIONS_SHORT } from './wording';

/** One label/value line of a facts table. */
export interface Fact {
  /** What the value is (`Deposit due`). */
  label: string;
  /** The value, already formatted for the reader. */
  value: string;
}

/** A block of a message body. Every block renders to both the HTML and the text part. */
export type Block =
  | { kind: 'paragraph'; text: string }
  | { kind: 'facts'; title: string; note?: string; rows: Fact[] }
  | { kind: 'list'; title: string; items: string[] }
  | { kind: 'quote'; title: string; text: string }
  | { kind: 'action'; label: string; url: string };

/** A message before rendering: one description that both parts are rendered from. */
export interface MessageContent {
  /** Subject line. */
  subject: string;
  /** Short summary that mail clients show after the subject (hidden in the body). */
  preheader: string;
  /** Main heading. */
  heading: string;
  /** Recipient's display name, for the greeting. */
  recipientName: string;
  /** Body blocks, in order. */
  blocks: Block[];
  /** Why the recipient gets this message, shown in the footer. */
  reason: string;
}

/** A rendered e-mail: what the server hands to nodemailer. */
export interface RenderedMessage {
  /** Subject, on one line. */
  subject: string;
  /** HTML part. */
  html: string;
  /** Plain-text part, with the same facts as the HTML part. */
  text: string;
}

/**
 * Our palette (from the web app's theme: deep teal ink primary #1d5e66 and its neutrals). Every
 * text/background pair used here meets WCAG 2.1 §1.4.3 (4.5:1); the tests compute the ratios.
 */
export const PALETTE = {
  /** Brand band and button background. */
  teal: '#1d5e66',
  /** Body text. */
  ink: '#191c1d',
  /** Secondary text (notes, footer). */
  muted: '#444748',
  /** Page background around the card. */
  page: '#eff1f1',
  /** Card background. */
  card: '#ffffff',
  /** Hairlines. */
  line: '#e1e3e3',
  /** Tinted background of quoted reasons. */
  tint: '#ecfcff',
  /** Text on teal. */
  onTeal: '#ffffff',
} as const;

/** Work Sans (the app's type face) when the reader has it, else the system's sans-serif. */
const FONT = "'Work Sans', system-ui, sans-serif";
const BASE = `font-family:${FONT};color:${PALETTE.ink};`;

/** Escapes, then keeps the writer's line breaks (reasons and notes are multi-line). */
function multiline(text: string): string {
  return escapeHtml(text).replace(/\r\n|\r|\n/g, '<br>');
}

function h2(title: string): string {
  return `<h2 style="margin:24px 0 8px;${BASE}font-size:17px;line-height:24px;font-weight:600;">${escapeHtml(title)}</h2>`;
}

function htmlBlock(block: Block): string {
  switch (block.kind) {
    case 'paragraph':
      return `<p style="margin:0 0 16px;">${multiline(block.text)}</p>`;
    case 'facts': {
      const rows = block.rows
        .map(
          (row) =>
            `<tr><th scope="row" style="width:40%;padding:6px 16px 6px 0;text-align:left;vertical-align:top;font-weight:600;border-bottom:1px solid ${PALETTE.line};">${escapeHtml(row.label)}</th>` +
            `<td style="padding:6px 0;vertical-align:top;border-bottom:1px solid ${PALETTE.line};">${multiline(row.value)}</td></tr>`,
        )
        .join('');
      const note = block.note
        ? `<p style="margin:8px 0 0;font-size:14px;line-height:20px;color:${PALETTE.muted};">${escapeHtml(block.note)}</p>`
        : '';
      return (
        h2(block.title) +
        `<table cellpadding="0" cellspacing="0" border="0" style="width:100%;border-collapse:collapse;${BASE}font-size:15px;line-height:22px;">${rows}</table>` +
        note
      );
    }
    case 'list':
      return (
        h2(block.title) +
        `<ul style="margin:0 0 16px;padding:0 0 0 20px;">${block.items
          .map((item) => `<li style="margin:0 0 4px;">${escapeHtml(item)}</li>`)
          .join('')}</ul>`
      );
    case 'quote':
      return (
        h2(block.title) +
        `<blockquote style="margin:0 0 16px;padding:12px 16px;background-color:${PALETTE.tint};border-left:4px solid ${PALETTE.teal};">${multiline(block.text)}</blockquote>`
      );
    case 'action': {
      const url = assertHttpUrl(block.url, 'action url');
      const href = escapeHtml(url);
      // A table cell carries the background so clients that ignore padding on links still show
      // a solid button; the link text says what happens (no "click here").
      return (
        `<table role="presentation" cellpadding="0" cellspacing="0" border="0" style="margin:24px 0 8px;"><tr>` +
        `<td style="border-radius:6px;background-color:${PALETTE.teal};">` +
        `<a href="${href}" style="display:inline-block;padding:12px 24px;font-family:${FONT};font-size:16px;line-height:24px;font-weight:600;color:${PALETTE.onTeal};text-decoration:none;border-radius:6px;">${escapeHtml(block.label)}</a>` +
        `</td></tr></table>` +
        `<p style="margin:0 0 16px;font-size:14px;line-height:20px;color:${PALETTE.muted};">If the button does not work, open this address: <a href="${href}" style="color:${PALETTE.teal};">${href}</a></p>`
      );
    }
  }
}

/**
 * Renders the HTML part: a single-column, table-based layout with inline styles only (mail
 * clients drop `<style>` blocks and external sheets), `lang` and a `<title>` for screen readers,
 * `role="presentation"` on layout tables so they are not announced as data, a real table with
 * row headers for the facts, and a hidden preheader.
 */
export function renderHtml(content: MessageContent): string {
  const body = content.blocks.map(htmlBlock).join('\n');
  return `<!DOCTYPE html>
<html lang="en" dir="ltr">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="color-scheme" content="light">
<title>${escapeHtml(oneLine(content.subject))}</title>
</head>
<body style="margin:0;padding:0;background-color:${PALETTE.page};">
<div style="display:none;max-height:0;overflow:hidden;opacity:0;" aria-hidden="true">${escapeHtml(content.preheader)}</div>
<table role="presentation" width="100%" cellpadding="0" cellspacing="0" border="0" style="background-color:${PALETTE.page};">
<tr><td align="center" style="padding:24px 12px;">
<table role="presentation" width="600" cellpadding="0" cellspacing="0" border="0" style="width:100%;max-width:600px;background-color:${PALETTE.card};border:1px solid ${PALETTE.line};border-radius:8px;">
<tr><td style="padding:18px 32px;background-color:${PALETTE.teal};border-radius:8px 8px 0 0;font-family:${FONT};font-size:20px;line-height:28px;font-weight:600;color:${PALETTE.onTeal};">Evalon</td></tr>
<tr><td style="padding:28px 32px 16px;${BASE}font-size:16px;line-height:24px;">
<h1 style="margin:0 0 16px;${BASE}font-size:22px;line-height:30px;font-weight:600;">${escapeHtml(content.heading)}</h1>
<p style="margin:0 0 16px;">Hello ${escapeHtml(content.recipientName)},</p>
${body}
</td></tr>
<tr><td style="padding:16px 32px 24px;border-top:1px solid ${PALETTE.line};font-family:${FONT};font-size:13px;line-height:20px;color:${PALETTE.muted};">
<p style="margin:0 0 8px;">${escapeHtml(CAUTIONS_SHORT)}</p>
<p style="margin:0;">${escapeHtml(content.reason)}</p>
</td></tr>
</table>
</td></tr>
</table>
</body>
</html>
`;
}

function textBlock(block: Block): string {
  switch (block.kind) {
    case 'paragraph':
      return block.text;
    case 'facts':
      return [
        block.title.toUpperCase(),
        ...block.rows.map((row) => `${row.label}: ${row.value.replace(/\r\n|\r|\n/g, '\n  ')}`),
        ...(block.note ? [block.note] : []),
      ].join('\n');
    case 'list':
      return [block.title.toUpperCase(), ...block.items.map((item) => `- ${item}`)].join('\n');
    case 'quote':
      return [
        block.title.toUpperCase(),
        ...block.text.split(/\r\n|\r|\n/).map((line) => `> ${line}`),
      ].join('\n');
    case 'action':
      return `${block.label}: ${assertHttpUrl(block.url, 'action url')}`;
  }
}

/**
 * Renders the plain-text part from the same blocks as the HTML, so both carry the same facts,
 * links and cautions in the same order.
 */
export function renderText(content: MessageContent): string {
  return [
    'EVALON',
    '',
    content.heading,
    '='.repeat(Math.min(content.heading.length, 72)),
    '',
    `Hello ${content.recipientName},`,
    '',
    ...content.blocks.flatMap((block) => [textBlock(block), '']),
    '--',
    CAUTIONS_SHORT,
    content.reason,
    '',
  ].join('\n');
}

/** Renders both parts and the one-line subject. */
export function render(content: MessageContent): RenderedMessage {
  return {
    subject: oneLine(content.subject),
    html: renderHtml(content),
    text: renderText(content),
  };
}
