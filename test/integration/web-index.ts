// In-host test runner for the browser (web worker) extension host: the module named by
// `extensionTestsPath` in Route B (scripts/web-test.mjs, `npm run test:web`). scripts/build.mjs bundles it
// with every test/integration/**/*.test.ts except `*.node.test.ts` into out/test/web/suite.js.
import './web-setup';
import { files } from 'virtual:integration-tests';
import { runMocha } from './support/run-mocha';

export function run(): Promise<void> {
  if (files.length === 0) return Promise.reject(new Error('no in-host test files were bundled into the web suite'));
  return runMocha(mocha);
}
