// The rail tree's document (site/js/tree-doc.js): export → import round trips, the stored
// version 1 fixture, page state ⇄ document through the engine's parser, share-link codes
// (Node's CompressionStream is the same WHATWG stream the browsers ship), and bad documents.
// Run after `cargo xtask build` (the engine's parseQuantity and checkTree come from site/pkg).
import { test } from 'node:test';
import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { initSync, parseQuantity, checkTree } from '../../site/pkg/railnote.js';
import {
  DocError, MAX_DOC_CHARS, demoDoc, demoState, migrate, importJson, exportJson, stateFromDoc, docFromState,
  sanitizeState, encodeDoc, decodeDoc, shareUrl, codeFromHash, emptyRow, RAIL_CHOICES,
} from '../../site/js/tree-doc.js';

initSync({ module: readFileSync(new URL('../../site/pkg/railnote_bg.wasm', import.meta.url)) });

const FIXTURE_V1 = readFileSync(new URL('./fixtures/tree-v1.json', import.meta.url), 'utf8');

/** A small seeded generator (mulberry32), so every run builds the same 10 000 trees. */
function rng(seed) {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** A random tree document: awkward doubles (1e-7…1e3, negative zero excluded), names with
 * quotes, backslashes, non-ASCII and emoji, optional keys present or absent. */
function randomDoc(r) {
  const num = () => {
    const pick = r();
    if (pick < 0.1) return Math.round(r() * 1000);
    if (pick < 0.2) return 0.1 + 0.2; // 0.30000000000000004
    return (r() * 2 - 0.5) * 10 ** Math.floor(r() * 10 - 7);
  };
  const name = (i, word) => {
    const bits = ['"', '\\', 'µ', 'θ', '🔋', ' ', '<b>', '\u2028', 'x'];
    let s = `${word} ${i}`;
    const n = Math.floor(r() * 3);
    for (let k = 0; k < n; k++) s += bits[Math.floor(r() * bits.length)];
    return s;
  };
  const maybe = (obj, key, v) => { if (r() < 0.6) obj[key] = v; };
  const source = { name: name(0, 'Source'), vMin: num(), vNom: num(), vMax: num() };
  maybe(source, 'capacityAh', num());
  maybe(source, 'capacityWh', num());
  maybe(source, 'currentLimitA', num());
  const rails = [];
  const nRails = Math.floor(r() * 8);
  for (let i = 0; i < nRails; i++) {
    const parent = i === 0 || r() < 0.3 ? source.name : rails[Math.floor(r() * i)].name;
    const rail = { name: name(i, 'Rail'), parent, kind: ['linear', 'switching', 'switch'][Math.floor(r() * 3)] };
    for (const k of ['vout', 'efficiencyPct', 'iq', 'dropoutV', 'rOn', 'thetaJa', 'tjMax', 'ratedA',
      'dropoutAtA', 'gndPct', 'voutTolPct', 'headroomMarginV', 'thermalMarginC', 'fsw', 'inductance', 'mainRdsOn', 'coss']) maybe(rail, k, num());
    for (const [k, choices] of Object.entries(RAIL_CHOICES)) maybe(rail, k, choices[Math.floor(r() * choices.length)]);
    rails.push(rail);
  }
  const loads = [];
  const nLoads = Math.floor(r() * 10);
  for (let i = 0; i < nLoads; i++) {
    const load = { name: name(i, 'Load'), rail: rails.length && r() < 0.9 ? rails[Math.floor(r() * rails.length)].name : source.name };
    for (const k of ['typA', 'peakA', 'typW', 'peakW', 'activityPct', 'sleepA']) maybe(load, k, num());
    loads.push(load);
  }
  const doc = { version: 2, sources: [source], rails, loads };
  maybe(doc, 'taMax', num());
  return doc;
}

function throwsDoc(fn, field, what) {
  assert.throws(fn, (err) => {
    assert.ok(err instanceof DocError, `${what}: a DocError, got ${err}`);
    assert.equal(err.field, field, `${what}: field`);
    assert.ok(err.message.length > err.field.length + 5, `${what}: a sentence (${err.message})`);
    return true;
  }, what);
}

test('export → import is lossless on 10 000 random trees', () => {
  const r = rng(20261202);
  for (let i = 0; i < 10000; i++) {
    const doc = randomDoc(r);
    const back = importJson(exportJson(doc));
    assert.deepStrictEqual(back, doc, `tree ${i}`);
  }
});

test('share-link code round trip is lossless on 500 random trees, and the demo link is short', async () => {
  const r = rng(7);
  for (let i = 0; i < 500; i++) {
    const doc = randomDoc(r);
    assert.deepStrictEqual(await decodeDoc(await encodeDoc(doc)), doc, `tree ${i}`);
  }
  const link = await shareUrl('http://127.0.0.1/tree.html?x=1#old', demoDoc());
  const code = codeFromHash(new URL(link).hash);
  assert.match(code, /^[A-Za-z0-9_-]+$/, 'base64url alphabet only');
  assert.deepStrictEqual(await decodeDoc(code), demoDoc());
  console.log(`demo tree share link: ${link.length} characters (code ${code.length})`);
  assert.ok(code.length < exportJson(demoDoc()).length, 'compressed code shorter than the JSON');
});

test('the stored version 1 fixture still loads, migrated to version 2, and checks the same as checkTree reading it as it is', () => {
  const doc = importJson(FIXTURE_V1);
  assert.equal(doc.version, 2);
  assert.equal(doc.rails.length, 4);
  assert.equal(doc.loads[2].name, 'Probe heater');
  // 7000 mAh became 7 Ah; nothing else changed.
  assert.equal(doc.sources[0].capacityAh, 7);
  assert.equal('capacityMah' in doc.sources[0], false);
  const raw = JSON.parse(FIXTURE_V1);
  assert.deepStrictEqual({ ...doc, version: 1, sources: raw.sources }, raw);
  const report = checkTree(doc);
  assert.equal(report.corners.length, 3);
  assert.ok(Number.isFinite(report.corners[1].sourceW.avg) && report.corners[1].sourceW.avg > 0.1 * 0.01);
  // checkTree reads version 1 itself too, with the same result (runtime from 7000 mAh included).
  assert.deepStrictEqual(checkTree(raw), report);
  assert.ok(report.runtimeH > 100, `runtime ${report.runtimeH} h`);
});

test('migrate: no version is version 1; later or odd versions are refused by name', () => {
  const noVersion = JSON.parse(FIXTURE_V1);
  delete noVersion.version;
  assert.equal(migrate(noVersion).version, 2);
  assert.deepStrictEqual(importJson(JSON.stringify(noVersion)), importJson(FIXTURE_V1));
  throwsDoc(() => importJson('{"version": 3}'), 'version', 'a later version');
  // A version 1 document is checked against version 1's keys: version 2's are not in it.
  throwsDoc(() => importJson('{"version":1,"sources":[{"name":"B","capacityAh":7}]}'), 'sources[0].capacityAh', 'a version 2 key in version 1');
  throwsDoc(() => importJson('{"version":2,"sources":[{"name":"B","capacityMah":7000}]}'), 'sources[0].capacityMah', 'a version 1 key in version 2');
  throwsDoc(() => importJson('{"version": "1"}'), 'version', 'a version as text');
  throwsDoc(() => importJson('{"version": 1.5}'), 'version', 'a fractional version');
});

test('bad documents give messages that name the place', () => {
  throwsDoc(() => importJson('not json at all'), 'document', 'not JSON');
  throwsDoc(() => importJson(''), 'document', 'empty');
  throwsDoc(() => importJson('[1,2]'), 'document', 'a list');
  throwsDoc(() => importJson('null'), 'document', 'null');
  throwsDoc(() => importJson('{"version":1,"rails":{}}'), 'rails', 'rails not a list');
  throwsDoc(() => importJson('{"version":1,"rails":[{"name":5}]}'), 'rails[0].name', 'a name as a number');
  throwsDoc(() => importJson('{"version":1,"loads":[{"name":"a","typA":"30 mA"}]}'), 'loads[0].typA', 'a number as text');
  throwsDoc(() => importJson('{"version":1,"rails":[{"name":"a","vout":3.3,"colour":"red"}]}'), 'rails[0].colour', 'an unknown key');
  throwsDoc(() => importJson('{"version":1,"extra":1}'), 'extra', 'an unknown top-level key');
  throwsDoc(() => importJson('{"version":1,"taMax":"hot"}'), 'taMax', 'taMax as text');
  throwsDoc(() => importJson('{"version":2,"rails":[{"name":"a","dropoutModel":"magic"}]}'), 'rails[0].dropoutModel', 'a choice not on the list');
  throwsDoc(() => importJson(JSON.stringify({ version: 1, rails: Array.from({ length: 501 }, (_, i) => ({ name: `r${i}` })) })), 'rails', 'too many rails');
  throwsDoc(() => importJson(JSON.stringify({ version: 1, sources: [{}, {}] })), 'sources', 'two sources');
});

test('a 10 MB paste is refused at once, before it is parsed', () => {
  const big = `{"version":1,"rails":[${'{"name":"r"},'.repeat(800000)}{"name":"x"}]}`;
  assert.ok(big.length > 10_000_000);
  const t0 = performance.now();
  throwsDoc(() => importJson(big), 'document', '10 MB');
  const ms = performance.now() - t0;
  console.log(`10 MB paste refused in ${ms.toFixed(3)} ms`);
  throwsDoc(() => importJson(' '.repeat(MAX_DOC_CHARS + 1)), 'document', 'just over 1 MB');
});

test('damaged links and a deflate bomb give messages', async () => {
  await assert.rejects(decodeDoc('abc$%'), (e) => e instanceof DocError && e.field === 'link');
  await assert.rejects(decodeDoc('AAAA'), (e) => e instanceof DocError && e.field === 'link');
  // 20 MB of spaces compress to a few kB: inflating stops at the limit.
  const bomb = new Blob([new Uint8Array(20_000_000).fill(32)]).stream().pipeThrough(new CompressionStream('deflate-raw'));
  const bytes = new Uint8Array(await new Response(bomb).arrayBuffer());
  const code = Buffer.from(bytes).toString('base64url');
  await assert.rejects(decodeDoc(code), (e) => e instanceof DocError && e.field === 'link' && /more than/.test(e.message));
  assert.equal(codeFromHash('#other'), null);
  assert.equal(codeFromHash('#doc=abc'), 'abc');
});

test('page state ⇄ document: the demo through text and the engine parser gives the same numbers', () => {
  const doc = demoDoc();
  const { doc: back, errors } = docFromState(stateFromDoc(doc), parseQuantity);
  assert.deepEqual(errors, []);
  assert.deepStrictEqual(back, doc);
  assert.deepStrictEqual(checkTree(back), checkTree(doc));
});

test('the demo as the page shows it (typed with units) parses to the demo document exactly', () => {
  const { doc, errors } = docFromState(demoState(), parseQuantity);
  assert.deepEqual(errors, []);
  assert.deepStrictEqual(doc, demoDoc());
});

test('page state: typed text with units is parsed; bad and missing cells are named like checkTree names them', () => {
  const state = stateFromDoc(demoDoc());
  state.rails[1].vout = '3V3';
  state.rails[1].iq = '50 µA';
  state.loads[0].peakA = '250 mA';
  state.taMax = '60 °C';
  let { doc, errors } = docFromState(state, parseQuantity);
  assert.deepEqual(errors, []);
  assert.equal(doc.rails[1].vout, 3.3);
  assert.equal(doc.rails[1].iq, 50e-6);
  assert.equal(doc.loads[0].peakA, 0.25);
  state.rails[0].vout = '5 A';
  state.loads[1].name = '';
  state.rails.push(emptyRow('rails'));
  ({ doc, errors } = docFromState(state, parseQuantity));
  const fields = errors.map((e) => e.field).sort();
  assert.deepEqual(fields, ['loads[1].name', 'rails[0].vout', 'rails[3].name', 'rails[3].parent']);
  assert.ok(errors.every((e) => typeof e.message === 'string' && e.message.length > 5));
});

test('sanitizeState keeps only text cells from a stored draft', () => {
  assert.equal(sanitizeState('x'), null);
  const s = sanitizeState({ taMax: 5, source: { name: 'B', vMin: { evil: 1 } }, rails: [{ name: 'r', kind: 'linear', vout: ['3'] }], loads: 'x' });
  assert.equal(s.taMax, '');
  assert.equal(s.source.name, 'B');
  assert.equal(s.source.vMin, '');
  assert.equal(s.rails[0].vout, '');
  assert.deepEqual(s.loads, []);
});
