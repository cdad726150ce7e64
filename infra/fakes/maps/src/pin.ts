/** The default marker drawing: an SVG pin whose tip is the marker's position. */

/** Size of the pin in CSS pixels. */
export const PIN_WIDTH = 28;
/** Height of the pin; the tip is at the bottom centre. */
export const PIN_HEIGHT = 40;

const SVG_NS = 'http://www.w3.org/2000/svg';

/**
 * Creates the pin SVG. `glyph` (at most two characters) is drawn in the head; without it, a dot.
 * The SVG is decorative: the element around it carries the accessible name.
 */
export function createPin(doc: Document, glyph?: string, glyphColor?: string): SVGSVGElement {
  const svg = doc.createElementNS(SVG_NS, 'svg');
  svg.setAttribute('class', 'evm-pin');
  svg.setAttribute('viewBox', `0 0 ${PIN_WIDTH} ${PIN_HEIGHT}`);
  svg.setAttribute('width', String(PIN_WIDTH));
  svg.setAttribute('height', String(PIN_HEIGHT));
  svg.setAttribute('aria-hidden', 'true');
  svg.setAttribute('focusable', 'false');
  const body = doc.createElementNS(SVG_NS, 'path');
  body.setAttribute('class', 'evm-pin-body');
  body.setAttribute(
    'd',
    'M14 1.2C6.9 1.2 1.2 6.8 1.2 13.8c0 9.1 10.6 21.9 12.1 23.7a.9.9 0 0 0 1.4 0' +
      'C16.2 35.7 26.8 22.9 26.8 13.8 26.8 6.8 21.1 1.2 14 1.2z',
  );
  svg.appendChild(body);
  if (glyph) {
    const text = doc.createElementNS(SVG_NS, 'text');
    text.setAttribute('class', 'evm-pin-glyph');
    text.setAttribute('x', '14');
    text.setAttribute('y', '18.2');
    if (glyphColor) text.setAttribute('style', `fill:${glyphColor}`);
    text.textContent = glyph;
    svg.appendChild(text);
  } else {
    const dot = doc.createElementNS(SVG_NS, 'circle');
    dot.setAttribute('class', 'evm-pin-dot');
    dot.setAttribute('cx', '14');
    dot.setAttribute('cy', '13.8');
    dot.setAttribute('r', '4.6');
    svg.appendChild(dot);
  }
  return svg;
}

/** Creates an SVG icon from one path (used by the zoom and close buttons). */
export function createIcon(doc: Document, d: string, size = 18): SVGSVGElement {
  const svg = doc.createElementNS(SVG_NS, 'svg');
  svg.setAttribute('viewBox', '0 0 24 24');
  svg.setAttribute('width', String(size));
  svg.setAttribute('height', String(size));
  svg.setAttribute('aria-hidden', 'true');
  svg.setAttribute('focusable', 'false');
  const path = doc.createElementNS(SVG_NS, 'path');
  path.setAttribute('d', d);
  path.setAttribute('fill', 'none');
  path.setAttribute('stroke', 'currentColor');
  path.setAttribute('stroke-width', '2.2');
  path.setAttribute('stroke-linecap', 'round');
  svg.appendChild(path);
  return svg;
}

export { SVG_NS };
