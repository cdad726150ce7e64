/**
 * @jest-environment jsdom
 */
// DOM types for the jsdom environment of this file (the packages' tsconfig has no DOM lib).
/// <reference lib="dom" />
/// <reference lib="dom.iterable" />
import fc from 'fast-check';

import { assertHttpUrl, escapeHtml, oneLine } from './escape';

// The outside check is the HTML parser of jsdom (the WHATWG HTML parsing algorithm, the same one
// browsers and modern mail clients' renderers follow): whatever escapeHtml returns must come
// back from that parser as the original text, both as a text node and as a quoted attribute.

function parseBack(value: string): {
  text: string;
  doubleQuoted: string | null;
  singleQuoted: string | null;
} {
  const escaped = escapeHtml(value);
  const doc = new DOMParser().parseFromString(
    `<!DOCTYPE html><body><p id="t" title="${escaped}" data-x='${escaped}'>${escaped}</p></body>`,
    'text/html',
  );
  const p = doc.getElementById('t');
  if (!p) throw new Error('the paragraph did not survive parsing');
  return {
    text: p.textContent ?? '',
    doubleQuoted: p.getAttribute('title'),
    singleQuoted: p.getAttribute('data-x'),
  };
}

describe('escapeHtml', () => {
  it('replaces the five characters of OWASP XSS prevention rule #1', () => {
    expect(escapeHtml(`<script>alert("x")</script> & 'y'`)).toBe(
      '&lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt; &amp; &#39;y&#39;',
    );
  });

  it('leaves other text alone and maps null/undefined to the empty string', () => {
    expect(escapeHtml('Zoë – OR 4, 100 % ready')).toBe('Zoë – OR 4, 100 % ready');
    expect(escapeHtml(null)).toBe('');
    expect(escapeHtml(undefined)).toBe('');
    expect(escapeHtml(42)).toBe('42');
  });

  it('escapes text that looks escaped again: its input is raw text, never markup', () => {
    expect(escapeHtml(escapeHtml('&'))).toBe('&amp;amp;');
  });

  it('creates no element from a hostile value', () => {
    const hostile = `"><img src=x onerror=alert(1)><script>alert(2)</script>'`;
    const doc = new DOMParser().parseFromString(
      `<!DOCTYPE html><body><p title="${escapeHtml(hostile)}">${escapeHtml(hostile)}</p></body>`,
      'text/html',
    );
    expect(doc.querySelectorAll('img, script')).toHaveLength(0);
    expect(doc.body.children).toHaveLength(1);
    expect(doc.querySelector('p')?.textContent).toBe(hostile);
    expect(doc.querySelector('p')?.getAttribute('title')).toBe(hostile);
  });

  it('round-trips any text through the HTML parser (property test, fast-check)', () => {
    // The HTML parser normalises CR and CRLF to LF and drops NUL in text (WHATWG HTML
    // §13.2.3.5 "preprocessing the input stream" and the "in body" rules, from memory), so
    // those two are left out of the generated text: they change with or without escaping.
    const text = fc.string({ unit: 'binary', maxLength: 60 }).map((s) => s.replace(/[\r\0]/g, ''));
    fc.assert(
      fc.property(text, (value) => {
        const back = parseBack(value);
        expect(back).toEqual({ text: value, doubleQuoted: value, singleQuoted: value });
      }),
      { numRuns: 300 },
    );
  });

  it('round-trips the characters that matter, mixed with markup-like text', () => {
    const pieces = fc.constantFrom(
      '<',
      '>',
      '&',
      '"',
      "'",
      '&amp;',
      '<!--',
      '-->',
      '</p>',
      'a',
      ' ',
      '\n',
    );
    fc.assert(
      fc.property(fc.array(pieces, { maxLength: 30 }), (parts) => {
        const value = parts.join('');
        expect(parseBack(value)).toEqual({ text: value, doubleQuoted: value, singleQuoted: value });
      }),
      { numRuns: 300 },
    );
  });
});

describe('oneLine', () => {
  it('joins lines so a header value cannot start a new header', () => {
    expect(oneLine('Loan EV-1\r\nBcc: x@y.example')).toBe('Loan EV-1 Bcc: x@y.example');
    expect(oneLine('  a \t b  ')).toBe('a b');
  });
});

describe('assertHttpUrl', () => {
  it('accepts absolute http(s) URLs and returns them normalised (WHATWG URL)', () => {
    expect(assertHttpUrl('https://evalon.example')).toBe('https://evalon.example/');
    expect(assertHttpUrl('http://127.0.0.1:8080/loans/1')).toBe('http://127.0.0.1:8080/loans/1');
  });

  it('refuses other schemes and relative URLs', () => {
    expect(() => assertHttpUrl('javascript:alert(1)')).toThrow(TypeError);
    expect(() => assertHttpUrl('data:text/html,<b>x</b>')).toThrow(TypeError);
    expect(() => assertHttpUrl('/loans/1')).toThrow(TypeError);
  });
});
