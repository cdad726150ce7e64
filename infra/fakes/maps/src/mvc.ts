/// <reference types="google.maps" />
/**
 * A small `MVCObject`: keyed values with `get`/`set`/`setValues`, a `<key>_changed` method hook
 * and a `<key>_changed` event on every change, which is how the hosted API's objects report
 * property changes (e.g. a marker's `position_changed`).
 */
import { event, type Handler, MapsEventListener, trigger } from './events';

/** Base class for the stand-in's map objects. */
export class MVCObject {
  private readonly mvcValues = new Map<string, unknown>();

  /** Adds a handler for `eventName` on this object; returns its handle. */
  addListener(eventName: string, handler: Handler): MapsEventListener {
    return event.addListener(this, eventName, handler);
  }

  /** The value stored under `key` (undefined when never set). */
  get(key: string): unknown {
    return this.mvcValues.get(key);
  }

  /** Stores `value` under `key` and reports the change. */
  set(key: string, value: unknown): void {
    this.mvcValues.set(key, value);
    this.notify(key);
  }

  /**
   * Sets several values; a key with a `set<Key>` method goes through it, so that conversions
   * (literal → LatLng, for instance) happen as with single calls.
   */
  setValues(values?: object | null): void {
    if (!values) return;
    for (const [key, value] of Object.entries(values)) {
      const setter = (this as unknown as Record<string, unknown>)[
        `set${key.charAt(0).toUpperCase()}${key.slice(1)}`
      ];
      if (typeof setter === 'function') setter.call(this, value);
      else this.set(key, value);
    }
  }

  /**
   * Reports a change of `key`: the `<key>_changed` method, `changed(key)`, then the event, whose
   * name is lower-cased as in the hosted API (`zIndex` → `zindex_changed`).
   */
  notify(key: string): void {
    const hook = (this as unknown as Record<string, unknown>)[`${key}_changed`];
    if (typeof hook === 'function') hook.call(this);
    this.changed(key);
    trigger(this, `${key.toLowerCase()}_changed`);
  }

  /** Called on every change; subclasses may override. */
  changed(_key: string): void {}

  /** Stores a value without reporting it (for changes that are reported together later). */
  protected setQuietly(key: string, value: unknown): void {
    this.mvcValues.set(key, value);
  }
}
