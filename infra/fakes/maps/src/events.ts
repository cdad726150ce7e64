/// <reference types="google.maps" />
/**
 * The `google.maps.event` namespace of the stand-in: listeners kept per object and event name,
 * handles with `remove()`, and `trigger` calling handlers with `this` bound to the object, as the
 * hosted API does.
 */

// Handlers take whatever the event passes, as in the hosted API's typings.
// eslint-disable-next-line @typescript-eslint/no-explicit-any
export type Handler = (...args: any[]) => void;

interface Registration {
  instance: object;
  name: string;
  handler: Handler;
  /** Set for DOM listeners, which are removed from the element itself. */
  dom?: { element: EventTarget; listener: EventListener; capture: boolean };
}

const registry = new WeakMap<object, Map<string, Set<Registration>>>();

/** A listener handle, as returned by `addListener`; `remove()` detaches it. */
export class MapsEventListener implements google.maps.MapsEventListener {
  /** Wraps one registration. */
  constructor(private readonly registration: Registration | null) {}

  /** Detaches the handler; calling it twice is harmless. */
  remove(): void {
    const r = this.registration;
    if (!r) return;
    if (r.dom) {
      r.dom.element.removeEventListener(r.name, r.dom.listener, r.dom.capture);
      return;
    }
    const byName = registry.get(r.instance);
    const set = byName?.get(r.name);
    set?.delete(r);
    if (set && set.size === 0) byName?.delete(r.name);
  }
}

function register(instance: object, name: string, handler: Handler): MapsEventListener {
  let byName = registry.get(instance);
  if (!byName) {
    byName = new Map();
    registry.set(instance, byName);
  }
  let set = byName.get(name);
  if (!set) {
    set = new Set();
    byName.set(name, set);
  }
  const registration: Registration = { instance, name, handler };
  set.add(registration);
  return new MapsEventListener(registration);
}

/** Whether `instance` has at least one handler for `eventName`. */
export function hasListeners(instance: object, eventName: string): boolean {
  return (registry.get(instance)?.get(eventName)?.size ?? 0) > 0;
}

/**
 * Calls every handler of `eventName` on `instance` with `args`, in the order they were added.
 * Handlers added or removed while it runs take effect from the next trigger.
 */
export function trigger(instance: object, eventName: string, ...args: unknown[]): void {
  const set = registry.get(instance)?.get(eventName);
  if (!set) return;
  for (const r of [...set]) {
    if (set.has(r)) r.handler.apply(instance, args);
  }
}

/** The `google.maps.event` namespace subset. */
export const event = {
  /** Adds a handler for `eventName` on a stand-in object; returns its handle. */
  addListener(instance: object, eventName: string, handler: Handler): MapsEventListener {
    return register(instance, eventName, handler);
  },

  /** Like `addListener`, but the handler removes itself after its first call. */
  addListenerOnce(instance: object, eventName: string, handler: Handler): MapsEventListener {
    const handle: MapsEventListener = register(
      instance,
      eventName,
      function (this: unknown, ...args: unknown[]) {
        handle.remove();
        handler.apply(this, args);
      },
    );
    return handle;
  },

  /** Deprecated in the hosted API, kept for old code: a plain DOM listener with a handle. */
  addDomListener(
    element: EventTarget,
    eventName: string,
    handler: Handler,
    capture = false,
  ): MapsEventListener {
    const listener: EventListener = (e) => handler.call(element, e);
    element.addEventListener(eventName, listener, capture);
    return new MapsEventListener({
      instance: element,
      name: eventName,
      handler,
      dom: { element, listener, capture },
    });
  },

  /** Removes one handler (same as `listener.remove()`). */
  removeListener(listener: google.maps.MapsEventListener | null | undefined): void {
    listener?.remove();
  },

  /** Removes every handler of `eventName` on `instance`. */
  clearListeners(instance: object, eventName: string): void {
    registry.get(instance)?.delete(eventName);
  },

  /** Removes every handler of every event on `instance`. */
  clearInstanceListeners(instance: object): void {
    registry.delete(instance);
  },

  /** Fires `eventName` on `instance`, passing `args` to each handler. */
  trigger(instance: object, eventName: string, ...args: unknown[]): void {
    trigger(instance, eventName, ...args);
  },

  /** Whether `instance` has handlers for `eventName` (not in the hosted typings; a helper). */
  hasListeners,
};
