// jsdom has no ResizeObserver; Material's form fields and tables only need it to exist.
class ResizeObserverStub {
  observe(): void {}
  unobserve(): void {}
  disconnect(): void {}
}
globalThis.ResizeObserver ??= ResizeObserverStub as unknown as typeof ResizeObserver;

// jsdom lays nothing out, so it has no scrollIntoView; the review panel scrolls an opened thread into view.
Element.prototype.scrollIntoView ??= function scrollIntoView(): void {};

// A spec drives several Material harness steps; on a busy machine the first spec of a file (which also
// pays for the first render) can need more than vitest's default 5 s.
vi.setConfig({ testTimeout: 30_000 });
