// jsdom ships no types; the tests use only its window (DOMParser for XML).
declare module "jsdom" {
  export class JSDOM {
    constructor(html?: string, options?: object);
    readonly window: Window & typeof globalThis;
  }
}
