// Browser tests of the divider picker page (site/divider.html with <railnote-divider sync-url>),
// the link from the linear page, and the divider embed.
//
// What the table shows is compared with what the API returns when called in the same page with
// the demo's numbers written out here in SI units (no expected candidate is guessed); the numbers
// themselves are checked against outside sources: the IEC 60063 E24 values, the divider relation
// of the brief (Kirchhoff's current law at the divider node), and the worst case as an
// extreme-value analysis over every corner, worked in the test.
import { test, before, after } from 'node:test';
import assert from 'node:assert/strict';
import path from 'node:path';
import {
  launch, open, url, assertSameOrigin, settled, field, message, result, close, OUT_DIR,
} from './browser.mjs';

const TAG = 'railnote-divider';

// Tolerances. The engine evaluates the same closed forms in f64, so relations worked here agree
// to rounding (1e-9 relative); a pixel position in the SVG is rounded to 0.01 px.
const REL = 1e-9;
const PX = 0.02;

// IEC 60063, the E24 series (one decade, in units of 0.1): the values the standard lists, which
// for 2.7–4.7 and 8.2 are not the rounded geometric values.
const E24 = [10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30, 33, 36, 39, 43, 47, 51, 56, 62, 68, 75, 82, 91];
function inE24(r) {
  const decade = Math.pow(10, Math.floor(Math.log10(r)) - 1);
  return E24.some((v) => Math.abs(v * decade - r) <= r * 1e-9);
}

// The page's demo, written out in SI units (the brief's invented soil-moisture logger; the
// regulator's part data are invented): V_ref 0.800 V ±1 %, pin current −50 nA…+50 nA, E24 1 %
// resistors at 100 ppm/K, −20…60 °C, window ±3 %, divider current 10 µA…1 mA, 1 kΩ…1 MΩ,
// 10 candidates, 20 000 normal Monte Carlo samples with seed 1.
const DEMO = {
  mode: 'feedback', topology: 'feedback', vref: 0.8, vrefTolPct: 1, pinCurrentMin: -50e-9, pinCurrentMax: 50e-9,
  voutTarget: 3.3, windowPct: 3, seriesTop: 'E24', seriesBottom: 'E24', tolTopPct: 1, tolBottomPct: 1,
  tcrTopPpm: 100, tcrBottomPpm: 100, tempMin: -20, tempMax: 60, rMin: 1e3, rMax: 1e6,
  currentMin: 10e-6, currentMax: 1e-3, limit: 10, mcSamples: 20000, mcSeed: 1, mcDistribution: 'normal',
};

/** Call checkDivider in the page itself, through the site's own engine module. */
async function apiCheck(page, input) {
  return page.evaluate(async (inp) => {
    const { ready } = await import('./js/engine.js');
    const api = await ready;
    return api.checkDivider(inp);
  }, input);
}

/** Format in the page with the engine's formatter, as the widget does. */
async function apiFormat(page, values) {
  return page.evaluate(async (vs) => {
    const { ready } = await import('./js/engine.js');
    const api = await ready;
    return vs.map(([v, kind, digits]) => api.formatQuantity(v, kind, digits));
  }, values);
}

/**
 * Worst case of a feedback-pin divider by extreme-value analysis, worked here: every resistor at
 * R·(1 ± (tolerance + |TCR|·ΔT)) with ΔT the larger distance from 25 °C to either end, the
 * reference at V_ref·(1 ± tol), the pin current at either end of its range, and
 * V_out = V_ref·(1 + R_top/R_bot) + I_fb·R_top (the brief's relation) at all 16 corners.
 */
function worstByCorners(x, rTop, rBottom, topology = 'feedback') {
  const dT = Math.max(25 - x.tempMin, x.tempMax - 25);
  const hTop = x.tolTopPct / 100 + x.tcrTopPpm * 1e-6 * dT;
  const hBot = x.tolBottomPct / 100 + x.tcrBottomPpm * 1e-6 * dT;
  const outs = [];
  for (const v of [x.vref * (1 - x.vrefTolPct / 100), x.vref * (1 + x.vrefTolPct / 100)]) {
    for (const rt of [rTop * (1 - hTop), rTop * (1 + hTop)]) {
      for (const rb of [rBottom * (1 - hBot), rBottom * (1 + hBot)]) {
        for (const i of [x.pinCurrentMin, x.pinCurrentMax]) {
          outs.push(topology === 'adjust' ? v * (1 + rb / rt) + i * rb : v * (1 + rt / rb) + i * rt);
        }
      }
    }
  }
  return { min: Math.min(...outs), max: Math.max(...outs) };
}

/** What the rendered candidate table shows: per row in DOM order, its rank index and cells. */
async function tableRows(page, table = 'feedback') {
  return page.locator(`${TAG} table[data-table="${table}"] tbody tr`).evaluateAll((trs) => trs.map((tr) => ({
    index: Number(tr.dataset.index),
    chosen: tr.classList.contains('rn-chosen'),
    cells: Object.fromEntries([...tr.querySelectorAll('td[data-q]')].map((td) => [td.dataset.q, td.textContent.trim()])),
    rank: tr.querySelector('th').textContent.trim(),
  })));
}

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser?.close(); });

async function assertDemoRail(page, target) {
  await settled(page, 'ready', TAG);
  const shown = await result(page, TAG);
  const api = await apiCheck(page, { ...DEMO, voutTarget: target });
  assert.deepEqual(shown, api, `the widget sends the demo's inputs for ${target} V and shows what the API returns`);
  assert.equal(api.mode, 'feedback');
  assert.ok(api.candidates.length >= 3, `several candidates for ${target} V`);
  close(api.windowMin, target * 0.97, REL, 'window low = target − 3 %');
  close(api.windowMax, target * 1.03, REL, 'window high = target + 3 %');
  for (const [k, c] of api.candidates.entries()) {
    assert.ok(c.vout >= api.windowMin && c.vout <= api.windowMax, `candidate ${k + 1}: nominal ${c.vout} V inside the window`);
    assert.ok(inE24(c.rTop) && inE24(c.rBottom), `candidate ${k + 1}: ${c.rTop} Ω and ${c.rBottom} Ω are IEC 60063 E24 values`);
    // Nominal output from the brief's relation at the middle of the pin current range (zero here).
    close(c.vout, 0.8 * (1 + c.rTop / c.rBottom), REL, `candidate ${k + 1}: V_out = V_ref·(1 + R_top/R_bot)`);
    close(c.senseCurrent, 0.8 / c.rBottom, REL, `candidate ${k + 1}: divider current V_ref/R_bot`);
    const w = worstByCorners(DEMO, c.rTop, c.rBottom);
    close(c.worstMin, w.min, REL, `candidate ${k + 1}: worst-case low over all corners`);
    close(c.worstMax, w.max, REL, `candidate ${k + 1}: worst-case high over all corners`);
    assert.equal(c.fitsWindow, w.min >= api.windowMin && w.max <= api.windowMax, `candidate ${k + 1}: fits the window as the corners say`);
    if (k > 0) assert.ok(Math.abs(c.errorPct) >= Math.abs(api.candidates[k - 1].errorPct) - 1e-12, 'ranked by the size of the nominal error');
  }
  // The top rows of the table show those candidates, formatted by the engine, in rank order.
  const rows = await tableRows(page);
  assert.equal(rows.length, api.candidates.length, 'one row per candidate');
  const top = api.candidates.slice(0, 3);
  const texts = await apiFormat(page, top.flatMap((c) => [[c.rTop, 'resistance', 3], [c.rBottom, 'resistance', 3], [c.vout, 'voltage', 4], [c.rss, 'voltage', 3]]));
  top.forEach((c, k) => {
    const row = rows[k];
    assert.equal(row.index, k);
    assert.equal(row.rank, String(k + 1));
    assert.equal(row.cells.rTop, `${texts[4 * k]} ${c.seriesTop}`);
    assert.equal(row.cells.rBottom, `${texts[4 * k + 1]} ${c.seriesBottom}`);
    assert.equal(row.cells.vout, texts[4 * k + 2]);
    assert.equal(row.cells.rss, texts[4 * k + 3]);
    assert.equal(row.cells.fitsWindow, c.fitsWindow ? 'yes' : 'no');
  });
  assert.ok(rows[0].chosen, 'the first row is the one in detail');
  return api;
}

test('the demo 3.3 V rail: the table shows what checkDivider returns, every nominal output in the window', async () => {
  const { context, page, requests, problems } = await open(browser);
  await page.goto(url('divider.html'));
  const api = await assertDemoRail(page, 3.3);
  // 75 kΩ over 24 kΩ is exact: 0.8 · (1 + 75/24) = 3.3 V, so it heads the table.
  assert.equal(api.candidates[0].rTop / api.candidates[0].rBottom, 75 / 24);
  // The verdict is in words, with the checks.
  const word = await page.locator(`${TAG} .rn-verdict-word`).textContent();
  assert.match(word, /Pass|Marginal|Fail/);
  assert.equal(await page.locator(`${TAG} .rn-check`).count(), api.checks.length);
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('the demo 1.8 V sensor rail from the same reference', async () => {
  const { context, page, requests, problems } = await open(browser);
  await page.goto(url('divider.html?vout-target=1.8%20V'));
  const api = await assertDemoRail(page, 1.8);
  // 0.8 · (1 + R_top/R_bot) = 1.8 needs R_top/R_bot = 1.25: 15 k/12 k and its decades are exact in E24.
  assert.equal(Math.abs(api.candidates[0].errorPct) < 1e-9, true, 'an exact E24 pair exists and comes first');
  assert.equal(api.candidates[0].rTop / api.candidates[0].rBottom, 1.25);
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('sorting by a column with the keyboard: Enter on its heading, aria-sort follows', async () => {
  const { context, page, requests, problems } = await open(browser);
  await page.goto(url('divider.html'));
  await settled(page, 'ready', TAG);
  const r = await result(page, TAG);
  const button = page.locator(`${TAG} table[data-table="feedback"] button[data-column="senseCurrent"]`);
  const th = page.locator(`${TAG} table[data-table="feedback"] th:has(button[data-column="senseCurrent"])`);
  assert.equal(await th.getAttribute('aria-sort'), 'none');
  await button.focus();
  await page.keyboard.press('Enter');
  assert.equal(await th.getAttribute('aria-sort'), 'ascending');
  let order = (await tableRows(page)).map((row) => row.index);
  const currents = order.map((i) => r.candidates[i].senseCurrent);
  assert.deepEqual(currents, currents.slice().sort((a, b) => a - b), 'rows by increasing divider current');
  assert.deepEqual(order.slice().sort((a, b) => a - b), r.candidates.map((c, i) => i), 'every row still there');
  assert.equal(await page.evaluate(() => document.activeElement.dataset.column), 'senseCurrent', 'focus stays on the heading');
  await page.keyboard.press('Enter');
  assert.equal(await th.getAttribute('aria-sort'), 'descending');
  order = (await tableRows(page)).map((row) => row.index);
  const down = order.map((i) => r.candidates[i].senseCurrent);
  assert.deepEqual(down, down.slice().sort((a, b) => b - a), 'then decreasing');
  // Another column by keyboard: Tab back to the rank heading, Space works like Enter.
  const rank = page.locator(`${TAG} table[data-table="feedback"] button[data-column="rank"]`);
  await rank.focus();
  await page.keyboard.press('Space');
  assert.deepEqual((await tableRows(page)).map((row) => row.index), r.candidates.map((c, i) => i), 'rank order again');
  assert.equal(await th.getAttribute('aria-sort'), 'none', 'only one column is sorted at a time');
  assert.deepEqual(await result(page, TAG), r, 'sorting leaves the result as it was');
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('picking a row by keyboard updates pick, the detail and the histogram', async () => {
  const { context, page, requests, problems } = await open(browser);
  await page.goto(url('divider.html'));
  await settled(page, 'ready', TAG);
  const first = await result(page, TAG);
  const histBefore = await page.locator(`${TAG} svg.rn-histogram rect.rn-hist-bar`).evaluateAll((rs) => rs.map((x) => x.dataset.count));
  // The radio of the chosen row, then an arrow key: the next row is chosen.
  await page.locator(`${TAG} table[data-table="feedback"] input[type="radio"][data-index="0"]`).focus();
  await page.keyboard.press('ArrowDown');
  await page.waitForFunction((tag) => document.querySelector(tag).result && document.querySelector(tag).result.pick === 1, TAG);
  const second = await result(page, TAG);
  assert.deepEqual(second, await apiCheck(page, { ...DEMO, pick: 1 }), 'the widget asks for pick 1 (rank 2)');
  assert.equal(await field(page, 'pick', TAG).inputValue(), '2', 'the pick field holds the rank');
  assert.equal(await page.evaluate(() => document.activeElement.dataset.index), '1', 'focus follows to the chosen row after the re-render');
  assert.equal(await page.evaluate(() => document.activeElement.checked), true);
  const rows = await tableRows(page);
  assert.deepEqual(rows.filter((x) => x.chosen).map((x) => x.index), [1]);
  // The detail now shows candidate 2.
  const c = second.candidates[1];
  const [wMin, wMax] = await apiFormat(page, [[c.worstMin, 'voltage', 4], [c.worstMax, 'voltage', 4]]);
  assert.match(await page.locator(`${TAG} [data-block="detail"] h3`).textContent(), /candidate 2/);
  assert.equal(await page.locator(`${TAG} [data-block="detail"] [data-q="worstMin"]`).textContent(), wMin);
  assert.equal(await page.locator(`${TAG} [data-block="detail"] [data-q="worstMax"]`).textContent(), wMax);
  // Its Monte Carlo run: the histogram is redrawn from the new counts.
  const histAfter = await page.locator(`${TAG} svg.rn-histogram rect.rn-hist-bar`).evaluateAll((rs) => rs.map((x) => x.dataset.count));
  assert.deepEqual(histAfter, second.monteCarlo.histogram.counts.map(String));
  assert.notDeepEqual(histAfter, histBefore, 'another candidate, another histogram');
  assert.notDeepEqual(second.detail, first.detail);
  // ArrowUp goes back to the first row.
  await page.keyboard.press('ArrowUp');
  await page.waitForFunction((tag) => document.querySelector(tag).result.pick === 0, TAG);
  assert.equal(await field(page, 'pick', TAG).inputValue(), '1');
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('after sorting, the arrow keys follow the rows as shown and the order survives the new pick', async () => {
  const { context, page, requests, problems } = await open(browser);
  await page.goto(url('divider.html'));
  await settled(page, 'ready', TAG);
  const r = await result(page, TAG);
  await page.locator(`${TAG} table[data-table="feedback"] button[data-column="powerW"]`).click();
  const shown = (await tableRows(page)).map((row) => row.index);
  const powers = shown.map((i) => r.candidates[i].powerW);
  assert.deepEqual(powers, powers.slice().sort((a, b) => a - b), 'sorted by dissipation');
  // From the chosen row (rank 1, wherever it now sits) the next row down is the next one shown.
  const at = shown.indexOf(0);
  assert.ok(at < shown.length - 1, 'rank 1 is not the last row shown');
  await page.locator(`${TAG} table[data-table="feedback"] input[data-index="0"]`).focus();
  await page.keyboard.press('ArrowDown');
  const next = shown[at + 1];
  await page.waitForFunction(([tag, n]) => document.querySelector(tag).result.pick === n, [TAG, next]);
  assert.equal(await field(page, 'pick', TAG).inputValue(), String(next + 1));
  assert.deepEqual((await tableRows(page)).map((row) => row.index), shown, 'still sorted by dissipation after the re-render');
  assert.equal(await page.locator(`${TAG} table[data-table="feedback"] th:has(button[data-column="powerW"])`).getAttribute('aria-sort'), 'ascending');
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('the Monte Carlo histogram is an SVG with its bars and the window edges where the window is', async () => {
  const { context, page, requests, problems } = await open(browser);
  await page.goto(url('divider.html'));
  await settled(page, 'ready', TAG);
  const r = await result(page, TAG);
  const m = r.monteCarlo;
  assert.equal(m.samples, 20000);
  assert.equal(m.histogram.counts.length, 40);
  // Normal parts cut at 3σ never leave the worst case, which the bins span: every sample is counted.
  assert.equal(m.histogram.counts.reduce((a, b) => a + b, 0), m.samples);
  assert.ok(m.histogram.lo <= r.candidates[0].worstMin && m.histogram.hi >= r.candidates[0].worstMax);
  assert.ok(m.min >= r.candidates[0].worstMin && m.max <= r.candidates[0].worstMax, 'no sample beyond the worst case');
  close(m.yieldPct, 100 * m.inside / m.samples, REL, 'yield = inside / samples');
  const seen = await page.locator(`${TAG} [data-block="monteCarlo"]`).evaluate((sec) => {
    const svg = sec.querySelector('svg.rn-histogram');
    const plot = svg.querySelector('.rn-chart-plot');
    const x0 = Number(plot.getAttribute('x'));
    const xOf = (sel) => {
      const d = svg.querySelector(sel)?.getAttribute('d') || '';
      const mm = /^M([\d.]+) /.exec(d);
      return mm ? Number(mm[1]) : NaN;
    };
    return {
      role: svg.getAttribute('role'), title: svg.querySelector('title')?.textContent, desc: svg.querySelector('desc')?.textContent,
      bars: [...svg.querySelectorAll('rect.rn-hist-bar')].map((b) => Number(b.dataset.count)),
      heights: [...svg.querySelectorAll('rect.rn-hist-bar')].map((b) => Number(b.getAttribute('height'))),
      x0, width: Number(plot.getAttribute('width')),
      winMin: xOf('[data-mark="window-min"]'), winMax: xOf('[data-mark="window-max"]'),
      mean: xOf('[data-mark="mean"]'),
      legend: [...sec.querySelectorAll('.rn-legend li')].map((li) => li.textContent),
      yieldText: sec.querySelector('[data-q="yieldPct"]').textContent,
      paths: [...svg.querySelectorAll('path')].map((p) => p.getAttribute('d')),
    };
  });
  assert.equal(seen.role, 'img');
  assert.ok(seen.title && /window/.test(seen.desc) && /Verdict/.test(seen.desc));
  assert.deepEqual(seen.bars, m.histogram.counts, 'one bar per bin, with its count');
  const tallest = seen.bars.indexOf(Math.max(...seen.bars));
  assert.equal(Math.max(...seen.heights), seen.heights[tallest], 'the fullest bin is the tallest bar');
  // The window edges sit where the window is on the histogram's own axis (bins span lo…hi).
  const at = (v) => seen.x0 + (v - m.histogram.lo) / (m.histogram.hi - m.histogram.lo) * seen.width;
  assert.ok(Math.abs(seen.winMin - at(r.windowMin)) <= PX, `window low at ${seen.winMin}, expected ${at(r.windowMin)}`);
  assert.ok(Math.abs(seen.winMax - at(r.windowMax)) <= PX, `window high at ${seen.winMax}, expected ${at(r.windowMax)}`);
  assert.ok(Math.abs(seen.mean - at(m.mean)) <= PX, 'the mean where it is');
  assert.ok(seen.legend.some((t) => /Window edges/.test(t)) && seen.legend.some((t) => /Outside the window/.test(t)), `legend in words: ${seen.legend}`);
  assert.ok(seen.paths.every((d) => d && !/NaN|Infinity|undefined/.test(d)), 'finite path data');
  const [yieldText] = await apiFormat(page, [[m.yieldPct, 'percent', 4]]);
  assert.equal(seen.yieldText, yieldText);
  // The contribution chart beside it: one bar pair per term, around the nominal line.
  const bars = await page.locator(`${TAG} [data-block="detail"] svg.rn-range-bars .rn-range-row`).count();
  assert.equal(bars, r.detail.contributions.length);
  // Turning the Monte Carlo run off says so in words instead of an empty chart.
  await field(page, 'mc-samples', TAG).fill('0');
  await settled(page, 'ready', TAG);
  await page.waitForFunction((tag) => document.querySelector(tag).result && document.querySelector(tag).result.monteCarlo === null, TAG);
  assert.match(await page.locator(`${TAG} [data-block="monteCarlo"]`).textContent(), /off \(0 samples\)/);
  assert.equal(await page.locator(`${TAG} svg.rn-histogram`).count(), 0);
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('reverse mode: two given resistors give their output and spread, both topologies', async () => {
  const { context, page, requests, problems } = await open(browser);
  await page.goto(url('divider.html?mode=reverse'));
  await settled(page, 'ready', TAG);
  const r = await result(page, TAG);
  assert.equal(r.mode, 'reverse');
  assert.equal(r.candidates.length, 1, 'the given pair only');
  const c = r.candidates[0];
  assert.equal(c.rTop, 75e3);
  assert.equal(c.rBottom, 24e3);
  close(c.vout, 3.3, REL, '0.8 · (1 + 75/24) by hand');
  const w = worstByCorners(DEMO, 75e3, 24e3);
  close(c.worstMin, w.min, REL, 'worst low over the corners');
  close(c.worstMax, w.max, REL, 'worst high over the corners');
  assert.equal(await page.locator(`${TAG} .rn-field[data-key="series-top"]`).isHidden(), true, 'no series to search in reverse mode');
  assert.equal(await page.locator(`${TAG} .rn-field[data-key="r-top"]`).isVisible(), true);
  // The adjust-pin topology with a non-standard pair, the target left empty: the window centres on it.
  await field(page, 'topology', TAG).selectOption('adjust');
  await field(page, 'r-top', TAG).fill('240');
  await field(page, 'r-bottom', TAG).fill('1k33');
  await field(page, 'vout-target', TAG).fill('');
  await page.waitForFunction((tag) => { const x = document.querySelector(tag).result; return x && x.candidates[0].rBottom === 1330; }, TAG);
  const a = await result(page, TAG);
  // Adjust pin (the brief's second relation): V_out = V_ref·(1 + R2/R1) + I_adj·R2, R1 = R_top.
  close(a.candidates[0].vout, 0.8 * (1 + 1330 / 240), REL, 'V_ref · (1 + R2/R1)');
  const wa = worstByCorners(DEMO, 240, 1330, 'adjust');
  close(a.candidates[0].worstMin, wa.min, REL, 'adjust worst low');
  close(a.candidates[0].worstMax, wa.max, REL, 'adjust worst high');
  close(a.windowMin, a.candidates[0].vout * 0.97, REL, 'the window centres on the nominal output');
  assert.equal(await page.locator(`${TAG} .rn-field[data-key="vout-target"]`).isVisible(), true, 'the emptied target stays there to be typed into');
  assert.equal(await page.locator(`${TAG} table[data-table="feedback"] button.rn-sort`).count(), 0, 'one given pair: nothing to sort');
  // IEC 60063: 24 is an E24 value (not E12), 133 first appears in E48.
  assert.equal(a.candidates[0].seriesTop, 'E24');
  assert.equal(a.candidates[0].seriesBottom, 'E48');
  assert.equal(await page.locator(`${TAG} svg.rn-sketch`).getAttribute('data-topology'), 'adjust');
  assert.match(await page.locator(`${TAG} [data-block="sketch"] figcaption`).textContent(), /R_top \(R1\) runs from the output to the adjust pin/);
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('threshold mode: start and stop of each candidate follow the threshold relations', async () => {
  const { context, page, requests, problems } = await open(browser);
  await page.goto(url('divider.html?mode=threshold'));
  await settled(page, 'ready', TAG);
  const r = await result(page, TAG);
  assert.equal(r.mode, 'threshold');
  assert.equal(r.candidates.length, 0);
  assert.equal(r.detail, null);
  assert.equal(r.monteCarlo, null);
  const t = r.threshold;
  assert.ok(t.candidates.length > 0);
  // The demo's invented enable pin: 1.20 V rising, 1.15 V falling, 0.1 µA in while off, 1 µA out
  // while on. By the brief: V_start = V_on·(1 + R_top/R_bot) + I_off·R_top,
  // V_stop = V_off·(1 + R_top/R_bot) + I_on·R_top.
  for (const [k, c] of t.candidates.entries()) {
    close(c.start, 1.2 * (1 + c.rTop / c.rBottom) + 0.1e-6 * c.rTop, REL, `candidate ${k + 1} start`);
    close(c.stop, 1.15 * (1 + c.rTop / c.rBottom) - 1e-6 * c.rTop, REL, `candidate ${k + 1} stop`);
    assert.ok(c.startLow <= c.start && c.start <= c.startHigh && c.stopLow <= c.stop && c.stop <= c.stopHigh);
  }
  // The exact pair solves both relations for 12.0 V and 10.8 V.
  close(1.2 * (1 + t.idealTop / t.idealBottom) + 0.1e-6 * t.idealTop, 12.0, 1e-9, 'ideal pair starts at 12.0 V');
  close(1.15 * (1 + t.idealTop / t.idealBottom) - 1e-6 * t.idealTop, 10.8, 1e-9, 'ideal pair stops at 10.8 V');
  const rows = await tableRows(page, 'threshold');
  assert.equal(rows.length, t.candidates.length);
  const [startText] = await apiFormat(page, [[t.candidates[0].start, 'voltage', 4]]);
  assert.ok(rows[0].cells.start.startsWith(startText), `${rows[0].cells.start} starts with ${startText}`);
  assert.equal(await page.locator(`${TAG} .rn-field[data-key="vref"]`).isHidden(), true, 'no reference in threshold mode');
  assert.equal(await page.locator(`${TAG} fieldset[data-group="reference"]`).isHidden(), true, 'nor its group');
  assert.equal(await page.locator(`${TAG} svg.rn-sketch`).getAttribute('data-topology'), 'threshold');
  // Choosing another row makes it the judged one.
  await page.locator(`${TAG} table[data-table="threshold"] input[data-index="0"]`).focus();
  await page.keyboard.press('ArrowDown');
  await page.waitForFunction((tag) => document.querySelector(tag).result.pick === 1, TAG);
  assert.equal(await field(page, 'pick', TAG).inputValue(), '2');
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('bad inputs give a message at the field, never an empty silent table, and the widget recovers', async () => {
  const { context, page, requests, problems } = await open(browser);
  await page.goto(url('divider.html'));
  await settled(page, 'ready', TAG);
  // [fields to set, field that must carry the message, what the message must say]
  const cases = [
    [{ 'vout-target': '0.5 V' }, 'vout-target', /above V_ref/],
    [{ window: '0' }, 'window', /empty/],
    [{ window: '', 'vout-min': '3.4', 'vout-max': '3.2' }, 'vout-max', /empty|above/],
    [{ 'r-min': '100k', 'r-max': '110k' }, 'current-min', /widen/],
    [{ 'tol-top': '80 %' }, 'tol-top', /tolerance/i],
    [{ 'tcr-bottom': '1e7' }, 'tcr-bottom', /./],
    [{ vref: 'abc' }, 'vref', /./],
    [{ 'mc-samples': '2000000' }, 'mc-samples', /1000000|1 000 000/],
    [{ pick: '0' }, 'pick', /rank/],
  ];
  const demoText = async (key) => page.evaluate(async ([k]) => {
    const m = await import('./js/divider-widget.js');
    return m.FIELD_DEFS.find((d) => d.key === k).def;
  }, [key]);
  for (const [set, at, reason] of cases) {
    for (const [k, v] of Object.entries(set)) await field(page, k, TAG).fill(v);
    assert.equal(await settled(page, 'error', TAG), 'error', `${JSON.stringify(set)} puts the widget in error`);
    const msg = (await message(page, at, TAG).textContent()).trim();
    assert.match(msg, reason, `${JSON.stringify(set)}: message at ${at}: "${msg}"`);
    assert.ok(msg.length > 10 && !/NaN|Infinity|undefined|panicked|wasm-function/.test(msg), `a sentence: "${msg}"`);
    assert.equal(await field(page, at, TAG).getAttribute('aria-invalid'), 'true');
    assert.equal(await page.locator(`${TAG} table.rn-candidates`).count(), 0, 'no stale or empty table');
    assert.equal(await page.locator(`${TAG} .rn-error-box`).count(), 1, 'the error box lists the problem');
    for (const k of Object.keys(set)) await field(page, k, TAG).fill(await demoText(k));
    assert.equal(await settled(page, 'ready', TAG), 'ready', `fixing ${Object.keys(set)} computes again`);
    assert.ok(await page.locator(`${TAG} table[data-table="feedback"] tbody tr`).count() > 0, 'the table is back');
  }
  assert.deepEqual(await result(page, TAG), await apiCheck(page, DEMO), 'back to the demo result');
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('hostile link values show as text with a field message and never run', async () => {
  const { context, page, requests, problems } = await open(browser);
  await context.addInitScript(() => {
    window.__alerts = [];
    window.alert = (m) => window.__alerts.push(String(m));
  });
  const hostile = { mode: '<svg onload=alert(1)>', vref: '<img src=x onerror=alert(2)>', pick: '"><script>alert(3)</script>' };
  await page.goto(url(`divider.html?${new URLSearchParams(hostile)}`));
  assert.equal(await settled(page, 'error', TAG), 'error');
  assert.match(await message(page, 'mode', TAG).textContent(), /choose/);
  assert.equal(await field(page, 'vref', TAG).inputValue(), hostile.vref);
  await page.waitForTimeout(300);
  assert.deepEqual(await page.evaluate(() => window.__alerts), []);
  assert.equal(await page.locator('img').count(), 0);
  await field(page, 'mode', TAG).selectOption('feedback');
  await field(page, 'vref', TAG).fill('0.8');
  await field(page, 'pick', TAG).fill('');
  assert.equal(await settled(page, 'ready', TAG), 'ready');
  assert.deepEqual(await result(page, TAG), await apiCheck(page, DEMO));
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('link round trip: a fresh page reproduces the inputs, the pick and the numbers (seeded Monte Carlo)', async () => {
  const { context, page, requests, problems } = await open(browser);
  await page.goto(url('divider.html'));
  await settled(page, 'ready', TAG);
  const typed = {
    'vout-target': '1V8', window: '2.5 %', 'series-top': 'E96', 'series-bottom': 'E48', 'tol-top': '0.5', 'tol-bottom': '0.5 %',
    'tcr-top': '25 ppm/K', 'tcr-bottom': '25', 'mc-seed': '42', 'mc-distribution': 'uniform', 'mc-samples': '5000',
  };
  for (const [k, v] of Object.entries(typed)) {
    const f = field(page, k, TAG);
    if (['series-top', 'series-bottom', 'mc-distribution'].includes(k)) await f.selectOption(v);
    else await f.fill(v);
  }
  await settled(page, 'ready', TAG);
  // Choose rank 3 with the mouse this time.
  await page.locator(`${TAG} table[data-table="feedback"] input[data-index="2"]`).click();
  await page.waitForFunction((tag) => document.querySelector(tag).result.pick === 2, TAG);
  await page.waitForFunction(() => new URLSearchParams(location.search).get('pick') === '3');
  const link = page.url();
  const params = new URL(link).searchParams;
  for (const [k, v] of Object.entries(typed)) assert.equal(params.get(k), v, `URL key ${k}`);
  const before = await result(page, TAG);
  assert.equal(before.monteCarlo.seed, 42);
  assert.equal(before.monteCarlo.distribution, 'uniform');

  const fresh = await context.newPage();
  await fresh.goto(link);
  await settled(fresh, 'ready', TAG);
  for (const [k, v] of Object.entries({ ...typed, pick: '3' })) assert.equal(await field(fresh, k, TAG).inputValue(), v, `field ${k} restored`);
  assert.deepEqual(await result(fresh, TAG), before, 'the same numbers, Monte Carlo included');
  assert.equal(await fresh.locator(`${TAG} table[data-table="feedback"] input[data-index="2"]`).isChecked(), true, 'the same row chosen');
  const hist = (p) => p.locator(`${TAG} svg.rn-histogram rect.rn-hist-bar`).evaluateAll((rs) => rs.map((x) => x.dataset.count));
  assert.deepEqual(await hist(fresh), await hist(page), 'the same histogram');
  // Another seed gives other samples: the seed is really used.
  const other = await apiCheck(fresh, {
    ...DEMO, voutTarget: 1.8, windowPct: 2.5, seriesTop: 'E96', seriesBottom: 'E48', tolTopPct: 0.5, tolBottomPct: 0.5,
    tcrTopPpm: 25, tcrBottomPpm: 25, mcSeed: 43, mcDistribution: 'uniform', mcSamples: 5000, pick: 2,
  });
  assert.deepEqual(other.candidates, before.candidates, 'the link\'s inputs, written out, give the same candidates');
  assert.notDeepEqual(other.monteCarlo.histogram.counts, before.monteCarlo.histogram.counts);
  // Reset goes back to the demo and clears the URL.
  await page.getByRole('button', { name: /Reset/ }).click();
  await settled(page, 'ready', TAG);
  assert.equal(new URL(page.url()).search, '');
  assert.deepEqual(await result(page, TAG), await apiCheck(page, DEMO));
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('the linear page\'s "pick the divider" link carries its output voltage and tolerance', async () => {
  const { context, page, requests, problems } = await open(browser);
  // The demo's 1.8 V sensor rail on the linear page.
  await page.goto(url('linear.html?vout=1.8%20V&vout-tol=3%20%25&iout-max=40m&iout-typ=20m'));
  await settled(page, 'ready');
  const link = page.locator('railnote-linear a[data-carry="divider"]');
  assert.match(await link.textContent(), /pick the divider for this output/i);
  // It sits on its own line after the thermal link.
  const order = await page.locator('railnote-linear .rn-carry').evaluateAll((ps) => ps.map((p) => p.querySelector('a').dataset.carry));
  assert.ok(order.indexOf('divider') > order.indexOf('thermal') && order.indexOf('thermal') >= 0, `carry links in order: ${order}`);
  await link.click();
  await page.waitForURL(/divider\.html/);
  await settled(page, 'ready', TAG);
  assert.equal(await field(page, 'vout-target', TAG).inputValue(), '1.8 V');
  assert.equal(await field(page, 'window', TAG).inputValue(), '3 %');
  assert.equal(await field(page, 'mode', TAG).inputValue(), 'feedback');
  const r = await result(page, TAG);
  close(r.windowMin, 1.8 * 0.97, REL, 'window from the linear tolerance');
  close(r.windowMax, 1.8 * 1.03, REL, 'window from the linear tolerance');
  assert.deepEqual(r, await apiCheck(page, { ...DEMO, voutTarget: 1.8 }));
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('the embed page shows the divider picker compactly, prefilled from the query', async () => {
  const { context, page, requests, problems } = await open(browser, { viewport: { width: 900, height: 900 } });
  await page.goto(url('embed.html?calc=divider&vout-target=1.8&pick=2'));
  await settled(page, 'ready', TAG);
  assert.equal(await page.title(), 'Divider picker · railnote');
  assert.equal(await page.locator(TAG).getAttribute('compact'), '');
  assert.equal(await field(page, 'vout-target', TAG).inputValue(), '1.8');
  const r = await result(page, TAG);
  assert.deepEqual(r, await apiCheck(page, { ...DEMO, voutTarget: 1.8, pick: 1 }));
  assert.equal(await page.locator(`${TAG} [data-block="detail"] details`).count(), 1, 'the contribution table is folded');
  assert.match(await page.locator('.rn-embed-foot').textContent(), /60 V DC/);
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('screenshots of divider.html, light and dark, and of the other modes (for looking at)', async () => {
  for (const colorScheme of ['light', 'dark']) {
    const { context, page, requests, problems } = await open(browser, { colorScheme });
    await page.goto(url('divider.html'));
    await settled(page, 'ready', TAG);
    await page.screenshot({ path: path.join(OUT_DIR, `divider-${colorScheme}.png`), fullPage: true });
    await page.locator(TAG).screenshot({ path: path.join(OUT_DIR, `divider-widget-${colorScheme}.png`) });
    await page.goto(url('divider.html?mode=threshold'));
    await settled(page, 'ready', TAG);
    await page.locator(TAG).screenshot({ path: path.join(OUT_DIR, `divider-threshold-${colorScheme}.png`) });
    await page.goto(url('divider.html?mode=reverse&topology=adjust&r-top=240&r-bottom=1k33&vout-target='));
    await settled(page, 'ready', TAG);
    await page.locator(TAG).screenshot({ path: path.join(OUT_DIR, `divider-reverse-${colorScheme}.png`) });
    assert.deepEqual(problems, []);
    assertSameOrigin(requests);
    await context.close();
  }
});

test('print keeps the table headings, the chosen row, the charts and the link, and hides the buttons', async () => {
  const { context, page, problems } = await open(browser);
  await page.goto(url('divider.html?pick=2'));
  await settled(page, 'ready', TAG);
  await page.emulateMedia({ media: 'print' });
  const seen = await page.evaluate((tag) => {
    const shown = (e) => e.getClientRects().length > 0 && getComputedStyle(e).visibility !== 'hidden';
    const w = document.querySelector(tag);
    return {
      otherButtons: [...document.querySelectorAll('button:not(.rn-sort)')].filter(shown).length,
      headings: [...w.querySelectorAll('table[data-table="feedback"] thead th')].filter(shown).map((th) => th.innerText.trim()),
      chosenRank: w.querySelector('table[data-table="feedback"] tr.rn-chosen th').innerText.trim(),
      charts: [...w.querySelectorAll('svg.rn-chart')].filter(shown).length,
      sketch: shown(w.querySelector('svg.rn-sketch')),
      link: w.querySelector('.rn-permalink').textContent,
    };
  }, TAG);
  assert.equal(seen.otherButtons, 0, 'no copy, reset or error buttons in print');
  assert.deepEqual(seen.headings, ['Rank', 'R_top', 'R_bot', 'Vout', 'Error', 'Current', 'Power', 'Worst case', 'RSS ±', 'Fits?'], 'the headings print as words');
  assert.equal(seen.chosenRank, '2');
  assert.equal(seen.charts, 2, 'the contribution bars and the histogram');
  assert.ok(seen.sketch);
  assert.match(seen.link, /divider\.html\?.*pick=2/);
  await page.screenshot({ path: path.join(OUT_DIR, 'divider-print.png'), fullPage: true });
  assert.deepEqual(problems, []);
  await context.close();
});
