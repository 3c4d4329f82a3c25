// Speed of the normal samplers and generators in kernel-lib/random (run `npm run build` first).
// Usage: node bench/normal-speed.js [draws]
'use strict';
const seedrandom = require('seedrandom');
const { createStream } = require('../dist/random/stream');
const { createPolarSampler } = require('../dist/random/normal');

const draws = Number(process.argv[2] || 5e6);

function time(label, fn) {
  fn(draws / 10); // warm up the optimiser
  const t0 = process.hrtime.bigint();
  const sink = fn(draws);
  const ns = Number(process.hrtime.bigint() - t0) / draws;
  console.log(`${label.padEnd(34)} ${ns.toFixed(2)} ns/draw   (checksum ${sink.toFixed(3)})`);
}

const s1 = createStream(1, 'bench');
time('xoshiro128** uniform', (n) => { let a = 0; for (let i = 0; i < n; i++) a += s1.uniform(); return a; });
const xor4096 = seedrandom.xor4096('1|bench');
time('seedrandom.xor4096 double', (n) => { let a = 0; for (let i = 0; i < n; i++) a += xor4096.double(); return a; });
const alea = seedrandom.alea('1|bench');
time('seedrandom.alea double', (n) => { let a = 0; for (let i = 0; i < n; i++) a += alea.double(); return a; });

const s2 = createStream(2, 'bench');
time('ziggurat normal (256 layers)', (n) => { let a = 0; for (let i = 0; i < n; i++) a += s2.normal(); return a; });
const s3 = createStream(3, 'bench');
const polar = createPolarSampler(() => s3.uniform());
time('polar normal', (n) => { let a = 0; for (let i = 0; i < n; i++) a += polar(); return a; });

const streams = Math.min(draws / 100, 1e5);
for (let r = 0; r < 2000; r++) createStream(42, 'warm-up', r).uniform();
const t0 = process.hrtime.bigint();
let c = 0;
for (let r = 0; r < streams; r++) c += createStream(42, 'scenario', r).uniform();
console.log(`${'createStream (derivation)'.padEnd(34)} ${(Number(process.hrtime.bigint() - t0) / streams / 1000).toFixed(2)} µs/stream   (checksum ${c.toFixed(3)})`);
