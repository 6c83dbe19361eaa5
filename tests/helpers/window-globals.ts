// What e2e tests put on a page's window, declared once (optional: the app itself never sets them).
// tsc reads this file with the rest of the project; page.evaluate callbacks see these types.

/** axe-core's one call the accessibility test makes (the script is injected into the page). */
interface Axe {
  run(context: Document, options: object): Promise<{ violations: { id: string; nodes: { target: string[] }[] }[] }>;
}

declare global {
  interface Window {
    /** CSP violations the page reported (tests/e2e/security-headers.test.ts) */
    __violations?: string[];
    /** axe-core, once its script tag has loaded (tests/e2e/accessibility.test.ts) */
    axe?: Axe;
  }
}

export {};
