import { PALETTE, renderText } from './layout';

// WCAG 2.1 definitions "relative luminance" and "contrast ratio" (W3C Recommendation), and
// success criterion 1.4.3 Contrast (Minimum): at least 4.5:1 for normal text.

function luminance(hex: string): number {
  const channel = (i: number) => {
    const c = parseInt(hex.slice(1 + 2 * i, 3 + 2 * i), 16) / 255;
    return c <= 0.03928 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
  };
  return 0.2126 * channel(0) + 0.7152 * channel(1) + 0.0722 * channel(2);
}

function contrast(a: string, b: string): number {
  const [hi, lo] = [luminance(a), luminance(b)].sort((x, y) => y - x);
  return (hi + 0.05) / (lo + 0.05);
}

describe('palette contrast (WCAG 2.1 §1.4.3)', () => {
  it('computes the formula correctly on known pairs', () => {
    // Black on white is the maximum, 21:1 (WCAG 2.1 "contrast ratio" note).
    expect(contrast('#000000', '#ffffff')).toBeCloseTo(21, 5);
    // #767676 on white ≈ 4.54:1, the commonly quoted lightest grey passing AA (from memory).
    expect(contrast('#767676', '#ffffff')).toBeCloseTo(4.54, 2);
  });

  it.each([
    ['body text on the card', PALETTE.ink, PALETTE.card],
    ['secondary text on the card', PALETTE.muted, PALETTE.card],
    ['button and brand text on teal', PALETTE.onTeal, PALETTE.teal],
    ['links (teal) on the card', PALETTE.teal, PALETTE.card],
    ['quoted reasons on the tint', PALETTE.ink, PALETTE.tint],
  ])('%s reaches 4.5:1', (_what, fg, bg) => {
    expect(contrast(fg, bg)).toBeGreaterThanOrEqual(4.5);
  });
});

describe('renderText', () => {
  it('renders every block kind in order, with the cautions and the reason last', () => {
    const text = renderText({
      subject: 'S',
      preheader: 'P',
      heading: 'Heading',
      recipientName: 'Ana',
      reason: 'Why you get this.',
      blocks: [
        { kind: 'paragraph', text: 'First.' },
        { kind: 'facts', title: 'Facts', rows: [{ label: 'A', value: 'one\ntwo' }], note: 'Note.' },
        { kind: 'list', title: 'List', items: ['x', 'y'] },
        { kind: 'quote', title: 'Quote', text: 'q1\nq2' },
        { kind: 'action', label: 'Go', url: 'https://evalon.example/x' },
      ],
    });
    expect(text).toBe(
      [
        'EVALON',
        '',
        'Heading',
        '=======',
        '',
        'Hello Ana,',
        '',
        'First.',
        '',
        'FACTS',
        'A: one',
        '  two',
        'Note.',
        '',
        'LIST',
        '- x',
        '- y',
        '',
        'QUOTE',
        '> q1',
        '> q2',
        '',
        'Go: https://evalon.example/x',
        '',
        '--',
        'Evalon schedules and documents; it does not certify. Computed dates and deposits are estimates until the lender confirms; local rules, contracts and licensed practice prevail.',
        'Why you get this.',
        '',
      ].join('\n'),
    );
  });
});
