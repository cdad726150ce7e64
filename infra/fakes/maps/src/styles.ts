/**
 * Look of the offline map: calm, neutral colours so the app's Material 3 theme sits on top, and
 * the CSS for the map's own elements (all classes start with `evm-`).
 */

/** Colours of the base map and its furniture. */
export const palette = {
  ocean: '#e8f0f2',
  land: '#f7f7f4',
  coast: '#a9b8bf',
  border: '#b9c4c9',
  graticule: '#d5e1e5',
  pin: '#2f6475',
  pinActive: '#1d4856',
  text: '#22343b',
  focus: '#1d5c70',
};

const css = `
.evm-root{position:absolute;inset:0;overflow:hidden;background:${palette.ocean};color:${palette.text};
font-family:inherit;font-size:13px;line-height:1.35;touch-action:none;user-select:none;
-webkit-user-select:none;cursor:grab;outline:none;contain:strict}
.evm-root.evm-dragging{cursor:grabbing}
.evm-root:focus-visible::after{content:"";position:absolute;inset:0;pointer-events:none;
box-shadow:inset 0 0 0 3px ${palette.focus};z-index:5}
.evm-base{position:absolute;left:0;top:0;width:100%;height:100%;display:block}
.evm-land{fill:${palette.land};stroke:${palette.coast};stroke-width:0.9px;stroke-linejoin:round}
.evm-borders{fill:none;stroke:${palette.border};stroke-width:0.8px;stroke-linejoin:round}
.evm-graticule{fill:none;stroke:${palette.graticule};stroke-width:1px}
.evm-layer{position:absolute;left:0;top:0;width:0;height:0}
.evm-markers{z-index:1}.evm-float{z-index:2}
.evm-marker{position:absolute;left:-14px;top:-40px;width:28px;height:40px;cursor:pointer;
border-radius:14px 14px 14px 14px/14px 14px 26px 26px;outline:none}
.evm-marker[aria-disabled],.evm-marker.evm-static{cursor:inherit}
.evm-marker:focus-visible{outline:3px solid ${palette.focus};outline-offset:2px}
.evm-pin{display:block;overflow:visible;filter:drop-shadow(0 1px 1.5px rgba(20,40,48,.35))}
.evm-pin-body{fill:${palette.pin};stroke:#fff;stroke-width:1.5px}
.evm-marker:hover .evm-pin-body,.evm-marker:focus-visible .evm-pin-body{fill:${palette.pinActive}}
.evm-pin-dot{fill:#fff}
.evm-pin-glyph{fill:#fff;font-size:12px;font-weight:600;text-anchor:middle;font-family:inherit}
.evm-caption{position:absolute;left:29px;top:5px;white-space:nowrap;background:rgba(255,255,255,.94);
border:1px solid #c9d3d7;border-radius:6px;padding:1px 6px;font-size:12px;font-weight:500;
color:${palette.text};box-shadow:0 1px 2px rgba(20,40,48,.14);pointer-events:none}
.evm-caption-left{left:auto;right:29px}.evm-caption-hidden{display:none}
.evm-advanced{position:absolute;left:0;top:0;width:0;height:0;display:block}
.evm-advanced-content{position:absolute;left:0;bottom:0;transform:translateX(-50%);cursor:pointer;
outline:none}
.evm-advanced-content:focus-visible{outline:3px solid ${palette.focus};outline-offset:2px}
.evm-info{position:absolute;left:0;top:0;width:0;height:0;cursor:auto;user-select:text;
-webkit-user-select:text}
.evm-info-frame{position:absolute;left:0;bottom:0;transform:translateX(-50%);display:flex;
flex-direction:column;align-items:center;outline:none;width:max-content;max-width:min(320px,80vw)}
.evm-info-box{position:relative;background:#fff;color:#1f2b30;border-radius:8px;
box-shadow:0 2px 10px rgba(20,40,48,.25);padding:12px 40px 12px 14px;font-size:14px;
line-height:1.4;min-width:80px;max-width:100%;max-height:60vh;overflow:auto;box-sizing:border-box}
.evm-info-head{font-weight:600;margin-bottom:4px}
.evm-info-close{position:absolute;top:4px;right:4px;width:32px;height:32px;padding:6px;border:0;
border-radius:50%;background:transparent;color:#4a5b61;cursor:pointer;display:grid;place-items:center}
.evm-info-close:hover{background:#eef3f4}
.evm-info-close:focus-visible{outline:3px solid ${palette.focus};outline-offset:0}
.evm-info-tail{width:0;height:0;border-left:9px solid transparent;border-right:9px solid transparent;
border-top:10px solid #fff;filter:drop-shadow(0 2px 1px rgba(20,40,48,.12))}
.evm-controls{position:absolute;right:12px;bottom:30px;display:flex;flex-direction:column;gap:1px;
z-index:3;border-radius:8px;box-shadow:0 1px 4px rgba(20,40,48,.28);overflow:hidden}
.evm-zoom{width:40px;height:40px;border:0;margin:0;padding:0;background:#fff;color:#37474f;
cursor:pointer;display:grid;place-items:center}
.evm-zoom:hover{background:#f1f5f6}
.evm-zoom:disabled{color:#b3bec2;cursor:default;background:#fff}
.evm-zoom:focus-visible{outline:3px solid ${palette.focus};outline-offset:-3px}
.evm-attribution{position:absolute;right:0;bottom:0;z-index:3;padding:2px 8px;font-size:11px;
color:#4b5c63;background:rgba(255,255,255,.8);border-top-left-radius:6px;cursor:auto;
user-select:text;-webkit-user-select:text}
`;

const installed = new WeakSet<Document>();

/**
 * Adds the stylesheet to `doc` once. A constructed stylesheet is used where the browser has one,
 * so a Content-Security-Policy without `style-src 'unsafe-inline'` does not block it; otherwise a
 * `<style>` element.
 */
export function installStyles(doc: Document): void {
  if (installed.has(doc)) return;
  installed.add(doc);
  const view = doc.defaultView as (Window & typeof globalThis) | null;
  const Sheet = view?.CSSStyleSheet;
  if (Sheet && 'replaceSync' in Sheet.prototype && Array.isArray(doc.adoptedStyleSheets)) {
    try {
      const sheet = new Sheet();
      sheet.replaceSync(css);
      doc.adoptedStyleSheets = [...doc.adoptedStyleSheets, sheet];
      return;
    } catch {
      // Constructable stylesheets missing (older engines): fall back to a <style> element.
    }
  }
  const style = doc.createElement('style');
  style.setAttribute('data-evm', '');
  style.textContent = css;
  doc.head.appendChild(style);
}
