// Browser tests of the switching estimate page (site/switching.html with <railnote-switching
// sync-url>), the carry-over from the linear page, and the switching embed.
//
// What the numbers are checked against:
// - the engine itself, called in the same page with an input object written out here by hand
//   from the demo's field texts: the widget must send exactly that and show exactly what comes
//   back (formatted by the engine's own formatter);
// - textbook relations, from memory: the lossless CCM conversion ratios (buck D = V_out/V_in,
//   boost D = 1 − V_in/V_out, inverting D = |V_out|/(V_in + |V_out|)), gate drive Q_g·V_drv·f_sw,
//   controller V_in·I_q, and the energy balance P_in = P_out + ΣP_loss;
// - common practice: a 20–40 % ripple ratio as the inductor's starting point.
import { test, before, after } from 'node:test';
import assert from 'node:assert/strict';
import path from 'node:path';
import {
  launch, open, url, assertSameOrigin, settled, field, message, result, close, OUT_DIR, ORIGIN, openEmbedHost,
} from './browser.mjs';

const TAG = 'railnote-switching';

// Tolerances: relations the engine evaluates in f64 agree to rounding.
const REL = 1e-9;

// The demo's inputs in SI units, written out from the page's default texts ("10.8 V", "22 µH",
// "80 mΩ", "4 nC", …): the brief's invented logger, a synchronous 5.0 V buck from the 12 V battery.
const DEMO = {
  topology: 'buck', rectifier: 'synchronous', lightLoad: 'discontinuousAllowed',
  vinMin: 10.8, vinNom: 12, vinMax: 14.4, vout: 5, iout: 0.8,
  inductance: 22e-6, rippleRatioPct: 30, dcr: 0.06, coreLoss: 0.02, isat: 1.5,
  mainRdsOn: 0.08, mainGateCharge: 4e-9, riseTime: 8e-9, fallTime: 8e-9, driveV: 5,
  rectRdsOn: 0.04, rectGateCharge: 5e-9, deadTime: 20e-9, bodyDiodeVf: 0.8,
  cossCharge: 2e-9, cout: 22e-6, esr: 0.01,
  fsw: 500e3, iq: 1e-3, minOnTime: 100e-9, maxDutyPct: 95,
};
/** The synchronous rectifier's keys, which a diode design does not send (lightLoad it sends,
 * ignored by the engine for a diode, since the API always takes it). */
const SYNC_ONLY = ['rectRdsOn', 'rectGateCharge', 'deadTime', 'bodyDiodeVf'];

/** A copy of the input without these keys (absent optional fields are left out, as the widget does). */
function without(input, ...keys) {
  const copy = { ...input };
  for (const k of keys) delete copy[k];
  return copy;
}

/** Call checkSwitching in the page (the same WASM module the widget uses). */
async function engine(page, input) {
  return page.evaluate(async ([x, module]) => {
    const { ready } = await import(module);
    const api = await ready;
    try {
      return { report: api.checkSwitching(x) };
    } catch (e) {
      return { error: { field: e.field, message: e.message } };
    }
  }, [input, url('js/engine.js')]);
}

/** formatQuantity in the page, for the text a number must show as. */
async function formatted(page, value, kind, digits = 3) {
  return page.evaluate(async ([v, k, d, module]) => {
    const { ready } = await import(module);
    return (await ready).formatQuantity(v, k, d);
  }, [value, kind, digits, url('js/engine.js')]);
}

/** Textbook relations every report must satisfy, whatever its topology. */
function assertRelations(r, input) {
  assert.equal(r.corners.length, 3);
  assert.deepEqual(r.corners.map((c) => c.label), ['min', 'nom', 'max']);
  const vins = [input.vinMin, input.vinNom, input.vinMax];
  r.corners.forEach((c, i) => {
    close(c.vin, vins[i], REL, `corner ${c.label} V_in`);
    const lossless = {
      buck: input.vout / c.vin,
      boost: 1 - c.vin / input.vout,
      inverting: input.vout / (c.vin + input.vout),
    }[input.topology];
    if (c.mode === 'continuous') close(c.dutyIdeal, lossless, REL, `${input.topology} lossless duty at ${c.label}`);
    assert.ok(c.duty >= c.dutyIdeal - 1e-12, `losses raise the duty at ${c.label}`);
    close(c.outputW, input.vout * input.iout, REL, 'P_out = V_out·I_out');
    close(c.inputW, c.outputW + c.losses.totalW, REL, 'energy balance');
    close(c.efficiencyPct, 100 * c.outputW / c.inputW, REL, 'η = P_out/P_in');
    close(c.inputCurrentA, c.inputW / c.vin, REL, 'I_in = P_in/V_in');
    close(c.losses.controllerW, c.vin * input.iq, REL, 'controller V_in·I_q');
    close(c.losses.mainGateW, input.mainGateCharge * input.driveV * input.fsw, REL, 'gate drive Q_g·V_drv·f');
    const sum = Object.entries(c.losses).filter(([k]) => k !== 'totalW').reduce((s, [, v]) => s + v, 0);
    close(c.losses.totalW, sum, REL, 'total of the losses');
    for (const [k, v] of Object.entries(c.losses)) assert.ok(Number.isFinite(v) && v >= 0, `${k} finite and not negative`);
  });
  assert.equal(r.sweep.length, 3);
  for (const curve of r.sweep) {
    assert.equal(curve.ioutA.length, 50);
    close(curve.ioutA[0], 0.01 * input.iout, 1e-9, 'sweep from 1 % of the load');
    close(curve.ioutA[49], 1.2 * input.iout, 1e-9, 'to 120 %');
    assert.ok(curve.efficiencyPct.every((e) => e > 0 && e < 100), 'efficiency below 100 % everywhere');
  }
}

/** The visible numbers of the corners table are the engine's, formatted by the engine. */
async function assertTable(page, r) {
  const w = page.locator(TAG);
  for (const c of r.corners) {
    const cell = async (q) => (await w.locator(`.rn-sw-corners td[data-corner="${c.label}"][data-q="${q}"]`).textContent()).trim();
    assert.equal(await cell('efficiencyPct'), await formatted(page, c.efficiencyPct, 'percent'));
    assert.equal(await cell('inputCurrentA'), await formatted(page, c.inputCurrentA, 'current'));
    assert.equal(await cell('rippleA'), await formatted(page, c.rippleA, 'current'));
    assert.equal(await cell('inductorPeakA'), await formatted(page, c.inductorPeakA, 'current'));
    assert.equal(await cell('outputRippleV'), await formatted(page, c.outputRippleV, 'voltage'));
    assert.equal(await cell('duty'), await formatted(page, c.duty * 100, 'percent'));
    assert.equal(await cell('dutyIdeal'), await formatted(page, c.dutyIdeal * 100, 'percent'));
    assert.equal(await cell('mode'), c.mode);
    assert.equal((await w.locator(`.rn-loss-table tr[data-loss="totalW"] td[data-corner="${c.label}"]`).textContent()).trim(),
      await formatted(page, c.losses.totalW, 'power'));
  }
}

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser?.close(); });

test('the demo sends the demo inputs and shows the engine\'s numbers, charts and verdict in words', async () => {
  const { context, page, requests, problems } = await open(browser);
  await page.goto(url('switching.html'));
  await settled(page, 'ready', TAG);
  const shown = await result(page, TAG);
  const { report, error } = await engine(page, DEMO);
  assert.equal(error, undefined, 'the hand-written demo input is accepted');
  assert.deepEqual(shown, report, 'the widget shows exactly what the engine gives for the demo inputs');
  assertRelations(report, DEMO);
  // The invented demo is a sensible design: continuous at full load, ripple within the usual
  // 20–40 % (common practice), efficiency in the nineties, every check passing.
  for (const c of report.corners) {
    assert.equal(c.mode, 'continuous');
    assert.ok(c.rippleRatioPct >= 20 && c.rippleRatioPct <= 40, `ripple ratio ${c.rippleRatioPct} %`);
    close(c.rippleRatioPct, 100 * c.rippleA / c.inductorAvgA, REL, 'ratio = ΔI/I_L');
    close(c.inductorAvgA, DEMO.iout, 1e-12, 'buck inductor carries the load');
  }
  assert.equal(report.verdict, 'pass');
  assert.equal(report.inductanceProposed, false);
  await assertTable(page, report);
  const w = page.locator(TAG);
  assert.equal((await w.locator('.rn-verdict-word').textContent()).trim().replace(/^✓/, ''), 'Pass');
  assert.equal((await w.locator('.rn-summary').textContent()).trim(), report.summary);
  const checks = await w.locator('.rn-check').evaluateAll((els) => els.map((e) => [e.dataset.check, e.querySelector('.rn-check-status').textContent]));
  assert.deepEqual(checks.map((c) => c[0]).sort(), report.checks.map((c) => c.id).sort());
  assert.ok(checks.every((c) => c[1] === 'Pass'));
  assert.equal(await w.locator('[data-q="inductanceH"]').textContent(), await formatted(page, DEMO.inductance, 'inductance'));
  // Two charts: the stacked losses (three bars, one segment per loss that is not zero) and
  // efficiency against load on a log axis (three corners, the full load and the boundary).
  const charts = await w.locator('svg.rn-chart').evaluateAll((svgs) => svgs.map((s) => ({
    title: s.querySelector('title')?.textContent,
    bars: [...s.querySelectorAll('.rn-bar')].map((b) => b.querySelectorAll('rect.rn-bar-seg').length),
    totals: [...s.querySelectorAll('.rn-bar-total')].map((t) => t.textContent),
    paths: [...s.querySelectorAll('path.rn-series')].map((p) => p.getAttribute('d')),
    rects: [...s.querySelectorAll('rect')].map((r) => [r.getAttribute('x'), r.getAttribute('width')]),
    ticks: [...s.querySelectorAll('.rn-chart-axes text')].map((t) => t.textContent),
    legend: [...s.closest('figure').querySelectorAll('.rn-legend li')].map((li) => li.textContent),
  })));
  assert.equal(charts.length, 2);
  const nonZero = report.corners.map((c) => Object.entries(c.losses).filter(([k, v]) => k !== 'totalW' && v > 0).length);
  assert.deepEqual(charts[0].bars, nonZero, 'one segment per loss that is not zero');
  assert.deepEqual(charts[0].totals, await Promise.all(report.corners.map((c) => formatted(page, c.losses.totalW, 'power'))));
  assert.equal(charts[0].legend.length, nonZero[0], 'a legend entry in words per loss');
  assert.ok(charts[0].rects.every(([x, wd]) => x === null || (Number.isFinite(Number(x)) && Number.isFinite(Number(wd ?? 0)))), 'finite bars');
  assert.equal(charts[1].paths.length, 5, 'three corners, full load, continuous boundary');
  assert.ok(charts[1].paths.every((d) => d && !/NaN|Infinity|undefined/.test(d)), 'finite curves');
  for (const tick of ['10.0 mA', '100 mA']) assert.ok(charts[1].ticks.includes(tick), `log tick ${tick} in ${charts[1].ticks}`);
  assert.ok(charts[1].legend.some((l) => /nominal input, 12\.0 V/.test(l)));
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('the rectifier decides which fields are active, and the result follows', async () => {
  const { context, page, problems } = await open(browser);
  await page.goto(url('switching.html'));
  await settled(page, 'ready', TAG);
  const enabled = async (key) => field(page, key, TAG).isEnabled();
  for (const key of ['rect-rds-on', 'rect-qg', 'dead-time', 'body-vf', 'light-load']) assert.equal(await enabled(key), true, `${key} active when synchronous`);
  assert.equal(await enabled('diode-vf'), false, 'the diode field is inactive when synchronous');
  assert.match(await page.locator(`${TAG} .rn-field[data-key="diode-vf"] .rn-label`).textContent(), /used with a diode only/);

  await field(page, 'rectifier', TAG).selectOption('diode');
  await settled(page, 'ready', TAG);
  for (const key of ['rect-rds-on', 'rect-qg', 'dead-time', 'body-vf', 'light-load']) {
    assert.equal(await enabled(key), false, `${key} inactive with a diode`);
    assert.match(await page.locator(`${TAG} .rn-field[data-key="${key}"] .rn-label`).textContent(), /not used with a diode/);
  }
  assert.equal(await enabled('diode-vf'), true);
  const diodeInput = { ...DEMO, rectifier: 'diode', diodeVf: 0.45 };
  for (const k of SYNC_ONLY) delete diodeInput[k];
  const shown = await result(page, TAG);
  assert.deepEqual(shown, (await engine(page, diodeInput)).report, 'the diode design sends no second-switch fields');
  assertRelations(shown, diodeInput);
  for (const c of shown.corners) {
    assert.ok(c.losses.diodeW > 0, 'a diode loss');
    close(c.losses.diodeW, 0.45 * c.rectAvgA, REL, 'diode loss V_f·I_avg');
    assert.equal(c.losses.rectConductionW + c.losses.rectGateW + c.losses.deadTimeW, 0, 'no second-switch losses');
  }
  const seen = await page.locator(`${TAG} .rn-loss-table tbody tr`).evaluateAll((rows) => rows.map((r) => r.dataset.loss));
  assert.ok(seen.includes('diodeW') && !seen.includes('rectGateW') && !seen.includes('deadTimeW'), `loss rows ${seen}`);
  // The inactive fields keep their text (a link still holds it) and come back when switching back.
  assert.equal(await field(page, 'rect-rds-on', TAG).inputValue(), '40 mΩ');
  await field(page, 'rectifier', TAG).selectOption('synchronous');
  await settled(page, 'ready', TAG);
  assert.deepEqual(await result(page, TAG), (await engine(page, DEMO)).report);
  assert.deepEqual(problems, []);
  await context.close();
});

test('boost and inverting topologies compute their own conversion ratios', async () => {
  const { context, page, problems } = await open(browser);
  // A 24 V boost from the battery (an invented sensor-heater rail), with a diode.
  await page.goto(url('switching.html?topology=boost&rectifier=diode&vout=24%20V&iout=150%20mA&inductance=47%20%C2%B5H'));
  await settled(page, 'ready', TAG);
  const boostInput = { ...DEMO, topology: 'boost', rectifier: 'diode', vout: 24, iout: 0.15, inductance: 47e-6, diodeVf: 0.45 };
  for (const k of SYNC_ONLY) delete boostInput[k];
  let shown = await result(page, TAG);
  assert.deepEqual(shown, (await engine(page, boostInput)).report);
  assertRelations(shown, boostInput);
  for (const c of shown.corners) {
    if (c.mode === 'continuous') close(c.inductorAvgA, 0.15 / (1 - c.duty), 1e-9, 'boost I_L = I_out/(1 − D)');
  }
  assert.match(await page.locator(`${TAG} .rn-carry`).textContent(), /cannot step up/);
  // An inverting −15 V rail, typed as its size.
  await field(page, 'topology', TAG).selectOption('inverting');
  await field(page, 'vout', TAG).fill('15 V');
  await settled(page, 'ready', TAG);
  shown = await result(page, TAG);
  const invInput = { ...boostInput, topology: 'inverting', vout: 15 };
  assert.deepEqual(shown, (await engine(page, invInput)).report);
  assertRelations(shown, invInput);
  assert.notEqual(shown.corners[1].dutyIdeal, (await engine(page, boostInput)).report.corners[1].dutyIdeal, 'a different ratio');
  assert.deepEqual(problems, []);
  await context.close();
});

test('bad values and impossible designs give messages at their fields, and the widget recovers', async () => {
  const { context, page, requests, problems } = await open(browser);
  await page.goto(url('switching.html'));
  await settled(page, 'ready', TAG);
  const cases = [
    // [key, bad text, good text, what the message must say]
    ['inductance', 'abc', '22 µH', /inductance|H\b/i],
    ['fsw', '5 ms', '500 kHz', /frequency|Hz/i],
    ['vout', '12 V', '5.0 V', /V_out|output|below|input/i], // a buck asked for more than its input
    ['max-duty', '30 %', '95 %', /duty/i], // the lowest input needs 46 % duty
    ['main-qg', '-1 nC', '4 nC', /gate charge|Q|negative|zero|above/i],
    ['coss', '100 pF', '', /one|both|charge|capacitance/i], // given together with the charge
  ];
  for (const [key, bad, good, words] of cases) {
    await field(page, key, TAG).fill(bad);
    assert.equal(await settled(page, 'error', TAG), 'error', `${key}=${bad} is refused`);
    const msg = (await message(page, key, TAG).textContent()).trim();
    assert.match(msg, words, `${key}=${bad}: message at the field: "${msg}"`);
    assert.ok(!/NaN|Infinity|undefined|panicked|wasm-function/.test(msg), `a sentence, not a dump: "${msg}"`);
    assert.equal(await field(page, key, TAG).getAttribute('aria-invalid'), 'true');
    assert.equal(await page.locator(`${TAG} .rn-field.rn-bad`).count(), 1, 'only that field is marked');
    assert.equal(await page.locator(`${TAG} .rn-verdict`).count(), 0, 'no stale verdict');
    await field(page, key, TAG).fill(good);
    assert.equal(await settled(page, 'ready', TAG), 'ready', `fixing ${key} computes again`);
    assert.equal(await message(page, key, TAG).textContent(), '');
  }
  // Neither an inductance nor a ripple ratio: the message is at the inductance.
  await field(page, 'inductance', TAG).fill('');
  await field(page, 'ripple-ratio', TAG).fill('');
  await settled(page, 'error', TAG);
  assert.ok((await message(page, 'inductance', TAG).textContent()).length > 10);
  await field(page, 'ripple-ratio', TAG).fill('30 %');
  await settled(page, 'ready', TAG);
  // Now the inductance is proposed from the ratio, and the page says so.
  const r = await result(page, TAG);
  assert.equal(r.inductanceProposed, true);
  const { report } = await engine(page, without(DEMO, 'inductance'));
  assert.deepEqual(r, report);
  assert.match(await page.locator(`${TAG} [data-block="inductor"]`).textContent(), /Proposed inductance/);
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('hostile link values show as text with field messages and never run', async () => {
  const { context, page, requests, problems } = await open(browser);
  await context.addInitScript(() => { window.__alerts = []; window.alert = (m) => window.__alerts.push(String(m)); });
  const q = new URLSearchParams({ topology: '<svg onload=alert(1)>', fsw: '<img src=x onerror=alert(2)>', rectifier: 'diode"><b>' }).toString();
  await page.goto(url(`switching.html?${q}`));
  assert.equal(await settled(page, 'error', TAG), 'error');
  for (const key of ['topology', 'fsw', 'rectifier']) assert.ok((await message(page, key, TAG).textContent()).length > 5, `message at ${key}`);
  assert.equal(await field(page, 'fsw', TAG).inputValue(), '<img src=x onerror=alert(2)>');
  assert.deepEqual(await page.evaluate(() => ({ alerts: window.__alerts, imgs: document.querySelectorAll('img, b').length })), { alerts: [], imgs: 0 });
  await field(page, 'topology', TAG).selectOption('buck');
  await field(page, 'rectifier', TAG).selectOption('synchronous');
  await field(page, 'fsw', TAG).fill('500 kHz');
  await settled(page, 'ready', TAG);
  assert.deepEqual(await result(page, TAG), (await engine(page, DEMO)).report);
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

// The demo typed in other accepted spellings (SI prefixes, IEC 60062 letter code, units or none).
const TYPED = {
  topology: 'buck', rectifier: 'synchronous', 'light-load': 'forcedContinuous',
  'vin-min': '10V8', 'vin-nom': '12', 'vin-max': '14.4V', vout: '5V0', iout: '800m',
  inductance: '22u', 'ripple-ratio': '30', dcr: '0R06', 'core-loss': '20m', isat: '1A5',
  'main-rds-on': '80m', 'main-qg': '4n', 'rise-time': '8n', 'fall-time': '8 ns', 'drive-v': '5',
  'rect-rds-on': '40 mOhm', 'rect-qg': '5nC', 'dead-time': '20n', 'body-vf': '0V8', 'diode-vf': '450m',
  'coss-charge': '2n', cout: '22uF', esr: '10m', fsw: '0.5 MHz', iq: '1m', 'min-on': '100n', 'max-duty': '95',
};

test('typed in other spellings, the link reproduces every field text and the result in a fresh page', async () => {
  const { context, page, requests, problems } = await open(browser);
  // The diode's field is inactive on a synchronous design, so its text comes from the first link.
  await page.goto(url('switching.html?fsw=1M&vout=3.3&diode-vf=450m'));
  await settled(page, 'ready', TAG);
  for (const [key, text] of Object.entries(TYPED)) {
    const f = field(page, key, TAG);
    if (!(await f.isEnabled())) assert.equal(await f.inputValue(), text, `inactive ${key} holds its linked text`);
    else if (['topology', 'rectifier', 'light-load'].includes(key)) await f.selectOption(text);
    else await f.fill(text);
  }
  await settled(page, 'ready', TAG);
  const shown = await result(page, TAG);
  assert.deepEqual(shown, (await engine(page, { ...DEMO, lightLoad: 'forcedContinuous' })).report, 'same numbers as the demo typed in SI');
  await page.waitForFunction(() => new URLSearchParams(location.search).get('max-duty') === '95');
  const params = new URL(page.url()).searchParams;
  for (const [key, text] of Object.entries(TYPED)) assert.equal(params.get(key), text, `URL key ${key}`);
  assert.equal(params.has('coss'), false, 'an empty optional field with an empty default stays out');

  const fresh = await browser.newContext();
  const again = await fresh.newPage();
  const freshRequests = [];
  fresh.on('request', (rq) => freshRequests.push(rq.url()));
  await again.goto(page.url());
  await settled(again, 'ready', TAG);
  for (const [key, text] of Object.entries(TYPED)) assert.equal(await field(again, key, TAG).inputValue(), text, `field ${key} restored`);
  assert.deepEqual(await result(again, TAG), shown, 'identical result from the link');
  await assertTable(again, shown);
  // Copy link gives the same link.
  await fresh.close();
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  assertSameOrigin(freshRequests);
  await context.close();
});

test('copy link and reset work as on every calculator', async () => {
  const { context, page, problems } = await open(browser);
  await context.grantPermissions(['clipboard-read', 'clipboard-write'], { origin: ORIGIN });
  await page.goto(url('switching.html'));
  await settled(page, 'ready', TAG);
  await field(page, 'fsw', TAG).fill('750 kHz');
  await settled(page, 'ready', TAG);
  await page.locator(TAG).getByRole('button', { name: 'Copy link' }).click();
  await page.locator(`${TAG} .rn-tool-status`, { hasText: 'Link copied' }).waitFor();
  const copied = new URL(await page.evaluate(() => navigator.clipboard.readText()));
  assert.ok(copied.pathname.endsWith('/switching.html'));
  assert.equal(copied.searchParams.get('fsw'), '750 kHz');
  assert.deepEqual(await result(page, TAG), (await engine(page, { ...DEMO, fsw: 750e3 })).report);
  await page.locator(TAG).getByRole('button', { name: /Reset/ }).click();
  await settled(page, 'ready', TAG);
  assert.equal(await field(page, 'fsw', TAG).inputValue(), '500 kHz');
  assert.equal(new URL(page.url()).search, '', 'reset clears the URL');
  assert.deepEqual(await result(page, TAG), (await engine(page, DEMO)).report);
  assert.deepEqual(problems, []);
  await context.close();
});

test('the linear page\'s "try this rail as a switcher" fills the switching page with that rail', async () => {
  const { context, page, requests, problems } = await open(browser);
  // The linear demo rail on a small board (θJA 200 K/W) and a wider input, so it runs too hot and
  // the linear page offers the switcher prominently.
  await page.goto(url('linear.html?vin-min=5.5%20V&vin-nom=6%20V&vin-max=7V2&theta-ja=200&iout-max=300m&rated=500m'));
  await settled(page, 'ready');
  const lin = await result(page);
  assert.equal(lin.suggestSwitching, true, 'the linear rail fails on heat or efficiency');
  const suggested = page.locator('railnote-linear a[data-carry="switching-suggested"]');
  assert.match(await suggested.textContent(), /try this rail as a switcher/i);
  assert.equal(await page.locator('railnote-linear a[data-carry="switching"]').count(), 1, 'also beside the thermal link');
  await suggested.click();
  await page.waitForURL(/switching\.html/);
  await settled(page, 'ready', TAG);
  const carried = { 'vin-min': '5.5 V', 'vin-nom': '6 V', 'vin-max': '7V2', vout: '3.3 V', iout: '300m', topology: 'buck', inductance: '', 'ripple-ratio': '30 %' };
  for (const [key, text] of Object.entries(carried)) assert.equal(await field(page, key, TAG).inputValue(), text, `carried ${key}`);
  const r = await result(page, TAG);
  assert.equal(r.inductanceProposed, true, 'the inductance is proposed for this rail');
  const input = without({ ...DEMO, vinMin: 5.5, vinNom: 6, vinMax: 7.2, vout: 3.3, iout: 0.3, rippleRatioPct: 30 }, 'inductance');
  assert.deepEqual(r, (await engine(page, input)).report);
  // The proposed L is the largest any corner needs for the wanted 30 % (the contract), so no
  // corner ripples by much more than that.
  close(r.inductanceH, Math.max(...r.corners.map((c) => c.lForRatioH)), REL, 'proposed L = the most any corner needs');
  assert.ok(r.corners.every((c) => c.rippleRatioPct <= 31), 'no corner far above the wanted ratio');
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('the embed page shows the switching estimate from its link, compactly, and reports its height', async () => {
  const { context, page, requests, problems } = await open(browser);
  const frame = await openEmbedHost(page, 'switching-notes.html', url('embed.html?calc=switching&rectifier=diode&fsw=400k'), 'Switching estimate');
  assert.equal(await settled(frame, 'ready', TAG), 'ready');
  assert.equal(await field(frame, 'fsw', TAG).inputValue(), '400k');
  const r = await frame.locator(TAG).evaluate((el) => el.result);
  const input = { ...DEMO, rectifier: 'diode', diodeVf: 0.45, fsw: 400e3 };
  for (const k of SYNC_ONLY) delete input[k];
  const { report } = await engine(page, input);
  assert.deepEqual(r, report, 'the embed computes what the engine gives for its link');
  assert.equal(await frame.locator(`${TAG} [data-block="corners"] details`).count(), 1, 'the corners table is folded');
  assert.equal(await frame.locator(`${TAG} [data-block="losses"] details`).count(), 1, 'the loss table is folded');
  await page.waitForFunction(() => window.heights.some((m) => m.calc === 'switching' && m.height > 300));
  await field(frame, 'fsw', TAG).fill('0');
  assert.equal(await settled(frame, 'error', TAG), 'error');
  await field(frame, 'fsw', TAG).fill('400k');
  assert.equal(await settled(frame, 'ready', TAG), 'ready');
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('every switching input has a label and existing descriptions, ids are unique', async () => {
  const { context, page } = await open(browser);
  await page.goto(url('switching.html'));
  await settled(page, 'ready', TAG);
  const report = await page.evaluate((tag) => [...document.querySelectorAll(`${tag} .rn-inputs input, ${tag} .rn-inputs select`)].map((el) => ({
    key: el.name,
    label: el.labels.length ? el.labels[0].textContent.trim() : '',
    described: (el.getAttribute('aria-describedby') || '').split(' ').filter(Boolean).map((id) => Boolean(document.getElementById(id))),
  })), TAG);
  assert.equal(report.length, 31);
  for (const r of report) {
    assert.ok(r.label.length > 3, `${r.key} has a label: "${r.label}"`);
    assert.ok(r.described.length >= 1 && r.described.every(Boolean), `${r.key} is described by existing elements`);
  }
  const ids = await page.evaluate(() => [...document.querySelectorAll('[id]')].map((e) => e.id));
  assert.equal(new Set(ids).size, ids.length, 'no duplicate ids');
  // The inactive diode field is skipped by Tab: from the body-diode field Tab goes to Q_oss.
  await field(page, 'body-vf', TAG).focus();
  await page.keyboard.press('Tab');
  assert.equal(await page.evaluate(() => document.activeElement.name), 'coss-charge');
  await context.close();
});

test('print shows the inputs, verdict, both charts, link and date, and hides the buttons', async () => {
  const { context, page } = await open(browser);
  await page.goto(url('switching.html?fsw=600k'));
  await settled(page, 'ready', TAG);
  await page.emulateMedia({ media: 'print' });
  await page.evaluate(() => window.dispatchEvent(new Event('beforeprint')));
  const seen = await page.evaluate(() => {
    const visible = (sel) => [...document.querySelectorAll(sel)].some((e) => e.getClientRects().length > 0 && getComputedStyle(e).visibility !== 'hidden');
    return {
      buttons: visible('railnote-switching button'),
      verdict: visible('.rn-verdict'),
      charts: [...document.querySelectorAll('svg.rn-chart')].filter((e) => e.getClientRects().length > 0).length,
      link: document.querySelector('.rn-permalink').textContent,
      date: visible('.rn-record time'),
    };
  });
  assert.equal(seen.buttons, false);
  assert.ok(seen.verdict && seen.date, JSON.stringify(seen));
  assert.equal(seen.charts, 2);
  assert.match(seen.link, /switching\.html\?.*fsw=600k/);
  await page.screenshot({ path: path.join(OUT_DIR, 'switching-print.png'), fullPage: true });
  await context.close();
});

test('screenshots of switching.html, light and dark, and of a diode boost (for looking at)', async () => {
  for (const colorScheme of ['light', 'dark']) {
    const { context, page, requests, problems } = await open(browser, { colorScheme });
    await page.goto(url('switching.html'));
    await settled(page, 'ready', TAG);
    const bg = await page.evaluate(() => getComputedStyle(document.documentElement).backgroundColor);
    const sum = bg.match(/\d+/g).slice(0, 3).map(Number).reduce((a, b) => a + b, 0);
    assert.ok(colorScheme === 'light' ? sum > 600 : sum < 150, `${colorScheme} background ${bg}`);
    await page.screenshot({ path: path.join(OUT_DIR, `switching-${colorScheme}.png`), fullPage: true });
    await page.locator(TAG).screenshot({ path: path.join(OUT_DIR, `switching-widget-${colorScheme}.png`) });
    await page.goto(url('switching.html?topology=boost&rectifier=diode&vout=24&iout=150m&inductance=47u'));
    await settled(page, 'ready', TAG);
    await page.locator(TAG).screenshot({ path: path.join(OUT_DIR, `switching-boost-${colorScheme}.png`) });
    assert.deepEqual(problems, []);
    assertSameOrigin(requests);
    await context.close();
  }
});
