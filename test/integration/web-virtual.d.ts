// Provided by scripts/build.mjs (plugin "integration-tests-glob"): imports every in-host test module.
declare module 'virtual:integration-tests' {
  /** Test files bundled into the web suite, relative to test/integration. */
  export const files: string[];
}
declare module 'mocha/mocha.js';
