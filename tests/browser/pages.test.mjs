// Every page: loads cleanly from its own origin only, shows the cautions, has no inline script or
// handler, and the reference's link-key tables match the widgets. Also screenshots linear.html in
// light, dark and print (tests/out/, git-ignored) for a person to look at (thermal.html's are
// taken in thermal.test.mjs, divider.html's in divider.test.mjs, switching.html's and compare.html's
// in their own test files).
import { test, before, after } from 'node:test';
import assert from 'node:assert/strict';
import path from 'node:path';
import { launch, open, url, assertSameOrigin, settled, field, OUT_DIR } from './browser.mjs';

const PAGES = ['index.html', 'linear.html', 'embed.html?calc=linear', 'thermal.html', 'embed.html?calc=thermal',
  'divider.html', 'embed.html?calc=divider',
  'switching.html', 'embed.html?calc=switching', 'compare.html', 'embed.html?calc=compare',
  'tree.html', 'embed.html?calc=tree', 'reference.html'];
/** The calculator element a page shows, if any. */
const TAG_OF = (p) => (/tree/.test(p) ? 'railnote-tree' : /thermal/.test(p) ? 'railnote-thermal' : /linear/.test(p) ? 'railnote-linear'
  : /divider/.test(p) ? 'railnote-divider'
  : /switching/.test(p) ? 'railnote-switching' : /compare/.test(p) ? 'railnote-compare' : null);
/** A field of each calculator the CSP test types into, with a good value for it. */
const PROBE = {
  'railnote-linear': ['vin-min', '4.85'], 'railnote-thermal': ['power', '0.49'],
  'railnote-divider': ['vref', '0.8'],
  'railnote-switching': ['fsw', '500k'], 'railnote-compare': ['iout', '250m'],
  'railnote-tree': ['loads[0].peakA', '250 mA'],
};
// The brief's cautions, in the words every page that can lead to hardware must carry.
const CAUTION_PHRASES = [/first-order/i, /datasheet/i, /measurement/i, /burn/i, /60 V DC/, /mains/i, /local codes/i, /licensed practice/i];

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser?.close(); });

test('each page loads with status 200, no errors, nothing fetched from elsewhere', async () => {
  const { context, page, requests, problems } = await open(browser);
  const failed = [];
  context.on('response', (r) => { if (r.status() >= 400) failed.push(`${r.status()} ${r.url()}`); });
  for (const p of PAGES) {
    const resp = await page.goto(url(p));
    assert.equal(resp.status(), 200, p);
    if (TAG_OF(p)) await settled(page, 'ready', TAG_OF(p));
    const info = await page.evaluate(() => ({
      inline: [...document.scripts].filter((s) => !s.src).length,
      handlers: [...document.querySelectorAll('*')].filter((el) => [...el.attributes].some((a) => /^on/i.test(a.name))).length,
      title: document.title,
      lang: document.documentElement.lang,
      text: document.body.innerText,
      links: [...document.querySelectorAll('a[href]')].map((a) => a.href).filter((h) => h.startsWith(location.origin)),
    }));
    assert.equal(info.inline, 0, `${p}: no inline scripts (the pages carry a CSP without unsafe-inline)`);
    assert.equal(info.handlers, 0, `${p}: no inline event handlers`);
    assert.ok(info.title.length > 5 && info.lang === 'en', `${p}: title and lang`);
    if (p !== 'reference.html') {
      for (const re of CAUTION_PHRASES) assert.match(info.text, re, `${p} shows the caution ${re}`);
    }
    // Internal links lead somewhere (checked without a browser navigation).
    for (const href of new Set(info.links)) {
      const target = href.split('#')[0];
      const res = await page.request.get(target);
      assert.equal(res.status(), 200, `${p} links to ${target}`);
    }
  }
  assert.deepEqual(failed, [], 'no failed requests (favicon included)');
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('the reference lists exactly the widget\'s link keys, with their API names', async () => {
  const { context, page } = await open(browser);
  await page.goto(url('reference.html'));
  const table = await page.evaluate(() => [...document.querySelectorAll('#url-key-table tbody tr')].map((tr) => [
    tr.cells[0].textContent.trim(), tr.cells[1].textContent.trim(),
  ]));
  const widget = await page.evaluate(async () => {
    const m = await import('./js/linear-widget.js');
    return m.FIELD_DEFS.map((d) => [d.key, d.prop]);
  });
  assert.deepEqual(table, widget);
  // Every API input key of the contract appears in the reference's checkLinear input table.
  const inputs = await page.evaluate(() => document.querySelector('#check-linear-input + .rn-table-scroll').textContent);
  for (const [, prop] of widget) assert.ok(inputs.includes(prop), `reference documents ${prop}`);
  await context.close();
});

test('the reference lists exactly the thermal widget\'s link keys, with their API names', async () => {
  const { context, page } = await open(browser);
  await page.goto(url('reference.html'));
  // Numbered rows (r1 … r8) sit in one table row with data-keys; the API name is the list's.
  const table = await page.evaluate(() => [...document.querySelectorAll('#thermal-url-key-table tbody tr')].flatMap((tr) => {
    const api = tr.cells[1].textContent.trim();
    const keys = tr.dataset.keys ? tr.dataset.keys.split(' ') : [tr.cells[0].textContent.trim()];
    return keys.map((k) => [k, api]);
  }));
  const widget = await page.evaluate(async () => {
    const m = await import('./js/thermal-widget.js');
    return m.FIELD_DEFS.map((d) => [d.key, d.apiName || d.prop]);
  });
  assert.deepEqual(table.slice().sort(), widget.slice().sort());
  const inputs = await page.evaluate(() => document.querySelector('#check-thermal-input + .rn-table-scroll').textContent);
  for (const [, api] of widget) assert.ok(inputs.includes(api.split('[')[0]), `reference documents ${api}`);
  await context.close();
});

test('the reference lists exactly the divider widget\'s link keys, with their API names', async () => {
  const { context, page } = await open(browser);
  await page.goto(url('reference.html'));
  const table = await page.evaluate(() => [...document.querySelectorAll('#divider-url-key-table tbody tr')].map((tr) => [
    tr.cells[0].textContent.trim(), tr.cells[1].textContent.trim(),
  ]));
  const widget = await page.evaluate(async () => {
    const m = await import('./js/divider-widget.js');
    return m.FIELD_DEFS.map((d) => [d.key, d.prop]);
  });
  assert.deepEqual(table, widget);
  // Every API input key the widget sends appears in the reference's checkDivider input table.
  const inputs = await page.evaluate(() => document.querySelector('#check-divider-input + .rn-table-scroll').textContent);
  for (const [, prop] of widget) assert.ok(inputs.includes(prop), `reference documents ${prop}`);
  await context.close();
});
for (const [calc, tableId, inputId] of [['switching', 'switching-url-key-table', 'check-switching-input'], ['compare', 'compare-url-key-table', null]]) {
  test(`the reference lists exactly the ${calc} widget's link keys, with their API names`, async () => {
    const { context, page } = await open(browser);
    await page.goto(url('reference.html'));
    const table = await page.evaluate((id) => [...document.querySelectorAll(`#${id} tbody tr`)].map((tr) => [
      tr.cells[0].textContent.trim(), tr.cells[1].textContent.trim(), tr.cells[4].textContent.trim(),
    ]), tableId);
    const widget = await page.evaluate(async (name) => {
      const m = await import(`./js/${name}-widget.js`);
      return m.FIELD_DEFS.map((d) => [d.key, d.prop, d.def === '' ? 'empty' : d.def]);
    }, calc);
    assert.deepEqual(table, widget, 'keys, API names and defaults in the widget\'s order');
    // Every API input key appears in the reference's input tables (compareRails: its own table
    // for the keys it adds, checkSwitching's for the rest).
    const inputs = await page.evaluate(() => ['check-switching-input', 'compare-rails-input']
      .map((id) => document.querySelector(`#${id} + .rn-table-scroll`).textContent).join(' '));
    for (const [, prop] of widget) assert.ok(inputs.includes(prop), `reference documents ${prop}`);
    if (inputId) assert.ok(await page.locator(`#${inputId}`).count(), 'input table present');
    await context.close();
  });
}

test('keyboard: Tab reaches the fields with a visible focus ring, and Enter does not reload', async () => {
  const { context, page } = await open(browser);
  await page.goto(url('linear.html'));
  await settled(page, 'ready');
  let focusedName = '';
  for (let i = 0; i < 12 && focusedName !== 'vin-min'; i++) {
    await page.keyboard.press('Tab');
    focusedName = await page.evaluate(() => document.activeElement.getAttribute('name') || '');
  }
  assert.equal(focusedName, 'vin-min', 'the first field is reachable by keyboard');
  const outline = await page.evaluate(() => getComputedStyle(document.activeElement).outlineStyle);
  assert.notEqual(outline, 'none', 'focus is visible');
  await page.keyboard.type('x');
  await settled(page, 'error');
  const before = page.url();
  await page.keyboard.press('Enter');
  await page.waitForTimeout(200);
  assert.equal(await page.locator('railnote-linear').getAttribute('data-state'), 'error', 'still the same page state');
  assert.equal(page.url().split('?')[0], before.split('?')[0]);
  await context.close();
});

test('print shows inputs, verdict, link and date, and hides the buttons', async () => {
  const { context, page } = await open(browser);
  await page.goto(url('linear.html?vout=3V3'));
  await settled(page, 'ready');
  await page.emulateMedia({ media: 'print' });
  const seen = await page.evaluate(() => {
    const visible = (sel) => [...document.querySelectorAll(sel)].some((e) => e.getClientRects().length > 0 && getComputedStyle(e).visibility !== 'hidden');
    return {
      buttons: visible('button'),
      verdict: visible('.rn-verdict'),
      link: visible('.rn-permalink'),
      date: visible('.rn-record time'),
      inputs: visible('.rn-field input'),
      linkText: document.querySelector('.rn-permalink').textContent,
    };
  });
  assert.equal(seen.buttons, false, 'no buttons in print');
  assert.ok(seen.verdict && seen.link && seen.date && seen.inputs, JSON.stringify(seen));
  assert.match(seen.linkText, /linear\.html\?.*vout=3V3/);
  await page.screenshot({ path: path.join(OUT_DIR, 'linear-print.png'), fullPage: true });
  await context.close();
});

test('screenshots of linear.html, light and dark (for looking at)', async () => {
  for (const colorScheme of ['light', 'dark']) {
    const { context, page, requests } = await open(browser, { colorScheme });
    await page.goto(url('linear.html'));
    await settled(page, 'ready');
    const bg = await page.evaluate(() => getComputedStyle(document.documentElement).backgroundColor);
    // The schemes differ: light paper is bright, dark is dark (sum of RGB channels).
    const sum = bg.match(/\d+/g).slice(0, 3).map(Number).reduce((a, b) => a + b, 0);
    assert.ok(colorScheme === 'light' ? sum > 600 : sum < 150, `${colorScheme} background ${bg}`);
    await page.screenshot({ path: path.join(OUT_DIR, `linear-${colorScheme}.png`), fullPage: true });
    await page.locator('railnote-linear').screenshot({ path: path.join(OUT_DIR, `linear-widget-${colorScheme}.png`) });
    assertSameOrigin(requests);
    await context.close();
  }
});

test('the pages work under a strict Content-Security-Policy with Trusted Types', async () => {
  // Every page carries the site's policy as a meta (csp.test.mjs checks it exactly); a host can
  // add its own as a header, with what a meta cannot say (frame-ancestors). Both apply: this
  // adds such a header by intercepting the HTML. wasm-bindgen 0.2.130 glue needs only
  // 'wasm-unsafe-eval' (see /work/shared/wasm-notes.md).
  const policy = "default-src 'self'; script-src 'self' 'wasm-unsafe-eval'; style-src 'self'; img-src 'self'; "
    + "object-src 'none'; base-uri 'none'; form-action 'none'; frame-ancestors 'self'; require-trusted-types-for 'script'";
  const { context, page, requests, problems } = await open(browser);
  await context.addInitScript(() => {
    window.__violations = [];
    document.addEventListener('securitypolicyviolation', (e) => window.__violations.push(`${e.violatedDirective} ${e.blockedURI}`));
  });
  await context.route((u) => u.pathname.endsWith('.html'), async (route) => {
    const response = await route.fetch();
    await route.fulfill({ response, headers: { ...response.headers(), 'content-security-policy': policy } });
  });
  for (const p of ['linear.html?vout=3V3', 'embed.html?calc=linear', 'thermal.html?power=0.4', 'embed.html?calc=thermal',
    'divider.html?vout-target=1.8', 'embed.html?calc=divider',
    'switching.html?rectifier=diode', 'embed.html?calc=switching', 'compare.html?iout=0.2', 'embed.html?calc=compare',
    'tree.html', 'embed.html?calc=tree', 'index.html', 'reference.html']) {
    await page.goto(url(p));
    const tag = TAG_OF(p);
    if (tag) {
      const [key, good] = PROBE[tag];
      assert.equal(await settled(page, 'ready', tag), 'ready', `${p} computes under the policy`);
      await field(page, key, tag).fill('abc');
      assert.equal(await settled(page, 'error', tag), 'error');
      await field(page, key, tag).fill(good);
      assert.equal(await settled(page, 'ready', tag), 'ready');
    }
    assert.deepEqual(await page.evaluate(() => window.__violations), [], `${p}: no policy violations`);
  }
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('the shared chart module draws a log axis (as efficiency against load will need) in the browser', async () => {
  const { context, page, problems } = await open(browser);
  await page.goto(url('index.html'));
  const seen = await page.evaluate(async () => {
    const { renderChart } = await import('./js/chart.js');
    const { svg, legend } = renderChart({
      title: 'log test', description: 'a made-up efficiency curve against load',
      x: { type: 'log', domain: [2e-3, 0.8], label: 'load' },
      y: { domain: [40, 95], label: 'efficiency' },
      series: [
        { kind: 'line', dash: 'dashed', label: 'made-up curve', points: [[1e-3, 50], [0.01, 80], [0.1, 92], [1, 88]] },
        { kind: 'area', tone: 2, label: 'region', points: [[1e-4, 0], [10, 0], [10, 60], [1e-4, 60]] },
        { kind: 'marker', tone: 5, label: 'a point', points: [[0.05, 90], [0, 90]] },
      ],
    });
    document.body.append(svg, legend);
    return {
      xTicks: [...svg.querySelectorAll('.rn-chart-axes text')].map((t) => t.textContent),
      minor: svg.querySelectorAll('.rn-chart-grid line.rn-minor').length,
      paths: [...svg.querySelectorAll('path')].map((p) => p.getAttribute('d')),
      legend: [...legend.querySelectorAll('li')].map((li) => li.textContent),
      box: svg.getBoundingClientRect().width,
    };
  });
  // Decades 0.001 … 1 cover 2 mA … 0.8 A; labels from the default formatter.
  for (const t of ['0.001', '0.01', '0.1', '1']) assert.ok(seen.xTicks.includes(t), `decade tick ${t} in ${seen.xTicks}`);
  assert.ok(seen.minor >= 6, 'minor 2× and 5× lines over three decades');
  assert.ok(seen.paths.length >= 3 && seen.paths.every((d) => d && !/NaN|Infinity/.test(d)), 'finite paths; the zero-load marker is dropped');
  assert.deepEqual(seen.legend, ['made-up curve', 'region', 'a point']);
  assert.ok(seen.box > 100);
  assert.deepEqual(problems, []);
  await context.close();
});
