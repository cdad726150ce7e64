/// <reference types="google.maps" />
/// <reference lib="dom" />
/**
 * `google.maps.Marker` (deprecated by the hosted API but still used by `<map-marker>`) and
 * `google.maps.marker.AdvancedMarkerElement` (used by `<map-advanced-marker>`), both drawn as an
 * accessible SVG pin with a small caption.
 */
import { event, hasListeners, trigger, type Handler, type MapsEventListener } from './events';
import { LatLng, toLatLng, toLatLngLiteral, type LatLngLike } from './geo';
import { markerPixel, type StandinMap, type StandinMouseEvent } from './map';
import { MVCObject } from './mvc';
import { createPin, PIN_HEIGHT } from './pin';

/** Longest label drawn inside the pin's head; longer labels become the caption. */
const MAX_GLYPH_LENGTH = 2;

type LabelValue = string | google.maps.MarkerLabel | null | undefined;

function labelText(label: LabelValue): string {
  if (!label) return '';
  return typeof label === 'string' ? label : (label.text ?? '');
}

/**
 * Fills a marker element: the pin (with a short label as its glyph) and a caption, which shows a
 * longer label or else the title, so that depots and campuses can be told apart at a glance.
 */
function renderMarkerContent(
  el: HTMLElement,
  opts: { title: string; label: LabelValue; clickable: boolean },
): void {
  const doc = el.ownerDocument;
  const text = labelText(opts.label);
  const glyph = text && text.length <= MAX_GLYPH_LENGTH ? text : undefined;
  const caption = glyph ? opts.title : text || opts.title;
  const glyphColor =
    opts.label && typeof opts.label === 'object' ? (opts.label.color ?? undefined) : undefined;
  el.replaceChildren(createPin(doc, glyph, glyphColor));
  if (caption) {
    const span = doc.createElement('span');
    span.className = 'evm-caption';
    span.textContent = caption;
    // The accessible name comes from aria-label; the caption would only repeat it.
    span.setAttribute('aria-hidden', 'true');
    el.appendChild(span);
  }
  const name = opts.title || text || 'Map marker';
  el.setAttribute('aria-label', name);
  if (opts.title) el.title = opts.title;
  else el.removeAttribute('title');
  if (opts.clickable) {
    el.setAttribute('role', 'button');
    el.tabIndex = 0;
    el.classList.remove('evm-static');
  } else {
    el.setAttribute('role', 'img');
    el.removeAttribute('tabindex');
    el.classList.add('evm-static');
  }
}

/** Wires DOM events of a marker element to hosted-API style events on `target`. */
function wireMarkerEvents(
  el: HTMLElement,
  target: object,
  position: () => LatLngLike | null,
  clickable: () => boolean,
  nativeOnly: boolean,
): void {
  const mouseEvent = (e: Event): StandinMouseEvent => {
    const p = position();
    return {
      latLng: p ? new LatLng(p.lat, p.lng) : null,
      domEvent: e,
      stop: () => e.stopPropagation(),
    };
  };
  el.addEventListener('click', (e) => {
    if (clickable()) trigger(target, 'click', mouseEvent(e));
  });
  el.addEventListener('keydown', (e) => {
    // role="button" on a div: Enter and Space act as a click, as on a native button.
    if ((e.key === 'Enter' || e.key === ' ') && clickable() && e.target === el) {
      e.preventDefault();
      e.stopPropagation();
      el.click();
    }
  });
  if (nativeOnly) return;
  const forward: [string, string][] = [
    ['dblclick', 'dblclick'],
    ['mousedown', 'mousedown'],
    ['mouseup', 'mouseup'],
    ['mouseover', 'mouseover'],
    ['mouseout', 'mouseout'],
    ['contextmenu', 'rightclick'],
  ];
  for (const [dom, name] of forward) {
    el.addEventListener(dom, (e) => trigger(target, name, mouseEvent(e)));
  }
}

/** Puts a marker element at its position on the map, or hides it. */
function placeMarker(
  el: HTMLElement,
  map: StandinMap | null,
  position: LatLngLike | null,
  visible: boolean,
  zIndex: number | null | undefined,
): void {
  const px = map && position && visible ? map.pixelFor(position) : null;
  if (!px) {
    el.style.display = 'none';
    markerPixel.delete(el);
    return;
  }
  markerPixel.set(el, px);
  el.style.display = '';
  el.style.transform = `translate(${px.x}px, ${px.y}px)`;
  // Without a zIndex, markers further south sit in front, as in the hosted API.
  el.style.zIndex = String(zIndex ?? Math.round(px.y));
}

/** The stand-in's `google.maps.Marker`. */
export class StandinMarker
  extends MVCObject
  implements
    Pick<
      google.maps.Marker,
      | 'getClickable'
      | 'getDraggable'
      | 'getLabel'
      | 'getOpacity'
      | 'getTitle'
      | 'getVisible'
      | 'getZIndex'
      | 'setClickable'
      | 'setLabel'
      | 'setOpacity'
      | 'setTitle'
      | 'setVisible'
      | 'setZIndex'
    >
{
  /** The marker's element (role="button" when clickable); exists before it is on a map. */
  readonly element: HTMLDivElement;
  private attachedTo: StandinMap | null = null;

  /** Creates a marker; with `map` in the options it shows at once. */
  constructor(options?: google.maps.MarkerOptions | null) {
    super();
    this.element = document.createElement('div');
    this.element.className = 'evm-marker';
    wireMarkerEvents(
      this.element,
      this,
      () => {
        const p = this.getPosition();
        return p ? { lat: p.lat(), lng: p.lng() } : null;
      },
      () => this.getClickable(),
      false,
    );
    this.setValues({ clickable: true, visible: true, ...(options ?? {}) });
    this.refresh();
  }

  /** Applies several options at once. */
  setOptions(options: google.maps.MarkerOptions | null): void {
    this.setValues(options ?? {});
  }

  /** Shows the marker on `map`, or removes it with null. */
  setMap(map: google.maps.Map | StandinMap | null): void {
    this.set('map', map ?? null);
  }

  /** The map the marker is on, or null. */
  getMap(): google.maps.Map | null {
    return (this.get('map') as google.maps.Map | null | undefined) ?? null;
  }

  /** Moves the marker; literals become LatLng. */
  setPosition(position: google.maps.LatLng | google.maps.LatLngLiteral | null | undefined): void {
    this.set('position', position ? toLatLng(position) : null);
  }

  /** The position, or null/undefined when none was set. */
  getPosition(): google.maps.LatLng | null | undefined {
    return this.get('position') as LatLng | null | undefined;
  }

  /** Sets the title: the tooltip, the accessible name and (without a long label) the caption. */
  setTitle(title: string | null): void {
    this.set('title', title);
  }

  /** The title. */
  getTitle(): string | null | undefined {
    return this.get('title') as string | null | undefined;
  }

  /** Sets the label: up to two characters in the pin's head, longer text as the caption. */
  setLabel(label: string | google.maps.MarkerLabel | null): void {
    this.set('label', label);
  }

  /** The label. */
  getLabel(): string | google.maps.MarkerLabel | null | undefined {
    return this.get('label') as LabelValue;
  }

  /** Sets whether the marker takes clicks (and is focusable). */
  setClickable(flag: boolean): void {
    this.set('clickable', flag);
  }

  /** Whether the marker takes clicks. */
  getClickable(): boolean {
    return this.get('clickable') !== false;
  }

  /** Sets whether the marker shows. */
  setVisible(visible: boolean): void {
    this.set('visible', visible);
  }

  /** Whether the marker shows. */
  getVisible(): boolean {
    return this.get('visible') !== false;
  }

  /** Sets the stacking order. */
  setZIndex(zIndex: number | null): void {
    this.set('zIndex', zIndex);
  }

  /** The stacking order set, if any. */
  getZIndex(): number | null | undefined {
    return this.get('zIndex') as number | null | undefined;
  }

  /** Sets the opacity (0–1). */
  setOpacity(opacity: number | null): void {
    this.set('opacity', opacity);
  }

  /** The opacity set, if any. */
  getOpacity(): number | null | undefined {
    return this.get('opacity') as number | null | undefined;
  }

  /** Stored only: the stand-in always draws its own pin. */
  setIcon(icon: string | google.maps.Icon | google.maps.Symbol | null): void {
    this.set('icon', icon);
  }

  /** The icon set, if any (not drawn). */
  getIcon(): string | google.maps.Icon | google.maps.Symbol | null | undefined {
    return this.get('icon') as string | google.maps.Icon | google.maps.Symbol | null | undefined;
  }

  /** Stored only: the stand-in's markers cannot be dragged. */
  setDraggable(flag: boolean | null): void {
    this.set('draggable', flag);
  }

  /** Whether dragging was asked for (it is not supported). */
  getDraggable(): boolean {
    return (this.get('draggable') as boolean | null | undefined) ?? false;
  }

  /** Stored only (no animation). */
  setAnimation(animation: google.maps.Animation | null): void {
    this.set('animation', animation);
  }

  /** The animation set, if any. */
  getAnimation(): google.maps.Animation | null | undefined {
    return this.get('animation') as google.maps.Animation | null | undefined;
  }

  /** The cursor option, if any. */
  getCursor(): string | null | undefined {
    return this.get('cursor') as string | null | undefined;
  }

  /** The shape option, if any (not used for hit testing). */
  getShape(): google.maps.MarkerShape | null | undefined {
    return this.get('shape') as google.maps.MarkerShape | null | undefined;
  }

  /** Height above the position where an info window anchored here has its tip. */
  anchorOffset(): number {
    const p = this.get('anchorPoint') as google.maps.Point | undefined;
    return p ? -p.y : PIN_HEIGHT + 2;
  }

  /** Called by the map on every view change. */
  draw(): void {
    const p = this.getPosition();
    placeMarker(
      this.element,
      this.attachedTo,
      p ? { lat: p.lat(), lng: p.lng() } : null,
      this.getVisible(),
      this.getZIndex(),
    );
  }

  /** Reacts to any option change: re-attaches, re-renders, re-positions. */
  override changed(key: string): void {
    if (key === 'map') this.reattach();
    if (['title', 'label', 'clickable'].includes(key)) this.refresh();
    if (key === 'opacity') {
      const o = this.getOpacity();
      this.element.style.opacity = o === null || o === undefined ? '' : String(o);
    }
    if (['position', 'visible', 'zIndex', 'map'].includes(key)) this.draw();
  }

  private refresh(): void {
    renderMarkerContent(this.element, {
      title: this.getTitle() ?? '',
      label: this.getLabel(),
      clickable: this.getClickable(),
    });
    this.attachedTo?.scheduleCaptionLayout();
  }

  private reattach(): void {
    const map = this.getMap() as unknown as StandinMap | null;
    if (map === this.attachedTo) return;
    if (this.attachedTo) {
      this.attachedTo.detachOverlay(this);
      this.element.remove();
    }
    this.attachedTo = map && typeof map.attachOverlay === 'function' ? map : null;
    if (this.attachedTo) {
      this.attachedTo.markerLayer.appendChild(this.element);
      this.attachedTo.attachOverlay(this);
    }
  }
}

/** Properties of `AdvancedMarkerElementOptions` that the stand-in reads. */
interface AdvancedOptions {
  map?: google.maps.Map | StandinMap | null;
  position?:
    google.maps.LatLng | google.maps.LatLngLiteral | google.maps.LatLngAltitudeLiteral | null;
  title?: string | null;
  content?: Node | null;
  zIndex?: number | null;
  gmpDraggable?: boolean | null;
  gmpClickable?: boolean | null;
  collisionBehavior?: string | null;
}

/** Tag name of the stand-in's advanced marker element (our own name). */
export const ADVANCED_MARKER_TAG = 'evalon-offline-marker';

/** The `AdvancedMarkerElement` class type the stand-in exposes. */
export type AdvancedMarkerClass = ReturnType<typeof defineAdvancedMarker>;

/**
 * Defines the stand-in's `AdvancedMarkerElement` in `win` (a custom element, as the hosted one
 * is) and returns the class. Done at load time because `HTMLElement` belongs to the window.
 */
export function defineAdvancedMarker(win: Window & typeof globalThis) {
  class StandinAdvancedMarker extends win.HTMLElement {
    private mapValue: StandinMap | null = null;
    private positionValue: AdvancedOptions['position'] = null;
    private titleValue = '';
    private contentValue: Node | null = null;
    private zIndexValue: number | null = null;
    private clickableValue: boolean | null = null;
    private readonly holder: HTMLDivElement;
    /** Whether the element holds its own default pin (not app content). */
    private defaultPin = true;

    /** Dragging is not supported; the value is only stored. */
    gmpDraggable: boolean | null = null;
    /** Stored only (no collision handling). */
    collisionBehavior: string | null = null;

    /** Creates the element; options as the hosted `AdvancedMarkerElementOptions`. */
    constructor(options?: AdvancedOptions | null) {
      super();
      this.holder = this.ownerDocument.createElement('div');
      this.holder.className = 'evm-advanced-content';
      wireMarkerEvents(
        this.holder,
        this,
        () => (this.positionValue ? toLatLngLiteral(this.positionValue) : null),
        () => this.isClickable(),
        true,
      );
      const o = options ?? {};
      if (o.title !== undefined) this.title = o.title ?? '';
      if (o.content !== undefined) this.content = o.content;
      if (o.zIndex !== undefined) this.zIndex = o.zIndex;
      if (o.gmpClickable !== undefined) this.gmpClickable = o.gmpClickable;
      this.gmpDraggable = o.gmpDraggable ?? null;
      this.collisionBehavior = o.collisionBehavior ?? null;
      if (o.position !== undefined) this.position = o.position;
      if (o.map !== undefined) this.map = o.map;
    }

    /** The map the marker is on, or null. */
    get map(): google.maps.Map | null {
      return this.mapValue as unknown as google.maps.Map | null;
    }

    set map(map: google.maps.Map | StandinMap | null | undefined) {
      const next = (map as unknown as StandinMap | null) ?? null;
      if (next === this.mapValue) return;
      if (this.mapValue) {
        this.mapValue.detachOverlay(this);
        this.remove();
      }
      this.mapValue = next && typeof next.attachOverlay === 'function' ? next : null;
      if (this.mapValue) {
        this.className = 'evm-advanced';
        this.refresh();
        if (this.holder.parentNode !== this) this.appendChild(this.holder);
        this.mapValue.markerLayer.appendChild(this);
        this.mapValue.attachOverlay(this);
      }
      // Lets an info window anchored here follow (it closes when the marker leaves the map).
      trigger(this, 'map_changed');
    }

    /** The position as set (LatLng or literal), or null. */
    get position(): AdvancedOptions['position'] {
      return this.positionValue;
    }

    set position(p: AdvancedOptions['position'] | undefined) {
      this.positionValue = p ?? null;
      this.draw();
      trigger(this, 'position_changed');
    }

    /** The title: tooltip and accessible name. */
    override get title(): string {
      return this.titleValue;
    }

    override set title(t: string) {
      this.titleValue = t ?? '';
      this.refresh();
    }

    /** The app's content node, or null for the default pin. */
    get content(): Node | null {
      return this.defaultPin ? null : this.contentValue;
    }

    set content(node: Node | null | undefined) {
      this.contentValue = node ?? null;
      this.defaultPin = !node;
      this.refresh();
    }

    /** Stacking order, or null. */
    get zIndex(): number | null {
      return this.zIndexValue;
    }

    set zIndex(z: number | null | undefined) {
      this.zIndexValue = z ?? null;
      this.draw();
    }

    /** Whether clicks are taken even without a click listener. */
    get gmpClickable(): boolean | null {
      return this.clickableValue;
    }

    set gmpClickable(flag: boolean | null | undefined) {
      this.clickableValue = flag ?? null;
      this.refresh();
    }

    /** The element itself, as in the hosted API. */
    get element(): HTMLElement {
      return this;
    }

    /** Adds a handler (e.g. 'click'); a click handler makes the marker a focusable button. */
    addListener(eventName: string, handler: Handler): MapsEventListener {
      const handle = event.addListener(this, eventName, handler);
      if (eventName === 'click') this.refresh();
      return handle;
    }

    /** Height above the position where an info window anchored here has its tip. */
    anchorOffset(): number {
      const h = this.holder.offsetHeight;
      return (h > 0 ? h : PIN_HEIGHT) + 2;
    }

    /** Called by the map on every view change. */
    draw(): void {
      placeMarker(
        this,
        this.mapValue,
        this.positionValue ? toLatLngLiteral(this.positionValue) : null,
        true,
        this.zIndexValue,
      );
    }

    private isClickable(): boolean {
      return this.clickableValue === true || hasListeners(this, 'click');
    }

    private refresh(): void {
      if (!this.holder) return;
      if (this.defaultPin) {
        renderMarkerContent(this.holder, {
          title: this.titleValue,
          label: null,
          clickable: this.isClickable(),
        });
      } else {
        this.holder.replaceChildren(this.contentValue as Node);
        this.holder.setAttribute('aria-label', this.titleValue || 'Map marker');
        if (this.isClickable()) {
          this.holder.setAttribute('role', 'button');
          this.holder.tabIndex = 0;
        } else {
          this.holder.removeAttribute('role');
          this.holder.removeAttribute('tabindex');
        }
      }
      // The tooltip lives on the inner element; the host keeps no title attribute of its own.
      this.removeAttribute('title');
      if (this.titleValue) this.holder.title = this.titleValue;
    }
  }
  if (!win.customElements.get(ADVANCED_MARKER_TAG)) {
    win.customElements.define(ADVANCED_MARKER_TAG, StandinAdvancedMarker);
  }
  return win.customElements.get(ADVANCED_MARKER_TAG) as typeof StandinAdvancedMarker;
}

/** What an info window can be anchored to: either marker kind. */
export interface MarkerAnchor {
  /** Height above the position where the info window's tip goes. */
  anchorOffset(): number;
}

/** Reads the position of either marker kind, or null. */
export function anchorPosition(anchor: unknown): LatLngLike | null {
  if (!anchor) return null;
  const a = anchor as { getPosition?: () => unknown; position?: unknown };
  const p = typeof a.getPosition === 'function' ? a.getPosition() : a.position;
  return p ? toLatLngLiteral(p as LatLngLike) : null;
}

/** Reads the map of either marker kind, or null. */
export function anchorMap(anchor: unknown): StandinMap | null {
  if (!anchor) return null;
  const a = anchor as { getMap?: () => unknown; map?: unknown };
  const m = typeof a.getMap === 'function' ? a.getMap() : a.map;
  return (m as StandinMap | null) ?? null;
}

/** The element of either marker kind that takes focus. */
export function anchorFocusTarget(anchor: unknown): HTMLElement | null {
  if (!anchor) return null;
  if (anchor instanceof StandinMarker) return anchor.element;
  const el = anchor as HTMLElement;
  return (el.querySelector?.('.evm-advanced-content') as HTMLElement | null) ?? null;
}
