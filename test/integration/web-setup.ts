// Loaded first by web-index.ts: mocha's browser build defines the global `mocha`; setting it up here,
// before the test modules are evaluated, defines `describe`/`it` for them.
import 'mocha/mocha.js';

mocha.setup({
  ui: 'bdd',
  forbidOnly: true,
  color: false,
  reporter: 'spec',
  timeout: 60_000,
});
