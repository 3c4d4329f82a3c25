#!/usr/bin/env node
'use strict';
/**
 * Kernel entry named in the Quadrat kernelspec: `node scripts/kernel-launch.js <connection_file>`.
 * Jupyter starts kernels in the notebook's folder and a kernelspec cannot choose another, so
 * this moves to the project root first (cells then import `./kernel-lib/...`, and tslab
 * compiles them against the project's node_modules) and starts the project's own tslab in
 * this same process, so Jupyter's interrupt (SIGINT) and shutdown reach it directly.
 */
const path = require('node:path');
const fs = require('node:fs');

const root = path.resolve(__dirname, '..');
const connectionFile = process.argv[2];
if (!connectionFile) {
  console.error('kernel-launch: expected the Jupyter connection file as the only argument');
  process.exit(2);
}
const tslabMain = path.join(root, 'node_modules', 'tslab', 'dist', 'main.js');
if (!fs.existsSync(tslabMain)) {
  console.error(`kernel-launch: ${tslabMain} not found; run "npm install" in ${root} first`);
  process.exit(1);
}
process.chdir(root);
// startKernel is tslab's stable entry (the one `tslab kernel --config-path <file>` calls).
require(tslabMain).startKernel({ configPath: path.resolve(connectionFile), enableFindLocal: false, jsKernel: false });
