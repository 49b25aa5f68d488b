// The iframe embed page inside a host page of the same origin (served by page.route on a made-up
// path, so the host never exists on disk).
import { test, before, after } from 'node:test';
import assert from 'node:assert/strict';
import { launch, open, url, assertSameOrigin, settled, field, close } from './browser.mjs';

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser?.close(); });

function hostPage(src) {
  // The host page is a test fixture standing in for a wiki; its inline script is the kind of
  // sizing snippet linear.html#embed documents.
  return `<!doctype html><html><head><meta charset="utf-8"><title>host wiki page</title></head>
<body><h1>Design notes: 3.3 V rail</h1>
<iframe id="rn" src="${src}" title="Linear rail check" width="900" height="400" style="border:0"></iframe>
<script>
  window.heights = [];
  addEventListener('message', (e) => {
    if (e.data && e.data.type === 'railnote-height') {
      window.heights.push(e.data);
      document.getElementById('rn').style.height = e.data.height + 'px';
    }
  });
</script></body></html>`;
}

test('the embed renders a prefilled check inside an iframe and reports its height', async () => {
  const { context, page, requests, problems } = await open(browser);
  const hostUrl = url('made-up-host/notes.html');
  await page.route(hostUrl, (route) => route.fulfill({
    status: 200, contentType: 'text/html', body: hostPage(url('embed.html?calc=linear&vin-min=4.7&iout-max=200m')),
  }));
  await page.goto(hostUrl);
  const frame = page.frameLocator('#rn');
  assert.equal(await settled(frame, 'ready'), 'ready');
  assert.equal(await field(frame, 'vin-min').inputValue(), '4.7', 'the query prefills the embed');
  assert.equal(await field(frame, 'iout-max').inputValue(), '200m');
  const r = await frame.locator('railnote-linear').evaluate((el) => el.result);
  // Worked by hand from the brief's headroom relation: 4.7 − 3.3·1.02 − 0.3 V·(0.2/0.3) = 1.134 V;
  // T_j = 60 + 100·((5.15 − 3.234)·0.2 + 5.15·(50 µA + 1 %·0.2)) = 99.6 °C (JESD51 θJA relation).
  close(r.worst.headroomV, 1.134, 1e-9, 'headroom');
  close(r.worst.tjC, 60 + 100 * ((5.15 - 3.234) * 0.2 + 5.15 * (50e-6 + 0.01 * 0.2)), 1e-9, 'T_j');
  assert.ok(await frame.locator('.rn-verdict-word').textContent(), 'a verdict in words');

  await page.waitForFunction(() => window.heights.length > 0);
  const heights = await page.evaluate(() => window.heights);
  for (const m of heights) {
    assert.equal(m.type, 'railnote-height');
    assert.equal(m.calc, 'linear');
    assert.ok(Number.isFinite(m.height) && m.height > 300, `plausible height ${m.height}`);
  }
  // The host sized the iframe from the last message, and the content fits it.
  await page.waitForFunction(() => {
    const f = document.getElementById('rn');
    return window.heights.length && Math.abs(f.getBoundingClientRect().height - window.heights.at(-1).height) < 2;
  });

  // Editing inside the embed computes again; the error view is shorter, so a new, smaller
  // height is reported.
  const before = heights.at(-1).height;
  await field(frame, 'vin-min').fill('not a voltage');
  assert.equal(await settled(frame, 'error'), 'error');
  await page.waitForFunction((h) => window.heights.at(-1).height < h, before);
  await field(frame, 'vin-min').fill('4.85');
  assert.equal(await settled(frame, 'ready'), 'ready');
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('an embed link naming an unknown calculator says so, as text', async () => {
  const { context, page, requests } = await open(browser);
  await context.addInitScript(() => { window.__alerts = []; window.alert = (m) => window.__alerts.push(m); });
  await page.goto(url('embed.html?calc=%3Cimg%20src%3Dx%20onerror%3Dalert(1)%3E'));
  const box = page.locator('.rn-error-box');
  await box.waitFor();
  assert.match(await box.textContent(), /does not have \(“<img src=x onerror=alert\(1\)>”\)/);
  assert.equal(await page.locator('img').count(), 0);
  assert.deepEqual(await page.evaluate(() => window.__alerts), []);
  assertSameOrigin(requests);
  await context.close();
});

test('two <railnote-linear> elements on one host page take their attributes and stay independent', async () => {
  const { context, page, requests, problems } = await open(browser);
  const hostUrl = url('made-up-host/two-rails.html');
  // The demo's two regulators: the 3.3 V rail for the microcontroller and radio, and the 1.8 V
  // sensor front-end rail at 40 mA (brief's invented scenario), both from the 5.0 V buck.
  const body = `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>two rails</title>
<link rel="stylesheet" href="${url('css/railnote.css')}">
<script type="module" src="${url('js/linear-widget.js')}"></script></head><body>
<railnote-linear id="a" vin-min="4.7 V" iout-max="200 mA"></railnote-linear>
<railnote-linear id="b" vout="1.8 V" iout-max="40 mA" iout-typ="10 mA" rated="150 mA"></railnote-linear>
</body></html>`;
  await page.route((u) => u.href.split('?')[0] === hostUrl, (route) => route.fulfill({ status: 200, contentType: 'text/html', body }));
  await page.goto(`${hostUrl}?vin-min=1`);
  await page.locator('#a[data-state="ready"]').waitFor();
  await page.locator('#b[data-state="ready"]').waitFor();
  const ra = await page.locator('#a').evaluate((el) => el.result);
  const rb = await page.locator('#b').evaluate((el) => el.result);
  // Without sync-url the page's query (vin-min=1) is ignored: the attributes rule.
  close(ra.worst.headroomV, 1.134, 1e-9, 'rail a headroom, 4.7 − 3.366 − 0.2 V by hand');
  // Rail b by hand: V_out,max = 1.836 V, V_do = 0.3·0.04/0.3 = 0.04 V → 4.85 − 1.836 − 0.04 = 2.974 V.
  close(rb.worst.headroomV, 2.974, 1e-9, 'rail b headroom');
  // Field ids are unique across the two widgets, so every label points at its own input.
  const ids = await page.evaluate(() => [...document.querySelectorAll('[id]')].map((e) => e.id));
  assert.equal(new Set(ids).size, ids.length, 'no duplicate ids');
  // Setting an attribute recomputes that widget only.
  await page.locator('#a').evaluate((el) => el.setAttribute('vin-min', '4.85 V'));
  await page.waitForFunction(() => Math.abs(document.getElementById('a').result.worst.headroomV - 1.284) < 1e-9);
  close((await page.locator('#b').evaluate((el) => el.result)).worst.headroomV, 2.974, 1e-9, 'rail b unchanged');
  assert.equal(new URL(page.url()).searchParams.get('vin-min'), '1', 'the host URL is left alone');
  // Reset goes back to the embedded attributes, not to the demo rail.
  await page.locator('#a').getByRole('button', { name: /Reset/ }).click();
  await page.waitForFunction(() => Math.abs(document.getElementById('a').result.worst.headroomV - 1.134) < 1e-9);
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});
