// No phoning home: every page, and the embed page with each calculator (on its own and inside a
// made-up host page), is loaded and used a little, while every request of the browser context
// (pages, iframes, module imports, the wasm, fetches) goes through one route that records its URL
// and aborts anything outside the test server's origin. The test fails on any such request.
//
// Chromium runs with browser.mjs's flags (--disable-background-networking,
// --disable-component-update, --disable-sync, --no-first-run): the browser's own background
// traffic is not the site's and does not pass through pages anyway.
import { test, before, after } from 'node:test';
import assert from 'node:assert/strict';
import { launch, url, settled, field, openEmbedHost, ORIGIN } from './browser.mjs';

/** Each page, its calculator element, and a field with another good value to type. */
const PAGES = [
  ['index.html', null], ['reference.html', null],
  ['linear.html', 'railnote-linear', 'vout', '2.5 V'],
  ['thermal.html', 'railnote-thermal', 'power', '0.3 W'],
  ['divider.html', 'railnote-divider', 'vout-target', '2.5 V'],
  ['switching.html', 'railnote-switching', 'fsw', '1 MHz'],
  ['compare.html', 'railnote-compare', 'iout', '0.2 A'],
  ['tree.html', 'railnote-tree', 'loads[0].peakA', '200 mA'],
  ['embed.html?calc=linear', 'railnote-linear', 'vout', '2.5 V'],
  ['embed.html?calc=thermal', 'railnote-thermal', 'power', '0.3 W'],
  ['embed.html?calc=divider', 'railnote-divider', 'vout-target', '2.5 V'],
  ['embed.html?calc=switching', 'railnote-switching', 'fsw', '1 MHz'],
  ['embed.html?calc=compare', 'railnote-compare', 'iout', '0.2 A'],
  ['embed.html?calc=tree', 'railnote-tree', 'loads[0].peakA', '200 mA'],
];

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser?.close(); });

/**
 * A context whose every request is recorded twice: by a route over all URLs (which aborts those
 * outside ORIGIN) and by the context's request event (which also sees any request a route might
 * not). Returns { context, routed, requested, outside() }.
 */
async function recordingContext() {
  // Service workers blocked: a request a service worker answers (or makes) passes neither a
  // route nor the request event, so with one in the way silence would prove nothing. What a
  // service worker itself fetches needs a test of its own.
  const context = await browser.newContext({ viewport: { width: 1280, height: 900 }, serviceWorkers: 'block' });
  const routed = [];
  const requested = [];
  await context.route('**/*', (route) => {
    const u = route.request().url();
    routed.push(u);
    return new URL(u).origin === ORIGIN ? route.continue() : route.abort('blockedbyclient');
  });
  context.on('request', (r) => { if (!r.url().startsWith('data:')) requested.push(r.url()); });
  const outside = () => [...new Set([...routed, ...requested])].filter((u) => new URL(u).origin !== ORIGIN);
  return { context, routed, requested, outside };
}

test('the recorder sees a request outside the origin (so silence below means something)', async () => {
  const { context, routed, requested, outside } = await recordingContext();
  const page = await context.newPage();
  await page.goto('about:blank');
  await page.evaluate(() => fetch('http://phone-home.invalid/ping').catch(() => 'refused'));
  assert.deepEqual(outside(), ['http://phone-home.invalid/ping']);
  assert.ok(routed.includes('http://phone-home.invalid/ping') && requested.includes('http://phone-home.invalid/ping'), 'both recorders saw it');
  await context.close();
});

test('no page requests anything outside the site while it is used', async (t) => {
  const { context, routed: seen, outside } = await recordingContext();
  const page = await context.newPage();
  for (const [p, tag, key, other] of PAGES) {
    const before = seen.length;
    await page.goto(url(p));
    if (tag) {
      await settled(page, 'ready', tag);
      await field(page, key, tag).fill(other);
      await settled(page, 'ready', tag);
      await field(page, key, tag).fill('abc');
      await settled(page, 'error', tag);
    }
    // Late requests (timers, lazy loads) get a moment.
    await page.waitForTimeout(300);
    const mine = seen.slice(before);
    assert.ok(mine.some((u) => u.endsWith(p.split('?')[0]) || u.includes(p)), `${p}: its own request was recorded`);
    if (tag) assert.ok(seen.some((u) => u.endsWith('/pkg/railnote_bg.wasm')), `${p}: the wasm came from the site`);
  }
  // The embeds inside a made-up host page (a wiki standing in), as they are used.
  for (const calc of ['linear', 'tree']) {
    const frame = await openEmbedHost(page, `no-network-${calc}`, `../embed.html?calc=${calc}`, 'railnote embed');
    await settled(frame, 'ready', calc === 'tree' ? 'railnote-tree' : 'railnote-linear');
    await page.waitForTimeout(300);
  }
  t.diagnostic(`${seen.length} requests, all to ${ORIGIN}; none elsewhere`);
  assert.deepEqual(outside(), [], 'requests outside the site');
  assert.ok(seen.every((u) => new URL(u).origin === ORIGIN), 'every recorded request went to the site');
  await context.close();
});
