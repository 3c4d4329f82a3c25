#!/usr/bin/env node
/**
 * Value exports (functions, classes, constants) of kernel-lib/ that nothing imports: not another library file, not a test, script,
 * benchmark or notebook, and not the public surface (kernel-lib/index.ts re-exports count as
 * used). Uses the TypeScript compiler to resolve every import to the symbol it names.
 * Usage: node scripts/check-unused-exports.js   (exit 1 when any are found)
 */
const ts = require('typescript');
const { readdirSync, readFileSync, statSync, existsSync } = require('node:fs');
const { join, relative, resolve } = require('node:path');

const ROOT = resolve(__dirname, '..');
const LIB = join(ROOT, 'kernel-lib');

function listFiles(dir, ext) {
  const out = [];
  if (!existsSync(dir)) return out;
  for (const name of readdirSync(dir)) {
    if (name === 'node_modules' || name === 'artifacts' || name.startsWith('.')) continue;
    const full = join(dir, name);
    if (statSync(full).isDirectory()) out.push(...listFiles(full, ext));
    else if (ext.some((e) => name.endsWith(e)) && !name.endsWith('.d.ts')) out.push(full);
  }
  return out;
}

const tsFiles = [...listFiles(LIB, ['.ts']), ...listFiles(join(ROOT, 'tests'), ['.ts']), ...listFiles(join(ROOT, 'data'), ['.ts'])];
const program = ts.createProgram(tsFiles, { strict: true, module: ts.ModuleKind.CommonJS, target: ts.ScriptTarget.ES2020, esModuleInterop: true, allowJs: false, noEmit: true });
const checker = program.getTypeChecker();

/** Symbols some other file imports or re-exports (resolved to their declaration). */
const used = new Set();
const resolveAlias = (sym) => (sym && sym.flags & ts.SymbolFlags.Alias ? checker.getAliasedSymbol(sym) : sym);
for (const sf of program.getSourceFiles()) {
  if (sf.isDeclarationFile || !tsFiles.includes(resolve(sf.fileName))) continue;
  ts.forEachChild(sf, function visit(node) {
    if (ts.isImportSpecifier(node) || ts.isExportSpecifier(node) || ts.isImportClause(node) || ts.isNamespaceImport(node)) {
      const sym = checker.getSymbolAtLocation(node.name ?? node);
      if (sym) used.add(resolveAlias(sym));
    }
    if (ts.isExportDeclaration(node) && !node.exportClause && node.moduleSpecifier) {
      // export * from './x': everything of x is part of the surface
      const mod = checker.getSymbolAtLocation(node.moduleSpecifier);
      if (mod) for (const s of checker.getExportsOfModule(mod)) used.add(resolveAlias(s));
    }
    if (ts.isPropertyAccessExpression(node) && ts.isIdentifier(node.expression)) {
      // ns.name through `import * as ns`
      const sym = checker.getSymbolAtLocation(node.name);
      if (sym) used.add(resolveAlias(sym));
    }
    ts.forEachChild(node, visit);
  });
}

/** Names used by JavaScript files (benchmarks, scripts, notebooks) through require() or `q.name`. */
const jsText = [...listFiles(join(ROOT, 'bench'), ['.js']), ...listFiles(join(ROOT, 'scripts'), ['.js']), ...listFiles(join(ROOT, 'notebooks'), ['.ipynb']), join(ROOT, 'bin', 'quadrat.js')]
  .filter(existsSync).map((f) => readFileSync(f, 'utf8')).join('\n');
const jsNames = new Set(jsText.match(/[A-Za-z_$][\w$]*/g) ?? []);
/** Files loaded by path at run time (worker threads) export to their loader. */
const workerEntry = (file) => /worker\.ts$/.test(file);

const unused = [];
for (const file of listFiles(LIB, ['.ts'])) {
  if (file === join(LIB, 'index.ts') || workerEntry(file)) continue;
  const sf = program.getSourceFile(file);
  const mod = sf && checker.getSymbolAtLocation(sf);
  if (!mod) continue;
  for (const sym of checker.getExportsOfModule(mod)) {
    const target = resolveAlias(sym);
    if (used.has(target) || used.has(sym)) continue;
    if (jsNames.has(sym.name)) continue;
    // types and interfaces name the parameters and results of exported functions: only values count
    if (!(target.flags & ts.SymbolFlags.Value)) continue;
    unused.push(`${relative(ROOT, file)}: ${sym.name}`);
  }
}

if (unused.length) {
  for (const u of unused) console.error(`unused export: ${u}`);
  console.error(`${unused.length} export(s) nothing imports: remove them or drop the export keyword`);
  process.exit(1);
}
console.log('exports: every export of kernel-lib/ is imported somewhere');
