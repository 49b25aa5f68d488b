// WASM timing of the switching estimate's full sweep in headless Chromium, for `cargo xtask
// bench`. Same batch as the native core/examples/bench_switching.rs: N calls of checkSwitching
// with the demo buck (invented scenario: the logger's 5.0 V, 0.8 A buck from its 12 V lead-acid
// battery; parts invented), the load nudged per call, built before the clock starts. Each call is
// a full report: three V_in corners and the efficiency sweep of 3 × 50 loads. It runs in the
// served site's index page through the page's own engine module (site/js/engine.js, which loads
// site/pkg), so the module, its glue and the browser are the ones a visitor gets; the time
// includes crossing the boundary both ways. Prints one JSON line:
// {"runner":"wasm-chromium","n":N,"points":150,"totalNs":…,"nsPerCheck":…,"checksum":…} — the
// checksum sums every sweep efficiency and must equal the native one.
// A benchmark: nothing here fails on time.
//
// Usage: node tests/bench/wasm_switching.mjs BASE_URL [N=2000]   (a server on site/ at BASE_URL)
import { chromium } from 'playwright-core';

const [base, nArg] = process.argv.slice(2);
const n = Number(nArg ?? 2000);
if (!base || !Number.isInteger(n) || n <= 0) {
  console.error('usage: node tests/bench/wasm_switching.mjs BASE_URL [N > 0]');
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
    // The i-th input; keep in step with `fn input` in core/examples/bench_switching.rs.
    const input = (i) => ({
      topology: 'buck',
      rectifier: 'synchronous',
      lightLoad: 'discontinuousAllowed',
      vinMin: 10.8,
      vinNom: 12.0,
      vinMax: 14.4,
      vout: 5.0,
      iout: 0.8 + (i % 50) * 0.001,
      fsw: 500e3,
      inductance: 22e-6,
      rippleRatioPct: 30,
      mainRdsOn: 0.1,
      rectRdsOn: 0.05,
      riseTime: 10e-9,
      fallTime: 10e-9,
      mainGateCharge: 5e-9,
      rectGateCharge: 5e-9,
      driveV: 5.0,
      deadTime: 20e-9,
      bodyDiodeVf: 0.7,
      coss: 200e-12,
      dcr: 0.05,
      coreLoss: 0.01,
      iq: 1e-3,
      cout: 22e-6,
      esr: 0.01,
      minOnTime: 100e-9,
      maxDutyPct: 90,
      isat: 1.5,
    });
    const inputs = Array.from({ length: n }, (_, i) => input(i));
    // Warm-up, as the native side does: lets the JS engine tier up the glue.
    for (let i = 0; i <= Math.floor(n / 10); i++) api.checkSwitching(inputs[i]);
    let checksum = 0;
    const start = performance.now();
    for (const x of inputs) {
      for (const curve of api.checkSwitching(x).sweep) {
        checksum += curve.efficiencyPct.reduce((a, b) => a + b, 0);
      }
    }
    const totalMs = performance.now() - start;
    return { totalMs, checksum };
  }, n);
  const totalNs = Math.round(result.totalMs * 1e6);
  console.log(
    JSON.stringify({
      runner: 'wasm-chromium',
      n,
      points: 150,
      totalNs,
      nsPerCheck: Number((totalNs / n).toFixed(1)),
      checksum: Number(result.checksum.toFixed(9)),
    }),
  );
} finally {
  await browser.close();
}
