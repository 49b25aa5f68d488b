// The rail tree page (<railnote-tree>): the demo board built by hand in the tables, every number
// shown against checkTree called in the same page, the draft across a reload, the share link in a
// fresh browser, export/import, bad trees and a 10 MB paste, the rail → calculator links, the
// embed, and light/dark screenshots in tests/out/.
import { test, before, after } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'node:fs';
import path from 'node:path';
import { launch, open, url, assertSameOrigin, settled, OUT_DIR } from './browser.mjs';

const TAG = 'railnote-tree';
const FIXTURE = path.resolve(path.dirname(new URL(import.meta.url).pathname), '../node/fixtures/tree-v1.json');

// The brief's logger board as typed by a person (units, prefixes, the RKM code), and the
// document those cells must give (the engine parses; these are the numbers the text means).
const TYPED = {
  taMax: '60 °C',
  source: { name: 'Battery', vMin: '10.8 V', vNom: '12 V', vMax: '14.4 V', capacityAh: '7000 mAh' },
  rails: [
    { name: '5V0 buck', parent: 'Battery', kind: 'switching', vout: '5.0 V', efficiencyPct: '88 %', ratedA: '0.8 A' },
    { name: '3V3 LDO', parent: '5V0 buck', kind: 'linear', vout: '3V3', dropoutV: '300 mV', iq: '50 µA', thetaJa: '100 K/W', tjMax: '125 °C', ratedA: '300 mA' },
    { name: '1V8 LDO', parent: '3V3 LDO', kind: 'linear', vout: '1V8', dropoutV: '0.3', iq: '50uA' },
  ],
  loads: [
    { name: 'Microcontroller and radio', rail: '3V3 LDO', typA: '30 mA', peakA: '250 mA', activityPct: '20 %', sleepA: '20 µA' },
    { name: 'Sensor front end', rail: '1V8 LDO', typA: '40 mA', peakA: '40 mA', activityPct: '5 %' },
  ],
};
const EXPECTED_DOC = {
  version: 2, taMax: 60,
  sources: [{ name: 'Battery', vMin: 10.8, vNom: 12, vMax: 14.4, capacityAh: 7 }],
  rails: [
    { name: '5V0 buck', parent: 'Battery', kind: 'switching', vout: 5, efficiencyPct: 88, ratedA: 0.8 },
    { name: '3V3 LDO', parent: '5V0 buck', kind: 'linear', vout: 3.3, dropoutV: 0.3, iq: 50e-6, thetaJa: 100, tjMax: 125, ratedA: 0.3 },
    { name: '1V8 LDO', parent: '3V3 LDO', kind: 'linear', vout: 1.8, dropoutV: 0.3, iq: 50e-6 },
  ],
  loads: [
    { name: 'Microcontroller and radio', rail: '3V3 LDO', typA: 0.03, peakA: 0.25, activityPct: 20, sleepA: 20e-6 },
    { name: 'Sensor front end', rail: '1V8 LDO', typA: 0.04, peakA: 0.04, activityPct: 5 },
  ],
};

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser?.close(); });

const cell = (page, p) => page.locator(`${TAG} input[data-path="${p}"], ${TAG} select[data-path="${p}"]`);
const cellMsg = (page, p) => page.locator(`${TAG} span.rn-cell[data-path="${p}"] .rn-msg`);

/** Wait for the element to settle after an edit (the state attribute is set on every render). */
async function settledAfter(page, action, state) {
  await page.locator(TAG).evaluate((el) => { el.dataset.state = 'pending'; });
  await action();
  return settled(page, state, TAG);
}

async function typeCells(page, prefix, values) {
  for (const [k, v] of Object.entries(values)) {
    const loc = cell(page, `${prefix}.${k}`);
    if (k === 'kind') await loc.selectOption(v);
    else await loc.fill(v);
  }
}

/** Build the demo board by hand, from an emptied page. */
async function buildByHand(page) {
  // Empty the tree: remove every rail and load, clear the source.
  while (await page.locator(`${TAG} button.rn-remove`).count()) await page.locator(`${TAG} button.rn-remove`).first().click();
  for (const k of ['name', 'vMin', 'vNom', 'vMax', 'capacityAh', 'capacityWh', 'currentLimitA']) await cell(page, `sources[0].${k}`).fill('');
  await cell(page, 'taMax').fill('');
  assert.equal(await page.locator(TAG).getAttribute('data-state'), 'error', 'an empty source is refused');
  await cell(page, 'taMax').fill(TYPED.taMax);
  await typeCells(page, 'sources[0]', TYPED.source);
  for (let i = 0; i < TYPED.rails.length; i++) {
    await page.locator(`${TAG} button.rn-add-rail`).click();
    // Kind first: it decides which cells are in use.
    await cell(page, `rails[${i}].kind`).selectOption(TYPED.rails[i].kind);
    await typeCells(page, `rails[${i}]`, TYPED.rails[i]);
  }
  for (let i = 0; i < TYPED.loads.length; i++) {
    await page.locator(`${TAG} button.rn-add-load`).click();
    await typeCells(page, `loads[${i}]`, TYPED.loads[i]);
  }
  return settled(page, 'ready', TAG);
}

/** Everything the page shows of the result, and the same figures formatted from checkTree called
 * in the page on the expected document, corner by corner. */
async function shownAndExpected(page, doc) {
  return page.evaluate(async ({ doc, tag }) => {
    const { ready } = await import('./js/engine.js');
    const api = await ready;
    const el = document.querySelector(tag);
    const report = api.checkTree(doc);
    const f = (v, kind) => api.formatQuantity(v, kind, 3);
    const out = [];
    for (const k of [0, 1, 2]) {
      const sel = el.querySelector('#rn-tree-corner');
      sel.value = String(k);
      sel.dispatchEvent(new Event('change'));
      const c = report.corners[k];
      const rows = [...el.querySelectorAll('[data-out-table="rails"] tbody tr')];
      rows.forEach((tr, i) => {
        const r = c.rails[i];
        const got = (key) => tr.querySelector(`[data-out="${key}"]`).textContent;
        out.push([`corner ${k} rail ${i} vin`, got('vin'), f(r.vin, 'voltage')]);
        out.push([`corner ${k} rail ${i} vout`, got('vout'), f(r.vout, 'voltage')]);
        out.push([`corner ${k} rail ${i} iout peak`, got('ioutPeak'), f(r.ioutA.peak, 'current')]);
        out.push([`corner ${k} rail ${i} iout avg`, got('ioutAvg'), f(r.ioutA.avg, 'current')]);
        out.push([`corner ${k} rail ${i} iin peak`, got('iinPeak'), f(r.iinA.peak, 'current')]);
        out.push([`corner ${k} rail ${i} loss peak`, got('lossPeak'), f(r.lossW.peak, 'power')]);
        out.push([`corner ${k} rail ${i} loss avg`, got('lossAvg'), f(r.lossW.avg, 'power')]);
      });
      out.push([`corner ${k} rail rows`, String(rows.length), String(c.rails.length)]);
      const loads = [...el.querySelectorAll('[data-out-table="loads"] tbody tr')];
      loads.forEach((tr, i) => {
        const l = c.loads[i];
        const got = (key) => tr.querySelector(`[data-out="${key}"]`).textContent;
        out.push([`corner ${k} load ${i} v`, got('v'), f(l.v, 'voltage')]);
        out.push([`corner ${k} load ${i} i typ`, got('iTyp'), f(l.iA.typ, 'current')]);
        out.push([`corner ${k} load ${i} i peak`, got('iPeak'), f(l.iA.peak, 'current')]);
        out.push([`corner ${k} load ${i} i avg`, got('iAvg'), f(l.iA.avg, 'current')]);
        out.push([`corner ${k} load ${i} p avg`, got('pAvg'), f(l.pW.avg, 'power')]);
      });
      const cases = (x, kind) => `${f(x.typ, kind)} typical · ${f(x.peak, kind)} peak · ${f(x.avg, kind)} average`;
      const tot = (key) => el.querySelector(`.rn-tree-totals [data-out="${key}"]`).textContent;
      out.push([`corner ${k} source A`, tot('sourceA'), cases(c.sourceA, 'current')]);
      out.push([`corner ${k} source W`, tot('sourceW'), cases(c.sourceW, 'power')]);
      out.push([`corner ${k} loads W`, tot('loadsW'), cases(c.loadsW, 'power')]);
      out.push([`corner ${k} losses W`, tot('lossesW'), cases(c.lossesW, 'power')]);
      out.push([`corner ${k} efficiency`, tot('efficiencyPct'), f(c.efficiencyPct, 'percent')]);
      out.push([`corner ${k} runtime`, tot('runtimeH'), `${f(report.runtimeH, 'count')} h (${f(report.runtimeH / 24, 'count')} days)`]);
      // Each edge of the diagram: the rail's input current or the load's current, peak and average.
      const edges = [...el.querySelectorAll('.rn-tree-edge-label')].map((t) => `${t.dataset.edge}: ${[...t.children].map((s) => s.textContent).join(' / ')}`).sort();
      const want = [...c.rails.map((r, i) => [`rail:${i}`, r.iinA]), ...c.loads.map((l, i) => [`load:${i}`, l.iA])]
        .map(([id, x]) => `${id}: ${f(x.peak, 'current')} peak / ${f(x.avg, 'current')} avg`).sort();
      out.push([`corner ${k} diagram edges`, edges.join(' | '), want.join(' | ')]);
    }
    const sel = el.querySelector('#rn-tree-corner');
    sel.value = '1';
    sel.dispatchEvent(new Event('change'));
    out.push(['summary', el.querySelector('.rn-summary').textContent, report.summary]);
    out.push(['checks', [...el.querySelectorAll('.rn-check')].map((li) => li.textContent).join(' | '),
      report.checks.map((c) => `${({ pass: 'Pass', marginal: 'Marginal', fail: 'Fail' })[c.status]}${c.title}${c.text}`).join(' | ')]);
    return { out, same: JSON.stringify(el.result) === JSON.stringify(report) };
  }, { doc, tag: TAG });
}

function assertShown({ out, same }) {
  assert.ok(out.length > 60, `many figures compared (${out.length})`);
  for (const [what, got, want] of out) assert.equal(got, want, what);
  assert.ok(same, 'the element\'s result is checkTree\'s report for the same document');
}

/** The share link of the record, once it is made (async compression). */
async function permalink(page) {
  await page.waitForFunction((tag) => {
    const a = document.querySelector(`${tag} .rn-permalink`);
    return a && a.getAttribute('href') !== '#';
  }, TAG);
  return page.locator(`${TAG} .rn-permalink`).getAttribute('href');
}

test('the demo board typed by hand: every number shown is checkTree\'s; reload keeps the draft; the share link reproduces it in a fresh browser', async () => {
  const { context, page, requests, problems } = await open(browser);
  await page.goto(url('tree.html'));
  assert.equal(await settled(page, 'ready', TAG), 'ready', 'the demo board computes');
  assert.equal(await buildByHand(page), 'ready');
  const doc = await page.locator(TAG).evaluate((el) => el.doc);
  assert.deepStrictEqual(doc, EXPECTED_DOC, 'the typed cells give the demo document');
  assertShown(await shownAndExpected(page, EXPECTED_DOC));
  // The unused cells of a kind say so and are disabled.
  assert.equal(await cell(page, 'rails[0].dropoutV').isDisabled(), true);
  assert.equal(await cell(page, 'rails[0].dropoutV').getAttribute('placeholder'), 'not used');

  // Reload: the draft (typed text, not numbers) comes back, and so does every number.
  const before = await page.evaluate((tag) => [...document.querySelectorAll(`${tag} [data-path]:is(input,select)`)].map((i) => [i.dataset.path, i.value]), TAG);
  await page.reload();
  assert.equal(await settled(page, 'ready', TAG), 'ready');
  const afterReload = await page.evaluate((tag) => [...document.querySelectorAll(`${tag} [data-path]:is(input,select)`)].map((i) => [i.dataset.path, i.value]), TAG);
  assert.deepEqual(afterReload, before, 'every cell text is back after the reload');
  assert.equal(await cell(page, 'rails[1].vout').inputValue(), '3V3', 'the typed text, not a number');
  assertShown(await shownAndExpected(page, EXPECTED_DOC));

  // The share link, opened in a fresh context (no draft there), gives the same report and text.
  const link = await permalink(page);
  assert.match(link, /tree\.html#doc=[A-Za-z0-9_-]+$/);
  console.log(`demo tree share link as made by the page: ${link.length} characters`);
  const shownText = (p) => p.evaluate((tag) => [...document.querySelectorAll(`${tag} .rn-results > section`)].map((s) => s.innerText).join('\n'), TAG);
  const here = await shownText(page);
  const fresh = await open(browser);
  await fresh.page.goto(link);
  assert.equal(await settled(fresh.page, 'ready', TAG), 'ready');
  assert.deepStrictEqual(await fresh.page.locator(TAG).evaluate((el) => el.doc), EXPECTED_DOC);
  assertShown(await shownAndExpected(fresh.page, EXPECTED_DOC));
  assert.equal(await shownText(fresh.page), here, 'the same text, figure for figure');
  assert.equal(new URL(fresh.page.url()).hash, '', 'the code leaves the address bar once it is the draft');
  assert.deepEqual(fresh.problems, []);
  assertSameOrigin(fresh.requests);
  await fresh.context.close();

  // Discard draft: the demo board again, and no draft after a reload.
  await page.locator(`${TAG} button.rn-discard`).click();
  assert.equal(await page.evaluate(() => localStorage.getItem('railnote.tree.draft')), null);
  assert.equal(await cell(page, 'rails[1].vout').inputValue(), '3.3 V', 'the demo board as typed');
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('export downloads the document; import (file and paste) opens it', async () => {
  const { context, page, requests, problems } = await open(browser, { acceptDownloads: true });
  await page.goto(url('tree.html'));
  await settled(page, 'ready', TAG);
  const [download] = await Promise.all([page.waitForEvent('download'), page.locator(`${TAG} button.rn-export`).click()]);
  assert.equal(download.suggestedFilename(), 'rail-tree.json');
  const exported = JSON.parse(fs.readFileSync(await download.path(), 'utf8'));
  assert.deepStrictEqual(exported, await page.locator(TAG).evaluate((el) => el.doc));
  assert.equal(exported.version, 2);

  const fixture = JSON.parse(fs.readFileSync(FIXTURE, 'utf8'));
  await settledAfter(page, () => page.locator(`${TAG} input[type="file"]`).setInputFiles(FIXTURE), 'ready');
  // The stored version 1 file opens, migrated: 7000 mAh is now 7 Ah, nothing else changed, and
  // every number equals checkTree reading the version 1 file as it is.
  const { capacityMah, ...source } = fixture.sources[0];
  assert.equal(capacityMah, 7000);
  assert.deepStrictEqual(await page.locator(TAG).evaluate((el) => el.doc), { ...fixture, version: 2, sources: [{ ...source, capacityAh: 7 }] }, 'the stored v1 file opens');
  assert.equal(await cell(page, 'sources[0].capacityAh').inputValue(), '7');
  assertShown(await shownAndExpected(page, fixture));
  assert.equal(await page.locator(`${TAG} .rn-tree-rail`).count(), 4, 'four rails drawn');

  await page.locator(`${TAG} details.rn-tree-paste summary`).click();
  await page.locator('#rn-tree-paste').fill(JSON.stringify(EXPECTED_DOC));
  await settledAfter(page, () => page.locator(`${TAG} button.rn-paste-read`).click(), 'ready');
  assert.deepStrictEqual(await page.locator(TAG).evaluate((el) => el.doc), EXPECTED_DOC);
  await page.locator('#rn-tree-paste').fill('{"version": 3}');
  await page.locator(`${TAG} button.rn-paste-read`).click();
  assert.match(await page.locator('#rn-tree-paste-msg').textContent(), /version 3/);
  assert.deepStrictEqual(await page.locator(TAG).evaluate((el) => el.doc), EXPECTED_DOC, 'a refused paste changes nothing');
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('cycles, dangling parents, duplicate names and a 10 MB paste give messages; the page keeps working', async () => {
  const { context, page, requests, problems } = await open(browser);
  await page.goto(url('tree.html'));
  await settled(page, 'ready', TAG);
  const cases = [
    ['a cycle', 'rails[0].parent', '1V8 LDO', /cycle/, 'rails'],
    ['a dangling parent', 'rails[2].parent', 'nowhere', /neither the source nor a rail/, 'rails[2].parent'],
    ['a duplicate name', 'rails[2].name', '3V3 LDO', /used twice/, null],
    ['a load on a missing rail', 'loads[0].rail', '2V5 LDO', /neither the source nor a rail/, 'loads[0].rail'],
    ['a bad value', 'rails[1].vout', '3.3 A', /voltage/, 'rails[1].vout'],
  ];
  for (const [what, p, bad, re, at] of cases) {
    const good = await cell(page, p).inputValue();
    assert.equal(await settledAfter(page, () => cell(page, p).fill(bad), 'error'), 'error', what);
    assert.match(await page.locator(`${TAG} .rn-error-box`).textContent(), re, `${what}: the sentence`);
    if (at && at.includes('.')) assert.match(await cellMsg(page, at).textContent(), re, `${what}: message at ${at}`);
    else {
      const msgs = await page.locator(`${TAG} [data-table="rails"] .rn-msg`).allTextContents();
      assert.ok(msgs.some((m) => re.test(m)), `${what}: a message in the rails table (${msgs.join(' / ')})`);
    }
    assert.equal(await settledAfter(page, () => cell(page, p).fill(good), 'ready'), 'ready', `${what}: fixed, computed again`);
    assert.equal(await cellMsg(page, at && at.includes('.') ? at : p).textContent(), '', `${what}: message gone`);
  }
  // A 10 MB paste: refused with a message, within a second, and the page keeps computing.
  await page.locator(`${TAG} details.rn-tree-paste summary`).click();
  await page.locator('#rn-tree-paste').evaluate((ta) => { ta.value = `{"version":1,"rails":[${'{"name":"r"},'.repeat(800000)}{"name":"x"}]}`; });
  const ms = await page.evaluate(async (tag) => {
    const t0 = performance.now();
    document.querySelector(`${tag} button.rn-paste-read`).click();
    const msg = document.querySelector('#rn-tree-paste-msg');
    while (!msg.textContent) await new Promise((r) => setTimeout(r, 5));
    return performance.now() - t0;
  }, TAG);
  console.log(`10 MB paste answered in ${ms.toFixed(1)} ms`);
  assert.ok(ms < 1000, `the page answered within a second (${ms} ms)`);
  assert.match(await page.locator('#rn-tree-paste-msg').textContent(), /more than a tree document may hold/);
  assert.equal(await settledAfter(page, () => cell(page, 'loads[0].peakA').fill('200 mA'), 'ready'), 'ready', 'still computing after the paste');
  // A damaged link: a message, and the demo board instead.
  const bad = await open(browser);
  await bad.page.goto(url('tree.html#doc=not*a*code'));
  assert.equal(await settled(bad.page, 'ready', TAG), 'ready');
  assert.match(await bad.page.locator(`${TAG} .rn-tool-status`).textContent(), /could not be opened: link: the link is damaged/);
  await bad.context.close();
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('a rail links to its calculator with its numbers from the tree', async () => {
  const { context, page, requests, problems } = await open(browser);
  await page.goto(url('tree.html'));
  await settled(page, 'ready', TAG);
  const r = await page.locator(TAG).evaluate((el) => el.result);
  const linear = new URL(await page.locator(`${TAG} a[data-rail-link="1"]`).getAttribute('href'), url('tree.html'));
  assert.equal(linear.pathname.endsWith('/linear.html'), true);
  const q = Object.fromEntries(linear.searchParams);
  // The 3.3 V rail's input at the three source voltages is the buck's output at each of them.
  assert.equal(Number(q['vin-min']), r.corners[0].rails[1].vin);
  assert.equal(Number(q['vin-nom']), r.corners[1].rails[1].vin);
  assert.equal(Number(q['vin-max']), r.corners[2].rails[1].vin);
  assert.equal(Number(q['iout-max']), Math.max(...r.corners.map((c) => c.rails[1].ioutA.peak)));
  assert.equal(Number(q['iout-typ']), r.corners[1].rails[1].ioutA.typ);
  assert.deepEqual([q.vout, q.dropout, q['dropout-model'], q.iq, q.gnd, q['vout-tol'], q['headroom-margin'], q['thermal-margin'], q['theta-ja'], q['ta-max'], q['tj-max'], q.rated],
    ['3.3', '0.3', 'constant', '0.00005', '0', '0', '0', '0', '100', '60', '125', '0.3']);
  await page.locator(`${TAG} a[data-rail-link="1"]`).click();
  assert.equal(await settled(page, 'ready', 'railnote-linear'), 'ready');
  const lin = await page.locator('railnote-linear').evaluate((el) => ({ v: el.querySelector('.rn-field[data-key="vin-min"] input').value, out: el.querySelector('.rn-field[data-key="iout-max"] input').value }));
  assert.equal(Number(lin.v), r.corners[0].rails[1].vin, 'the linear page holds the rail\'s lowest input');
  assert.equal(Number(lin.out), Number(q['iout-max']));
  await page.goBack();
  await settled(page, 'ready', TAG);
  const sw = new URL(await page.locator(`${TAG} a[data-rail-link="0"]`).getAttribute('href'), url('tree.html'));
  assert.equal(sw.pathname.endsWith('/switching.html'), true);
  assert.deepEqual([sw.searchParams.get('vin-min'), sw.searchParams.get('vin-max'), sw.searchParams.get('vout')], ['10.8', '14.4', '5']);
  assert.equal(Number(sw.searchParams.get('iout')), Math.max(...r.corners.map((c) => c.rails[0].ioutA.peak)));
  await page.goto(sw.href);
  assert.equal(await settled(page, 'ready', 'railnote-switching'), 'ready', 'the switching page computes the carried rail');
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('linear details go through the linear check, a buck can be estimated from its parts, and capacity takes Wh', async () => {
  const { context, page, requests, problems } = await open(browser);
  await page.goto(url('tree.html'));
  await settled(page, 'ready', TAG);
  // The 3.3 V LDO with a 2 V headroom margin: it regulates with 1.40 V to spare, short of 2 V,
  // so the linear check calls it marginal, and so does the tree.
  assert.equal(await page.locator(`${TAG} [data-detail="linear"] tbody tr`).count(), 2, 'both LDOs in the linear details');
  await settledAfter(page, () => cell(page, 'rails[1].headroomMarginV').fill('2 V'), 'ready');
  let r = await page.locator(TAG).evaluate((el) => el.result);
  assert.equal(r.verdict, 'marginal');
  assert.equal(r.firstFailure, '3V3 LDO');
  const head = r.checks.find((c) => c.rail === '3V3 LDO' && c.id === 'headroom');
  assert.equal(head.status, 'marginal');
  assert.match(await page.locator(`${TAG} [data-out-table="rails"] tr[data-rail="1"] [data-out="verdict"]`).textContent(), /marginal/i);
  const linear = new URL(await page.locator(`${TAG} a[data-rail-link="1"]`).getAttribute('href'), url('tree.html'));
  assert.equal(linear.searchParams.get('headroom-margin'), '2');
  await page.goto(linear.href);
  await settled(page, 'ready', 'railnote-linear');
  const onLinear = await page.locator('railnote-linear').evaluate((el) => el.result.checks.find((c) => c.id === 'headroom'));
  assert.deepEqual([onLinear.status, onLinear.text], [head.status, head.text], 'the linear page grades the carried rail as the tree did');
  await page.goBack();
  await settled(page, 'ready', TAG);

  // The buck from its parts: the parts table appears, prefilled from the switching page's demo,
  // and the buck's input current is the switching estimate's (checkTree in the page on the doc).
  await settledAfter(page, () => cell(page, 'rails[0].efficiencyFrom').selectOption('estimate'), 'ready');
  assert.equal(await page.locator(`${TAG} [data-detail="estimate"] tbody tr`).count(), 1);
  assert.equal(await cell(page, 'rails[0].fsw').inputValue(), '500 kHz');
  assert.equal(await cell(page, 'rails[0].efficiencyPct').isDisabled(), true, 'a fixed efficiency is not used now');
  const doc = await page.locator(TAG).evaluate((el) => el.doc);
  assert.equal(doc.rails[0].efficiencyFrom, 'estimate');
  assert.equal(doc.rails[0].efficiencyPct, undefined);
  assert.equal(doc.rails[0].fsw, 500e3);
  assertShown(await shownAndExpected(page, doc));
  r = await page.locator(TAG).evaluate((el) => el.result);
  assert.deepEqual(r.checks.filter((c) => c.rail === '5V0 buck').map((c) => c.id), ['duty', 'onTime', 'saturation', 'rating']);
  // A bad part is named at its cell, and fixing it computes again.
  await settledAfter(page, () => cell(page, 'rails[0].fsw').fill('500 kV'), 'error');
  assert.match(await cellMsg(page, 'rails[0].fsw').textContent(), /voltage/);
  await settledAfter(page, () => cell(page, 'rails[0].fsw').fill('400 kHz'), 'ready');
  const sw = new URL(await page.locator(`${TAG} a[data-rail-link="0"]`).getAttribute('href'), url('tree.html'));
  assert.deepEqual([sw.searchParams.get('fsw'), sw.searchParams.get('inductance'), sw.searchParams.get('topology')], ['400000', String(doc.rails[0].inductance), 'buck']);

  // Capacity in watt-hours: 84 Wh over the average source power at 12 V.
  await settledAfter(page, () => cell(page, 'sources[0].capacityAh').fill(''), 'ready');
  await settledAfter(page, () => cell(page, 'sources[0].capacityWh').fill('84 Wh'), 'ready');
  r = await page.locator(TAG).evaluate((el) => el.result);
  assert.ok(Math.abs(r.runtimeH - 84 / r.corners[1].sourceW.avg) <= 1e-12 * r.runtimeH);
  await settledAfter(page, () => cell(page, 'sources[0].capacityWh').fill('84 W'), 'error');
  assert.match(await cellMsg(page, 'sources[0].capacityWh').textContent(), /energy/);
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('the embed opens a shared tree and keeps no draft', async () => {
  const { context, page, requests, problems } = await open(browser, { permissions: ['clipboard-read', 'clipboard-write'] });
  await page.goto(url('tree.html'));
  await settled(page, 'ready', TAG);
  const link = await permalink(page);
  // "Copy share link" gives the same link (copied, or shown selected where copying is refused).
  await page.locator(`${TAG} button.rn-copy`).click();
  await page.waitForFunction((tag) => /copied|selected below/.test(document.querySelector(`${tag} .rn-tool-status`).textContent), TAG);
  const status = await page.locator(`${TAG} .rn-tool-status`).textContent();
  const copied = /copied/.test(status) ? await page.evaluate(() => navigator.clipboard.readText()) : await page.locator(`${TAG} .rn-link-fallback`).inputValue();
  assert.equal(copied, link, 'the copied link is the record\'s link');
  const code = new URL(link).hash;
  await page.evaluate(() => localStorage.clear());
  await page.goto(url(`embed.html?calc=tree${code}`));
  assert.equal(await settled(page, 'ready', TAG), 'ready');
  assert.equal(await page.title(), 'Rail tree · railnote');
  assert.deepStrictEqual(await page.locator(TAG).evaluate((el) => el.doc), (await import('../../site/js/tree-doc.js')).demoDoc());
  await settledAfter(page, () => cell(page, 'loads[0].peakA').fill('100 mA'), 'ready');
  assert.equal(await page.evaluate(() => localStorage.getItem('railnote.tree.draft')), null, 'an embed writes no draft');
  assert.equal(await page.locator(`${TAG} button.rn-discard`).count(), 0);
  assert.deepEqual(problems, []);
  assertSameOrigin(requests);
  await context.close();
});

test('screenshots: light and dark', async () => {
  for (const scheme of ['light', 'dark']) {
    const { context, page, problems } = await open(browser, { colorScheme: scheme });
    await page.goto(url('tree.html'));
    await settled(page, 'ready', TAG);
    await page.screenshot({ path: path.join(OUT_DIR, `tree-${scheme}.png`), fullPage: true });
    await page.locator(`${TAG} .rn-tree-figure`).screenshot({ path: path.join(OUT_DIR, `tree-diagram-${scheme}.png`) });
    // The diagram draws every node, with its words.
    const nodes = await page.locator(`${TAG} .rn-tree-node`).count();
    assert.equal(nodes, 1 + 3 + 2);
    assert.deepEqual(problems, []);
    await context.close();
  }
});
