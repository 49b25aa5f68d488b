// WASM timing of the rail tree in headless Chromium, for `cargo xtask bench`. The same invented
// tree as the native core/examples/bench_tree.rs (200 rails, 1000 loads), checked N times through
// the page's own engine module (site/js/engine.js), the time including both boundary crossings.
// Prints one JSON line: {"runner":"wasm-chromium","n":N,"rails":200,"loads":1000,"totalNs":…,
// "nsPerRun":…,"checksum":…}; the checksum must equal the native one. Nothing fails on time.
//
// Usage: node tests/bench/wasm_tree.mjs BASE_URL [N=20]   (a server on site/ at BASE_URL)
import { chromium } from 'playwright-core';

const [base, nArg] = process.argv.slice(2);
const n = Number(nArg ?? 20);
if (!base || !Number.isInteger(n) || n <= 0) {
  console.error('usage: node tests/bench/wasm_tree.mjs BASE_URL [N > 0]');
  process.exit(2);
}

const browser = await chromium.launch({
  executablePath: '/usr/bin/chromium',
  headless: true,
  // Nothing may leave the machine: every host name fails to resolve (the site is on 127.0.0.1).
  args: ['--host-resolver-rules=MAP * ~NOTFOUND, EXCLUDE 127.0.0.1'],
});
try {
  const page = await browser.newPage();
  page.on('pageerror', (e) => console.error(`page error: ${e.message}`));
  await page.goto(new URL('index.html', base).href);
  const result = await page.evaluate(async (n) => {
    const { ready } = await import(new URL('js/engine.js', document.baseURI).href);
    const api = await ready;
    // Keep in step with `fn tree` in core/examples/bench_tree.rs.
    const tree = (i) => {
      const rails = [];
      const leaves = [];
      for (let b = 0; b < 20; b++) {
        const buck = `B${b}`;
        rails.push({ name: buck, parent: 'Source', kind: 'switching', vout: 5, efficiencyPct: 90, iq: 1e-3 });
        for (let k = 0; k < 4; k++) {
          const name = `L${b}.${k}`;
          rails.push({ name, parent: buck, kind: 'linear', vout: 3.3, dropoutV: 0.3, iq: 50e-6, thetaJa: 100 });
          leaves.push(name);
        }
        for (let k = 0; k < 5; k++) {
          const name = `S${b}.${k}`;
          rails.push({ name, parent: buck, kind: 'switch', rOn: 0.05 });
          leaves.push(name);
        }
      }
      const loads = Array.from({ length: 1000 }, (_, k) => {
        const typ = 1e-3 * (1 + (k % 7));
        const l = { name: `Load ${k}`, rail: leaves[k % leaves.length], activityPct: 10 + (k % 9) * 10, sleepA: 1e-6 };
        if (k % 2 === 1) Object.assign(l, { typW: typ, peakW: 3 * typ });
        else Object.assign(l, { typA: typ, peakA: 3 * typ });
        return l;
      });
      return {
        version: 1,
        taMax: 50,
        sources: [{ name: 'Source', vMin: 20, vNom: 24 + 0.01 * (i % 7), vMax: 28, capacityMah: 10000, currentLimitA: 10 }],
        rails,
        loads,
      };
    };
    const inputs = Array.from({ length: n }, (_, i) => tree(i));
    for (let i = 0; i <= Math.floor(n / 10); i++) api.checkTree(inputs[i]);
    let checksum = 0;
    const start = performance.now();
    for (const x of inputs) checksum += api.checkTree(x).corners[1].sourceW.avg;
    return { totalMs: performance.now() - start, checksum };
  }, n);
  const totalNs = Math.round(result.totalMs * 1e6);
  console.log(JSON.stringify({
    runner: 'wasm-chromium', n, rails: 200, loads: 1000, totalNs,
    nsPerRun: Number((totalNs / n).toFixed(1)), checksum: Number(result.checksum.toFixed(9)),
  }));
} finally {
  await browser.close();
}
