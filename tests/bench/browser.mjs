// Browser figures for `cargo xtask bench`, measured in Debian's headless Chromium through
// playwright-core (which never downloads a browser of its own):
//   1. first-load weight of a page: every response the page actually receives, each body gzipped
//      at level 9, summed (what a static host with gzip would send);
//   2. navigation start to the first computed result (the widget's first `railnote-result` event
//      with state "ready"), and to the frame after it (painted), over several cold loads;
//   3. an edit to a painted result: set a field's text, dispatch `input`, wait for the
//      `railnote-result` event, then for the next animation frame plus a task (the frame in which
//      the new result is painted), over many edits. p50/p95 are printed. These are benchmarks:
//      nothing here fails on time.
//
// Usage: node tests/bench/browser.mjs BASE_URL PAGE [EDITS=50] [LOADS=10]
//   e.g. node tests/bench/browser.mjs http://127.0.0.1:8000/ linear.html
import { chromium } from 'playwright-core';
import { gzipSync } from 'node:zlib';

const [base, pagePath, editsArg, loadsArg] = process.argv.slice(2);
if (!base || !pagePath) {
  console.error('usage: node tests/bench/browser.mjs BASE_URL PAGE [EDITS] [LOADS]');
  process.exit(2);
}
const EDITS = Number(editsArg ?? 50);
const LOADS = Number(loadsArg ?? 10);
const url = new URL(pagePath, base).href;
const origin = new URL(base).origin;
const READY_TIMEOUT_MS = 30_000;

function quantile(sorted, q) {
  // Nearest-rank on the sorted sample.
  const i = Math.min(sorted.length - 1, Math.max(0, Math.ceil(q * sorted.length) - 1));
  return sorted[i];
}
function summary(label, values) {
  const s = [...values].sort((a, b) => a - b);
  const f = (x) => x.toFixed(1).padStart(7);
  console.log(
    `${label.padEnd(44)} p50 ${f(quantile(s, 0.5))} ms   p95 ${f(quantile(s, 0.95))} ms   ` +
      `min ${f(s[0])} ms   max ${f(s[s.length - 1])} ms   (n = ${s.length})`,
  );
}

// Records, from the page's own clock (performance.now() counts from navigation start), when the
// first result arrived and the frame after it.
const INIT = `
  window.__rnBench = { first: null, painted: null, state: null };
  document.addEventListener('railnote-result', (e) => {
    const b = window.__rnBench;
    if (b.first !== null) return;
    b.state = e.detail && e.detail.state;
    b.first = performance.now();
    requestAnimationFrame(() => setTimeout(() => { b.painted = performance.now(); }, 0));
  }, true);
`;

const browser = await chromium.launch({
  executablePath: '/usr/bin/chromium',
  headless: true,
  // Nothing may leave the machine: every host name fails to resolve (the site is on 127.0.0.1).
  args: ['--host-resolver-rules=MAP * ~NOTFOUND, EXCLUDE 127.0.0.1'],
});
let failed = false;
try {
  // 1. First-load weight. Contexts block the service worker: its background precache of the
  // whole site (for offline use) is not part of what a page needs to show its check.
  {
    const context = await browser.newContext({ serviceWorkers: 'block' });
    const page = await context.newPage();
    const responses = [];
    const problems = [];
    page.on('response', (r) => responses.push(r));
    page.on('requestfailed', (r) => problems.push(`request failed: ${r.url()} (${r.failure()?.errorText})`));
    page.on('pageerror', (e) => problems.push(`page error: ${e.message}`));
    await page.addInitScript(INIT);
    await page.goto(url);
    await page.waitForFunction(() => window.__rnBench.painted !== null, null, { timeout: READY_TIMEOUT_MS });
    await page.waitForLoadState('networkidle');
    const state = await page.evaluate(() => window.__rnBench.state);
    // One row per file: Chromium may ask twice for the same file (the favicon, say); a file
    // weighs once in the first load.
    const rows = [];
    const seen = new Map();
    for (const r of responses) {
      const u = r.url();
      if (!u.startsWith(origin)) problems.push(`request outside the site: ${u}`);
      if (r.status() >= 300 && r.status() < 400) continue; // a redirect carries no file
      if (seen.has(u)) {
        seen.get(u).times += 1;
        continue;
      }
      const body = await r.body();
      const row = { path: u.slice(origin.length), status: r.status(), raw: body.length, gz: gzipSync(body, { level: 9 }).length, times: 1 };
      seen.set(u, row);
      rows.push(row);
    }
    rows.sort((a, b) => b.gz - a.gz);
    console.log(`first load of ${url} (widget state after load: ${state})`);
    for (const row of rows) {
      const again = row.times > 1 ? `  (requested ${row.times}×, counted once)` : '';
      console.log(`  ${String(row.gz).padStart(8)} B gzip  ${String(row.raw).padStart(8)} B raw  ${row.status}  ${row.path}${again}`);
    }
    const raw = rows.reduce((a, r) => a + r.raw, 0);
    const gz = rows.reduce((a, r) => a + r.gz, 0);
    console.log(`  ${String(gz).padStart(8)} B gzip  ${String(raw).padStart(8)} B raw  total over ${rows.length} files (${(gz / 1024).toFixed(1)} KiB gzip)`);
    for (const p of problems) console.log(`  WARNING: ${p}`);
    if (state !== 'ready') {
      console.log(`  the widget ended in state ${state}, not "ready": the timings below would be meaningless`);
      failed = true;
    }
    await context.close();
  }

  if (!failed) {
    // 2. Navigation to the first computed result, cold (a new context has an empty cache).
    const first = [];
    const painted = [];
    for (let i = 0; i < LOADS; i++) {
      const context = await browser.newContext({ serviceWorkers: 'block' });
      const page = await context.newPage();
      await page.addInitScript(INIT);
      await page.goto(url);
      await page.waitForFunction(() => window.__rnBench.painted !== null, null, { timeout: READY_TIMEOUT_MS });
      const b = await page.evaluate(() => window.__rnBench);
      first.push(b.first);
      painted.push(b.painted);
      await context.close();
    }
    summary('navigation start -> first result', first);
    summary('navigation start -> first result painted', painted);

    // 3. Edit to painted result, on one page.
    const context = await browser.newContext({ serviceWorkers: 'block' });
    const page = await context.newPage();
    await page.goto(url);
    await page.waitForSelector('railnote-linear[data-state="ready"]', { timeout: READY_TIMEOUT_MS });
    const times = await page.evaluate(async (edits) => {
      const el = document.querySelector('railnote-linear');
      const input = el.querySelector('input[name="iout-max"]');
      if (!input) throw new Error('no iout-max field in <railnote-linear>');
      const computed = [];
      const shown = [];
      for (let i = 0; i < edits; i++) {
        // A different, valid load each time (250 mA … 289 mA), so every edit recomputes.
        const text = `${250 + (i % 40)} mA`;
        const done = new Promise((resolve) => el.addEventListener('railnote-result', resolve, { once: true }));
        const t0 = performance.now();
        input.value = text;
        input.dispatchEvent(new Event('input', { bubbles: true }));
        const event = await done;
        const t1 = performance.now();
        if (event.detail.state !== 'ready') throw new Error(`edit ${text} gave state ${event.detail.state}`);
        await new Promise((resolve) => requestAnimationFrame(() => setTimeout(resolve, 0)));
        computed.push(t1 - t0);
        shown.push(performance.now() - t0);
        // Let the page go idle (debounced URL update) before the next edit.
        await new Promise((resolve) => setTimeout(resolve, 30));
      }
      return { computed, shown };
    }, EDITS);
    summary('input event -> result rendered (sync)', times.computed);
    summary('input event -> result painted (next frame)', times.shown);
    await context.close();
  }
} finally {
  await browser.close();
}
process.exit(failed ? 1 : 0);
