// WASM timing of the linear rail check, for `cargo xtask bench`. Same batch as the native
// core/examples/bench_linear.rs: N checks of the demo rail with the load and the highest input
// nudged per iteration, built before the clock starts. Prints one JSON line:
// {"runner":"wasm","n":N,"totalNs":…,"nsPerCheck":…,"checksum":…} — the checksum is the sum of
// worst.tjC and must equal the native one when both ran the same inputs.
//
// Usage: node tests/bench/wasm_linear.mjs [N]   (after `cargo xtask build`)
import { readFileSync } from 'node:fs';
import { performance } from 'node:perf_hooks';
import { initSync, checkLinear } from '../../site/pkg/railnote.js';

const n = Number(process.argv[2] ?? 20000);
if (!Number.isInteger(n) || n <= 0) {
  console.error('usage: node tests/bench/wasm_linear.mjs [N > 0]');
  process.exit(2);
}

initSync({ module: readFileSync(new URL('../../site/pkg/railnote_bg.wasm', import.meta.url)) });

// The i-th input; keep in step with `fn input` in core/examples/bench_linear.rs.
function input(i) {
  return {
    vinMin: 4.85,
    vinNom: 5.0,
    vinMax: 5.15 + (i % 7) * 0.01,
    vout: 3.3,
    voutTolPct: 2,
    ioutMax: 0.25 + (i % 50) * 0.0005,
    ioutTyp: 0.03,
    iq: 50e-6,
    gndPct: 1,
    dropoutModel: 'resistive',
    dropoutV: 0.3,
    dropoutAtA: 0.3,
    ratedA: 0.3,
    thetaJa: 100,
    taMax: 60,
    tjMax: 125,
    headroomMarginV: 0.3,
    thermalMarginC: 15,
  };
}

const inputs = Array.from({ length: n }, (_, i) => input(i));
// Warm-up, as the native side does: lets the JS engine tier up the glue.
for (let i = 0; i <= Math.floor(n / 10); i++) checkLinear(inputs[i]);

let checksum = 0;
const start = performance.now();
for (const x of inputs) checksum += checkLinear(x).worst.tjC;
const totalNs = Math.round((performance.now() - start) * 1e6);
console.log(
  JSON.stringify({
    runner: 'wasm',
    n,
    totalNs,
    nsPerCheck: Number((totalNs / n).toFixed(1)),
    checksum: Number(checksum.toFixed(9)),
  }),
);
