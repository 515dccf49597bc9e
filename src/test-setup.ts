// Runs before every `ng test` spec file (angular.json → test.options.setupFiles).
// jsdom lacks two browser APIs the app's libraries touch:
// - ResizeObserver (used by chart and grid directives to follow their container's size);
// - canvas 2D contexts; returning null makes chart libraries fall back or skip drawing, and
//   silences jsdom's "Not implemented: HTMLCanvasElement.prototype.getContext" noise.

class ResizeObserverStub implements ResizeObserver {
  observe(): void {}
  unobserve(): void {}
  disconnect(): void {}
}

if (!('ResizeObserver' in globalThis)) {
  (globalThis as { ResizeObserver?: unknown }).ResizeObserver = ResizeObserverStub;
}

if (typeof HTMLCanvasElement !== 'undefined') {
  Object.defineProperty(HTMLCanvasElement.prototype, 'getContext', { value: () => null, configurable: true });
}
