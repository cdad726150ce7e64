/// <reference types="google.maps" />
/// <reference lib="dom" />
/**
 * `google.maps.InfoWindow` of the stand-in: an HTML box with a close button and a tail, placed
 * above its anchor marker (or at its own position), kept in place as the map moves.
 */
import { type MapsEventListener, trigger } from './events';
import { toLatLng, toLatLngLiteral, type LatLng, type LatLngLike } from './geo';
import type { StandinMap } from './map';
import { anchorFocusTarget, anchorMap, anchorPosition, type MarkerAnchor } from './marker';
import { MVCObject } from './mvc';
import { createIcon } from './pin';

/** Pixels kept between an auto-panned info window and the map's edge. */
const AUTO_PAN_MARGIN = 12;

/** The stand-in's `google.maps.InfoWindow`. */
export class StandinInfoWindow
  extends MVCObject
  implements
    Pick<
      google.maps.InfoWindow,
      | 'close'
      | 'getContent'
      | 'getPosition'
      | 'getZIndex'
      | 'setContent'
      | 'setPosition'
      | 'setZIndex'
    >
{
  /** The outer element (zero-size, at the tip); exists before the window is opened. */
  readonly element: HTMLDivElement;
  private readonly frame: HTMLDivElement;
  private readonly box: HTMLDivElement;
  private readonly header: HTMLDivElement;
  private readonly body: HTMLDivElement;
  private readonly closeButton: HTMLButtonElement;
  private attachedTo: StandinMap | null = null;
  private anchorListeners: MapsEventListener[] = [];

  /** Creates a closed info window; call `open` to show it. */
  constructor(options?: google.maps.InfoWindowOptions | null) {
    super();
    const doc = document;
    this.element = doc.createElement('div');
    this.element.className = 'evm-info';
    this.frame = doc.createElement('div');
    this.frame.className = 'evm-info-frame';
    this.frame.setAttribute('role', 'dialog');
    this.frame.tabIndex = -1;
    this.box = doc.createElement('div');
    this.box.className = 'evm-info-box';
    this.header = doc.createElement('div');
    this.header.className = 'evm-info-head';
    this.header.hidden = true;
    this.body = doc.createElement('div');
    this.body.className = 'evm-info-body';
    this.closeButton = doc.createElement('button');
    this.closeButton.type = 'button';
    this.closeButton.className = 'evm-info-close';
    this.closeButton.setAttribute('aria-label', 'Close');
    this.closeButton.title = 'Close';
    this.closeButton.appendChild(createIcon(doc, 'M6 6l12 12M18 6L6 18', 18));
    this.box.append(this.header, this.body, this.closeButton);
    const tail = doc.createElement('div');
    tail.className = 'evm-info-tail';
    this.frame.append(this.box, tail);
    this.element.appendChild(this.frame);

    this.closeButton.addEventListener('click', (e) => {
      e.stopPropagation();
      const hadFocus = this.element.contains(this.element.ownerDocument.activeElement);
      const anchor = this.get('anchor');
      this.close();
      trigger(this, 'closeclick');
      if (hadFocus) anchorFocusTarget(anchor)?.focus();
    });
    this.element.addEventListener('keydown', (e) => {
      if (e.key !== 'Escape') return;
      e.stopPropagation();
      const anchor = this.get('anchor');
      this.close();
      anchorFocusTarget(anchor)?.focus();
    });
    // Presses inside the window are not map drags or map clicks.
    this.element.addEventListener('pointerdown', (e) => e.stopPropagation());

    this.setValues(options ?? {});
  }

  /** Whether the window is open on a map. */
  get isOpen(): boolean {
    return this.attachedTo !== null;
  }

  /** Applies several options at once. */
  setOptions(options: google.maps.InfoWindowOptions | null): void {
    this.setValues(options ?? {});
  }

  /**
   * Opens on a map, above `anchor` when given (a Marker or an AdvancedMarkerElement), else at
   * the window's position. Accepts `open({map, anchor, shouldFocus})` or `open(map, anchor)`.
   * Without a map, the anchor's map is used.
   */
  open(
    options?: google.maps.InfoWindowOpenOptions | google.maps.Map | StandinMap | null,
    anchor?: unknown,
  ): void {
    let map: StandinMap | null = null;
    let anchorObj: unknown = anchor ?? null;
    let shouldFocus: boolean | null | undefined;
    const o = options as Record<string, unknown> | null | undefined;
    if (o && typeof (o as unknown as StandinMap).attachOverlay === 'function') {
      map = o as unknown as StandinMap;
    } else if (o) {
      map = (o['map'] as StandinMap | null | undefined) ?? null;
      anchorObj = o['anchor'] ?? anchorObj;
      shouldFocus = o['shouldFocus'] as boolean | null | undefined;
    }
    map = map ?? anchorMap(anchorObj);
    if (!map || typeof map.attachOverlay !== 'function') return;

    const focusedBefore = this.element.ownerDocument.activeElement;
    this.set('anchor', anchorObj);
    this.watchAnchor(anchorObj);
    if (this.attachedTo !== map) {
      this.detach();
      this.attachedTo = map;
      map.floatLayer.appendChild(this.element);
      map.attachOverlay(this);
    } else {
      this.draw();
    }
    this.set('map', map);
    this.autoPan();
    // Focus follows a keyboard user: explicitly asked, or the anchor had focus when opened.
    const anchorEl = anchorFocusTarget(anchorObj);
    if (shouldFocus === true || (shouldFocus == null && anchorEl && focusedBefore === anchorEl)) {
      this.frame.focus();
    }
    setTimeout(() => {
      if (this.attachedTo) trigger(this, 'domready');
    }, 0);
  }

  /** Closes the window (it can be opened again). */
  close(): void {
    if (!this.attachedTo) return;
    this.detach();
    this.set('anchor', null);
    this.set('map', null);
    trigger(this, 'close');
  }

  /** Sets the content: a string is parsed as HTML (as the hosted API does), a node is inserted. */
  setContent(content?: string | Element | Text | null): void {
    this.set('content', content);
  }

  /** The content as set. */
  getContent(): string | Element | Text | null | undefined {
    return this.get('content') as string | Element | Text | null | undefined;
  }

  /** Sets where the window points when it has no anchor. */
  setPosition(position?: google.maps.LatLng | google.maps.LatLngLiteral | null): void {
    this.set('position', position ? toLatLng(position) : null);
  }

  /** The position set, if any. */
  getPosition(): google.maps.LatLng | null | undefined {
    return this.get('position') as LatLng | null | undefined;
  }

  /** Sets the stacking order among info windows. */
  setZIndex(zIndex: number): void {
    this.set('zIndex', zIndex);
  }

  /** The stacking order set (0 by default). */
  getZIndex(): number {
    return (this.get('zIndex') as number | undefined) ?? 0;
  }

  /** Escape on the map (focus on a pin or the map itself) closes the window. */
  onEscape(): boolean {
    if (!this.attachedTo) return false;
    this.close();
    return true;
  }

  /** Called by the map on every view change. */
  draw(): void {
    const map = this.attachedTo;
    const anchor = this.get('anchor');
    const pos: LatLngLike | null = anchor
      ? anchorPosition(anchor)
      : this.getPosition()
        ? toLatLngLiteral(this.getPosition() as LatLng)
        : null;
    const px = map && pos ? map.pixelFor(pos) : null;
    if (!px) {
      this.element.style.display = 'none';
      return;
    }
    const lift = anchor ? ((anchor as MarkerAnchor).anchorOffset?.() ?? 0) : 0;
    const offset = this.get('pixelOffset') as google.maps.Size | null | undefined;
    const x = px.x + (offset?.width ?? 0);
    const y = px.y - lift + (offset?.height ?? 0);
    this.element.style.display = '';
    this.element.style.transform = `translate(${x}px, ${y}px)`;
    this.element.style.zIndex = String(this.getZIndex());
  }

  /** Reacts to option changes. */
  override changed(key: string): void {
    switch (key) {
      case 'content':
        this.renderContent();
        break;
      case 'headerContent':
      case 'headerDisabled':
        this.renderHeader();
        break;
      case 'ariaLabel':
        this.updateLabel();
        break;
      case 'maxWidth':
      case 'minWidth': {
        const max = this.get('maxWidth') as number | undefined;
        const min = this.get('minWidth') as number | undefined;
        this.box.style.maxWidth = max ? `${max}px` : '';
        this.box.style.minWidth = min ? `${min}px` : '';
        break;
      }
      case 'position':
      case 'pixelOffset':
      case 'zIndex':
        this.draw();
        break;
    }
  }

  private renderContent(): void {
    const content = this.getContent();
    if (content === null || content === undefined) {
      this.body.replaceChildren();
    } else if (typeof content === 'string') {
      // Parity with the hosted API, which treats a string as HTML: pass a Node for untrusted text.
      this.body.innerHTML = content;
    } else {
      this.body.replaceChildren(content);
    }
    this.updateLabel();
    if (this.attachedTo) this.draw();
  }

  private renderHeader(): void {
    const header = this.get('headerContent') as string | Node | null | undefined;
    const disabled = this.get('headerDisabled') === true;
    if (disabled || header === null || header === undefined || header === '') {
      this.header.hidden = true;
      this.header.replaceChildren();
    } else {
      this.header.hidden = false;
      if (typeof header === 'string') this.header.textContent = header;
      else this.header.replaceChildren(header);
    }
    this.updateLabel();
  }

  private updateLabel(): void {
    const label = this.get('ariaLabel') as string | null | undefined;
    const header = this.header.hidden ? '' : (this.header.textContent ?? '');
    const text = label || header || (this.body.textContent ?? '').trim().slice(0, 80) || 'Details';
    this.frame.setAttribute('aria-label', text);
  }

  private watchAnchor(anchor: unknown): void {
    for (const l of this.anchorListeners) l.remove();
    this.anchorListeners = [];
    if (!anchor || typeof (anchor as MVCObject).addListener !== 'function') return;
    const a = anchor as MVCObject;
    this.anchorListeners.push(
      a.addListener('position_changed', () => this.draw()),
      // An anchor taken off the map takes its info window with it.
      a.addListener('map_changed', () => {
        if (!anchorMap(anchor)) this.close();
      }),
    );
  }

  private detach(): void {
    if (!this.attachedTo) return;
    this.attachedTo.detachOverlay(this);
    this.element.remove();
    this.attachedTo = null;
    for (const l of this.anchorListeners) l.remove();
    this.anchorListeners = [];
  }

  /** Pans the map so the whole window shows, unless disableAutoPan. */
  private autoPan(): void {
    const map = this.attachedTo;
    if (!map || this.get('disableAutoPan') === true) return;
    const w = this.frame.offsetWidth;
    const h = this.frame.offsetHeight;
    if (!w || !h) return;
    const pos = this.element.style.transform.match(/translate\(([-\d.e]+)px, ([-\d.e]+)px\)/);
    if (!pos) return;
    const x = parseFloat(pos[1]);
    const y = parseFloat(pos[2]);
    const size = map.size();
    const left = x - w / 2 - AUTO_PAN_MARGIN;
    const right = x + w / 2 + AUTO_PAN_MARGIN;
    const top = y - h - AUTO_PAN_MARGIN;
    let dx = 0;
    let dy = 0;
    if (left < 0) dx = left;
    else if (right > size.w) dx = Math.min(right - size.w, left);
    if (top < 0) dy = top;
    if (dx || dy) map.panBy(dx, dy);
  }
}
