#!/usr/bin/env node
// The `slopewise` command: a thin launcher for the bundled command line (out/cli.js, built by
// scripts/build.mjs from src/cli/main.ts).
'use strict';
const fs = require('fs');
const path = require('path');

const cli = path.join(__dirname, '..', 'out', 'cli.js');
if (!fs.existsSync(cli)) {
  process.stderr.write(
    'slopewise: the command line is not built yet (missing out/cli.js).\n' +
    'Run `npm run build` (or `npm install && npm run build`) in ' + path.join(__dirname, '..') + ' first.\n');
  process.exit(2);
}
require(cli);
