// A minimal Angular app (JIT, zoneless) that uses the real @angular/google-maps 21.2.9 components
// against the stand-in: <google-map>, <map-marker>, <map-advanced-marker>, <map-info-window>.
// Bundled by demo/check.mjs with esbuild; plain JavaScript so no Angular compiler step is needed.
/* global window -- runs in the browser */
import '@angular/compiler';
import { Component, provideZonelessChangeDetection, signal } from '@angular/core';
import { bootstrapApplication } from '@angular/platform-browser';
import { GoogleMap, MapAdvancedMarker, MapInfoWindow, MapMarker } from '@angular/google-maps';

class HarnessMap {
  // Invented demo scenario: hospital campuses and a lender depot.
  campuses = [
    { title: 'Boston campus', position: { lat: 42.36, lng: -71.06 } },
    { title: 'Chicago depot', position: { lat: 41.88, lng: -87.63 } },
    { title: 'Los Angeles campus', position: { lat: 34.05, lng: -118.24 } },
  ];
  depot = { title: 'Frankfurt depot', position: { lat: 50.11, lng: 8.68 } };
  selected = signal('');
  options = { center: { lat: 40, lng: -40 }, zoom: 2 };

  ready(map) {
    window.__angular = { map, ready: true };
  }

  open(title, anchor, info) {
    this.selected.set(title);
    info.open(anchor);
  }

  openAdvanced(title, marker, info) {
    this.selected.set(title);
    info.openAdvancedMarkerElement(marker.advancedMarker);
  }
}

Component({
  selector: 'ev-harness-map',
  imports: [GoogleMap, MapMarker, MapAdvancedMarker, MapInfoWindow],
  template: `
    <google-map height="760px" width="1240px" [options]="options" (mapInitialized)="ready($event)">
      @for (c of campuses; track c.title) {
        <map-marker #m="mapMarker" [position]="c.position" [title]="c.title"
          (mapClick)="open(c.title, m, info)" />
      }
      <map-advanced-marker #a="mapAdvancedMarker" [position]="depot.position" [title]="depot.title"
        (mapClick)="openAdvanced(depot.title, a, info)" />
      <map-info-window #info="mapInfoWindow"><p class="picked">{{ selected() }}</p></map-info-window>
    </google-map>
  `,
})(HarnessMap);

bootstrapApplication(HarnessMap, { providers: [provideZonelessChangeDetection()] }).catch((e) =>
  console.error(e),
);
