import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { MAPS_CALLBACK, MapsLoader } from './maps-loader';

type TestWindow = Window & { google?: unknown; [MAPS_CALLBACK]?: () => void };

describe('MapsLoader', () => {
  let http: HttpTestingController;
  let loader: MapsLoader;
  const win = window as TestWindow;

  beforeEach(() => {
    delete win.google;
    document.head.querySelectorAll('script').forEach((s) => s.remove());
    TestBed.configureTestingModule({
      providers: [provideHttpClient(), provideHttpClientTesting()],
    });
    http = TestBed.inject(HttpTestingController);
    loader = TestBed.inject(MapsLoader);
  });

  afterEach(() => {
    http.verify();
    delete win.google;
  });

  const flushed = () => new Promise((resolve) => setTimeout(resolve));

  it('injects the script from the server’s config once and resolves when it calls back', async () => {
    const first = loader.load();
    const second = loader.load();
    expect(loader.status()).toBe('loading');
    http
      .expectOne('/api/config/maps')
      .flush({ apiKey: null, scriptUrl: '/maps/api/js', offline: true });
    await flushed();
    const scripts = document.head.querySelectorAll('script');
    expect(scripts).toHaveLength(1);
    const src = new URL(scripts[0]!.src);
    expect(src.pathname).toBe('/maps/api/js');
    expect(src.searchParams.get('callback')).toBe(MAPS_CALLBACK);
    expect(src.searchParams.has('key')).toBe(false);

    win.google = { maps: {} };
    win[MAPS_CALLBACK]!();
    await Promise.all([first, second]);
    expect(loader.status()).toBe('ready');
    expect(loader.offline()).toBe(true);
    // Loaded already: no second request, no second script.
    await loader.load();
    expect(document.head.querySelectorAll('script')).toHaveLength(1);
  });

  it('passes the browser key to the hosted script', async () => {
    void loader.load().catch(() => undefined);
    http.expectOne('/api/config/maps').flush({
      apiKey: 'browser-key-123',
      scriptUrl: 'https://maps.example/api/js',
      offline: false,
    });
    await flushed();
    const src = new URL(document.head.querySelector('script')!.src);
    expect(src.origin).toBe('https://maps.example');
    expect(src.searchParams.get('key')).toBe('browser-key-123');
    expect(loader.offline()).toBe(false);
  });

  it('reports a script that fails to load and tries again on the next call', async () => {
    const attempt = loader.load();
    http
      .expectOne('/api/config/maps')
      .flush({ apiKey: null, scriptUrl: '/maps/api/js', offline: true });
    await flushed();
    document.head.querySelector('script')!.dispatchEvent(new Event('error'));
    await expect(attempt).rejects.toThrow('could not be loaded');
    expect(loader.status()).toBe('failed');
    expect(document.head.querySelectorAll('script')).toHaveLength(0);

    void loader.load().catch(() => undefined);
    http
      .expectOne('/api/config/maps')
      .flush({ apiKey: null, scriptUrl: '/maps/api/js', offline: true });
    await flushed();
    expect(document.head.querySelectorAll('script')).toHaveLength(1);
  });
});
