/** The TypeScript source files below a folder (declaration files left out), for the lint scripts. */
const { readdirSync, statSync } = require('node:fs');
const { join } = require('node:path');

function listTsFiles(dir) {
  const out = [];
  for (const name of readdirSync(dir)) {
    const full = join(dir, name);
    if (statSync(full).isDirectory()) out.push(...listTsFiles(full));
    else if (name.endsWith('.ts') && !name.endsWith('.d.ts')) out.push(full);
  }
  return out;
}

module.exports = { listTsFiles };
