// WASM timing of the divider picker in headless Chromium, for `cargo xtask bench`. Same two
// jobs as the native core/examples/bench_divider.rs, N runs each: an exhaustive E192/E192
// feedback search over 1 kΩ–1 MΩ (best 200 returned), and 100 000 Monte Carlo samples of one
// divider. It runs in the served site's index page through the page's own engine module
// (site/js/engine.js), so the time includes crossing the boundary both ways. Prints one JSON line
// per job: {"runner":"wasm-chromium","job":…,"n":N,"searched":…,"totalNs":…,"nsPerRun":…,
// "checksum":…}; the checksums must equal the native ones. A benchmark: nothing fails on time.
//
// Usage: node tests/bench/wasm_divider.mjs BASE_URL [N=20]   (a server on site/ at BASE_URL)
import { chromium } from 'playwright-core';

const [base, nArg] = process.argv.slice(2);
const n = Number(nArg ?? 20);
if (!base || !Number.isInteger(n) || n <= 0) {
  console.error('usage: node tests/bench/wasm_divider.mjs BASE_URL [N > 0]');
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
  const results = await page.evaluate(async (n) => {
    const { ready } = await import(new URL('js/engine.js', document.baseURI).href);
    const api = await ready;
    // Keep in step with `fn input` in core/examples/bench_divider.rs.
    const input = (job, i) => {
      const search = job === 'search';
      const x = {
        mode: search ? 'feedback' : 'reverse',
        topology: 'feedback',
        seriesTop: 'E192',
        seriesBottom: 'E192',
        tolTopPct: 1,
        tolBottomPct: 1,
        tcrTopPpm: 100,
        tcrBottomPpm: 100,
        tempMin: -20,
        tempMax: 60,
        rMin: 1e3,
        rMax: 1e6,
        currentMin: 1e-9,
        currentMax: 1,
        windowPct: 3,
        limit: 200,
        vref: 0.8,
        vrefTolPct: 1,
        pinCurrentMin: -50e-9,
        pinCurrentMax: 50e-9,
        voutTarget: 3.3 + 0.001 * (i % 7),
        mcSeed: i + 1,
        mcDistribution: 'normal',
      };
      if (!search) Object.assign(x, { rTop: 75e3, rBottom: 24e3, mcSamples: 100000 });
      return x;
    };
    const out = [];
    for (const job of ['search', 'montecarlo']) {
      const inputs = Array.from({ length: n }, (_, i) => input(job, i));
      for (let i = 0; i <= Math.floor(n / 10); i++) api.checkDivider(inputs[i]);
      let checksum = 0;
      let searched = 0;
      const start = performance.now();
      for (const x of inputs) {
        const r = api.checkDivider(x);
        searched = r.searched;
        checksum += r.monteCarlo ? r.monteCarlo.mean : r.candidates[0].vout;
      }
      out.push({ job, totalMs: performance.now() - start, checksum, searched });
    }
    return out;
  }, n);
  for (const r of results) {
    const totalNs = Math.round(r.totalMs * 1e6);
    console.log(
      JSON.stringify({
        runner: 'wasm-chromium',
        job: r.job,
        n,
        searched: r.searched,
        totalNs,
        nsPerRun: Number((totalNs / n).toFixed(1)),
        checksum: Number(r.checksum.toFixed(9)),
      }),
    );
  }
} finally {
  await browser.close();
}
