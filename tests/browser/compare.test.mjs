// Browser tests of the linear-or-switching page (site/compare.html with <railnote-compare
// sync-url>), its links to and from the linear and switching pages, and its embed.
//
// What the numbers are checked against:
// - the engine called in the same page: compareRails with an input written out here by hand from
//   the demo's texts, and each side on its own (checkLinear, checkSwitching) with the same rail,
//   since the comparison is defined as those two side by side;
// - JEDEC JESD51's θJA relation T_j = T_a + θJA·P for the converter's package;
// - the definition of the crossing load: below it one side dissipates less, above it the other.
import { test, before, after } from 'node:test';
import assert from 'node:assert/strict';
import path from 'node:path';
import {
  launch, open, url, assertSameOrigin, settled, field, message, result, close, OUT_DIR, openEmbedHost,
} from './browser.mjs';

const TAG = 'railnote-compare';
const SW_TAG = 'railnote-switching';
const REL = 1e-9;

// The demo in SI units, from the page's default texts: the logger's 3.3 V rail (250 mA) from the
// 5.0 V rail (±3 %), 60 °C, the linear page's regulator against an invented 1 MHz synchronous buck.
const RAIL = { vinMin: 4.85, vinNom: 5, vinMax: 5.15, vout: 3.3, iout: 0.25 };
const LIMITS = { voutTolPct: 2, taMax: 60, tjMax: 125, headroomMarginV: 0.3, thermalMarginC: 15 };
const LDO = {
  ldoDropoutModel: 'resistive', ldoDropoutV: 0.3, ldoDropoutAtA: 0.3, ldoRatedA: 0.3, ldoIq: 50e-6, ldoGndPct: 1, ldoThetaJa: 100,
};
const CONVERTER = {
  topology: 'buck', rectifier: 'synchronous', lightLoad: 'discontinuousAllowed',
  fsw: 1e6, iq: 300e-6, minOnTime: 80e-9, maxDutyPct: 95,
  inductance: 15e-6, rippleRatioPct: 30, isat: 0.6, dcr: 0.15, coreLoss: 5e-3, cout: 22e-6, esr: 5e-3,
  mainRdsOn: 0.15, mainGateCharge: 1.5e-9, riseTime: 5e-9, fallTime: 5e-9, driveV: 5,
  rectRdsOn: 0.1, rectGateCharge: 1.5e-9, deadTime: 15e-9, bodyDiodeVf: 0.8, cossCharge: 0.8e-9,
};
const SW_THETA = 60;
const DEMO = { ...RAIL, ...LIMITS, ...LDO, ...CONVERTER, swThetaJa: SW_THETA };

/** The linear side as checkLinear takes it (the contract: ioutMax = ioutTyp = iout). */
function linearInput(x) {
  return {
    vinMin: x.vinMin, vinNom: x.vinNom, vinMax: x.vinMax, vout: x.vout, voutTolPct: x.voutTolPct,
    ioutMax: x.iout, ioutTyp: x.iout, iq: x.ldoIq, gndPct: x.ldoGndPct, dropoutModel: x.ldoDropoutModel,
    dropoutV: x.ldoDropoutV, dropoutAtA: x.ldoDropoutAtA, ratedA: x.ldoRatedA, thetaJa: x.ldoThetaJa,
    taMax: x.taMax, tjMax: x.tjMax, headroomMarginV: x.headroomMarginV, thermalMarginC: x.thermalMarginC,
  };
}
function switchingInput(x) {
  const out = { ...x };
  for (const k of [...Object.keys(LIMITS), ...Object.keys(LDO), 'swThetaJa']) delete out[k];
  return out;
}

/** Call one of the engine's functions in the page (the same module the widgets use). */
async function engine(page, fn, input) {
  return page.evaluate(async ([name, x, module]) => {
    const { ready } = await import(module);
    const api = await ready;
    try {
      return { report: api[name](x) };
    } catch (e) {
      return { error: { field: e.field, message: e.message } };
    }
  }, [fn, input, url('js/engine.js')]);
}

async function formatted(page, value, kind, digits = 3) {
  return page.evaluate(async ([v, k, d, module]) => {
    const { ready } = await import(module);
    return (await ready).formatQuantity(v, k, d);
  }, [value, kind, digits, url('js/engine.js')]);
}

/** The comparison is its two sides: check it against checkLinear and checkSwitching run alone. */
async function assertSides(page, r, input) {
  const lin = (await engine(page, 'checkLinear', linearInput(input))).report;
  const sw = (await engine(page, 'checkSwitching', switchingInput(input))).report;
  assert.ok(lin && sw, 'both sides compute alone');
  assert.equal(r.linearPossible, true);
  assert.equal(r.linearVerdict, lin.verdict);
  assert.equal(r.switchingVerdict, sw.verdict);
  r.corners.forEach((c, i) => {
    const lf = lin.corners[i].full;
    close(c.linear.dissipationW, lf.totalW, REL, `linear dissipation at ${c.label}`);
    close(c.linear.efficiencyPct, lf.efficiencyPct, REL, 'linear efficiency');
    close(c.linear.tjC, lf.tjC, REL, 'linear T_j');
    close(c.linear.inputCurrentA, lf.inputA, REL, 'linear input current');
    const sc = sw.corners[i];
    const L = sc.losses;
    close(c.switching.dissipationW, L.totalW, REL, `switching dissipation at ${c.label}`);
    // The converter's package dissipates all but the inductor's, the diode's and the output
    // capacitor's losses (those parts are their own packages).
    close(c.switching.packageW, L.totalW - L.inductorCopperW - L.inductorCoreW - L.diodeW - L.outputEsrW, 1e-9, 'package share');
    close(c.switching.tjC, input.taMax + input.swThetaJa * c.switching.packageW, REL, 'T_j = T_a + θJA·P (JESD51)');
    close(c.switching.efficiencyPct, sc.efficiencyPct, REL, 'switching efficiency');
    close(c.switching.inputCurrentA, sc.inputCurrentA, REL, 'switching input current');
  });
  // The crossing at the nominal input splits the curve into a side where each wins.
  const nom = r.corners[1];
  const { ioutA, linearW, switchingW } = r.curves;
  if (nom.crossingLoadA !== null) {
    for (let i = 0; i < ioutA.length; i++) {
      const rel = ioutA[i] / nom.crossingLoadA;
      if (rel < 0.97) assert.ok(linearW[i] < switchingW[i], `linear cooler at ${ioutA[i]} A, below the crossing`);
      if (rel > 1.03) assert.ok(linearW[i] > switchingW[i], `switcher cooler at ${ioutA[i]} A, above the crossing`);
    }
  }
  return { lin, sw };
}

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser?.close(); });

test('the demo compares the two sides as each calculator computes them alone, and says so in words', async () => {
  const { context, page, requests, problems } = await open(browser);
  await page.goto(url('compare.html'));
  await settled(page, 'ready', TAG);
  const shown = await result(page, TAG);
  const { report, error } = await engine(page, 'compareRails', DEMO);
  assert.equal(error, undefined);
  assert.deepEqual(shown, report, 'the widget shows what the engine gives for the demo inputs');
  await assertSides(page, report, DEMO);
  // The demo shows a real trade-off: the buck is far cooler at full load, the linear regulator
  // wins at the lightest loads, and the two cross inside the sweep.
  const nom = report.corners[1];
  assert.ok(nom.linear.dissipationW > 3 * nom.switching.dissipationW, 'the buck wastes far less at full load');
  assert.ok(nom.crossingLoadA > 0.01 * RAIL.iout && nom.crossingLoadA < RAIL.iout, `crossing ${nom.crossingLoadA} A inside the range`);
  const w = page.locator(TAG);
  for (const c of report.corners) {
    for (const [q, kind] of [['dissipationW', 'power'], ['efficiencyPct', 'percent'], ['tjC', 'temperature'], ['inputCurrentA', 'current'], ['packageW', 'power']]) {
      for (const side of ['linear', 'switching']) {
        const text = (await w.locator(`.rn-compare-table td[data-corner="${c.label}"][data-side="${side}"][data-q="${q}"]`).textContent()).trim();
        assert.equal(text, await formatted(page, c[side][q], kind), `${side} ${q} at ${c.label}`);
      }
    }
    assert.equal((await w.locator(`.rn-crossing li[data-corner="${c.label}"] [data-q="crossingLoadA"]`).textContent()).trim(),
      await formatted(page, c.crossingLoadA, 'current'));
  }
  assert.match(await w.locator('.rn-crossing li[data-corner="nom"]').textContent(), /below it the linear regulator wastes less/);
  const verdicts = await w.locator('.rn-side-verdict').evaluateAll((els) => els.map((e) => [e.dataset.side, e.dataset.verdict, e.querySelector('.rn-summary').textContent]));
  assert.deepEqual(verdicts, [['linear', report.linearVerdict, report.linearSummary], ['switching', report.switchingVerdict, report.switchingSummary]]);
  assert.deepEqual(await w.locator('.rn-tradeoffs li').allTextContents(), report.tradeoffs);
  assert.ok(report.tradeoffs.length >= 5, 'noise, supply rejection, interference, transient, parts count');
  const chart = await w.locator('svg.rn-chart').evaluateAll((svgs) => svgs.map((s) => ({
    paths: [...s.querySelectorAll('path.rn-series')].map((p) => p.getAttribute('d')),
    ticks: [...s.querySelectorAll('.rn-chart-axes text')].map((t) => t.textContent),
    legend: [...s.closest('figure').querySelectorAll('.rn-legend li')].map((li) => li.textContent),
  })));
  assert.equal(chart.length, 1);
  assert.equal(chart[0].paths.length, 4, 'linear, switching, crossing, full load');
  assert.ok(chart[0].paths.every((d) => d && !/NaN|Infinity|undefined/.test(d)));
  assert.ok(chart[0].ticks.includes('10.0 mA') && chart[0].ticks.includes('100 mW'), `log ticks ${chart[0].ticks}`);
  const crossingText = await formatted(page, nom.crossingLoadA, 'current');
  assert.ok(chart[0].legend.some((l) => l.includes(`Equal dissipation at ${crossingText}`)), 'the crossing is marked');
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('a boost rail has no linear side, and the page says why in words', async () => {
  const { context, page, problems } = await open(browser);
  await page.goto(url('compare.html?topology=boost&vout=9%20V&iout=100m'));
  await settled(page, 'ready', TAG);
  const r = await result(page, TAG);
  assert.deepEqual(r, (await engine(page, 'compareRails', { ...DEMO, topology: 'boost', vout: 9, iout: 0.1 })).report);
  assert.equal(r.linearPossible, false);
  assert.ok(r.linearImpossible && r.linearImpossible.length > 10);
  assert.equal(r.curves.linearW, null);
  const box = page.locator(`${TAG} .rn-side-verdict[data-side="linear"]`);
  assert.match(await box.textContent(), /Not possible/);
  assert.ok((await box.textContent()).includes(r.linearImpossible));
  assert.equal((await page.locator(`${TAG} td[data-side="linear"][data-q="dissipationW"]`).allTextContents()).join(), '—,—,—');
  assert.equal(await page.locator(`${TAG} svg.rn-chart path.rn-series`).count(), 2, 'switching curve and the full load only');
  assert.deepEqual(problems, []);
  await context.close();
});

test('bad values give messages at their fields (the linear side\'s too), and the widget recovers', async () => {
  const { context, page, requests, problems } = await open(browser);
  await page.goto(url('compare.html'));
  await settled(page, 'ready', TAG);
  const cases = [
    ['ldo-theta-ja', '-5', '100 K/W', /θJA|thermal|above|positive|zero/i],
    ['sw-theta-ja', 'abc', '60 K/W', /thermal resistance|K\/W/i],
    ['vout', '6 V', '3.3 V', /V_out|output|input|below/i],
    ['ldo-iq', '5 V', '50 µA', /current|A\b/i],
    ['ta-max', '130', '60 °C', /T_j,max|junction|limit|below/i],
  ];
  for (const [key, bad, good, words] of cases) {
    await field(page, key, TAG).fill(bad);
    assert.equal(await settled(page, 'error', TAG), 'error', `${key}=${bad} is refused`);
    const msg = (await message(page, key, TAG).textContent()).trim();
    assert.match(msg, words, `${key}=${bad}: message at the field: "${msg}"`);
    assert.ok(!/NaN|Infinity|undefined|panicked|wasm-function/.test(msg), `a sentence: "${msg}"`);
    assert.equal(await page.locator(`${TAG} .rn-field.rn-bad`).count(), 1, 'only that field is marked');
    assert.equal(await page.locator(`${TAG} .rn-side-verdict`).count(), 0, 'no stale verdicts');
    await field(page, key, TAG).fill(good);
    assert.equal(await settled(page, 'ready', TAG), 'ready', `fixing ${key} computes again`);
  }
  assert.deepEqual(await result(page, TAG), (await engine(page, 'compareRails', DEMO)).report);
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('a link round trip in a fresh page reproduces every input and the result', async () => {
  const { context, page, requests, problems } = await open(browser);
  await page.goto(url('compare.html'));
  await settled(page, 'ready', TAG);
  const edits = { 'vin-max': '5V5', 'ldo-theta-ja': '150', 'sw-theta-ja': '45 K/W', rectifier: 'diode', 'diode-vf': '350m', iout: '0.2', 'ldo-dropout-model': 'constant' };
  for (const [key, text] of Object.entries(edits)) {
    if (['rectifier', 'ldo-dropout-model'].includes(key)) await field(page, key, TAG).selectOption(text);
    else await field(page, key, TAG).fill(text);
  }
  await settled(page, 'ready', TAG);
  const shown = await result(page, TAG);
  const input = { ...DEMO, vinMax: 5.5, ldoThetaJa: 150, swThetaJa: 45, rectifier: 'diode', diodeVf: 0.35, iout: 0.2, ldoDropoutModel: 'constant' };
  for (const k of ['rectRdsOn', 'rectGateCharge', 'deadTime', 'bodyDiodeVf']) delete input[k];
  assert.deepEqual(shown, (await engine(page, 'compareRails', input)).report);
  await assertSides(page, shown, input);
  await page.waitForFunction(() => new URLSearchParams(location.search).get('ldo-dropout-model') === 'constant');
  const texts = await page.locator(`${TAG} .rn-inputs`).evaluate((form) => Object.fromEntries([...form.querySelectorAll('input, select')].map((e) => [e.name, e.value])));
  const fresh = await browser.newContext();
  const again = await fresh.newPage();
  const freshRequests = [];
  fresh.on('request', (rq) => freshRequests.push(rq.url()));
  await again.goto(page.url());
  await settled(again, 'ready', TAG);
  const restored = await again.locator(`${TAG} .rn-inputs`).evaluate((form) => Object.fromEntries([...form.querySelectorAll('input, select')].map((e) => [e.name, e.value])));
  assert.deepEqual(restored, texts, 'every field text restored');
  assert.deepEqual(await result(again, TAG), shown, 'identical result from the link');
  await fresh.close();
  assertSameOrigin(freshRequests);
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('from the linear page, "compare it with a switching converter" carries the regulator and the rail', async () => {
  const { context, page, requests, problems } = await open(browser);
  // A hot variant of the linear demo, so the linear page offers the switcher prominently.
  await page.goto(url('linear.html?vin-max=6V&theta-ja=180%20K%2FW&ta-max=55C&iq=80u&gnd=2&dropout=250m&tj-max=150'));
  await settled(page, 'ready');
  const lin = await result(page);
  assert.equal(lin.suggestSwitching, true);
  await page.locator('railnote-linear a[data-carry="compare-suggested"]').click();
  await page.waitForURL(/compare\.html/);
  await settled(page, 'ready', TAG);
  const carried = {
    'vin-min': '4.85 V', 'vin-nom': '5.0 V', 'vin-max': '6V', vout: '3.3 V', iout: '250 mA', 'vout-tol': '2 %',
    'ta-max': '55C', 'tj-max': '150', 'headroom-margin': '0.3 V', 'thermal-margin': '15 K',
    'ldo-dropout-model': 'resistive', 'ldo-dropout': '250m', 'ldo-dropout-at': '300 mA', 'ldo-rated': '300 mA',
    'ldo-iq': '80u', 'ldo-gnd': '2', 'ldo-theta-ja': '180 K/W', topology: 'buck', inductance: '', 'ripple-ratio': '30 %',
  };
  for (const [key, text] of Object.entries(carried)) assert.equal(await field(page, key, TAG).inputValue(), text, `carried ${key}`);
  const r = await result(page, TAG);
  // The linear side at full load is exactly the linear page's own full-load corners.
  r.corners.forEach((c, i) => {
    close(c.linear.dissipationW, lin.corners[i].full.totalW, REL, `dissipation at ${c.label} as on the linear page`);
    close(c.linear.tjC, lin.corners[i].full.tjC, REL, `T_j at ${c.label} as on the linear page`);
  });
  assert.equal(r.linearVerdict, 'fail', 'too hot there, too hot here');
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('"open this converter in the switching estimate" carries the converter, with the same losses', async () => {
  const { context, page, requests, problems } = await open(browser);
  await page.goto(url('compare.html?fsw=800k&inductance=18u'));
  await settled(page, 'ready', TAG);
  const cmp = await result(page, TAG);
  await page.locator(`${TAG} a[data-carry="switching"]`).click();
  await page.waitForURL(/switching\.html/);
  await settled(page, 'ready', SW_TAG);
  for (const [key, text] of Object.entries({ fsw: '800k', inductance: '18u', vout: '3.3 V', iout: '250 mA', 'main-rds-on': '150 mΩ', 'coss-charge': '0.8 nC' })) {
    assert.equal(await field(page, key, SW_TAG).inputValue(), text, `carried ${key}`);
  }
  assert.equal(new URL(page.url()).searchParams.has('ldo-theta-ja'), false, 'only the converter\'s keys travel');
  const sw = await result(page, SW_TAG);
  sw.corners.forEach((c, i) => close(c.losses.totalW, cmp.corners[i].switching.dissipationW, REL, `same losses at ${c.label}`));
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('from the switching page, "compare with a linear regulator" carries the whole converter', async () => {
  const { context, page, requests, problems } = await open(browser);
  await page.goto(url('switching.html?iout=0.5'));
  await settled(page, 'ready', SW_TAG);
  const sw = await result(page, SW_TAG);
  const texts = await page.locator(`${SW_TAG} .rn-inputs`).evaluate((form) => Object.fromEntries([...form.querySelectorAll('input, select')].map((e) => [e.name, e.value])));
  await page.locator(`${SW_TAG} a[data-carry="compare"]`).click();
  await page.waitForURL(/compare\.html/);
  await settled(page, 'ready', TAG);
  for (const [key, text] of Object.entries(texts)) assert.equal(await field(page, key, TAG).inputValue(), text, `carried ${key}`);
  const cmp = await result(page, TAG);
  // The logger's 5 V buck from 12 V: the switching side is the switching page's own estimate.
  cmp.corners.forEach((c, i) => {
    close(c.switching.dissipationW, sw.corners[i].losses.totalW, REL, `losses at ${c.label} as on the switching page`);
    close(c.switching.efficiencyPct, sw.corners[i].efficiencyPct, REL, 'efficiency as on the switching page');
  });
  assert.equal(cmp.linearPossible, true, 'a 5 V linear regulator from 10.8 V is possible, if hot');
  assert.ok(cmp.corners[2].linear.dissipationW > 10 * cmp.corners[2].switching.dissipationW, 'and wastes far more');
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('the embed page shows the comparison from its link, compactly, and reports its height', async () => {
  const { context, page, requests, problems } = await open(browser);
  const frame = await openEmbedHost(page, 'compare-notes.html', url('embed.html?calc=compare&iout=150m&ldo-theta-ja=120'), 'Linear or switching');
  assert.equal(await settled(frame, 'ready', TAG), 'ready');
  const r = await frame.locator(TAG).evaluate((el) => el.result);
  assert.deepEqual(r, (await engine(page, 'compareRails', { ...DEMO, iout: 0.15, ldoThetaJa: 120 })).report);
  assert.equal(await frame.locator(`${TAG} [data-block="sides"] details`).count(), 1, 'the table is folded');
  await page.waitForFunction(() => window.heights.some((m) => m.calc === 'compare' && m.height > 300));
  await field(frame, 'iout', TAG).fill('x');
  assert.equal(await settled(frame, 'error', TAG), 'error');
  await field(frame, 'iout', TAG).fill('150m');
  assert.equal(await settled(frame, 'ready', TAG), 'ready');
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('every comparison input has a label, ids are unique', async () => {
  const { context, page } = await open(browser);
  await page.goto(url('compare.html'));
  await settled(page, 'ready', TAG);
  const report = await page.evaluate((tag) => [...document.querySelectorAll(`${tag} .rn-inputs input, ${tag} .rn-inputs select`)].map((el) => ({
    key: el.name,
    label: el.labels.length ? el.labels[0].textContent.trim() : '',
    described: (el.getAttribute('aria-describedby') || '').split(' ').filter(Boolean).map((id) => Boolean(document.getElementById(id))),
  })), TAG);
  assert.equal(report.length, 44);
  for (const r of report) {
    assert.ok(r.label.length > 3, `${r.key} has a label`);
    assert.ok(r.described.every(Boolean), `${r.key} described by existing elements`);
  }
  const ids = await page.evaluate(() => [...document.querySelectorAll('[id]')].map((e) => e.id));
  assert.equal(new Set(ids).size, ids.length, 'no duplicate ids');
  await context.close();
});

test('screenshots of compare.html, light and dark (for looking at)', async () => {
  for (const colorScheme of ['light', 'dark']) {
    const { context, page, requests, problems } = await open(browser, { colorScheme });
    await page.goto(url('compare.html'));
    await settled(page, 'ready', TAG);
    await page.screenshot({ path: path.join(OUT_DIR, `compare-${colorScheme}.png`), fullPage: true });
    await page.locator(TAG).screenshot({ path: path.join(OUT_DIR, `compare-widget-${colorScheme}.png`) });
    assert.deepEqual(problems, []);
    assertSameOrigin(requests);
    await context.close();
  }
});
