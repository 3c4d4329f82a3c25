#!/usr/bin/env node
'use strict';
/**
 * Writes the project's Jupyter kernelspec "quadrat-ts" (display name "TypeScript (Quadrat)")
 * to notebooks/.kernel/kernels/quadrat-ts/kernel.json. Nothing outside the project is
 * touched: Jupyter finds the kernel when JUPYTER_PATH includes notebooks/.kernel, which
 * scripts/render-notebook.js sets; for JupyterLab run
 *   JUPYTER_PATH=$PWD/notebooks/.kernel jupyter lab
 * The kernel runs scripts/kernel-launch.js with this Node binary, which starts the project's
 * tslab with the project root as working directory.
 *
 * Usage: node scripts/register-kernel.js   (prints the kernelspec path and the JUPYTER_PATH to use)
 */
const path = require('node:path');
const fs = require('node:fs');

const ROOT = path.resolve(__dirname, '..');
const KERNEL_NAME = 'quadrat-ts';
const JUPYTER_PATH_DIR = path.join(ROOT, 'notebooks', '.kernel');

function kernelSpec() {
  return {
    argv: [process.execPath, path.join(ROOT, 'scripts', 'kernel-launch.js'), '{connection_file}'],
    display_name: 'TypeScript (Quadrat)',
    language: 'typescript',
    interrupt_mode: 'signal',
    metadata: { quadrat: { root: ROOT } },
  };
}

/**
 * Write the kernelspec unless an identical one is there. Returns where it is and whether it changed.
 * `jupyterPath` is the folder that gets kernels/quadrat-ts/ (default notebooks/.kernel; a test
 * passes a temporary Jupyter data folder).
 */
function registerKernel(jupyterPath = JUPYTER_PATH_DIR) {
  const tslab = path.join(ROOT, 'node_modules', 'tslab', 'dist', 'main.js');
  if (!fs.existsSync(tslab)) {
    throw new Error(`tslab is not installed (${path.relative(ROOT, tslab)} missing); run "npm install" first`);
  }
  const kernelDir = path.join(jupyterPath, 'kernels', KERNEL_NAME);
  const file = path.join(kernelDir, 'kernel.json');
  const text = JSON.stringify(kernelSpec(), null, 2) + '\n';
  let changed = true;
  try {
    changed = fs.readFileSync(file, 'utf8') !== text;
  } catch {
    // not written yet
  }
  if (changed) {
    fs.mkdirSync(kernelDir, { recursive: true });
    fs.writeFileSync(file, text);
  }
  return { kernelName: KERNEL_NAME, kernelFile: file, jupyterPath, changed };
}

module.exports = { registerKernel, kernelSpec, KERNEL_NAME, JUPYTER_PATH_DIR, ROOT };

if (require.main === module) {
  try {
    const r = registerKernel();
    console.log(`${r.changed ? 'Wrote' : 'Up to date:'} ${path.relative(process.cwd(), r.kernelFile)}`);
    console.log(`Use it with: JUPYTER_PATH=${r.jupyterPath} jupyter lab   (kernel "${r.kernelName}")`);
  } catch (err) {
    console.error(`register-kernel: ${err.message}`);
    process.exit(1);
  }
}
