/** @jest-environment jsdom */
/// <reference lib="dom" />
/// <reference types="google.maps" />
/**
 * The offline maps stand-in, loaded as the built script into jsdom and driven the way
 * @angular/google-maps 21.2.9 drives the hosted API (call sequences copied from its
 * fesm2022/google-maps.mjs: GoogleMap._initialize, MapMarker._initialize, MapAdvancedMarker,
 * MapInfoWindow.open, MapEventManager.getLazyEmitter).
 */
import { execFileSync } from 'node:child_process';
import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { graticuleStep, unwrapRing } from './src/basemap';

const here = __dirname;
const distFile = path.join(here, 'dist', 'maps-standin.js');

// Spherical Web Mercator (EPSG:3857), "Popular Visualisation Pseudo-Mercator": sphere radius =
// WGS 84 semi-major axis a = 6 378 137 m; x = a·λ, y = a·ln(tan(π/4 + φ/2)).
const A = 6378137;
const epsg3857 = (lat: number, lng: number) => ({
  x: (A * lng * Math.PI) / 180,
  y: A * Math.log(Math.tan(Math.PI / 4 + (lat * Math.PI) / 360)),
});
/** World units (0..256 at zoom 0, y down) → EPSG:3857 metres. */
const worldToMetres = (p: { x: number; y: number }) => ({
  x: ((p.x - 128) * 2 * Math.PI * A) / 256,
  y: ((128 - p.y) * 2 * Math.PI * A) / 256,
});

const sites = {
  boston: { lat: 42.36, lng: -71.06 },
  chicago: { lat: 41.88, lng: -87.63 },
  losAngeles: { lat: 34.05, lng: -118.24 },
  frankfurt: { lat: 50.11, lng: 8.68 },
};

type Maps = typeof google.maps & {
  version: string;
  marker: { AdvancedMarkerElement: typeof google.maps.marker.AdvancedMarkerElement };
};
let maps: Maps;
const ready = jest.fn();

function loadBuiltScript(): void {
  // The loader tag as the app writes it; jsdom does not fetch it, the stand-in reads its URL.
  const tag = document.createElement('script');
  tag.src = 'http://127.0.0.1:8080/maps/api/js?key=&callback=onMapsReady&loading=async';
  document.head.appendChild(tag);
  const script = document.createElement('script');
  script.textContent = fs.readFileSync(distFile, 'utf8');
  document.head.appendChild(script);
}

function mapDiv(width = 800, height = 600): HTMLDivElement {
  // As GoogleMap._setSize does on its .map-container element.
  const div = document.createElement('div');
  div.className = 'map-container';
  div.style.width = `${width}px`;
  div.style.height = `${height}px`;
  document.body.appendChild(div);
  return div;
}

const tick = () => new Promise((r) => setTimeout(r, 5));

beforeAll(() => {
  // Build through the server's helper, so the on-demand path is what gets tested.
  const out = execFileSync(
    process.execPath,
    [
      '--input-type=module',
      '-e',
      `import('${path.join(here, 'index.mjs')}').then(async (m) => console.log(await m.mapsStandinPath()))`,
    ],
    { encoding: 'utf8' },
  );
  expect(out.trim()).toBe(distFile);
  (window as unknown as { onMapsReady: () => void }).onMapsReady = ready;
  loadBuiltScript();
  maps = (window as unknown as { google: { maps: Maps } }).google.maps;
});

afterEach(() => {
  document.body.replaceChildren();
});

describe('build and helper', () => {
  it('writes the inputs hash into the file, and a second build gives the same bytes', () => {
    const first = fs.readFileSync(distFile);
    const hashLine = first.toString('utf8').split('\n')[0];
    expect(hashLine).toMatch(/^\/\*! evalon-offline-maps inputs: [0-9a-f]{64} \*\/$/);
    execFileSync(process.execPath, [path.join(here, 'build.mjs')], { encoding: 'utf8' });
    const second = fs.readFileSync(distFile);
    const sha = (b: Buffer) => crypto.createHash('sha256').update(b).digest('hex');
    expect(sha(second)).toBe(sha(first));
    // Size budget: 1:110m outlines + code stay well under 200 kB.
    expect(second.length).toBeLessThan(200_000);
  });
});

describe('loading', () => {
  it('fills google.maps and calls the callback named in the script URL, once, afterwards', async () => {
    expect(maps.version).toBe('evalon-offline');
    expect(typeof maps.Map).toBe('function');
    expect(typeof maps.Marker).toBe('function');
    expect(typeof maps.InfoWindow).toBe('function');
    expect(typeof maps.marker.AdvancedMarkerElement).toBe('function');
    await tick();
    expect(ready).toHaveBeenCalledTimes(1);
  });

  it('importLibrary resolves the maps, marker and core libraries with the same classes', async () => {
    const mapsLib = (await maps.importLibrary('maps')) as google.maps.MapsLibrary;
    expect(mapsLib.Map).toBe(maps.Map);
    expect(mapsLib.InfoWindow).toBe(maps.InfoWindow);
    const markerLib = (await maps.importLibrary('marker')) as google.maps.MarkerLibrary;
    expect(markerLib.Marker).toBe(maps.Marker);
    expect(markerLib.AdvancedMarkerElement).toBe(maps.marker.AdvancedMarkerElement);
    const core = (await maps.importLibrary('core')) as google.maps.CoreLibrary;
    expect(core.LatLngBounds).toBe(maps.LatLngBounds);
    await expect(maps.importLibrary('geocoding')).rejects.toThrow(/no "geocoding" library/);
  });
});

describe('LatLng', () => {
  it('wraps longitude and clamps latitude unless told not to', () => {
    const p = new maps.LatLng(100, 190);
    expect(p.lat()).toBe(90);
    expect(p.lng()).toBeCloseTo(-170, 12);
    const raw = new maps.LatLng(100, 190, true);
    expect([raw.lat(), raw.lng()]).toEqual([100, 190]);
    expect(new maps.LatLng(sites.boston).toJSON()).toEqual(sites.boston);
    expect(new maps.LatLng(sites.boston).equals(new maps.LatLng(42.36, -71.06))).toBe(true);
    expect(new maps.LatLng(1 / 3, 2 / 3).toUrlValue()).toBe('0.333333,0.666667');
  });
});

describe('LatLngBounds', () => {
  it('extends over the four sites on the shorter side (values worked by hand)', () => {
    const b = new maps.LatLngBounds();
    expect(b.isEmpty()).toBe(true);
    for (const s of [sites.boston, sites.chicago, sites.losAngeles, sites.frankfurt]) b.extend(s);
    // Going east from LA (-118.24) to Frankfurt (8.68) spans 126.92°; the other way 233.08°.
    expect(b.toJSON()).toEqual({ south: 34.05, west: -118.24, north: 50.11, east: 8.68 });
    // Centre: ((34.05 + 50.11) / 2, (-118.24 + 8.68) / 2) = (42.08, -54.78).
    const c = b.getCenter();
    expect(c.lat()).toBeCloseTo(42.08, 10);
    expect(c.lng()).toBeCloseTo(-54.78, 10);
    expect(b.contains(sites.chicago)).toBe(true);
    expect(b.contains({ lat: 35.68, lng: 139.69 })).toBe(false);
    expect(b.toSpan().lng()).toBeCloseTo(126.92, 10);
    expect(b.isEmpty()).toBe(false);
  });

  it('crosses the antimeridian when that is shorter', () => {
    const b = new maps.LatLngBounds();
    b.extend({ lat: -10, lng: 170 }).extend({ lat: 10, lng: -170 });
    // 170°E → 170°W eastwards is 20°; the centre is on the antimeridian.
    expect(b.toJSON()).toEqual({ south: -10, west: 170, north: 10, east: -170 });
    expect(Math.abs(b.getCenter().lng())).toBeCloseTo(180, 10);
    expect(b.getCenter().lat()).toBe(0);
    expect(b.toSpan().lng()).toBeCloseTo(20, 10);
    expect(b.contains({ lat: 0, lng: 180 })).toBe(true);
    expect(b.contains({ lat: 0, lng: 0 })).toBe(false);
  });

  it('union takes the smaller gap, worked by hand', () => {
    const b = new maps.LatLngBounds({ south: 34.05, west: -118.24, north: 50.11, east: 8.68 });
    // Adding a point near 139.69°E: east from it to -118.24 is 102.07°, east from 8.68 to it
    // is 131.01°, so the west edge moves to 139.69 (across the antimeridian).
    b.union(new maps.LatLngBounds({ lat: 35.68, lng: 139.69 }, { lat: 35.68, lng: 139.69 }));
    expect(b.toJSON()).toEqual({ south: 34.05, west: 139.69, north: 50.11, east: 8.68 });
    expect(b.toSpan().lng()).toBeCloseTo(228.99, 10);
    expect(b.contains({ lat: 40, lng: 180 })).toBe(true);
    expect(b.intersects({ south: 0, west: 150, north: 40, east: 160 })).toBe(true);
    expect(b.equals({ south: 34.05, west: 139.69, north: 50.11, east: 8.68 })).toBe(true);
    expect(b.toUrlValue()).toBe('34.05,139.69,50.11,8.68');
  });
});

describe('Web Mercator projection', () => {
  let map: google.maps.Map;
  beforeEach(() => {
    map = new maps.Map(mapDiv(), { center: { lat: 0, lng: 0 }, zoom: 2 });
  });

  it('matches the spherical Mercator formula (EPSG:3857) for Frankfurt', () => {
    const proj = map.getProjection() as google.maps.Projection;
    const metres = worldToMetres(proj.fromLatLngToPoint(sites.frankfurt) as google.maps.Point);
    const expected = epsg3857(sites.frankfurt.lat, sites.frankfurt.lng);
    expect(metres.x).toBeCloseTo(expected.x, 4);
    expect(metres.y).toBeCloseTo(expected.y, 4);
  });

  it('puts 45°N at a·ln(1 + √2) and the world edge at π·a (values worked by hand)', () => {
    const proj = map.getProjection() as google.maps.Projection;
    // tan(π/4 + π/8) = 1 + √2, so y(45°) = 6 378 137 × 0.881373587 = 5 621 521.486 m.
    const p45 = worldToMetres(proj.fromLatLngToPoint({ lat: 45, lng: 0 }) as google.maps.Point);
    expect(p45.y).toBeCloseTo(5621521.486, 2);
    // EPSG:3857's square ends at ±20 037 508.34 m = π·a, reached at 85.0511287798°.
    const edge = worldToMetres(proj.fromLatLngToPoint({ lat: 90, lng: 180 }) as google.maps.Point);
    expect(edge.y).toBeCloseTo(20037508.34, 1);
    expect(edge.x).toBeCloseTo(20037508.34, 1);
    const back = proj.fromPointToLatLng(new maps.Point(64, 64)) as google.maps.LatLng;
    // y = 64 is a quarter of the way down: Mercator y = π/2 · R, latitude gd(π/2) = 66.5133°.
    expect(back.lat()).toBeCloseTo(66.51326, 5);
    expect(back.lng()).toBe(-90);
  });

  it('getBounds of a 800×600 view at zoom 2 around (0, 0)', () => {
    // Zoom 2: 1024 px per 360°, so ±400 px = ±140.625°; ±300 px = ±75 world units of y.
    const b = (map.getBounds() as google.maps.LatLngBounds).toJSON();
    expect(b.west).toBeCloseTo(-140.625, 10);
    expect(b.east).toBeCloseTo(140.625, 10);
    const lat = (2 * Math.atan(Math.exp((75 / 256) * 2 * Math.PI)) - Math.PI / 2) * (180 / Math.PI);
    expect(b.north).toBeCloseTo(lat, 10);
    expect(b.south).toBeCloseTo(-lat, 10);
  });
});

describe('Map as GoogleMap uses it', () => {
  it('renders into the container with the attribution, base map and zoom buttons', () => {
    const div = mapDiv();
    const map = new maps.Map(div, { center: sites.chicago, zoom: 4, mapTypeId: 'roadmap' });
    expect(map.getDiv()).toBe(div);
    const root = div.querySelector('.evm-root') as HTMLElement;
    expect(root.getAttribute('aria-roledescription')).toBe('map');
    expect(root.tabIndex).toBe(0);
    expect(div.querySelector('.evm-attribution')?.textContent).toBe(
      'Offline map: Natural Earth via world-atlas',
    );
    expect((div.querySelector('.evm-land')?.getAttribute('d') ?? '').length).toBeGreaterThan(
      50_000,
    );
    expect(div.querySelector('button[aria-label="Zoom in"]')).not.toBeNull();
    expect(map.getCenter()?.toJSON()).toEqual(sites.chicago);
    expect(map.getZoom()).toBe(4);
    expect(map.getMapTypeId()).toBe('roadmap');
  });

  it('fitBounds with no padding: whole zoom that fits, centred on the Mercator midpoint', () => {
    const map = new maps.Map(mapDiv(800, 600), { center: { lat: 0, lng: 0 }, zoom: 1 });
    const bounds = new maps.LatLngBounds();
    Object.values(sites).forEach((s) => bounds.extend(s));
    map.fitBounds(bounds, 0);
    // Expected from the formula: width at zoom 0 = 126.92/360 × 256 px; height from y(φ).
    const R0 = 256 / (2 * Math.PI);
    const y = (lat: number) => R0 * Math.log(Math.tan(Math.PI / 4 + (lat * Math.PI) / 360));
    const dx = (126.92 / 360) * 256;
    const dy = y(50.11) - y(34.05);
    const zoom = Math.floor(Math.log2(Math.min(800 / dx, 600 / dy)));
    expect(zoom).toBe(3);
    expect(map.getZoom()).toBe(zoom);
    const midLat =
      (2 * Math.atan(Math.exp((y(50.11) + y(34.05)) / 2 / R0)) - Math.PI / 2) * (180 / Math.PI);
    expect(map.getCenter()?.lat()).toBeCloseTo(midLat, 9);
    expect(map.getCenter()?.lng()).toBeCloseTo(-54.78, 9);
    const view = map.getBounds() as google.maps.LatLngBounds;
    for (const s of Object.values(sites)) expect(view.contains(s)).toBe(true);
  });

  it('fitBounds default padding (40 px) and asymmetric padding', () => {
    const map = new maps.Map(mapDiv(800, 600), { center: { lat: 0, lng: 0 }, zoom: 1 });
    const bounds = { south: 34.05, west: -118.24, north: 50.11, east: 8.68 };
    map.fitBounds(bounds);
    // 720 px / 90.25 px = 7.98 < 8: one zoom less than without padding.
    expect(map.getZoom()).toBe(2);
    map.fitBounds(bounds, { left: 200, right: 0, top: 0, bottom: 0 });
    // 600 / 90.25 = 6.6 → zoom 2; the centre moves 100 px west: 100 px at zoom 2 is 35.15625°.
    expect(map.getZoom()).toBe(2);
    expect(map.getCenter()?.lng()).toBeCloseTo(-54.78 - 35.15625, 9);
  });

  it('fitBounds on a map without size does nothing, as the hosted API documents', () => {
    const div = document.createElement('div');
    document.body.appendChild(div);
    const map = new maps.Map(div, { center: { lat: 1, lng: 2 }, zoom: 5 });
    map.fitBounds({ south: 34.05, west: -118.24, north: 50.11, east: 8.68 });
    expect(map.getZoom()).toBe(5);
    expect(map.getBounds()).toBeUndefined();
  });

  it('reports changes through events, idle after they settle, and listeners can be removed', async () => {
    const map = new maps.Map(mapDiv(), { center: sites.boston, zoom: 3 });
    const seen: string[] = [];
    const handles = ['zoom_changed', 'center_changed', 'bounds_changed', 'idle'].map((name) =>
      map.addListener(name, () => seen.push(name)),
    );
    await tick(); // the first idle
    seen.length = 0;
    map.setZoom(5);
    map.panTo(sites.chicago);
    expect(seen).toEqual(['zoom_changed', 'bounds_changed', 'center_changed', 'bounds_changed']);
    await tick();
    expect(seen.filter((n) => n === 'idle')).toHaveLength(1);
    handles.forEach((h) => h.remove());
    seen.length = 0;
    map.setZoom(6);
    await tick();
    expect(seen).toEqual([]);
  });

  it('clamps zoom to minZoom/maxZoom and hides zoom buttons with disableDefaultUI', () => {
    const div = mapDiv();
    const map = new maps.Map(div, {
      center: sites.boston,
      zoom: 12,
      minZoom: 2,
      maxZoom: 8,
      disableDefaultUI: true,
    });
    expect(map.getZoom()).toBe(8);
    map.setZoom(0);
    expect(map.getZoom()).toBe(2);
    expect((div.querySelector('.evm-controls') as HTMLElement).hidden).toBe(true);
    map.setOptions({ zoomControl: true });
    expect((div.querySelector('.evm-controls') as HTMLElement).hidden).toBe(false);
    expect((div.querySelector('button[aria-label="Zoom out"]') as HTMLButtonElement).disabled).toBe(
      true,
    );
  });
});

describe('google.maps.event', () => {
  it('trigger passes arguments with this bound; addListenerOnce; clearInstanceListeners', () => {
    const target = new maps.MVCObject();
    const calls: unknown[] = [];
    maps.event.addListener(target, 'ping', function (this: unknown, a: number, b: string) {
      calls.push([this === target, a, b]);
    });
    maps.event.addListenerOnce(target, 'ping', () => calls.push('once'));
    maps.event.trigger(target, 'ping', 1, 'x');
    maps.event.trigger(target, 'ping', 2, 'y');
    expect(calls).toEqual([[true, 1, 'x'], 'once', [true, 2, 'y']]);
    maps.event.clearInstanceListeners(target);
    maps.event.trigger(target, 'ping', 3, 'z');
    expect(calls).toHaveLength(3);
  });

  it('MVCObject set fires <key>_changed with the key lower-cased, as the hosted API', () => {
    const o = new maps.MVCObject();
    const seen: string[] = [];
    o.addListener('zindex_changed', () => seen.push(String(o.get('zIndex'))));
    o.set('zIndex', 4);
    expect(seen).toEqual(['4']);
  });
});

describe('Marker as MapMarker uses it', () => {
  function setup() {
    const div = mapDiv();
    const map = new maps.Map(div, { center: sites.chicago, zoom: 4 });
    // MapMarker._initialize: new Marker(options) then setMap(map).
    const marker = new maps.Marker({ position: sites.chicago, title: 'Chicago depot' });
    marker.setMap(map);
    return { div, map, marker };
  }

  it('is an accessible, focusable pin with the title as name and caption', () => {
    const { div, marker } = setup();
    const el = div.querySelector('.evm-marker') as HTMLElement;
    expect(el.getAttribute('role')).toBe('button');
    expect(el.getAttribute('aria-label')).toBe('Chicago depot');
    expect(el.tabIndex).toBe(0);
    expect(el.querySelector('svg')?.getAttribute('aria-hidden')).toBe('true');
    expect(el.querySelector('.evm-caption')?.textContent).toBe('Chicago depot');
    // At the map centre: translate to the middle of the 800×600 map.
    expect(el.style.transform).toBe('translate(400px, 300px)');
    marker.setLabel('7');
    expect(el.querySelector('.evm-pin-glyph')?.textContent).toBe('7');
    marker.setClickable(false);
    expect(el.getAttribute('role')).toBe('img');
    expect(el.hasAttribute('tabindex')).toBe(false);
    marker.setMap(null);
    expect(div.querySelector('.evm-marker')).toBeNull();
  });

  it('click and Enter fire the click event with the position; no map click', () => {
    const { div, map, marker } = setup();
    const clicks: google.maps.MapMouseEvent[] = [];
    const mapClicks = jest.fn();
    marker.addListener('click', (e: google.maps.MapMouseEvent) => clicks.push(e));
    map.addListener('click', mapClicks);
    const el = div.querySelector('.evm-marker') as HTMLElement;
    el.dispatchEvent(new MouseEvent('click', { bubbles: true }));
    el.dispatchEvent(new KeyboardEvent('keydown', { key: 'Enter', bubbles: true }));
    expect(clicks).toHaveLength(2);
    expect(clicks[0].latLng?.toJSON()).toEqual(sites.chicago);
    expect(mapClicks).not.toHaveBeenCalled();
  });

  it('position_changed and title_changed fire; getPosition is a LatLng', () => {
    const { marker } = setup();
    const seen: string[] = [];
    marker.addListener('position_changed', () => seen.push('position'));
    marker.addListener('title_changed', () => seen.push('title'));
    marker.setPosition(sites.boston);
    marker.setTitle('Boston campus');
    expect(seen).toEqual(['position', 'title']);
    expect(marker.getPosition()?.lat()).toBe(42.36);
    expect(marker.getTitle()).toBe('Boston campus');
  });
});

describe('InfoWindow as MapInfoWindow uses it', () => {
  function setup() {
    const div = mapDiv();
    const map = new maps.Map(div, { center: sites.chicago, zoom: 4 });
    const marker = new maps.Marker({ position: sites.chicago, title: 'Chicago depot', map });
    // MapInfoWindow passes its own host element as content.
    const host = document.createElement('map-info-window');
    host.textContent = 'Chicago depot: 3 units ready';
    const info = new maps.InfoWindow({ content: host, position: undefined });
    return { div, map, marker, host, info };
  }

  it('opens above the anchor marker with its content, and closes', async () => {
    const { div, marker, host, info } = setup();
    const domready = jest.fn();
    const closed = jest.fn();
    info.addListener('domready', domready);
    info.addListener('close', closed);
    // MapInfoWindow.open(): compares get('anchor'), then open({map, anchor, shouldFocus}).
    expect(info.get('anchor')).toBeUndefined();
    info.open({ map: marker.getMap() as google.maps.Map, anchor: marker, shouldFocus: undefined });
    expect(info.get('anchor')).toBe(marker);
    expect(info.isOpen).toBe(true);
    const dialog = div.querySelector('.evm-info-frame[role="dialog"]') as HTMLElement;
    expect(dialog.contains(host)).toBe(true);
    expect(dialog.getAttribute('aria-label')).toBe('Chicago depot: 3 units ready');
    // The tip sits 42 px above the marker position (pin height 40 + 2).
    expect((div.querySelector('.evm-info') as HTMLElement).style.transform).toBe(
      'translate(400px, 258px)',
    );
    await tick();
    expect(domready).toHaveBeenCalledTimes(1);
    info.close();
    expect(div.querySelector('.evm-info')).toBeNull();
    expect(info.get('anchor')).toBeNull();
    expect(closed).toHaveBeenCalledTimes(1);
  });

  it('the close button fires closeclick; a string content is HTML, as in the hosted API', () => {
    const { div, map, info } = setup();
    const closeclick = jest.fn();
    info.addListener('closeclick', closeclick);
    info.setContent('<b>Frankfurt depot</b>');
    info.setPosition(sites.frankfurt);
    info.open(map);
    expect(div.querySelector('.evm-info-body b')?.textContent).toBe('Frankfurt depot');
    (div.querySelector('.evm-info-close') as HTMLButtonElement).click();
    expect(closeclick).toHaveBeenCalledTimes(1);
    expect(info.isOpen).toBe(false);
  });

  it('follows a moved anchor and closes when the anchor leaves the map', () => {
    const { div, map, marker, info } = setup();
    info.open({ map, anchor: marker });
    const el = div.querySelector('.evm-info') as HTMLElement;
    map.panBy(100, 0);
    expect(el.style.transform).toBe('translate(300px, 258px)');
    marker.setMap(null);
    expect(info.isOpen).toBe(false);
  });

  it('Escape on the focused anchor closes it; focus moves in when the anchor had focus', () => {
    const { div, map, marker, info } = setup();
    const pin = div.querySelector('.evm-marker') as HTMLElement;
    pin.focus();
    info.open({ map, anchor: marker });
    expect(div.querySelector('.evm-info-frame')).toBe(document.activeElement);
    info.close();
    pin.focus();
    info.open({ map, anchor: marker, shouldFocus: false });
    expect(document.activeElement).toBe(pin);
    pin.dispatchEvent(new KeyboardEvent('keydown', { key: 'Escape', bubbles: true }));
    expect(info.isOpen).toBe(false);
  });
});

describe('AdvancedMarkerElement as MapAdvancedMarker uses it', () => {
  it('shows a pin, becomes a button once a click listener is added, and anchors info windows', () => {
    const div = mapDiv();
    const map = new maps.Map(div, { center: sites.frankfurt, zoom: 5, mapId: 'DEMO' });
    // MapAdvancedMarker._initialize: new AdvancedMarkerElement(options) then .map = map.
    const m = new maps.marker.AdvancedMarkerElement({
      title: 'Frankfurt depot',
      position: sites.frankfurt,
      content: undefined,
      zIndex: undefined,
      gmpDraggable: undefined,
    });
    m.map = map;
    expect(div.querySelector('.evm-advanced')).toBe(m);
    const inner = m.querySelector('.evm-advanced-content') as HTMLElement;
    expect(inner.getAttribute('aria-label')).toBe('Frankfurt depot');
    expect(inner.getAttribute('role')).toBe('img');
    const clicks = jest.fn();
    m.addListener('click', clicks); // MapEventManager: non-native 'click'
    const dbl = jest.fn();
    m.addEventListener('dblclick', dbl); // MapEventManager: native 'dblclick'
    expect(inner.getAttribute('role')).toBe('button');
    inner.click();
    inner.dispatchEvent(new MouseEvent('dblclick', { bubbles: true }));
    expect(clicks).toHaveBeenCalledTimes(1);
    expect(dbl).toHaveBeenCalledTimes(1);
    expect(m.style.transform).toBe('translate(400px, 300px)');

    const info = new maps.InfoWindow({ content: 'Frankfurt' });
    info.open({ map, anchor: m }); // MapInfoWindow.openAdvancedMarkerElement
    expect((div.querySelector('.evm-info') as HTMLElement).style.transform).toBe(
      'translate(400px, 258px)',
    );
    m.map = null;
    expect(div.querySelector('.evm-advanced')).toBeNull();
    expect(info.isOpen).toBe(false);
  });
});

describe('gestures and keys', () => {
  function setup(options: google.maps.MapOptions = {}) {
    const div = mapDiv(800, 600);
    const map = new maps.Map(div, { center: { lat: 0, lng: 0 }, zoom: 3, ...options });
    const root = div.querySelector('.evm-root') as HTMLElement;
    return { div, map, root };
  }
  // jsdom has no layout: the root's client rect is at (0, 0), so client = map pixels.
  const degPerPx = (zoom: number) => 360 / (256 * 2 ** zoom);

  it('zoom buttons step the zoom', () => {
    const { div, map } = setup();
    (div.querySelector('button[aria-label="Zoom in"]') as HTMLButtonElement).click();
    expect(map.getZoom()).toBe(4);
    (div.querySelector('button[aria-label="Zoom out"]') as HTMLButtonElement).click();
    (div.querySelector('button[aria-label="Zoom out"]') as HTMLButtonElement).click();
    expect(map.getZoom()).toBe(2);
  });

  it('+ / - zoom and arrows pan 100 px while the map has focus; off with keyboardShortcuts', () => {
    const { map, root } = setup();
    const key = (k: string) =>
      root.dispatchEvent(new KeyboardEvent('keydown', { key: k, bubbles: true, cancelable: true }));
    key('+');
    expect(map.getZoom()).toBe(4);
    key('-');
    expect(map.getZoom()).toBe(3);
    key('ArrowRight');
    expect(map.getCenter()?.lng()).toBeCloseTo(100 * degPerPx(3), 10);
    key('ArrowLeft');
    key('ArrowLeft');
    expect(map.getCenter()?.lng()).toBeCloseTo(-100 * degPerPx(3), 10);
    map.setOptions({ keyboardShortcuts: false });
    key('+');
    expect(map.getZoom()).toBe(3);
  });

  it('drag pans by the pointer travel, fires drag events, and the release is not a click', () => {
    const { map, root } = setup();
    const events: string[] = [];
    for (const n of ['dragstart', 'drag', 'dragend', 'click'])
      map.addListener(n, () => events.push(n));
    const fire = (type: string, x: number, y: number) =>
      root.dispatchEvent(
        new MouseEvent(type, { clientX: x, clientY: y, button: 0, bubbles: true }),
      );
    fire('pointerdown', 400, 300);
    fire('pointermove', 350, 300);
    fire('pointermove', 300, 300);
    fire('pointerup', 300, 300);
    fire('click', 300, 300);
    expect(map.getCenter()?.lng()).toBeCloseTo(100 * degPerPx(3), 10);
    expect(events).toEqual(['dragstart', 'drag', 'drag', 'dragend']);
  });

  it('a click on the background gives the LatLng under the pointer', () => {
    const { map, root } = setup();
    const clicks: google.maps.MapMouseEvent[] = [];
    map.addListener('click', (e: google.maps.MapMouseEvent) => clicks.push(e));
    root.dispatchEvent(new MouseEvent('click', { clientX: 500, clientY: 300, bubbles: true }));
    expect(clicks).toHaveLength(1);
    expect(clicks[0].latLng?.lat()).toBeCloseTo(0, 10);
    expect(clicks[0].latLng?.lng()).toBeCloseTo(100 * degPerPx(3), 10);
  });

  it('wheel zooms around the pointer; gestureHandling none turns it off', () => {
    const { map, root } = setup();
    const target = { lat: 0, lng: 200 * degPerPx(3) }; // 200 px east of the centre
    root.dispatchEvent(
      new WheelEvent('wheel', {
        deltaY: -100,
        clientX: 600,
        clientY: 300,
        bubbles: true,
        cancelable: true,
      }),
    );
    expect(map.getZoom()).toBe(4);
    // The point under the pointer stays at x = 600: the centre is now 200 px west of it at zoom 4.
    expect(map.getCenter()?.lng()).toBeCloseTo(target.lng - 200 * degPerPx(4), 10);
    const quiet = setup({ gestureHandling: 'none' });
    quiet.root.dispatchEvent(
      new WheelEvent('wheel', { deltaY: -100, bubbles: true, cancelable: true }),
    );
    expect(quiet.map.getZoom()).toBe(3);
  });

  it('double-click zooms in around the pointer', () => {
    const { map, root } = setup();
    root.dispatchEvent(new MouseEvent('dblclick', { clientX: 400, clientY: 300, bubbles: true }));
    expect(map.getZoom()).toBe(4);
    expect(map.getCenter()?.lng()).toBeCloseTo(0, 10);
  });
});

describe('base map geometry', () => {
  it('makes rings that cross the antimeridian continuous and closes polar rings at the pole', () => {
    // A small ring drawn across 180°: the jump of 350° becomes a step of 10°.
    expect(
      unwrapRing([
        [175, 0],
        [-175, 0],
        [-175, 5],
        [175, 5],
        [175, 0],
      ]),
    ).toEqual([
      [175, 0],
      [185, 0],
      [185, 5],
      [175, 5],
      [175, 0],
    ]);
    // A ring that goes all the way round (as Antarctica) ends 360° from its start.
    const polar = unwrapRing([
      [-180, -80],
      [0, -70],
      [180, -80],
      [-180, -80],
    ]);
    expect(polar.slice(-3)).toEqual([
      [180, -90],
      [-180, -90],
      [-180, -80],
    ]);
  });

  it('spaces the graticule so lines stay at least 120 px apart', () => {
    // Zoom 0: 256 px per 360°, 120 px = 168.75° → coarsest step 30°. Zoom 5: 8192 px, 120 px
    // = 5.27° → 10°. Zoom 8: 65 536 px, 120 px = 0.66° → 1°.
    expect([0, 5, 8].map(graticuleStep)).toEqual([30, 10, 1]);
  });
});
