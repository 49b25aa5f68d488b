// Browser tests of the thermal path page (site/thermal.html with <railnote-thermal sync-url>), the
// carry-over link from the linear page, and the thermal embed.
import { test, before, after } from 'node:test';
import assert from 'node:assert/strict';
import path from 'node:path';
import {
  launch, open, url, assertSameOrigin, settled, field, message, result, close, OUT_DIR, ORIGIN, openEmbedHost,
} from './browser.mjs';

const TAG = 'railnote-thermal';

// Tolerances. The engine evaluates the same closed forms in f64 through libm, so hand-worked
// values agree to rounding; numbers that went through a six-figure link text agree to 1e-5.
const REL = 1e-9;
const REL_LINK = 1e-5;

// The demo of the thermal contract (the brief's invented soil-moisture logger: its 3.3 V
// regulator at 0.49 W in a 60 °C enclosure, the radio sending 50 ms bursts every 500 ms), an
// invented Foster network whose stages add up to θJA, and a made-up case-top reading.
const DEMO = {
  powerW: 0.49, taMax: 60, taMin: -20, tjMax: 125, marginC: 15, thetaJa: 100,
  foster: [[2, 1e-3], [8, 10e-3], [25, 0.1], [65, 2]],
  pulseW: 0.49, onS: 0.05, periodS: 0.5, periods: 10, psiJt: 8, caseTopC: 95,
};

// Worked by hand from the equations on thermal.html:
// - T_j = T_a + θ·P (JEDEC JESD51-1/-2A definition of θJA), margin T_j,max − T_j, and the same
//   relation solved for P and for T_a at the wanted margin;
// - T_j ≈ T_top + ΨJT·P (JEDEC JESD51-2A ΨJT);
// - Foster: Z_th(t) = Σ R_i(1 − e^(−t/τ_i)); one pulse from cold: T_a + P·Z_th(t_on);
// - periodic train: ΔT_peak = P·Σ R_i(1 − e^(−t_on/τ_i))/(1 − e^(−T/τ_i)), the valley that times
//   e^(−(T − t_on)/τ_i) per stage; average T_a + P·(t_on/T)·Σ R_i;
// - the series: each stage's exact exponential over each constant-power step, from zero rise.
//   For the plot core splits every step into equal parts (the same update applied in parts, so
//   still exact): min(12, max(1, floor(4000 / (steps × repeats)))) parts, as core/src/thermal.rs
//   documents; the hand work below splits the same way.
function zth(t, foster = DEMO.foster) {
  return foster.reduce((s, [r, tau]) => s + r * (1 - Math.exp(-t / tau)), 0);
}
function stepSeries(foster, wholeSteps, repeats, taC) {
  const parts = Math.min(12, Math.max(1, Math.floor(4000 / (wholeSteps.length * repeats))));
  const steps = wholeSteps.flatMap(([p, dt]) => Array.from({ length: parts }, () => [p, dt / parts]));
  const rise = foster.map(() => 0);
  const out = [[0, taC]];
  let t = 0;
  for (let k = 0; k < repeats; k++) {
    for (const [p, dt] of steps) {
      foster.forEach(([r, tau], i) => {
        const a = Math.exp(-dt / tau);
        rise[i] = rise[i] * a + p * r * (1 - a);
      });
      t += dt;
      out.push([t, taC + rise.reduce((s, x) => s + x, 0)]);
    }
  }
  return out;
}
const X = DEMO;
const E = {
  tjC: X.taMax + X.thetaJa * X.powerW, // 60 + 100·0.49 = 109 °C
  marginC: X.tjMax - (X.taMax + X.thetaJa * X.powerW), // 16 K
  maxPowerW: (X.tjMax - X.marginC - X.taMax) / X.thetaJa, // 0.5 W
  hottestAmbientC: X.tjMax - X.marginC - X.thetaJa * X.powerW, // 61 °C
  fromCaseTopC: X.caseTopC + X.psiJt * X.powerW, // 98.92 °C
  rTotal: X.foster.reduce((s, [r]) => s + r, 0), // 100 K/W
  dutyPct: 100 * X.onS / X.periodS, // 10 %
  singlePeakC: X.taMax + X.pulseW * zth(X.onS),
  trainPeakC: X.taMax + X.pulseW * X.foster.reduce((s, [r, tau]) => s + r * (1 - Math.exp(-X.onS / tau)) / (1 - Math.exp(-X.periodS / tau)), 0),
  trainValleyC: X.taMax + X.pulseW * X.foster.reduce((s, [r, tau]) => s + r * (1 - Math.exp(-X.onS / tau)) * Math.exp(-(X.periodS - X.onS) / tau) / (1 - Math.exp(-X.periodS / tau)), 0),
  averageC: X.taMax + X.pulseW * (X.onS / X.periodS) * X.foster.reduce((s, [r]) => s + r, 0), // 64.9 °C
  series: stepSeries(X.foster, [[X.pulseW, X.onS], [0, X.periodS - X.onS]], X.periods, X.taMax),
};
E.seriesPeakC = Math.max(...E.series.map((p) => p[1]));
// Sanity of the hand work itself: the settled peak lies above the peak after 10 periods (the
// 2 s stage has not settled in 5 s), which lies above one pulse from cold.
assert.ok(E.trainPeakC > E.seriesPeakC && E.seriesPeakC > E.singlePeakC && E.trainValleyC > X.taMax);

function assertDemoNumbers(r) {
  assert.equal(r.verdict, 'pass', 'steady 16 K ≥ 15 K, case-top 26 K, pulse peak 52 K below the limit');
  close(r.steady.thetaTotal, 100, REL, 'θ');
  close(r.steady.tjC, E.tjC, REL, 'T_j');
  close(r.steady.marginC, E.marginC, REL, 'margin');
  close(r.steady.maxPowerW, E.maxPowerW, REL, 'largest power');
  close(r.steady.hottestAmbientC, E.hottestAmbientC, REL, 'hottest ambient');
  assert.equal(r.steady.thetaSaNeededKPerW, null, 'no heat sink on the θJA path');
  close(r.measured.fromCaseTopC, E.fromCaseTopC, REL, 'T_j from the case top');
  assert.equal(r.measured.fromBoardC, null);
  // Derating at the coldest ambient: (125 + 20)/100 = 1.45 W; with margin (110 + 20)/100 = 1.3 W.
  close(r.derating.limit[0][1], 1.45, REL, 'derating at T_a,min');
  close(r.derating.withMargin[0][1], 1.3, REL, 'derating with margin at T_a,min');
  const t = r.transient;
  close(t.rTotal, E.rTotal, REL, 'Σ R_i');
  assert.ok(t.zth.length >= 10);
  for (const [time, z] of t.zth) close(z, zth(time), REL, `Z_th(${time})`);
  close(t.pulse.dutyPct, E.dutyPct, REL, 'duty');
  close(t.pulse.singlePeakC, E.singlePeakC, REL, 'one pulse from cold');
  close(t.pulse.trainPeakC, E.trainPeakC, REL, 'settled peak');
  close(t.pulse.trainValleyC, E.trainValleyC, REL, 'settled valley');
  close(t.pulse.averageC, E.averageC, REL, 'average');
  assert.equal(t.series.length, E.series.length, 'one point per step part, plus the start');
  t.series.forEach(([time, tj], i) => {
    close(time, E.series[i][0], REL, `series time ${i}`);
    close(tj, E.series[i][1], REL, `series T_j ${i}`);
  });
  close(t.seriesPeakC, E.seriesPeakC, REL, 'series peak');
}

/** The visible numbers: the engine's formatter at 3 figures of the hand-worked values. */
async function assertDemoText(page) {
  const w = page.locator(TAG);
  await w.locator('.rn-verdict-word', { hasText: 'Pass' }).waitFor();
  const q = async (name) => (await w.locator(`[data-q="${name}"]`).textContent()).trim();
  assert.equal(await q('tjC'), '109 °C');
  assert.equal(await q('marginC'), '16.0 K');
  assert.equal(await q('maxPowerW'), '500 mW');
  assert.equal(await q('hottestAmbientC'), '61.0 °C');
  assert.equal(await q('fromCaseTopC'), '98.9 °C'); // 98.92 °C
  assert.equal(await q('rTotal'), '100 K/W');
  assert.equal(await q('dutyPct'), '10.0 %');
  assert.equal(await q('singlePeakC'), '70.5 °C'); // 70.48 °C
  assert.equal(await q('trainPeakC'), '73.3 °C'); // 73.28 °C
  assert.equal(await q('trainValleyC'), '62.9 °C'); // 62.89 °C
  assert.equal(await q('averageC'), '64.9 °C');
  assert.equal(await q('seriesPeakC'), '73.0 °C'); // 72.99 °C
  const checks = await w.locator('.rn-check').evaluateAll((els) => els.map((e) => [e.dataset.check, e.querySelector('.rn-check-status').textContent]));
  assert.deepEqual(checks.map((c) => c[0]).sort(), ['caseTop', 'pulse', 'steady']);
  assert.ok(checks.every((c) => c[1] === 'Pass'), `every check passes in words: ${checks}`);
  // Three plots, each an accessible SVG with finite paths and a legend in words.
  const charts = await w.locator('svg.rn-chart').evaluateAll((svgs) => svgs.map((s) => ({
    role: s.getAttribute('role'),
    title: s.querySelector('title')?.textContent,
    paths: [...s.querySelectorAll('path')].map((p) => p.getAttribute('d')),
    ticks: [...s.querySelectorAll('.rn-chart-axes text')].map((t) => t.textContent),
    legend: [...s.closest('figure').querySelectorAll('.rn-legend li')].map((li) => li.textContent),
  })));
  assert.equal(charts.length, 3, 'derating, Z_th and T_j over time');
  for (const c of charts) {
    assert.equal(c.role, 'img');
    assert.ok(c.title && c.legend.length >= 3, `${c.title}: legend in words`);
    assert.ok(c.paths.length >= 3 && c.paths.every((d) => d && !/NaN|Infinity|undefined/.test(d)), `${c.title}: finite paths`);
  }
  // The Z_th plot has a log time axis: decade ticks formatted by the engine.
  for (const tick of ['100 µs', '1.00 ms', '10.0 ms', '100 ms', '1.00 s']) assert.ok(charts[1].ticks.includes(tick), `log tick ${tick} in ${charts[1].ticks}`);
  assert.ok(charts[2].legend.some((l) => /peak 73\.3 °C/.test(l)) && charts[2].legend.some((l) => /valley 62\.9 °C/.test(l)), 'peak and valley marked');
  assert.ok(charts[2].legend.some((l) => /Junction limit 125 °C/.test(l)) && charts[2].legend.some((l) => /margin, 110 °C/.test(l)), 'limit and with-margin lines');
}

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser?.close(); });

test('the demo computes the hand-worked verdict and numbers, and shows them in words', async () => {
  const { context, page, requests, problems } = await open(browser);
  await page.goto(url('thermal.html'));
  await settled(page, 'ready', TAG);
  assertDemoNumbers(await result(page, TAG));
  await assertDemoText(page);
  // θJA path: only θJA shows; the chain's fields are hidden.
  assert.equal(await field(page, 'theta-ja', TAG).isVisible(), true);
  assert.equal(await field(page, 'theta-jc', TAG).isVisible(), false);
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('a heat-sink chain: the θSA needed in words, and when none can do it', async () => {
  const { context, page, problems } = await open(browser);
  await page.goto(url('thermal.html'));
  await settled(page, 'ready', TAG);
  await field(page, 'path', TAG).selectOption('chain');
  await settled(page, 'ready', TAG);
  assert.equal(await field(page, 'theta-ja', TAG).isVisible(), false, 'θJA hidden on the chain path');
  assert.equal(await field(page, 'theta-jc', TAG).isVisible(), true);
  // θSA needed = (T_j,max − m − T_a,max)/P − θJC − θCS = 50/0.49 − 15 − 1.5 = 85.54 K/W.
  let r = await result(page, TAG);
  close(r.steady.thetaSaNeededKPerW, 50 / 0.49 - 16.5, REL, 'θSA needed');
  assert.equal(r.steady.tjC, null, 'no T_j without a chosen heat sink');
  assert.equal(r.derating, null);
  const need = page.locator(`${TAG} [data-block="heatSink"]`);
  assert.match(await need.textContent(), /θSA at most 85\.5 K\/W/);
  // A chosen sink of 20 K/W: θ = 36.5 K/W, T_j = 60 + 0.49·36.5 = 77.885 °C.
  await field(page, 'theta-sa', TAG).fill('20 K/W');
  await settled(page, 'ready', TAG);
  r = await result(page, TAG);
  close(r.steady.thetaTotal, 36.5, REL, 'θJC + θCS + θSA');
  close(r.steady.tjC, 60 + 0.49 * 36.5, REL, 'T_j through the heat sink');
  assert.equal(await page.locator(`${TAG} [data-q="tjC"]`).textContent(), '77.9 °C');
  // θJC 150 K/W alone exceeds the allowed 102 K/W: the θSA needed is negative and the page says
  // in words that no heat sink can do it.
  await field(page, 'theta-sa', TAG).fill('');
  await field(page, 'theta-jc', TAG).fill('150');
  await settled(page, 'ready', TAG);
  r = await result(page, TAG);
  close(r.steady.thetaSaNeededKPerW, 50 / 0.49 - 151.5, REL, 'negative θSA needed');
  assert.match(await need.textContent(), /No heat sink can do it/);
  assert.ok(r.warnings.length >= 1, 'the engine warns too');
  assert.deepEqual(problems, []);
  await context.close();
});

test('a board reading, a power rating and a power profile follow their equations', async () => {
  const { context, page, problems } = await open(browser);
  await page.goto(url('thermal.html?psi-jb=5%20K%2FW&board=90&power-rating=1%20W&p1=1%20W&d1=20%20ms&p2=0.2&d2=80m&periods=3'));
  await settled(page, 'ready', TAG);
  const r = await result(page, TAG);
  // JESD51-12 ΨJB estimate: T_j ≈ T_b + ΨJB·P = 90 + 5·0.49 = 92.45 °C; the case-top one stays.
  close(r.measured.fromBoardC, 92.45, REL, 'T_j from the board');
  close(r.measured.fromCaseTopC, E.fromCaseTopC, REL, 'T_j from the case top');
  assert.equal(await page.locator(`${TAG} [data-q="fromBoardC"]`).textContent(), '92.5 °C');
  // The rating caps the derating curve: at −20 °C the junction would allow 1.45 W, the package 1 W.
  assert.equal(r.derating.ratingW, 1);
  close(r.derating.limit[0][1], 1, REL, 'derating capped by the rating');
  assert.ok(r.derating.limit.every(([, pw]) => pw <= 1 + 1e-12), 'never above the rating');
  // The profile (1 W for 20 ms, 0.2 W for 80 ms, three times) replaces the pulse in the series:
  // each point is the stage-by-stage exponential update worked here.
  const want = stepSeries(X.foster, [[1, 0.02], [0.2, 0.08]], 3, X.taMax);
  assert.equal(r.transient.series.length, want.length);
  r.transient.series.forEach(([time, tj], i) => {
    close(time, want[i][0], REL, `profile series time ${i}`);
    close(tj, want[i][1], REL, `profile series T_j ${i}`);
  });
  close(r.transient.seriesPeakC, Math.max(...want.map((q) => q[1])), REL, 'profile series peak');
  // The profile holds text, so its folded rows are open.
  assert.equal(await field(page, 'p1', TAG).isVisible(), true);
  assert.deepEqual(problems, []);
  await context.close();
});

// The demo typed in other accepted spellings (SI prefixes, IEC 60062 letter code, units or none).
const TYPED = {
  power: '490m', 'ta-max': '60C', 'ta-min': '-20', 'tj-max': '125 °C', margin: '15', path: 'ja',
  'theta-ja': '100', 'psi-jt': '8', 'case-top': '95', r1: '2', tau1: '1m', r2: '8 K/W', tau2: '10 ms',
  r3: '25', tau3: '100m', r4: '65', tau4: '2', 'pulse-power': '0W49', 'pulse-on': '50m', 'pulse-period': '0.5 s',
  periods: '10',
};

test('typed in other spellings, the demo gives the same numbers; its link reproduces them and every field text', async () => {
  const { context, page, requests, problems } = await open(browser);
  await page.goto(url('thermal.html?power=1&theta-ja=50'));
  await settled(page, 'ready', TAG);
  for (const [key, text] of Object.entries(TYPED)) {
    const f = field(page, key, TAG);
    if (key === 'path' || key === 'periods') await f.selectOption(text);
    else await f.fill(text);
  }
  await settled(page, 'ready', TAG);
  assertDemoNumbers(await result(page, TAG));
  await page.waitForFunction(() => new URLSearchParams(location.search).get('pulse-period') === '0.5 s');
  const params = new URL(page.url()).searchParams;
  for (const [key, text] of Object.entries(TYPED)) assert.equal(params.get(key), text, `URL key ${key}`);
  assert.equal(params.has('r5'), false, 'empty rows stay out of the link');

  const again = await context.newPage();
  await again.goto(page.url());
  await settled(again, 'ready', TAG);
  for (const [key, text] of Object.entries(TYPED)) assert.equal(await field(again, key, TAG).inputValue(), text, `field ${key} restored`);
  assert.deepEqual(await result(again, TAG), await result(page, TAG), 'identical result from the link');
  await assertDemoText(again);

  // Clearing an optional field whose default is not empty survives the link as key=.
  await field(again, 'psi-jt', TAG).fill('');
  await field(again, 'case-top', TAG).fill('');
  await settled(again, 'ready', TAG);
  await again.waitForFunction(() => new URLSearchParams(location.search).get('case-top') === '');
  const third = await context.newPage();
  await third.goto(again.url());
  await settled(third, 'ready', TAG);
  assert.equal(await field(third, 'psi-jt', TAG).inputValue(), '');
  assert.equal((await result(third, TAG)).measured.fromCaseTopC, null);
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('bad values give messages at their fields, and fixing them computes again', async () => {
  const { context, page, requests, problems } = await open(browser);
  await page.goto(url('thermal.html?path=chain&theta-sa=20'));
  await settled(page, 'ready', TAG);
  const cases = [
    // [key, bad text, good text, what the message must say]
    ['theta-jc', '-5', '15 K/W', /θJC/],
    ['tau2', '0', '10 ms', /τ/],
    ['ta-max', '130', '60 °C', /T_j,max|junction limit|below/i],
    ['r1', 'abc', '2 K/W', /thermal resistance/i],
    ['pulse-on', '2 s', '50 ms', /period/i],
    ['power', '5 ms', '0.49 W', /power/i],
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
  // A list error names the entry of the list sent; with row 1 empty, foster[1] is row 3.
  await field(page, 'r1', TAG).fill('');
  await field(page, 'tau1', TAG).fill('');
  await field(page, 'tau3', TAG).fill('0');
  await settled(page, 'error', TAG);
  assert.match(await message(page, 'tau3', TAG).textContent(), /τ/);
  assert.equal(await page.locator(`${TAG} .rn-field.rn-bad`).evaluateAll((els) => els.map((e) => e.dataset.key)).then((k) => k.join()), 'tau3');
  await field(page, 'tau3', TAG).fill('100 ms');
  await settled(page, 'ready', TAG);
  // A row filled in only partly gets a message at its empty cell.
  await field(page, 'r5', TAG).fill('5 K/W');
  await settled(page, 'error', TAG);
  assert.match(await message(page, 'tau5', TAG).textContent(), /fill in/);
  await field(page, 'r5', TAG).fill('');
  await settled(page, 'ready', TAG);
  // A profile step with no duration: the folded profile opens to show the message.
  await field(page, 'd1', TAG).evaluate((el) => { el.value = '0'; el.dispatchEvent(new Event('input', { bubbles: true })); });
  await field(page, 'p1', TAG).evaluate((el) => { el.value = '1 W'; el.dispatchEvent(new Event('input', { bubbles: true })); });
  await settled(page, 'error', TAG);
  assert.equal(await field(page, 'd1', TAG).isVisible(), true, 'the folded profile opened');
  assert.match(await message(page, 'd1', TAG).textContent(), /duration/i);
  await field(page, 'd1', TAG).fill('100 ms');
  await settled(page, 'ready', TAG);
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('hostile link values show as text with field messages and never run', async () => {
  const { context, page, requests, problems } = await open(browser);
  await context.addInitScript(() => { window.__alerts = []; window.alert = (m) => window.__alerts.push(String(m)); });
  const q = new URLSearchParams({ path: '<svg onload=alert(1)>', r1: '<img src=x onerror=alert(2)>', periods: '1e9' }).toString();
  await page.goto(url(`thermal.html?${q}`));
  assert.equal(await settled(page, 'error', TAG), 'error');
  for (const key of ['path', 'r1', 'periods']) assert.ok((await message(page, key, TAG).textContent()).length > 5, `message at ${key}`);
  assert.equal(await field(page, 'r1', TAG).inputValue(), '<img src=x onerror=alert(2)>');
  const dom = await page.evaluate(() => ({ alerts: window.__alerts, imgs: document.querySelectorAll('img').length }));
  assert.deepEqual(dom, { alerts: [], imgs: 0 });
  await field(page, 'path', TAG).selectOption('ja');
  await field(page, 'r1', TAG).fill('2 K/W');
  await field(page, 'periods', TAG).selectOption('10');
  await settled(page, 'ready', TAG);
  assertDemoNumbers(await result(page, TAG));
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('the linear page\'s "check the thermal path" link fills the thermal page with that rail\'s numbers', async () => {
  const { context, page, requests, problems } = await open(browser);
  // A hotter variant of the linear demo rail, so no default of the thermal page can pass for it.
  await page.goto(url('linear.html?theta-ja=80%20K%2FW&ta-max=55C&tj-max=150&thermal-margin=20%20K'));
  await settled(page, 'ready');
  const lin = await result(page);
  const link = page.locator('railnote-linear a[data-carry="thermal"]');
  assert.match(await link.textContent(), /check the thermal path/i);
  await link.click();
  await page.waitForURL(/thermal\.html/);
  await settled(page, 'ready', TAG);
  // The field texts travel as typed; the dissipation as the engine formats it (six figures).
  assert.equal(await field(page, 'theta-ja', TAG).inputValue(), '80 K/W');
  assert.equal(await field(page, 'ta-max', TAG).inputValue(), '55C');
  assert.equal(await field(page, 'tj-max', TAG).inputValue(), '150');
  assert.equal(await field(page, 'margin', TAG).inputValue(), '20 K');
  assert.equal(await field(page, 'path', TAG).inputValue(), 'ja');
  const powerText = await field(page, 'power', TAG).inputValue();
  assert.match(powerText, /^492\.13\d mW$/, `worst-case dissipation 492.13 mW as text: ${powerText}`);
  // The thermal page's own example (Foster network, pulse, case-top reading) is cleared.
  assert.equal(await field(page, 'r1', TAG).inputValue(), '');
  assert.equal(await field(page, 'psi-jt', TAG).inputValue(), '');
  const th = await result(page, TAG);
  assert.equal(th.transient, null, 'no Foster network carried over');
  // The same T_j and margin as the linear page's worst case: 55 + 80·0.49213 = 94.37 °C.
  close(th.steady.tjC, lin.worst.tjC, REL_LINK, 'T_j carried over');
  close(th.steady.marginC, lin.worst.thermalMarginC, REL_LINK, 'margin carried over');
  close(th.steady.tjC, 55 + 80 * lin.worst.powerW, REL_LINK, 'T_j = T_a + θJA·P by hand');
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('the embed page shows the thermal calculator from its link, compactly, and reports its height', async () => {
  const { context, page, requests, problems } = await open(browser);
  const frame = await openEmbedHost(page, 'thermal-notes.html', url('embed.html?calc=thermal&power=0.3&theta-ja=80&psi-jt=&case-top='), 'Thermal path');
  assert.equal(await settled(frame, 'ready', TAG), 'ready');
  assert.equal(await field(frame, 'power', TAG).inputValue(), '0.3');
  const r = await frame.locator(TAG).evaluate((el) => el.result);
  // By hand: T_j = 60 + 80·0.3 = 84 °C (JESD51 θJA relation); the case-top pair is cleared.
  close(r.steady.tjC, 84, REL, 'T_j in the embed');
  assert.equal(r.measured.fromCaseTopC, null);
  assert.equal(await frame.locator(`${TAG} .rn-zth details`).count(), 1, 'the Z_th plot is folded in the compact embed');
  await page.waitForFunction(() => window.heights.some((m) => m.calc === 'thermal' && m.height > 300));
  await field(frame, 'theta-ja', TAG).fill('-1');
  assert.equal(await settled(frame, 'error', TAG), 'error');
  await field(frame, 'theta-ja', TAG).fill('80');
  assert.equal(await settled(frame, 'ready', TAG), 'ready');
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('copy link and reset work as on every calculator', async () => {
  const { context, page, problems } = await open(browser);
  await context.grantPermissions(['clipboard-read', 'clipboard-write'], { origin: ORIGIN });
  await page.goto(url('thermal.html'));
  await settled(page, 'ready', TAG);
  await field(page, 'power', TAG).fill('0.3 W');
  await settled(page, 'ready', TAG);
  await page.locator(TAG).getByRole('button', { name: 'Copy link' }).click();
  await page.locator(`${TAG} .rn-tool-status`, { hasText: 'Link copied' }).waitFor();
  const copied = new URL(await page.evaluate(() => navigator.clipboard.readText()));
  assert.ok(copied.pathname.endsWith('/thermal.html'));
  assert.equal(copied.searchParams.get('power'), '0.3 W');
  await page.waitForFunction(() => new URLSearchParams(location.search).get('power') === '0.3 W');
  await page.locator(TAG).getByRole('button', { name: /Reset/ }).click();
  await settled(page, 'ready', TAG);
  assert.equal(await field(page, 'power', TAG).inputValue(), '0.49 W');
  assert.equal(new URL(page.url()).search, '', 'reset clears the URL');
  assertDemoNumbers(await result(page, TAG));
  assert.deepEqual(problems, []);
  await context.close();
});

test('every thermal input has a label and existing descriptions; the stage rows are reached by Tab', async () => {
  const { context, page } = await open(browser);
  await page.goto(url('thermal.html'));
  await settled(page, 'ready', TAG);
  const report = await page.evaluate((tag) => [...document.querySelectorAll(`${tag} .rn-inputs input, ${tag} .rn-inputs select`)].map((el) => ({
    key: el.name,
    label: el.labels.length ? el.labels[0].textContent.trim() : '',
    described: (el.getAttribute('aria-describedby') || '').split(' ').filter(Boolean).map((id) => Boolean(document.getElementById(id))),
  })), TAG);
  // 6 limits + 5 path + 4 measured + 16 Foster cells + 4 pulse + 16 profile cells.
  assert.equal(report.length, 51);
  for (const r of report) {
    assert.ok(r.label.length > 3, `${r.key} has a label: "${r.label}"`);
    assert.ok(r.described.length >= 1 && r.described.every(Boolean), `${r.key} is described by existing elements`);
  }
  assert.equal(report.find((r) => r.key === 'tau2').label, 'Stage 2: time constant', 'a row cell says which row it is');
  const ids = await page.evaluate(() => [...document.querySelectorAll('[id]')].map((e) => e.id));
  assert.equal(new Set(ids).size, ids.length, 'no duplicate ids');
  await field(page, 'r1', TAG).focus();
  await page.keyboard.press('Tab');
  assert.equal(await page.evaluate(() => document.activeElement.name), 'tau1', 'Tab goes along the row');
  await page.keyboard.press('Tab');
  assert.equal(await page.evaluate(() => document.activeElement.name), 'r2', 'then to the next row');
  await context.close();
});

test('print shows the inputs, verdict, plots, link and date, and hides the buttons', async () => {
  const { context, page } = await open(browser);
  await page.goto(url('thermal.html?power=0.4%20W'));
  await settled(page, 'ready', TAG);
  await page.emulateMedia({ media: 'print' });
  await page.evaluate(() => window.dispatchEvent(new Event('beforeprint')));
  const seen = await page.evaluate(() => {
    const visible = (sel) => [...document.querySelectorAll(sel)].some((e) => e.getClientRects().length > 0 && getComputedStyle(e).visibility !== 'hidden');
    return {
      buttons: visible('railnote-thermal button'),
      verdict: visible('.rn-verdict'),
      charts: [...document.querySelectorAll('svg.rn-chart')].filter((e) => e.getClientRects().length > 0).length,
      link: document.querySelector('.rn-permalink').textContent,
      date: visible('.rn-record time'),
      folded: [...document.querySelectorAll('railnote-thermal details')].every((d) => d.open),
    };
  });
  assert.equal(seen.buttons, false, 'no buttons in print');
  assert.ok(seen.verdict && seen.date && seen.folded, JSON.stringify(seen));
  assert.equal(seen.charts, 3);
  assert.match(seen.link, /thermal\.html\?.*power=0\.4\+W/);
  await page.screenshot({ path: path.join(OUT_DIR, 'thermal-print.png'), fullPage: true });
  await context.close();
});

test('screenshots of thermal.html, light and dark, and of the chain path (for looking at)', async () => {
  for (const colorScheme of ['light', 'dark']) {
    const { context, page, requests, problems } = await open(browser, { colorScheme });
    await page.goto(url('thermal.html'));
    await settled(page, 'ready', TAG);
    await page.screenshot({ path: path.join(OUT_DIR, `thermal-${colorScheme}.png`), fullPage: true });
    await page.locator(TAG).screenshot({ path: path.join(OUT_DIR, `thermal-widget-${colorScheme}.png`) });
    await page.goto(url('thermal.html?path=chain&theta-jc=150'));
    await settled(page, 'ready', TAG);
    await page.locator(TAG).screenshot({ path: path.join(OUT_DIR, `thermal-chain-${colorScheme}.png`) });
    assert.deepEqual(problems, []);
    assertSameOrigin(requests);
    await context.close();
  }
});
