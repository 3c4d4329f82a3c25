#!/usr/bin/env node
/**
 * Import rules of kernel-lib/ (DEVELOPERS.md, "Rooms"): a file imports only from its own room or
 * rooms below it, and no files import each other in a cycle. Prints each violation and exits 1.
 * Usage: node scripts/check-imports.js [root]   (default: kernel-lib)
 */
const { readFileSync } = require('node:fs');
const { listTsFiles } = require('./library-files');
const { join, relative, resolve, dirname, sep } = require('node:path');

/** Rooms from the ground up; a room may import any room with a lower rank. */
const ROOMS = ['numeric', 'random', 'model', 'data', 'family', 'fit', 'analyse', 'design', 'study', 'plots', 'display', 'notebook', 'cli'];
/** Rooms that may be imported only for their types from the given rooms (checked below). */
const TYPE_ONLY = { plots: ['study', 'fit', 'design', 'data', 'model'] };


/** Relative imports of a file: [{ target, typeOnly }]. */
function importsOf(file) {
  const text = readFileSync(file, 'utf8');
  const out = [];
  const re = /^\s*(import|export)\s+(type\s+)?([^'";]*?)\s*from\s+['"](\.[^'"]+)['"]/gm;
  let m;
  while ((m = re.exec(text)) !== null) {
    const clause = m[3];
    const typeOnly = Boolean(m[2]) || /^\{[^}]*\}$/.test(clause.trim()) && clause.replace(/[{}\s]/g, '').split(',').filter(Boolean).every((x) => x.startsWith('type'));
    let target = resolve(dirname(file), m[4]);
    target = target.endsWith('.ts') ? target : `${target}.ts`;
    out.push({ target, typeOnly });
  }
  // dynamic and worker paths: require('./x') / join(__dirname, 'x.js') are not module imports
  return out;
}

function roomOf(root, file) {
  const rel = relative(root, file).split(sep);
  return rel.length > 1 ? rel[0] : '';
}

function check(root) {
  const files = listTsFiles(root);
  const graph = new Map();
  const problems = [];
  for (const file of files) {
    const room = roomOf(root, file);
    const deps = importsOf(file);
    graph.set(file, deps.map((d) => d.target));
    if (room === '') continue; // kernel-lib/index.ts: the public surface, above everything
    const rank = ROOMS.indexOf(room);
    if (rank < 0) { problems.push(`${relative(root, file)}: room "${room}" is not in the rooms list`); continue; }
    for (const d of deps) {
      const other = roomOf(root, d.target);
      if (other === room) continue;
      const otherRank = ROOMS.indexOf(other);
      const allowedTypes = d.typeOnly && (TYPE_ONLY[room] ?? []).includes(other);
      if ((otherRank < 0 || otherRank > rank) && !allowedTypes) {
        problems.push(`${relative(root, file)}: imports ${relative(root, d.target)} (room "${other}" is above "${room}")`);
      }
    }
  }
  // cycles among files, type-only imports included (they tie the modules' meaning together all the same)
  const state = new Map();
  const stack = [];
  const visit = (f) => {
    state.set(f, 1);
    stack.push(f);
    for (const g of graph.get(f) ?? []) {
      if (!graph.has(g)) continue;
      if (state.get(g) === 1) {
        const cycle = stack.slice(stack.indexOf(g)).concat(g).map((x) => relative(root, x));
        problems.push(`import cycle: ${cycle.join(' -> ')}`);
      } else if (!state.has(g)) visit(g);
    }
    stack.pop();
    state.set(f, 2);
  };
  for (const f of graph.keys()) if (!state.has(f)) visit(f);
  return problems;
}

module.exports = { check, ROOMS };

if (require.main === module) {
  const root = resolve(process.argv[2] ?? join(__dirname, '..', 'kernel-lib'));
  const problems = check(root);
  for (const p of problems) console.error(p);
  if (problems.length) {
    console.error(`${problems.length} import rule violation(s)`);
    process.exit(1);
  }
  console.log('imports: no upward imports between rooms, no cycles');
}
