// Browser tests of the linear rail check page (site/linear.html with <railnote-linear sync-url>).
import { test, before, after } from 'node:test';
import assert from 'node:assert/strict';
import {
  launch, open, url, assertSameOrigin, settled, field, message, result, close, ORIGIN,
} from './browser.mjs';

// The brief's demo rail (an invented soil-moisture logger): 3.3 V ±2 % LDO from the 5.0 V ±3 %
// buck rail, 250 mA peak / 30 mA typical, I_q 50 µA + 1 % of load, MOS dropout 300 mV at 300 mA,
// rated 300 mA, θJA 100 K/W, T_a 60 °C, T_j,max 125 °C, margins 0.3 V and 15 K.
const DEMO = {
  vinMin: 4.85, vinNom: 5.0, vinMax: 5.15, vout: 3.3, tolPct: 2, ioutMax: 0.25, ioutTyp: 0.03,
  iq: 50e-6, gndPct: 1, dropoutV: 0.3, dropoutAtA: 0.3, ratedA: 0.3, thetaJa: 100, taMax: 60,
  tjMax: 125, headroomMargin: 0.3, thermalMargin: 15,
};

/**
 * Expected values worked by hand from the brief's equations ("Linear rail check" in
 * /work/shared/product.md): I_gnd = I_q + k·I_out; P = (V_in − V_out)·I_out + V_in·I_gnd;
 * η = V_out·I_out / (V_in·(I_out + I_gnd)); T_j = T_a + θJA·P (JEDEC JESD51 θJA);
 * headroom = V_in,min − V_out,max − V_do(I_out,max) with the resistive (MOS) dropout
 * V_do(I) = V_do,rated·I / I_rated. Heat is taken at V_in,max and V_out,min, headroom at V_in,min
 * and V_out,max. The solved-back limits invert the same linear relations.
 */
function expected(x) {
  const k = x.gndPct / 100;
  const voutMax = x.vout * (1 + x.tolPct / 100);
  const voutMin = x.vout * (1 - x.tolPct / 100);
  const vdo = x.dropoutV * x.ioutMax / x.dropoutAtA;
  const ignd = (i) => x.iq + k * i;
  const power = (vin, vout, i) => (vin - vout) * i + vin * ignd(i);
  const powerW = power(x.vinMax, voutMin, x.ioutMax);
  const tjC = x.taMax + x.thetaJa * powerW;
  const allowedW = (x.tjMax - x.thermalMargin - x.taMax) / x.thetaJa;
  const maxLoadThermal = (allowedW - x.vinMax * x.iq) / (x.vinMax - voutMin + k * x.vinMax);
  const maxLoadHeadroom = (x.vinMin - voutMax - x.headroomMargin) * x.dropoutAtA / x.dropoutV;
  return {
    headroomV: x.vinMin - voutMax - vdo,
    powerW,
    tjC,
    thermalMarginC: x.tjMax - tjC,
    inputCurrentA: x.ioutMax + ignd(x.ioutMax),
    effNomTypPct: 100 * x.vout * x.ioutTyp / (x.vinNom * (x.ioutTyp + ignd(x.ioutTyp))),
    maxLoadA: Math.min(maxLoadThermal, maxLoadHeadroom, x.ratedA),
    maxLoadThermalA: maxLoadThermal,
    maxLoadHeadroomA: maxLoadHeadroom,
    hottestAmbientC: x.tjMax - x.thermalMargin - x.thetaJa * powerW,
    vinMinRegulating: voutMax + vdo,
    vinMaxThermal: (allowedW + voutMin * x.ioutMax) / (x.ioutMax + ignd(x.ioutMax)),
  };
}

const E = expected(DEMO);

// Worked out: headroom 4.85 − 3.366 − 0.25 = 1.234 V ≥ 0.3 V wanted; T_j = 60 + 100·0.49213 =
// 109.2 °C, margin 15.79 K ≥ 15 K wanted; 250 mA ≤ 300 mA rating. Every check passes.
assert.ok(Math.abs(E.headroomV - 1.234) < 1e-12 && Math.abs(E.tjC - 109.21325) < 1e-9);

function assertDemoNumbers(r, x = E) {
  assert.equal(r.verdict, 'pass', 'every check clears its margin, so the verdict is pass');
  close(r.worst.headroomV, x.headroomV, 1e-9, 'worst headroom');
  close(r.worst.powerW, x.powerW, 1e-9, 'worst dissipation');
  close(r.worst.tjC, x.tjC, 1e-9, 'worst junction temperature');
  close(r.worst.thermalMarginC, x.thermalMarginC, 1e-9, 'thermal margin');
  close(r.worst.inputCurrentA, x.inputCurrentA, 1e-9, 'input current');
  const nom = r.corners.find((c) => c.label === 'nom');
  close(nom.typ.efficiencyPct, x.effNomTypPct, 1e-9, 'efficiency at nominal input, typical load');
  close(r.limits.maxLoadA, x.maxLoadA, 1e-9, 'largest load');
  assert.equal(r.limits.maxLoadBy, 'thermal', 'the thermal limit (254 mA) is below rating and headroom limits');
  close(r.limits.maxLoadHeadroomA, x.maxLoadHeadroomA, 1e-9, 'headroom-bounded load');
  close(r.limits.hottestAmbientC, x.hottestAmbientC, 1e-9, 'hottest ambient');
  close(r.limits.vinMinRegulating, x.vinMinRegulating, 1e-9, 'smallest regulating input');
  close(r.limits.vinMaxThermal, x.vinMaxThermal, 1e-9, 'highest input thermally');
}

/** Visible numbers: the engine's formatter at 3 significant figures of the hand-worked values. */
async function assertDemoText(page) {
  const w = page.locator('railnote-linear');
  await assert.doesNotReject(w.locator('.rn-verdict-word', { hasText: 'Pass' }).waitFor());
  assert.equal(await w.locator('[data-worst="tjC"]').textContent(), '109 °C'); // 109.21 °C
  assert.equal(await w.locator('[data-worst="powerW"]').textContent(), '492 mW'); // 492.1 mW
  assert.equal(await w.locator('[data-worst="headroomV"]').textContent(), '1.23 V'); // 1.234 V
  assert.equal(await w.locator('[data-worst="thermalMarginC"]').textContent(), '15.8 K'); // 15.79 K
  assert.equal(await w.locator('[data-limit="maxLoadA"]').textContent(), '254 mA'); // 254.0 mA
  assert.equal(await w.locator('[data-limit="hottestAmbientC"]').textContent(), '60.8 °C'); // 60.79 °C
  assert.equal(await w.locator('tr[data-corner="nom"][data-load="typ"] [data-q="efficiencyPct"]').textContent(), '65.2 %'); // 65.24 %
  const checks = await w.locator('.rn-check').count();
  assert.equal(checks, 3, 'headroom, thermal and rating checks are listed (no efficiency or budget asked)');
  assert.equal(await w.locator('.rn-check.rn-status-pass').count(), 3);
}

// The demo rail typed as an engineer might, in several accepted spellings.
const TYPED = {
  'vin-min': '4.85', 'vin-nom': '5', 'vin-max': '5.15', vout: '3V3', 'vout-tol': '2',
  'iout-max': '0.25', 'iout-typ': '30m', iq: '50u', gnd: '1 %', 'dropout-model': 'resistive',
  dropout: '0.3 V', 'dropout-at': '300mA', rated: '0A3', 'theta-ja': '100', 'ta-max': '60C',
  'tj-max': '125', 'headroom-margin': '300 mV', 'thermal-margin': '15',
};

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser?.close(); });

test('typing the demo rail gives the hand-worked verdict and numbers; the URL then holds the typed text', async () => {
  const { context, page, requests, problems } = await open(browser);
  // Start from another rail (the demo's 1.8 V sensor regulator at 40 mA) so every field changes.
  await page.goto(url('linear.html?vout=1.8&iout-max=40m&iout-typ=20m'));
  await settled(page, 'ready');
  for (const [key, text] of Object.entries(TYPED)) {
    const f = field(page, key);
    if (key === 'dropout-model') await f.selectOption(text);
    else {
      await f.fill('');
      await f.pressSequentially(text);
    }
  }
  await settled(page, 'ready');
  assertDemoNumbers(await result(page));
  await assertDemoText(page);

  // After the ~300 ms debounce the page URL holds every key with the raw typed text.
  await page.waitForFunction(() => new URLSearchParams(location.search).get('tj-max') === '125');
  const params = new URL(page.url()).searchParams;
  for (const [key, text] of Object.entries(TYPED)) assert.equal(params.get(key), text, `URL key ${key}`);

  // The same URL in a fresh page reproduces the numbers and shows the same text in every field.
  const again = await context.newPage();
  await again.goto(page.url());
  await settled(again, 'ready');
  for (const [key, text] of Object.entries(TYPED)) assert.equal(await field(again, key).inputValue(), text, `field ${key} restored`);
  assert.deepEqual(await result(again), await result(page), 'identical result from the link');
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('a link with some parameters restores those fields exactly and defaults the rest', async () => {
  const { context, page, requests, problems } = await open(browser);
  await page.goto(url('linear.html?vin-min=4.6&vout=3V3&iout-max=0A25'));
  await settled(page, 'ready');
  assert.equal(await field(page, 'vin-min').inputValue(), '4.6');
  assert.equal(await field(page, 'vout').inputValue(), '3V3');
  assert.equal(await field(page, 'iout-max').inputValue(), '0A25');
  assert.equal(await field(page, 'vin-max').inputValue(), '5.15 V', 'missing key takes the default');
  const r = await result(page);
  // By hand: 4.6 − 3.3·1.02 − 0.3·0.25/0.3 = 0.984 V.
  close(r.worst.headroomV, expected({ ...DEMO, vinMin: 4.6 }).headroomV, 1e-9, 'headroom at V_in,min 4.6 V');
  close(r.worst.headroomV, 0.984, 1e-9, 'headroom at V_in,min 4.6 V (worked by hand)');
  close(r.worst.tjC, E.tjC, 1e-9, 'T_j unchanged: heat is taken at V_in,max');
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('bad input gives a message at that field; fixing it computes again', async () => {
  const { context, page, requests, problems } = await open(browser);
  await page.goto(url('linear.html'));
  await settled(page, 'ready');
  const cases = [
    ['vin-min', 'abc'], ['vin-min', ''], ['vin-min', '-1'], ['vin-min', '1e400'], ['vin-min', 'NaN'],
    ['iout-max', 'abc'], ['iout-max', ''], ['iout-max', '-1'], ['iout-max', '1e400'], ['iout-max', 'NaN'],
    ['theta-ja', 'abc'], ['theta-ja', '-1'], ['theta-ja', 'NaN'],
    ['vout', '500 mA'],
  ];
  const good = { 'vin-min': '4.85 V', 'iout-max': '250 mA', 'theta-ja': '100 K/W', vout: '3.3 V' };
  for (const [key, bad] of cases) {
    const f = field(page, key);
    await f.fill(bad);
    assert.equal(await settled(page, 'error'), 'error', `${key}=${JSON.stringify(bad)} puts the widget in error`);
    const msg = (await message(page, key).textContent()).trim();
    assert.ok(msg.length > 10, `${key}=${JSON.stringify(bad)} shows a message at the field: "${msg}"`);
    assert.ok(!/NaN|Infinity|undefined|panicked|at \w+ \(|wasm-function/.test(msg), `message is a sentence, not a dump: "${msg}"`);
    assert.equal(await f.getAttribute('aria-invalid'), 'true');
    const describedBy = (await f.getAttribute('aria-describedby')).split(' ');
    assert.ok(describedBy.includes(await message(page, key).getAttribute('id')), 'the message is linked to the input');
    assert.equal(await page.locator('railnote-linear .rn-verdict').count(), 0, 'no stale verdict is shown');
    assert.equal(await page.locator('railnote-linear .rn-error-box').count(), 1);
    // Other fields carry no message.
    assert.equal(await page.locator('railnote-linear .rn-field.rn-bad').count(), 1, 'only that field is marked');
    await f.fill(good[key]);
    assert.equal(await settled(page, 'ready'), 'ready', `fixing ${key} computes again`);
    assert.equal(await message(page, key).textContent(), '');
    assert.equal(await f.getAttribute('aria-invalid'), null);
  }
  // A unit of the wrong kind is named as such.
  await field(page, 'vout').fill('500 mA');
  await settled(page, 'error');
  assert.match(await message(page, 'vout').textContent(), /current/i);
  await field(page, 'vout').fill('3.3');
  await settled(page, 'ready');
  assertDemoNumbers(await result(page));
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('every result render dispatches railnote-result and sets data-state', async () => {
  const { context, page } = await open(browser);
  await page.goto(url('linear.html'));
  await settled(page, 'ready');
  await page.evaluate(() => {
    window.seen = [];
    document.addEventListener('railnote-result', (e) => window.seen.push([e.detail.state, e.detail.result && e.detail.result.verdict]));
  });
  await field(page, 'vin-min').fill('zz');
  await settled(page, 'error');
  await field(page, 'vin-min').fill('4.85');
  await settled(page, 'ready');
  const seen = await page.evaluate(() => window.seen);
  assert.deepEqual(seen, [['error', null], ['ready', 'pass']], 'the event bubbles to the document after each render');
  await context.close();
});

test('hostile URL values show as text with a field message and never run', async () => {
  const { context, page, requests, problems } = await open(browser);
  await context.addInitScript(() => {
    window.__alerts = [];
    window.alert = (m) => window.__alerts.push(String(m));
    window.confirm = window.alert;
    window.prompt = window.alert;
  });
  const hostile = {
    'vin-min': '<img src=x onerror=alert(1)>',
    vout: '"><script>alert(2)</script>',
    'theta-ja': 'javascript:alert(3)',
    'dropout-model': '<svg onload=alert(4)>',
    'iout-max': '1e999999',
  };
  const q = new URLSearchParams(hostile).toString();
  await page.goto(url(`linear.html?${q}`));
  assert.equal(await settled(page, 'error'), 'error');
  for (const key of ['vin-min', 'vout', 'theta-ja', 'dropout-model', 'iout-max']) {
    const msg = (await message(page, key).textContent()).trim();
    assert.ok(msg.length > 5, `message at ${key}: "${msg}"`);
  }
  assert.equal(await field(page, 'vin-min').inputValue(), hostile['vin-min'], 'the text is shown exactly, as text');
  assert.equal(await field(page, 'vout').inputValue(), hostile.vout);
  await page.waitForTimeout(300);
  const dom = await page.evaluate(() => ({
    alerts: window.__alerts,
    imgs: document.querySelectorAll('img').length,
    scripts: [...document.scripts].map((s) => s.getAttribute('src')),
    svgs: [...document.querySelectorAll('svg')].filter((s) => s.getAttribute('onload') !== null).length,
    handlers: [...document.querySelectorAll('*')].filter((el) => [...el.attributes].some((a) => a.name.startsWith('on'))).length,
  }));
  assert.deepEqual(dom.alerts, [], 'nothing executed');
  assert.equal(dom.imgs, 0, 'no injected <img>');
  assert.deepEqual(dom.scripts, ['js/linear-widget.js'], 'only the page\'s own module script');
  assert.equal(dom.svgs, 0);
  assert.equal(dom.handlers, 0, 'no inline event handler attribute anywhere');
  // The widget is alive: fixing the fields computes the demo rail again.
  await field(page, 'vin-min').fill('4.85 V');
  await field(page, 'vout').fill('3.3 V');
  await field(page, 'theta-ja').fill('100 K/W');
  await field(page, 'iout-max').fill('250 mA');
  await field(page, 'dropout-model').selectOption('resistive');
  assert.equal(await settled(page, 'ready'), 'ready');
  assertDemoNumbers(await result(page));
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('copy link puts a reproducing link on the clipboard; reset restores the demo rail and clears the URL', async () => {
  const { context, page, requests, problems } = await open(browser);
  await context.grantPermissions(['clipboard-read', 'clipboard-write'], { origin: ORIGIN });
  await page.goto(url('linear.html'));
  await settled(page, 'ready');
  await field(page, 'vin-min').fill('4.7');
  await field(page, 'iout-max').fill('200m');
  await settled(page, 'ready');
  await page.getByRole('button', { name: 'Copy link' }).click();
  await page.locator('railnote-linear .rn-tool-status', { hasText: 'Link copied' }).waitFor();
  const copied = await page.evaluate(() => navigator.clipboard.readText());
  const link = new URL(copied);
  assert.equal(link.pathname.endsWith('/linear.html'), true);
  assert.equal(link.searchParams.get('vin-min'), '4.7');
  assert.equal(link.searchParams.get('iout-max'), '200m');
  const r1 = await result(page);
  const other = await context.newPage();
  await other.goto(copied);
  await settled(other, 'ready');
  assert.deepEqual(await result(other), r1, 'the copied link reproduces the result');
  // By hand: 4.7 − 3.366 − 0.3·0.2/0.3 = 1.134 V.
  close(r1.worst.headroomV, 1.134, 1e-9, 'headroom at 4.7 V, 200 mA');

  await page.waitForFunction(() => new URLSearchParams(location.search).get('vin-min') === '4.7');
  await page.getByRole('button', { name: /Reset/ }).click();
  await settled(page, 'ready');
  assert.equal(await field(page, 'vin-min').inputValue(), '4.85 V');
  assert.equal(await field(page, 'iout-max').inputValue(), '250 mA');
  assert.equal(new URL(page.url()).search, '', 'reset clears the URL');
  assertDemoNumbers(await result(page));
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('when the clipboard is refused, the link is shown selected for copying by hand', async () => {
  const { context, page } = await open(browser);
  await context.addInitScript(() => {
    Object.defineProperty(navigator, 'clipboard', {
      value: { writeText: () => Promise.reject(new DOMException('denied', 'NotAllowedError')) },
    });
  });
  await page.goto(url('linear.html?vout=3V3'));
  await settled(page, 'ready');
  await page.getByRole('button', { name: 'Copy link' }).click();
  const box = page.locator('railnote-linear .rn-link-fallback');
  await box.waitFor({ state: 'visible' });
  const value = await box.inputValue();
  assert.equal(new URL(value).searchParams.get('vout'), '3V3');
  const selected = await box.evaluate((el) => el.value.slice(el.selectionStart, el.selectionEnd));
  assert.equal(selected, value, 'the whole link is selected');
  await context.close();
});

test('every input and select has a label, a unit or note, and a message slot', async () => {
  const { context, page } = await open(browser);
  await page.goto(url('linear.html'));
  await settled(page, 'ready');
  const report = await page.evaluate(() => [...document.querySelectorAll('railnote-linear .rn-inputs input, railnote-linear .rn-inputs select')].map((el) => ({
    key: el.name,
    label: el.labels.length ? el.labels[0].textContent.trim() : '',
    described: (el.getAttribute('aria-describedby') || '').split(' ').filter(Boolean).map((id) => Boolean(document.getElementById(id))),
  })));
  assert.equal(report.length, 20, 'twenty fields');
  for (const r of report) {
    assert.ok(r.label.length > 3, `${r.key} has a label`);
    assert.ok(r.described.length >= 2 && r.described.every(Boolean), `${r.key} is described by existing elements`);
  }
  await context.close();
});

test('if the engine cannot load, the widget says so instead of sitting dead', async () => {
  const { context, page } = await open(browser);
  await page.route((u) => u.pathname.endsWith('/pkg/railnote_bg.wasm'), (route) => route.fulfill({ status: 404, body: 'gone' }));
  await page.goto(url('linear.html'));
  await page.locator('railnote-linear[data-state="failed"]').waitFor();
  assert.match(await page.locator('railnote-linear .rn-status').textContent(), /could not load/);
  await context.close();
});

test('the dropout fields a model does not use are marked, and still go into the link', async () => {
  const { context, page } = await open(browser);
  await page.goto(url('linear.html?dropout-model=classic&vin-min=6&vin-nom=7&vin-max=8'));
  await settled(page, 'ready');
  const unused = await page.locator('railnote-linear .rn-field.rn-unused').evaluateAll((els) => els.map((e) => e.dataset.key));
  assert.deepEqual(unused, ['dropout', 'dropout-at']);
  const r = await result(page);
  // Classic three-terminal: a constant 2.0 V dropout (common practice), so the lowest regulating
  // input is V_out,max + 2.0 V = 3.366 + 2.0 = 5.366 V, whatever the dropout field says.
  close(r.limits.vinMinRegulating, 5.366, 1e-9, 'classic dropout');
  assert.equal(r.limits.maxLoadHeadroomA, null, 'headroom does not depend on load with a constant dropout');
  await field(page, 'dropout-model').selectOption('constant');
  await settled(page, 'ready');
  assert.deepEqual(await page.locator('railnote-linear .rn-field.rn-unused').evaluateAll((els) => els.map((e) => e.dataset.key)), ['dropout-at']);
  await context.close();
});

test('the operating window is an accessible SVG whose legend names every series in words', async () => {
  const { context, page } = await open(browser);
  await page.goto(url('linear.html'));
  await settled(page, 'ready');
  const chart = await page.locator('railnote-linear .rn-window').evaluate((sec) => {
    const svg = sec.querySelector('svg.rn-chart');
    return {
      role: svg.getAttribute('role'),
      label: svg.getAttribute('aria-label'),
      title: svg.querySelector('title')?.textContent,
      desc: svg.querySelector('desc')?.textContent,
      paths: [...svg.querySelectorAll('path')].map((p) => p.getAttribute('d')),
      dashes: [...svg.querySelectorAll('path.rn-line')].map((p) => p.getAttribute('stroke-dasharray') || 'solid'),
      legend: [...sec.querySelectorAll('.rn-legend li')].map((li) => li.textContent.trim()),
      notes: [...svg.querySelectorAll('.rn-chart-notes text')].map((t) => t.textContent),
      ticks: [...svg.querySelectorAll('.rn-chart-axes text')].map((t) => t.textContent),
    };
  });
  assert.equal(chart.role, 'img');
  assert.ok(chart.label && chart.title && chart.desc.includes('Verdict: Pass'), 'label, title and a description in words');
  assert.ok(chart.paths.length >= 8 && chart.paths.every((d) => d && !/NaN|Infinity|undefined/.test(d)), 'finite path data');
  assert.ok(new Set(chart.dashes).size >= 3, `boundaries differ by dash pattern, not only colour: ${chart.dashes}`);
  assert.equal(chart.legend.length, 6);
  assert.ok(chart.legend.some((t) => /dropout/i.test(t) && /right/i.test(t)), 'the legend says which side of dropout is OK');
  assert.ok(chart.legend.some((t) => /thermal/i.test(t) && /below/i.test(t)), 'and which side of the thermal boundary');
  assert.ok(chart.notes.includes('too hot') && chart.notes.includes('drops out'));
  // Tick labels come from the engine's formatter (engineering notation with units).
  assert.ok(chart.ticks.includes('5.00 V') && chart.ticks.includes('300 mA'), `tick labels ${chart.ticks}`);
  await context.close();
});
