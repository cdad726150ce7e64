/**
 * The five characters that can end an HTML text node or a quoted attribute value, and their
 * character references. `'` becomes `&#39;` because `&apos;` is not defined in HTML 4, which
 * some mail clients still parse by.
 */
const HTML_ESCAPES: Readonly<Record<string, string>> = {
  '&': '&amp;',
  '<': '&lt;',
  '>': '&gt;',
  '"': '&quot;',
  "'": '&#39;',
};

/**
 * Escapes text for an HTML text node or a quoted attribute value (`"` or `'`).
 *
 * Written here rather than imported: the well-known packages in node_modules (`escape-html`,
 * `he`, `entities`) arrive only as dependencies of other tools, not of this workspace, so
 * importing them would break when those tools change. The rule is the OWASP XSS prevention
 * cheat sheet's rule #1 and the tests check it with a standards-conforming HTML parser.
 *
 * @param value Any value; `null`/`undefined` become the empty string, others go through `String`.
 * @returns The escaped text.
 */
export function escapeHtml(value: unknown): string {
  if (value === null || value === undefined) return '';
  return String(value).replace(/[&<>"']/g, (ch) => HTML_ESCAPES[ch] ?? ch);
}

/**
 * Collapses every run of white space (including CR and LF) to one space and trims, for header
 * values such as the subject: a line break in a header could start a forged header line.
 *
 * @param value Text from the data (names, references).
 * @returns The text on one line.
 */
export function oneLine(value: string): string {
  return value.replace(/\s+/g, ' ').trim();
}

/**
 * Checks that a link is an absolute `http:` or `https:` URL and returns it normalised. Links in
 * e-mails come from configuration or the payment provider, never from users, but a `javascript:`
 * or relative URL would still be a bug worth stopping here.
 *
 * @param url The URL to check.
 * @param label Name of the value, for the error message.
 * @throws TypeError when the URL is not absolute http(s).
 */
export function assertHttpUrl(url: string, label = 'url'): string {
  let parsed: URL;
  try {
    parsed = new URL(url);
  } catch {
    throw new TypeError(`${label} must be an absolute http(s) URL, got ${JSON.stringify(url)}`);
  }
  if (parsed.protocol !== 'https:' && parsed.protocol !== 'http:') {
    throw new TypeError(`${label} must use http or https, got ${parsed.protocol}`);
  }
  return parsed.href;
}
