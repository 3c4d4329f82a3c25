#!/usr/bin/env node
'use strict';
// The command line runs the compiled library (npm install builds it into dist/).
const path = require('node:path');
const fs = require('node:fs');
const entry = path.join(__dirname, '..', 'dist', 'cli', 'main.js');
if (!fs.existsSync(entry)) {
  process.stderr.write('quadrat: the library is not built yet; run "npm install" (or "npm run build") in the project folder\n');
  process.exit(2);
}
require(entry).main(process.argv.slice(2)).then((code) => { process.exitCode = code; });
