/// <reference types="google.maps" />
/// <reference lib="dom" />
/**
 * `google.maps.Map` of the offline stand-in: an SVG Web Mercator base map (ocean, graticule,
 * land, borders) in the given element, with layers for markers and info windows, zoom buttons,
 * drag to pan, wheel and double-click zoom, and keyboard zoom/pan while the map has focus.
 */
import {
  baseMapPaths,
  graticulePath,
  graticuleStep,
  nearGraticulePath,
  nearPaths,
} from './basemap';
import { hasListeners, trigger } from './events';
import {
  clamp,
  LatLng,
  LatLngBounds,
  mercatorProjection,
  Point,
  project,
  toBounds,
  toLatLng,
  unproject,
  WORLD_SIZE,
  wrapLng,
} from './geo';
import { MVCObject } from './mvc';
import { createIcon, SVG_NS } from './pin';
import { installStyles } from './styles';

/** Text of the attribution line (the data's source and the package that ships it). */
export const ATTRIBUTION = 'Offline map: Natural Earth via world-atlas';

/** Pixels kept free around the bounds by `fitBounds` when no padding is given (our choice). */
export const DEFAULT_FIT_PADDING = 40;

/** Zoom limits when the options set none. */
export const DEFAULT_MIN_ZOOM = 0;
/** Past zoom 18 the 1:110m outlines say nothing more, and SVG transforms lose precision. */
export const DEFAULT_MAX_ZOOM = 18;

/**
 * From this zoom on, the base map is drawn clipped to the view in screen pixels instead of as the
 * whole world scaled by 2^zoom: Chromium stopped filling the scaled land path somewhere between
 * zoom 14 and 18 (seen in the harness), and 9 keeps well clear of that.
 */
export const NEAR_ZOOM = 9;

/** Pixels moved by one arrow key press. */
const ARROW_PAN_PX = 100;
/** Pointer travel, in pixels, before a press becomes a drag instead of a click. */
const DRAG_THRESHOLD_PX = 4;
/** Wheel travel (in pixels) that makes one zoom step; one mouse-wheel notch is about 100. */
const WHEEL_STEP_PX = 50;
/** Pause after a wheel zoom step, so one trackpad flick does not jump several levels. */
const WHEEL_PAUSE_MS = 180;

/** Something drawn on the map in pixel space (markers, info windows). */
export interface MapOverlay {
  /** Re-positions the overlay for the current view. */
  draw(): void;
  /** Handles Escape pressed on the map; returns whether it did something (closed itself). */
  onEscape?(): boolean;
}

/** What the hosted API passes to mouse event handlers. */
export interface StandinMouseEvent {
  latLng: LatLng | null;
  domEvent: Event;
  pixel?: Point;
  stop(): void;
}

type Padding = { top: number; right: number; bottom: number; left: number };
type Rect = { left: number; top: number; right: number; bottom: number };

/** Last pixel position of each marker element, written by markers, read for caption layout. */
export const markerPixel = new WeakMap<HTMLElement, { x: number; y: number }>();

function toPadding(p: number | google.maps.Padding | undefined): Padding {
  if (p === undefined || p === null) {
    return {
      top: DEFAULT_FIT_PADDING,
      right: DEFAULT_FIT_PADDING,
      bottom: DEFAULT_FIT_PADDING,
      left: DEFAULT_FIT_PADDING,
    };
  }
  if (typeof p === 'number') return { top: p, right: p, bottom: p, left: p };
  return { top: p.top ?? 0, right: p.right ?? 0, bottom: p.bottom ?? 0, left: p.left ?? 0 };
}

function parsePx(v: string): number {
  return /^\s*[\d.]+px\s*$/.test(v) ? parseFloat(v) : 0;
}

/** Elements inside the map whose own handlers own the pointer (no map click, no drag start). */
const OWN_UI = '.evm-info,.evm-controls,.evm-attribution';
/** Elements that are not the map background (no map click event). */
const NOT_BACKGROUND = `${OWN_UI},.evm-marker,.evm-advanced`;

let mapCount = 0;

/** The stand-in's `google.maps.Map`. */
export class StandinMap
  extends MVCObject
  implements
    Pick<
      google.maps.Map,
      | 'fitBounds'
      | 'getBounds'
      | 'getCenter'
      | 'getDiv'
      | 'getHeading'
      | 'getMapTypeId'
      | 'getProjection'
      | 'getTilt'
      | 'getZoom'
      | 'panBy'
      | 'panTo'
      | 'panToBounds'
      | 'setCenter'
      | 'setMapTypeId'
      | 'setOptions'
      | 'setZoom'
    >
{
  /** The element given to the constructor. */
  private readonly div: HTMLElement;
  /** The map's own root element inside `div`; focusable, takes the keyboard shortcuts. */
  readonly root: HTMLDivElement;
  /** Layer for markers (pixel space, origin at the map's top-left corner). */
  readonly markerLayer: HTMLDivElement;
  /** Layer for info windows, above the markers. */
  readonly floatLayer: HTMLDivElement;
  private readonly copies: SVGGElement;
  private readonly graticule: SVGPathElement;
  private readonly near: SVGGElement;
  private readonly nearLayers: {
    graticule: SVGPathElement;
    land: SVGPathElement;
    borders: SVGPathElement;
  };
  private readonly worldId: string;
  private readonly controls: HTMLDivElement;
  private readonly zoomInButton: HTMLButtonElement;
  private readonly zoomOutButton: HTMLButtonElement;
  private readonly overlays = new Set<MapOverlay>();
  private currentGraticuleStep = 0;
  private idleTimer: ReturnType<typeof setTimeout> | undefined;
  private firstIdle = true;
  private drag: {
    id: number;
    x: number;
    y: number;
    lastX: number;
    lastY: number;
    moved: boolean;
  } | null = null;
  private suppressClick = false;
  private wheelTravel = 0;
  private wheelPausedUntil = 0;
  private lastSize = { w: 0, h: 0 };
  private captionLayoutQueued = false;

  /** Creates a map inside `div` with the hosted API's `MapOptions` (the subset listed in the docs). */
  constructor(div: HTMLElement | null, options?: google.maps.MapOptions | null) {
    super();
    if (!div || typeof (div as HTMLElement).appendChild !== 'function') {
      throw new Error('InvalidValueError: Map: Expected mapDiv of type HTMLElement');
    }
    this.div = div;
    const doc = div.ownerDocument;
    installStyles(doc);
    this.worldId = `evm-world-${++mapCount}`;

    const view = doc.defaultView;
    if (view && view.getComputedStyle(div).position === 'static') div.style.position = 'relative';
    if (!div.style.overflow) div.style.overflow = 'hidden';

    this.root = doc.createElement('div');
    this.root.className = 'evm-root';
    this.root.tabIndex = 0;
    this.root.setAttribute('role', 'region');
    this.root.setAttribute('aria-roledescription', 'map');
    this.root.setAttribute('aria-label', 'Map');
    this.root.setAttribute(
      'aria-keyshortcuts',
      'ArrowUp ArrowDown ArrowLeft ArrowRight + - PageUp PageDown Home End',
    );

    const svg = doc.createElementNS(SVG_NS, 'svg');
    svg.setAttribute('class', 'evm-base');
    svg.setAttribute('aria-hidden', 'true');
    svg.setAttribute('focusable', 'false');
    const defs = doc.createElementNS(SVG_NS, 'defs');
    const world = doc.createElementNS(SVG_NS, 'g');
    world.setAttribute('id', this.worldId);
    this.graticule = doc.createElementNS(SVG_NS, 'path');
    this.graticule.setAttribute('class', 'evm-graticule');
    const paths = baseMapPaths();
    const land = doc.createElementNS(SVG_NS, 'path');
    land.setAttribute('class', 'evm-land');
    land.setAttribute('d', paths.land);
    land.setAttribute('fill-rule', 'evenodd');
    const borders = doc.createElementNS(SVG_NS, 'path');
    borders.setAttribute('class', 'evm-borders');
    borders.setAttribute('d', paths.borders);
    for (const el of [this.graticule, land, borders]) {
      // Strokes keep their screen width whatever the zoom scale on the group.
      el.setAttribute('vector-effect', 'non-scaling-stroke');
      world.appendChild(el);
    }
    defs.appendChild(world);
    svg.appendChild(defs);
    this.copies = doc.createElementNS(SVG_NS, 'g');
    this.copies.setAttribute('class', 'evm-copies');
    svg.appendChild(this.copies);
    this.near = doc.createElementNS(SVG_NS, 'g');
    this.near.setAttribute('class', 'evm-near');
    const nearPath = (cls: string) => {
      const el = doc.createElementNS(SVG_NS, 'path');
      el.setAttribute('class', cls);
      this.near.appendChild(el);
      return el;
    };
    this.nearLayers = {
      graticule: nearPath('evm-graticule'),
      land: nearPath('evm-land'),
      borders: nearPath('evm-borders'),
    };
    this.nearLayers.land.setAttribute('fill-rule', 'evenodd');
    svg.appendChild(this.near);
    this.root.appendChild(svg);

    this.markerLayer = doc.createElement('div');
    this.markerLayer.className = 'evm-layer evm-markers';
    this.floatLayer = doc.createElement('div');
    this.floatLayer.className = 'evm-layer evm-float';
    this.root.append(this.markerLayer, this.floatLayer);

    this.controls = doc.createElement('div');
    this.controls.className = 'evm-controls';
    this.zoomInButton = this.makeZoomButton(doc, 'Zoom in', 'M12 5v14M5 12h14', 1);
    this.zoomOutButton = this.makeZoomButton(doc, 'Zoom out', 'M5 12h14', -1);
    this.controls.append(this.zoomInButton, this.zoomOutButton);
    const attribution = doc.createElement('div');
    attribution.className = 'evm-attribution';
    attribution.textContent = ATTRIBUTION;
    this.root.append(this.controls, attribution);
    div.appendChild(this.root);

    this.listen();
    this.setValues(options ?? {});
    this.updateControls();
    this.updateGestures();
    this.render();
    this.scheduleIdle();

    const RO = (view as (Window & typeof globalThis) | null)?.ResizeObserver;
    if (RO) new RO(() => this.onResize()).observe(this.root);
  }

  // ---- hosted API methods --------------------------------------------------------------------

  /** Applies several options at once (same keys as the constructor). */
  setOptions(options: google.maps.MapOptions | null): void {
    this.setValues(options ?? {});
  }

  /** Moves the centre (no animation). */
  setCenter(latLng: google.maps.LatLng | google.maps.LatLngLiteral): void {
    const c = toLatLng(latLng);
    this.setView(c, this.getZoom());
  }

  /** The centre, or undefined before one was set. Longitude is wrapped to [-180, 180]. */
  getCenter(): google.maps.LatLng | undefined {
    return this.get('center') as LatLng | undefined;
  }

  /** Sets the zoom, clamped to the zoom limits. */
  setZoom(zoom: number): void {
    if (typeof zoom !== 'number' || Number.isNaN(zoom)) return;
    const center = this.getCenter() as LatLng | undefined;
    if (!center) {
      this.setQuietly('zoom', this.clampZoom(zoom));
      this.notify('zoom');
      return;
    }
    this.setView(center, zoom);
  }

  /** The zoom, or undefined before one was set. */
  getZoom(): number | undefined {
    return this.get('zoom') as number | undefined;
  }

  /**
   * Sets the centre and the largest whole zoom at which `bounds` fits inside the map less
   * `padding` (default 40 px on each side). Does nothing while the map has no size, as the
   * hosted API documents for a hidden map.
   */
  fitBounds(
    bounds: google.maps.LatLngBounds | google.maps.LatLngBoundsLiteral,
    padding?: number | google.maps.Padding,
  ): void {
    const b = toBounds(bounds);
    if (b.isEmpty()) return;
    const { w, h } = this.size();
    if (!w || !h) return;
    const pad = toPadding(padding);
    const { south, west, north } = b.toJSON();
    const spanLng = b.lngSpan();
    const top = project(north, west).y;
    const bottom = project(south, west).y;
    const dx = (spanLng / 360) * WORLD_SIZE;
    const dy = bottom - top;
    const availW = Math.max(1, w - pad.left - pad.right);
    const availH = Math.max(1, h - pad.top - pad.bottom);
    const ratio = Math.min(dx > 0 ? availW / dx : Infinity, dy > 0 ? availH / dy : Infinity);
    // A tiny epsilon so that an exact fit is not lost to rounding in log2.
    const zoom = Number.isFinite(ratio) ? Math.floor(Math.log2(ratio) + 1e-9) : this.maxZoom();
    const z = this.clampZoom(zoom);
    const s = 2 ** z;
    const cx = project(0, west).x + dx / 2 - (pad.left - pad.right) / 2 / s;
    const cy = (top + bottom) / 2 - (pad.top - pad.bottom) / 2 / s;
    this.setViewWorld(cx, cy, z);
  }

  /** Moves the centre to `latLng` (at once; the hosted API may animate short moves). */
  panTo(latLng: google.maps.LatLng | google.maps.LatLngLiteral): void {
    this.setView(toLatLng(latLng), this.getZoom());
  }

  /** Moves the view by (x, y) pixels; positive x shows more of the east, positive y the south. */
  panBy(x: number, y: number): void {
    const v = this.viewState();
    if (!v) return;
    this.setViewWorld(v.cx + x / v.scale, v.cy + y / v.scale, v.zoom);
  }

  /**
   * Pans so that `bounds` is in view. Simplified: when a corner is outside the current view, the
   * map pans to the centre of `bounds` (the hosted API pans by the least amount).
   */
  panToBounds(
    bounds: google.maps.LatLngBounds | google.maps.LatLngBoundsLiteral,
    _padding?: number | google.maps.Padding,
  ): void {
    const b = toBounds(bounds);
    const view = this.getBounds();
    if (b.isEmpty() || !view) return;
    if (view.contains(b.getNorthEast()) && view.contains(b.getSouthWest())) return;
    this.panTo(b.getCenter());
  }

  /**
   * The visible area, or undefined while the map has no size, centre or zoom. Spans -180..180 in
   * longitude when more than one world copy is visible, as the hosted API does.
   */
  getBounds(): google.maps.LatLngBounds | undefined {
    const v = this.viewState();
    if (!v) return undefined;
    const halfW = v.w / 2 / v.scale;
    const halfH = v.h / 2 / v.scale;
    const north = unproject(0, clamp(v.cy - halfH, 0, WORLD_SIZE)).lat;
    const south = unproject(0, clamp(v.cy + halfH, 0, WORLD_SIZE)).lat;
    if (2 * halfW >= WORLD_SIZE) return new LatLngBounds({ south, west: -180, north, east: 180 });
    const west = wrapLng(unproject(v.cx - halfW, 0).lng);
    const east = wrapLng(unproject(v.cx + halfW, 0).lng);
    return new LatLngBounds({ south, west, north, east });
  }

  /** The element given to the constructor. */
  getDiv(): HTMLElement {
    return this.div;
  }

  /** The Web Mercator projection (world coordinates 0..256 at zoom 0). */
  getProjection(): google.maps.Projection | undefined {
    return mercatorProjection;
  }

  /** Always 0: the stand-in draws north up. */
  getHeading(): number | undefined {
    return 0;
  }

  /** Always 0: the stand-in is flat. */
  getTilt(): number | undefined {
    return 0;
  }

  /** Stored only; the stand-in has one look. */
  setMapTypeId(mapTypeId: string): void {
    this.set('mapTypeId', mapTypeId);
  }

  /** The map type last set (default 'roadmap'). */
  getMapTypeId(): string | undefined {
    return (this.get('mapTypeId') as string | undefined) ?? 'roadmap';
  }

  /** Stored only (the base map has no clickable points of interest). */
  setClickableIcons(value: boolean): void {
    this.set('clickableIcons', value);
  }

  /** The value last set (default true). */
  getClickableIcons(): boolean {
    return (this.get('clickableIcons') as boolean | undefined) ?? true;
  }

  // ---- MVC hooks for options -----------------------------------------------------------------

  /** Called when the minZoom option changes. */
  minZoom_changed(): void {
    this.reclampZoom();
  }

  /** Called when the maxZoom option changes. */
  maxZoom_changed(): void {
    this.reclampZoom();
  }

  /** Called when the zoomControl option changes. */
  zoomControl_changed(): void {
    this.updateControls();
  }

  /** Called when the disableDefaultUI option changes. */
  disableDefaultUI_changed(): void {
    this.updateControls();
  }

  /** Called when the gestureHandling option changes. */
  gestureHandling_changed(): void {
    this.updateGestures();
  }

  /** Called when the (deprecated) draggable option changes. */
  draggable_changed(): void {
    this.updateGestures();
  }

  /** Called when the backgroundColor option changes. */
  backgroundColor_changed(): void {
    this.root.style.background = String(this.get('backgroundColor') ?? '');
  }

  // ---- for markers and info windows ----------------------------------------------------------

  /** Adds an overlay that is redrawn on every view change. */
  attachOverlay(overlay: MapOverlay): void {
    this.overlays.add(overlay);
    overlay.draw();
    this.scheduleCaptionLayout();
  }

  /** Removes an overlay added with `attachOverlay`. */
  detachOverlay(overlay: MapOverlay): void {
    this.overlays.delete(overlay);
    this.scheduleCaptionLayout();
  }

  /** Re-places marker captions soon (batched, for markers added in a loop). */
  scheduleCaptionLayout(): void {
    if (this.captionLayoutQueued) return;
    this.captionLayoutQueued = true;
    queueMicrotask(() => {
      this.captionLayoutQueued = false;
      this.layoutCaptions();
    });
  }

  /**
   * Pixel position of a point relative to the map's top-left corner, on the world copy nearest the
   * centre; null while the map has no size, centre or zoom.
   */
  pixelFor(latLng: { lat: number; lng: number }): { x: number; y: number } | null {
    const v = this.viewState();
    if (!v) return null;
    const p = project(latLng.lat, latLng.lng);
    let dx = p.x - v.cx;
    dx = ((((dx + WORLD_SIZE / 2) % WORLD_SIZE) + WORLD_SIZE) % WORLD_SIZE) - WORLD_SIZE / 2;
    return { x: v.w / 2 + dx * v.scale, y: v.h / 2 + (p.y - v.cy) * v.scale };
  }

  /** The point under a pixel (relative to the map's top-left corner). */
  latLngAt(x: number, y: number): LatLng | null {
    const v = this.viewState();
    if (!v) return null;
    const p = unproject(v.cx + (x - v.w / 2) / v.scale, v.cy + (y - v.h / 2) / v.scale);
    return new LatLng(p.lat, p.lng);
  }

  /** Size of the map in CSS pixels (from layout, or from inline px styles where there is none). */
  size(): { w: number; h: number } {
    const w = this.div.clientWidth || parsePx(this.div.style.width);
    const h = this.div.clientHeight || parsePx(this.div.style.height);
    return { w, h };
  }

  // ---- view state ----------------------------------------------------------------------------

  private minZoom(): number {
    const v = this.get('minZoom');
    return typeof v === 'number' ? v : DEFAULT_MIN_ZOOM;
  }

  private maxZoom(): number {
    const v = this.get('maxZoom');
    return typeof v === 'number' ? v : DEFAULT_MAX_ZOOM;
  }

  private clampZoom(z: number): number {
    return clamp(z, this.minZoom(), Math.max(this.minZoom(), this.maxZoom()));
  }

  private reclampZoom(): void {
    const z = this.getZoom();
    if (z !== undefined && this.clampZoom(z) !== z) this.setZoom(z);
    this.updateControls();
  }

  private viewState(): {
    cx: number;
    cy: number;
    zoom: number;
    scale: number;
    w: number;
    h: number;
  } | null {
    const center = this.getCenter();
    const zoom = this.getZoom();
    const { w, h } = this.size();
    if (!center || zoom === undefined || !w || !h) return null;
    const p = project(center.lat(), center.lng());
    return { cx: p.x, cy: p.y, zoom, scale: 2 ** zoom, w, h };
  }

  /** Keeps the poles' edges out of view when the world is taller than the map (our choice). */
  private clampWorldY(y: number, zoom: number): number {
    const { h } = this.size();
    if (!h) return y;
    const half = h / 2 / 2 ** zoom;
    if (2 * half >= WORLD_SIZE) return WORLD_SIZE / 2;
    return clamp(y, half, WORLD_SIZE - half);
  }

  private setViewWorld(x: number, y: number, zoom: number): void {
    const z = this.clampZoom(zoom);
    const p = unproject(x, this.clampWorldY(y, z));
    this.applyView(new LatLng(p.lat, wrapLng(p.lng)), z);
  }

  private setView(center: LatLng, zoom: number | undefined): void {
    if (zoom === undefined) {
      this.applyView(center, undefined);
      return;
    }
    const z = this.clampZoom(zoom);
    const p = project(center.lat(), center.lng());
    const y = this.clampWorldY(p.y, z);
    if (Math.abs(y - p.y) > 1e-9) {
      this.applyView(new LatLng(unproject(p.x, y).lat, center.lng()), z);
    } else {
      this.applyView(center, z);
    }
  }

  /** Stores centre and zoom, redraws, then reports what changed (as the hosted API's events). */
  private applyView(center: LatLng, zoom: number | undefined): void {
    const oldCenter = this.getCenter() as LatLng | undefined;
    const oldZoom = this.getZoom();
    const centerChanged = !oldCenter || !oldCenter.equals(center);
    const zoomChanged = zoom !== undefined && zoom !== oldZoom;
    if (!centerChanged && !zoomChanged) return;
    this.setQuietly('center', center);
    if (zoom !== undefined) this.setQuietly('zoom', zoom);
    this.render();
    if (zoomChanged) this.notify('zoom');
    if (centerChanged) this.notify('center');
    if (this.viewState()) trigger(this, 'bounds_changed');
    this.scheduleIdle();
  }

  private onResize(): void {
    const { w, h } = this.size();
    if (w === this.lastSize.w && h === this.lastSize.h) return;
    const center = this.getCenter() as LatLng | undefined;
    const zoom = this.getZoom();
    if (center && zoom !== undefined) {
      // Re-clamp for the new height, then redraw and report new bounds.
      this.setView(center, zoom);
    }
    this.render();
    if (this.viewState()) trigger(this, 'bounds_changed');
    this.scheduleIdle();
  }

  /** Fires `idle` once the view has settled (never during a drag), and the one-off load events. */
  private scheduleIdle(): void {
    if (this.drag?.moved) return;
    if (!this.viewState()) return;
    if (this.idleTimer !== undefined) clearTimeout(this.idleTimer);
    this.idleTimer = setTimeout(() => {
      this.idleTimer = undefined;
      if (this.firstIdle) {
        this.firstIdle = false;
        trigger(this, 'projection_changed');
        trigger(this, 'tilesloaded');
      }
      trigger(this, 'idle');
    }, 0);
  }

  // ---- drawing -------------------------------------------------------------------------------

  private render(): void {
    const v = this.viewState();
    this.lastSize = this.size();
    if (!v) {
      this.copies.style.display = 'none';
      this.near.style.display = 'none';
    } else if (v.zoom >= NEAR_ZOOM) {
      this.copies.style.display = 'none';
      this.near.style.display = '';
      const paths = nearPaths({ cx: v.cx, cy: v.cy, scale: v.scale, w: v.w, h: v.h });
      this.nearLayers.land.setAttribute('d', paths.land);
      this.nearLayers.borders.setAttribute('d', paths.borders);
      this.nearLayers.graticule.setAttribute('d', nearGraticulePath(v, graticuleStep(v.zoom)));
    } else {
      this.near.style.display = 'none';
      this.copies.style.display = '';
      const tx = v.w / 2 - v.cx * v.scale;
      const ty = v.h / 2 - v.cy * v.scale;
      this.copies.setAttribute('transform', `translate(${tx} ${ty}) scale(${v.scale})`);
      // One <use> per world copy that reaches into the view, so the map repeats east-west.
      const halfW = v.w / 2 / v.scale;
      const first = Math.floor((v.cx - halfW) / WORLD_SIZE);
      const last = Math.floor((v.cx + halfW) / WORLD_SIZE);
      const doc = this.root.ownerDocument;
      while (this.copies.childNodes.length < last - first + 1) {
        const use = doc.createElementNS(SVG_NS, 'use');
        use.setAttribute('href', `#${this.worldId}`);
        this.copies.appendChild(use);
      }
      while (this.copies.childNodes.length > last - first + 1) {
        this.copies.removeChild(this.copies.lastChild as ChildNode);
      }
      this.copies.childNodes.forEach((node, i) => {
        (node as Element).setAttribute('x', String((first + i) * WORLD_SIZE));
      });
      const step = graticuleStep(v.zoom);
      if (step !== this.currentGraticuleStep) {
        this.currentGraticuleStep = step;
        this.graticule.setAttribute('d', graticulePath(step));
      }
    }
    this.updateZoomButtons();
    for (const o of this.overlays) o.draw();
    this.layoutCaptions();
  }

  /**
   * Puts each marker caption right of its pin, else left of it, else hides it, so that captions
   * neither overlap each other or other pins nor run off the map. Greedy, west to east.
   */
  private layoutCaptions(): void {
    const { w, h } = this.size();
    type Item = { caption: HTMLElement; x: number; y: number; width: number; height: number };
    const items: Item[] = [];
    const pins: Rect[] = [];
    for (const host of this.markerLayer.children) {
      const el = host as HTMLElement;
      const px = markerPixel.get(el);
      if (!px || el.style.display === 'none') continue;
      pins.push({ left: px.x - 14, top: px.y - 40, right: px.x + 14, bottom: px.y });
      const caption = el.querySelector<HTMLElement>('.evm-caption');
      if (!caption) continue;
      caption.classList.remove('evm-caption-left', 'evm-caption-hidden');
      items.push({ caption, x: px.x, y: px.y, width: 0, height: 0 });
    }
    // Measure after all the writes above: one layout pass, not one per caption.
    for (const item of items) {
      item.width = item.caption.offsetWidth;
      item.height = item.caption.offsetHeight;
    }
    if (!w || !h || items.some((i) => i.width === 0)) return; // no layout engine (e.g. jsdom)
    items.sort((a, b) => a.x - b.x);
    const taken: Rect[] = [];
    const overlaps = (r: Rect, own: Rect) =>
      [...pins, ...taken].some(
        (o) =>
          o !== own && r.left < o.right && r.right > o.left && r.top < o.bottom && r.bottom > o.top,
      );
    for (const item of items) {
      const own = pins.find((p) => p.left === item.x - 14 && p.bottom === item.y) as Rect;
      const top = item.y - 35;
      const right: Rect = {
        left: item.x + 15,
        top,
        right: item.x + 15 + item.width,
        bottom: top + item.height,
      };
      const left: Rect = {
        left: item.x - 15 - item.width,
        top,
        right: item.x - 15,
        bottom: top + item.height,
      };
      const fits = (r: Rect) => r.left >= 2 && r.right <= w - 2 && !overlaps(r, own);
      if (fits(right)) taken.push(right);
      else if (fits(left)) {
        item.caption.classList.add('evm-caption-left');
        taken.push(left);
      } else item.caption.classList.add('evm-caption-hidden');
    }
  }

  private makeZoomButton(doc: Document, label: string, icon: string, delta: number) {
    const b = doc.createElement('button');
    b.type = 'button';
    b.className = 'evm-zoom';
    b.setAttribute('aria-label', label);
    b.title = label;
    b.appendChild(createIcon(doc, icon));
    b.addEventListener('click', (e) => {
      e.stopPropagation();
      const z = this.getZoom();
      if (z !== undefined) this.setZoom(Math.round(z) + delta);
    });
    return b;
  }

  private updateControls(): void {
    const zoomControl = this.get('zoomControl');
    const hidden =
      zoomControl === false || (this.get('disableDefaultUI') === true && zoomControl !== true);
    this.controls.hidden = hidden;
    this.controls.style.display = hidden ? 'none' : '';
    this.updateZoomButtons();
  }

  private updateZoomButtons(): void {
    const z = this.getZoom();
    this.zoomInButton.disabled = z !== undefined && z >= this.maxZoom();
    this.zoomOutButton.disabled = z !== undefined && z <= this.minZoom();
  }

  private gestures(): { drag: boolean; wheel: 'always' | 'modifier' | 'never' } {
    const mode = this.get('gestureHandling') as string | undefined;
    const drag = mode !== 'none' && this.get('draggable') !== false;
    let wheel: 'always' | 'modifier' | 'never' = 'always';
    if (mode === 'none' || this.get('scrollwheel') === false) wheel = 'never';
    else if (mode === 'cooperative') wheel = 'modifier';
    return { drag, wheel };
  }

  private updateGestures(): void {
    // Touch gestures the map handles itself must not also scroll the page.
    const { drag } = this.gestures();
    this.root.style.touchAction =
      drag && this.get('gestureHandling') !== 'cooperative' ? 'none' : 'pan-x pan-y';
    this.root.style.cursor = drag ? '' : 'default';
  }

  // ---- input ---------------------------------------------------------------------------------

  private mouseEvent(e: MouseEvent): StandinMouseEvent {
    const rect = this.root.getBoundingClientRect();
    const x = e.clientX - rect.left;
    const y = e.clientY - rect.top;
    return {
      latLng: this.latLngAt(x, y),
      domEvent: e,
      pixel: new Point(x, y),
      stop: () => e.stopPropagation(),
    };
  }

  private zoomAround(delta: number, clientX: number, clientY: number): void {
    const v = this.viewState();
    if (!v) return;
    const rect = this.root.getBoundingClientRect();
    const px = clientX - rect.left - v.w / 2;
    const py = clientY - rect.top - v.h / 2;
    const z = this.clampZoom(Math.round(v.zoom) + delta);
    if (z === v.zoom) return;
    const wx = v.cx + px / v.scale;
    const wy = v.cy + py / v.scale;
    const s = 2 ** z;
    // Keep the point under the pointer where it is.
    this.setViewWorld(wx - px / s, wy - py / s, z);
  }

  private listen(): void {
    const root = this.root;
    const inside = (e: Event, selector: string) =>
      e.target instanceof Element && !!e.target.closest(selector);

    root.addEventListener('pointerdown', (e) => {
      if (e.button !== 0 || inside(e, OWN_UI) || !this.gestures().drag) return;
      this.drag = {
        id: e.pointerId,
        x: e.clientX,
        y: e.clientY,
        lastX: e.clientX,
        lastY: e.clientY,
        moved: false,
      };
    });
    root.addEventListener('pointermove', (e) => {
      const d = this.drag;
      if (d && d.id === e.pointerId) {
        if (!d.moved) {
          if (Math.hypot(e.clientX - d.x, e.clientY - d.y) < DRAG_THRESHOLD_PX) return;
          d.moved = true;
          root.classList.add('evm-dragging');
          // Capture only once dragging, so a plain click still targets the marker under it.
          root.setPointerCapture?.(e.pointerId);
          trigger(this, 'dragstart');
        }
        const dx = e.clientX - d.lastX;
        const dy = e.clientY - d.lastY;
        d.lastX = e.clientX;
        d.lastY = e.clientY;
        this.panBy(-dx, -dy);
        trigger(this, 'drag');
        return;
      }
      if (hasListeners(this, 'mousemove')) trigger(this, 'mousemove', this.mouseEvent(e));
    });
    const endDrag = (e: PointerEvent) => {
      const d = this.drag;
      if (!d || d.id !== e.pointerId) return;
      this.drag = null;
      if (!d.moved) return;
      root.classList.remove('evm-dragging');
      if (root.hasPointerCapture?.(e.pointerId)) root.releasePointerCapture(e.pointerId);
      // The click that ends a drag is not a map click.
      this.suppressClick = true;
      setTimeout(() => (this.suppressClick = false), 0);
      trigger(this, 'dragend');
      this.scheduleIdle();
    };
    root.addEventListener('pointerup', endDrag);
    root.addEventListener('pointercancel', endDrag);
    root.addEventListener('pointerenter', (e) => trigger(this, 'mouseover', this.mouseEvent(e)));
    root.addEventListener('pointerleave', (e) => trigger(this, 'mouseout', this.mouseEvent(e)));

    root.addEventListener(
      'click',
      (e) => {
        if (!this.suppressClick) return;
        this.suppressClick = false;
        e.stopImmediatePropagation();
        e.preventDefault();
      },
      true,
    );
    root.addEventListener('click', (e) => {
      if (inside(e, NOT_BACKGROUND)) return;
      trigger(this, 'click', this.mouseEvent(e));
    });
    root.addEventListener('dblclick', (e) => {
      if (inside(e, NOT_BACKGROUND)) return;
      trigger(this, 'dblclick', this.mouseEvent(e));
      if (this.get('disableDoubleClickZoom') !== true && this.gestures().wheel !== 'never') {
        this.zoomAround(1, e.clientX, e.clientY);
      }
    });
    root.addEventListener('contextmenu', (e) => {
      if (inside(e, NOT_BACKGROUND)) return;
      trigger(this, 'rightclick', this.mouseEvent(e));
    });

    root.addEventListener(
      'wheel',
      (e) => {
        const mode = this.gestures().wheel;
        if (mode === 'never' || (mode === 'modifier' && !e.ctrlKey && !e.metaKey)) return;
        if (inside(e, '.evm-info')) return;
        e.preventDefault();
        const now = Date.now();
        if (now < this.wheelPausedUntil) return;
        const unit = e.deltaMode === 1 ? 16 : e.deltaMode === 2 ? this.size().h : 1;
        this.wheelTravel += e.deltaY * unit;
        if (Math.abs(this.wheelTravel) < WHEEL_STEP_PX) return;
        const delta = this.wheelTravel < 0 ? 1 : -1;
        this.wheelTravel = 0;
        this.wheelPausedUntil = now + WHEEL_PAUSE_MS;
        this.zoomAround(delta, e.clientX, e.clientY);
      },
      { passive: false },
    );

    root.addEventListener('keydown', (e) => this.onKey(e));
  }

  private onKey(e: KeyboardEvent): void {
    if (this.get('keyboardShortcuts') === false) return;
    if (e.ctrlKey || e.altKey || e.metaKey || e.defaultPrevented) return;
    const t = e.target;
    if (
      t instanceof Element &&
      (t.closest('.evm-info') || t.matches('input,textarea,select,[contenteditable]'))
    ) {
      return;
    }
    const { w, h } = this.size();
    const z = this.getZoom();
    switch (e.key) {
      case '+':
      case '=':
        if (z !== undefined) this.setZoom(Math.round(z) + 1);
        break;
      case '-':
      case '_':
        if (z !== undefined) this.setZoom(Math.round(z) - 1);
        break;
      case 'ArrowLeft':
        this.panBy(-ARROW_PAN_PX, 0);
        break;
      case 'ArrowRight':
        this.panBy(ARROW_PAN_PX, 0);
        break;
      case 'ArrowUp':
        this.panBy(0, -ARROW_PAN_PX);
        break;
      case 'ArrowDown':
        this.panBy(0, ARROW_PAN_PX);
        break;
      case 'PageUp':
        this.panBy(0, -0.75 * h);
        break;
      case 'PageDown':
        this.panBy(0, 0.75 * h);
        break;
      case 'Home':
        this.panBy(-0.75 * w, 0);
        break;
      case 'End':
        this.panBy(0.75 * w, 0);
        break;
      case 'Escape': {
        let closed = false;
        for (const o of [...this.overlays]) closed = (o.onEscape?.() ?? false) || closed;
        if (!closed) return;
        break;
      }
      default:
        return;
    }
    e.preventDefault();
  }
}
