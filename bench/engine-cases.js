'use strict';
// Generated (invented) data sets for the engine benchmark, from the project's own seeded streams.
const { createStream } = require('../dist/random/stream');

function toCsv(columns) {
  const names = Object.keys(columns);
  const n = columns[names[0]].length;
  const lines = [names.join(',')];
  for (let i = 0; i < n; i++) lines.push(names.map((c) => columns[c][i]).join(','));
  return lines.join('\n') + '\n';
}

function intercept(n, groups, seed) {
  const s = createStream('bench', 'intercept', n, seed);
  const b = Array.from({ length: groups }, () => s.normal());
  const g = [], x = [], y = [];
  for (let i = 0; i < n; i++) {
    const l = i % groups;
    const xi = s.normal();
    g.push(`g${String(l).padStart(3, '0')}`); x.push(xi.toFixed(6)); y.push((2 + 0.5 * xi + b[l] + s.normal()).toFixed(6));
  }
  return { columns: { g, x, y }, kind: 'intercept', model: { response: 'y', fixed: ['x'], groups: [{ factor: 'g', as: 'random' }] } };
}

function crossed(seed) {
  const s = createStream('bench', 'crossed', seed);
  const bs = Array.from({ length: 6 }, () => s.normal());
  const by = Array.from({ length: 4 }, () => 0.5 * s.normal());
  const site = [], year = [], rain = [], y = [];
  for (let a = 0; a < 6; a++) for (let t = 0; t < 4; t++) for (let k = 0; k < 5; k++) {
    const r = s.normal();
    site.push(`s${a}`); year.push(String(2020 + t)); rain.push(r.toFixed(6)); y.push((1 + 0.4 * r + bs[a] + by[t] + s.normal()).toFixed(6));
  }
  return { columns: { site, year, rain, y }, kind: 'crossed', model: { response: 'y', fixed: ['rain'], groups: [{ factor: 'site', as: 'random' }, { factor: 'year', as: 'random' }] } };
}

function slope(seed) {
  const s = createStream('bench', 'slope', seed);
  const g = [], x = [], y = [];
  for (let l = 0; l < 8; l++) {
    const b0 = s.normal();
    const b1 = 0.3 * b0 + 0.4 * s.normal();
    for (let k = 0; k < 10; k++) {
      const xi = s.normal();
      g.push(`g${l}`); x.push(xi.toFixed(6)); y.push((5 + b0 + (0.7 + b1) * xi + 0.8 * s.normal()).toFixed(6));
    }
  }
  return { columns: { g, x, y }, kind: 'slope', model: { response: 'y', fixed: ['x'], groups: [{ factor: 'g', as: 'random', slopes: ['x'], correlated: true }] } };
}

function engineCases() {
  return [
    { name: 'random intercept, n = 30 (6 groups)', ...intercept(30, 6, 1) },
    { name: 'random intercept, n = 120 (12 groups)', ...intercept(120, 12, 2) },
    { name: 'random intercept, n = 1000 (50 groups)', ...intercept(1000, 50, 3) },
    { name: 'crossed site x year (6 x 4 x 5)', ...crossed(4) },
    { name: 'correlated random slope (8 groups x 10)', ...slope(5) },
  ];
}

module.exports = { engineCases, toCsv };
