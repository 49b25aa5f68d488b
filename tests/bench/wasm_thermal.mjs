// WASM timing of a long junction-temperature series in headless Chromium, for `cargo xtask
// bench`. Same batch as the native core/examples/bench_thermal.rs: N calls of checkThermal with an
// invented eight-stage Foster network and a 50-step power profile repeated 200 times (a
// 10 000-step T_j(t) series each), built before the clock starts. It runs in the served site's
// index page through the page's own engine module (site/js/engine.js, which loads site/pkg), so
// the module, its glue and the browser are the ones a visitor gets; the time includes crossing the
// boundary both ways (reading the input object, writing the report with its series of up to 4000
// points). Prints one JSON line:
// {"runner":"wasm-chromium","n":N,"steps":10000,"totalNs":…,"nsPerCheck":…,"checksum":…} — the
// checksum sums seriesPeakC and the last series temperature and must equal the native one.
// A benchmark: nothing here fails on time.
//
// Usage: node tests/bench/wasm_thermal.mjs BASE_URL [N=200]   (a server on site/ at BASE_URL)
import { chromium } from 'playwright-core';

const [base, nArg] = process.argv.slice(2);
const n = Number(nArg ?? 200);
if (!base || !Number.isInteger(n) || n <= 0) {
  console.error('usage: node tests/bench/wasm_thermal.mjs BASE_URL [N > 0]');
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
    // The i-th input; keep in step with `fn input` in core/examples/bench_thermal.rs.
    const foster = [
      [0.3, 20e-6],
      [0.7, 200e-6],
      [1.5, 1e-3],
      [3.0, 5e-3],
      [6.0, 20e-3],
      [12.0, 100e-3],
      [16.5, 0.5],
      [20.0, 2.0],
    ].map(([r, tau]) => ({ r, tau }));
    const input = (i) => ({
      powerW: 0.5,
      taMax: 60,
      taMin: -20,
      tjMax: 125,
      marginC: 15,
      path: 'ja',
      thetaJa: 60,
      foster,
      profile: Array.from({ length: 50 }, (_, k) => ({
        powerW: k === 0 ? 1.0 + (i % 7) * 0.01 : 0.1 * (((k * 7) % 10) + 1),
        durationS: 1e-3 * ((k % 5) + 1),
      })),
      profilePeriods: 200,
    });
    const inputs = Array.from({ length: n }, (_, i) => input(i));
    // Warm-up, as the native side does: lets the JS engine tier up the glue.
    for (let i = 0; i <= Math.floor(n / 10); i++) api.checkThermal(inputs[i]);
    let checksum = 0;
    const start = performance.now();
    for (const x of inputs) {
      const t = api.checkThermal(x).transient;
      checksum += t.seriesPeakC + t.series[t.series.length - 1][1];
    }
    const totalMs = performance.now() - start;
    return { totalMs, checksum, steps: inputs[0].profile.length * inputs[0].profilePeriods };
  }, n);
  const totalNs = Math.round(result.totalMs * 1e6);
  console.log(
    JSON.stringify({
      runner: 'wasm-chromium',
      n,
      steps: result.steps,
      totalNs,
      nsPerCheck: Number((totalNs / n).toFixed(1)),
      checksum: Number(result.checksum.toFixed(9)),
    }),
  );
} finally {
  await browser.close();
}
