// Hostile input in real Chromium: the corpus of hostile-corpus.mjs typed into every field of every
// calculator page and placed in every link key.
//
// For each case: a refused value gets its message at its own field (the field marked invalid with
// aria-invalid and .rn-bad, the message linked by aria-describedby, naming the reason and the
// field's kind); a value that is in fact valid behaves exactly as its plain spelling does (and the
// output says whether that computed or was refused by the calculator's range); nothing executes
// (window.alert/confirm/prompt are trapped) and no injected element appears; the page never shows
// "NaN" or "Infinity"; any computed result holds only finite numbers; and once the field is set
// back to its good value the widget computes the same result as at first.
//
// Speed: the typed corpus runs inside the page (value set, then the `input` event the widgets
// listen to, which computes synchronously), many cases per page.evaluate; locator.fill types a
// payload into every field once more, the way a person would; link keys are read by a fresh
// element from the address (history.replaceState), and a few links are opened for real.
import { test, before, after } from 'node:test';
import assert from 'node:assert/strict';
import { launch, open, url, settled, field, message } from './browser.mjs';
import { CORPUS, NOUN, materialize } from './hostile-corpus.mjs';

/**
 * The calculator pages. configs: settings (query keys) under which further fields are in use:
 * each field is tested in the first config that shows and enables it. The tree has no link
 * keys (its document travels in #doc=) and its rails' kinds decide which cells are in use.
 */
const CALCULATORS = [
  { page: 'linear.html', tag: 'railnote-linear', configs: [''] },
  { page: 'thermal.html', tag: 'railnote-thermal', configs: ['', '?path=chain&theta-sa=2'] },
  // 2000 Monte Carlo samples instead of 20 000: each case recomputes, the samples are one field.
  { page: 'divider.html', tag: 'railnote-divider', configs: ['?mc-samples=2000', '?mode=reverse&mc-samples=2000', '?mode=threshold'] },
  { page: 'switching.html', tag: 'railnote-switching', configs: ['', '?rectifier=diode'] },
  { page: 'compare.html', tag: 'railnote-compare', configs: ['', '?rectifier=diode'] },
  { page: 'tree.html', tag: 'railnote-tree', configs: [''], treeKinds: [
    { 'rails[2].kind': 'switch' },
    { 'rails[0].kind': 'switch', 'rails[1].kind': 'switch' },
    { 'rails[0].kind': 'linear', 'rails[0].dropoutV': '1 V', 'rails[1].kind': 'switching', 'rails[1].efficiencyPct': '85 %', 'rails[2].kind': 'switching', 'rails[2].efficiencyPct': '80 %' },
  ] },
];

const KINDS = [...Object.keys(NOUN), 'text'];
const DATA = materialize(KINDS);

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser?.close(); });

/** A context whose pages trap alert/confirm/prompt into window.__trapped. */
async function trappedContext() {
  const opened = await open(browser);
  await opened.context.addInitScript(() => {
    window.__trapped = [];
    for (const name of ['alert', 'confirm', 'prompt', 'print']) {
      window[name] = (...args) => { window.__trapped.push(`${name}(${args.map(String).join(',')})`); return null; };
    }
  });
  return opened;
}

// ---- in-page helpers (serialised into page.evaluate, so they take everything as arguments) ----

/**
 * Runs inside the page: the whole corpus typed into each field in use that is not in `skip`.
 * Returns { tested: [keys], cases, failures: [text], notes: {…counts} }.
 */
async function typeCorpusInPage({ tag, corpus, skip, nouns }) {
  const el = document.querySelector(tag);
  const isTree = tag === 'railnote-tree';
  let kindOf;
  if (isTree) {
    const doc = await import('./js/tree-doc.js');
    const tables = { sources: doc.SOURCE_KEYS, rails: doc.RAIL_KEYS, loads: doc.LOAD_KEYS };
    kindOf = (key) => {
      if (key === 'taMax') return 'temperature';
      const m = /^(\w+)\[\d+\]\.(\w+)$/.exec(key);
      const k = tables[m[1]][m[2]];
      return k === null ? 'text' : k;
    };
  } else {
    kindOf = (key) => el.fields.find((f) => f.def.key === key).def.kind;
  }
  const all = [...el.querySelectorAll('.rn-field[data-key]')].map((root) => ({ root, key: root.dataset.key, input: root.querySelector('input, select') }));
  const fields = all.filter((f) => f.input && f.input.tagName === 'INPUT' && !f.input.disabled && !f.root.closest('[hidden]') && !skip.includes(f.key));
  const failures = [];
  const notes = { cases: 0, sameComputed: 0, sameRefused: 0, numberComputed: 0, numberRefused: 0, numberRelated: 0, fixed: 0, blankOmitted: 0, blankRefused: 0, refused: 0, text: 0 };
  const INJECTED = 'img[src="x"], script:not([src]), svg[onload], [onerror], [onload], iframe';
  const badText = /\bNaN\b|Infinity/;
  const nonFinite = (v, path = 'result') => {
    if (typeof v === 'number') return Number.isFinite(v) ? [] : [`${path} = ${v}`];
    if (v && typeof v === 'object') return Object.entries(v).flatMap(([k, x]) => nonFinite(x, `${path}.${k}`));
    return [];
  };
  const messages = () => [...el.querySelectorAll('.rn-msg')].map((m) => m.textContent).join('|');
  // The widget's text (the rest of the page is static, checked once before any input), less the
  // links that reproduce a check (they hold the typed text itself).
  const shown = (root = el) => {
    const walk = document.createTreeWalker(root, NodeFilter.SHOW_TEXT);
    let out = '';
    for (let n = walk.nextNode(); n; n = walk.nextNode()) if (!n.parentElement.closest('.rn-permalink')) out += n.data;
    return out;
  };
  const snapshot = () => ({ state: el.dataset.state, result: el.result ? JSON.stringify(el.result) : null, messages: messages() });
  const set = (f, text) => {
    f.input.value = text;
    f.input.dispatchEvent(new Event('input', { bubbles: true }));
  };
  const look = (f, text) => {
    const msgEl = f.root.querySelector('.rn-msg');
    return {
      state: el.dataset.state,
      msg: msgEl.textContent,
      invalid: f.input.getAttribute('aria-invalid') === 'true',
      bad: f.root.classList.contains('rn-bad'),
      linked: (f.input.getAttribute('aria-describedby') || '').split(/\s+/).includes(msgEl.id),
      messages: messages(),
      result: el.result ? JSON.stringify(el.result) : null,
      nonFinite: nonFinite(el.result),
      kept: f.input.value === text,
    };
  };
  const placed = (f, seen) => {
    if (seen.msg) return 'here';
    return seen.messages.replace(/\|/g, '') ? 'related' : 'nowhere';
  };
  const base = snapshot();
  if (base.state !== 'ready') return { tested: [], cases: 0, failures: [`the page did not compute at first: ${base.messages}`], notes };
  if (document.querySelector(INJECTED)) return { tested: [], cases: 0, failures: ['the page holds an element the injection check looks for before any input'], notes };
  if (badText.test(shown(document.body))) return { tested: [], cases: 0, failures: ['the page shows NaN or Infinity before any input'], notes };

  for (const f of fields) {
    const kind = kindOf(f.key);
    const good = f.input.value;
    const required = !isTree && !f.root.querySelector('.rn-optional') && !f.root.closest('.rn-rows');
    let refusedRun = 0;
    for (const entry of corpus) {
      // A name cell takes any text: only the entries that are odd as text go there.
      if (kind === 'text' && !entry.name) continue;
      const text = entry.texts[kind];
      const where = `${f.key} (${kind}) ← ${entry.id}`;
      const fail = (why) => failures.push(`${where}: ${why}`);
      notes.cases += 1;
      set(f, text);
      const seen = look(f, text);
      if (window.__trapped.length) fail(`something ran: ${window.__trapped.join(', ')}`);
      if (document.querySelector(INJECTED)) fail('an injected element is in the page');
      const names = isTree && kind === 'text';
      // A rail named "NaN" is shown by its name; only computed text is checked on text cells.
      const text_ = shown();
      if (!(names && /nan|inf/i.test(text)) && badText.test(text_)) fail('the page shows NaN or Infinity');
      if (!names && /0{16,}|9{16,}/.test(text_)) fail(`the page shows a number as a long run of digits: …${/.{0,40}(0{16,}|9{16,}).{0,20}/.exec(text_)[0]}…`);
      if (seen.messages.length > 2000) fail(`messages ${seen.messages.length} characters long`);
      if (seen.nonFinite.length) fail(`non-finite numbers in the result: ${seen.nonFinite.slice(0, 3).join(', ')}`);
      if (!seen.kept) fail('the field does not hold what was typed');
      if (names) {
        notes.text += 1;
        if (seen.state === 'error' && !seen.messages.replace(/\|/g, '')) fail('an error with no message anywhere');
        if (seen.state !== 'error' && seen.state !== 'ready') fail(`state ${seen.state}`);
      } else if (entry.class === 'refused') {
        notes.refused += 1;
        const reason = new RegExp(entry.reason);
        if (seen.state !== 'error') fail(`not refused (state ${seen.state})`);
        if (!reason.test(seen.msg)) fail(`message "${seen.msg}" does not match ${reason}`);
        if (!seen.msg.includes(nouns[kind])) fail(`message "${seen.msg}" does not name ${nouns[kind]}`);
        if (!seen.invalid || !seen.bad || !seen.linked) fail(`field not marked: aria-invalid ${seen.invalid}, rn-bad ${seen.bad}, described by its message ${seen.linked}`);
      } else if (entry.class === 'blank' || entry.class === 'same') {
        const plain = entry.class === 'blank' ? '' : entry.as[kind];
        set(f, plain);
        const ref = look(f, plain);
        for (const k of ['state', 'msg', 'messages', 'result', 'invalid']) {
          if (seen[k] !== ref[k]) fail(`differs from "${plain}" in ${k}: ${String(seen[k]).slice(0, 160)} vs ${String(ref[k]).slice(0, 160)}`);
        }
        if (entry.class === 'blank' && required && !(/^enter /.test(seen.msg) && seen.msg.includes(nouns[kind]))) fail(`a required field left blank says "${seen.msg}"`);
        const ok = seen.state === 'ready';
        if (entry.class === 'blank') notes[ok ? 'blankOmitted' : 'blankRefused'] += 1;
        else notes[ok ? 'sameComputed' : 'sameRefused'] += 1;
        if (!ok) {
          const at = placed(f, seen);
          if (at === 'nowhere') fail('an error with no message at any field');
        }
      } else if (entry.class === 'number') {
        // A relation between two fields (I_out,typ ≤ I_out,max; T_a < T_j) may be reported at
        // the other field of the pair: then that message must be there and say why.
        const at = seen.state === 'ready' ? 'computed' : placed(f, seen);
        if (at === 'computed') notes.numberComputed += 1;
        else if (at === 'here') {
          notes.numberRefused += 1;
          if (!seen.invalid || !seen.bad || !seen.linked) fail('field not marked invalid');
        } else if (at === 'related') notes.numberRelated += 1;
        else fail('refused with no message at any field');
      }
      // Refused values are judged on their own (the widget reads every field afresh each
      // time); the field is typed back to its good value after every value that is not
      // refused, after every third refused one and after the last.
      refusedRun = entry.class === 'refused' && !names ? refusedRun + 1 : 0;
      if (refusedRun > 0 && refusedRun % 3 !== 0 && entry !== corpus.at(-1)) continue;
      set(f, good);
      notes.fixed += 1;
      const back = snapshot();
      if (back.state !== 'ready' || back.result !== base.result || back.messages !== base.messages) {
        fail(`after "${good}" again: state ${back.state}, ${back.result === base.result ? 'same' : 'different'} result, messages ${back.messages.replace(/\|+/g, ' | ').slice(0, 200)}`);
        // Put the page back as it was so later cases are judged on their own.
        break;
      }
    }
    // Inline handlers anywhere, after the whole corpus went through this field.
    if ([...document.querySelectorAll('*')].some((n) => [...n.attributes].some((a) => /^on/i.test(a.name)))) failures.push(`${f.key}: an element with an inline event handler attribute appeared`);
  }
  return { tested: fields.map((f) => f.key), cases: notes.cases, failures, notes };
}

/** Runs inside the page: set the cells of `values` (selects by change, text by input). */
function setCellsInPage({ tag, values }) {
  const el = document.querySelector(tag);
  for (const [key, value] of Object.entries(values)) {
    const input = el.querySelector(`.rn-field[data-key="${key}"] input, .rn-field[data-key="${key}"] select`);
    input.value = value;
    input.dispatchEvent(new Event(input.tagName === 'SELECT' ? 'change' : 'input', { bubbles: true }));
  }
  return el.dataset.state;
}

/**
 * Runs inside the page: for each corpus entry, every link key of the widget holds the entry's text
 * (its kind's version; a select's key the plain one); a fresh element reads the address and
 * computes. Each field must show the entry's message (a select: its "choose" message); then the
 * fields typed back to their first values compute the first result again. With `existing`, the
 * element the page made from its own address is judged instead, for one entry.
 */
async function linkCorpusInPage({ tag, corpus, nouns, existing, good }) {
  const failures = [];
  const notes = { cases: 0, keys: 0, equivalent: 0 };
  const INJECTED = 'img[src="x"], script:not([src]), svg[onload], [onerror], [onload], iframe';
  let el = document.querySelector(tag);
  const Ctor = customElements.get(tag);
  const defs = Ctor.fieldDefs;
  const keys = defs.map((d) => d.key);
  const domKeys = [...el.querySelectorAll('.rn-field[data-key]')].map((n) => n.dataset.key);
  if (JSON.stringify(domKeys) !== JSON.stringify(keys)) failures.push(`link keys ${keys.join(' ')} are not the fields in the page: ${domKeys.join(' ')}`);
  notes.keys = keys.length;
  // The first texts and result: the page's own (opened without a query), or given.
  const firstTexts = new Map(good ? good.texts : el.fields.map((f) => [f.def.key, f.input.value]));
  const base = good ? good.result : JSON.stringify(el.result);
  const textFor = (entry, d) => (d.type === 'select' ? entry.texts.text : entry.texts[d.kind]);
  const fresh = async (search) => {
    if (search === null) return el;
    history.replaceState(null, '', location.pathname + search);
    const next = document.createElement(tag);
    next.setAttribute('sync-url', '');
    const done = new Promise((resolve) => {
      next.addEventListener('railnote-result', resolve, { once: true });
      setTimeout(resolve, 5000);
    });
    el.replaceWith(next);
    el = next;
    await done;
    return el;
  };
  const state = () => ({ state: el.dataset.state, result: el.result ? JSON.stringify(el.result) : null, messages: el.fields.map((f) => f.message.textContent).join('|') });
  const t0 = performance.now();
  for (const entry of corpus) {
    if (entry.class === 'number') continue;
    const params = new URLSearchParams();
    for (const d of defs) params.set(d.key, textFor(entry, d));
    await fresh(existing ? null : `?${params}`);
    notes.cases += 1;
    const seen = state();
    const fail = (why) => failures.push(`link with every key ← ${entry.id}: ${why}`);
    if (window.__trapped.length) fail(`something ran: ${window.__trapped.join(', ')}`);
    if (document.querySelector(INJECTED)) fail('an injected element is in the page');
    if (/\bNaN\b|Infinity/.test(document.body.textContent)) fail('the page shows NaN or Infinity');
    for (const f of el.fields) {
      const d = f.def;
      const expected = textFor(entry, d);
      if (f.input.value !== (d.type === 'select' ? '' : expected)) fail(`${d.key} holds "${f.input.value.slice(0, 40)}", not the link's text`);
      const msg = f.message.textContent;
      const marked = f.input.getAttribute('aria-invalid') === 'true' && f.root.classList.contains('rn-bad');
      if (d.type === 'select') {
        if (!/^choose /.test(msg) || !marked) fail(`${d.key}: select shows "${msg}"`);
      } else if (entry.class === 'refused') {
        if (!new RegExp(entry.reason).test(msg) || !msg.includes(nouns[d.kind]) || !marked) fail(`${d.key}: shows "${msg}"`);
      } else if (entry.class === 'blank') {
        const rowFilled = d.row && el.fields.some((g) => g.def.row && g.def.row.list === d.row.list && g.def.row.index === d.row.index && g.input.value.trim() !== '');
        const required = !d.optional && !d.row;
        if (required && !/^enter /.test(msg)) fail(`${d.key} (required, blank): shows "${msg}"`);
        if (!required && !rowFilled && msg) fail(`${d.key} (optional, blank): shows "${msg}"`);
      }
    }
    if (entry.class === 'same') {
      // The plain spelling in every key must give the very same page.
      const plain = new URLSearchParams();
      for (const d of defs) plain.set(d.key, d.type === 'select' ? entry.texts.text : entry.as[d.kind]);
      await fresh(`?${plain}`);
      const ref = state();
      if (seen.state !== ref.state || seen.messages !== ref.messages || seen.result !== ref.result) fail('differs from the same link in plain spelling');
      else notes.equivalent += 1;
    }
    // Fixed again by typing: the first texts back in every field (a select to its first
    // option), then one input event, which reads every field.
    for (const f of el.fields) f.input.value = firstTexts.get(f.def.key);
    el.fields.filter((f) => f.def.type !== 'select').at(-1).input.dispatchEvent(new Event('input', { bubbles: true }));
    const back = state();
    if (back.state !== 'ready' || back.result !== base) fail(`fixed by typing, the widget shows ${back.state} and ${back.result === base ? 'the same' : 'a different'} result (${back.messages.replace(/\|+/g, ' | ').slice(0, 200)})`);
    if (existing) break;
  }
  notes.ms = Math.round(performance.now() - t0);
  return { failures, notes };
}

// ---- the tests ----

const totals = { typed: 0, fields: 0, pages: 0, linkCases: 0, linkKeys: 0, linkPages: 0 };

for (const calc of CALCULATORS) {
  test(`hostile corpus typed into every field of ${calc.page}`, async (t) => {
    const { context, page, problems } = await trappedContext();
    const tested = [];
    const notes = {};
    const failures = [];
    const payload = CORPUS.find((e) => e.id === 'img onerror').text();
    let filled = 0;
    const runs = [...calc.configs.map((c) => ({ query: c })), ...(calc.treeKinds || []).map((values) => ({ query: '', values }))];
    let allKeys = [];
    for (const run of runs) {
      await page.goto(url(calc.page + run.query));
      await settled(page, 'ready', calc.tag);
      if (run.values) {
        const state = await page.evaluate(setCellsInPage, { tag: calc.tag, values: run.values });
        assert.equal(state, 'ready', `${calc.page} with ${JSON.stringify(run.values)} computes`);
      }
      allKeys = await page.evaluate((tag) => [...document.querySelectorAll(`${tag} .rn-field[data-key] input`)].map((i) => i.closest('.rn-field').dataset.key), calc.tag);
      const first = await page.locator(calc.tag).evaluate((el) => JSON.stringify(el.result));
      const r = await page.evaluate(typeCorpusInPage, { tag: calc.tag, corpus: DATA, skip: tested, nouns: NOUN });
      tested.push(...r.tested);
      failures.push(...r.failures.map((f) => `${calc.page}${run.query}${run.values ? ' (kinds changed)' : ''}: ${f}`));
      for (const [k, v] of Object.entries(r.notes)) notes[k] = (notes[k] || 0) + v;
      assert.deepEqual(failures.slice(0, 40), [], `${failures.length} failures`);
      // The same fields typed for real (locator.fill) with a payload, then fixed again.
      await page.locator(`${calc.tag} details`).evaluateAll((ds) => ds.forEach((d) => { d.open = true; }));
      for (const key of r.tested) {
        const input = field(page, key, calc.tag);
        const good = await input.inputValue();
        await input.fill(payload, { timeout: 5000 });
        if (!/\.(name|parent|rail)$/.test(key)) {
          assert.match(await message(page, key, calc.tag).textContent(), /expected /, `${calc.page} ${key}: message after typing a payload`);
          assert.equal(await input.getAttribute('aria-invalid'), 'true', `${calc.page} ${key}: marked invalid`);
        }
        await input.fill(good, { timeout: 5000 });
        assert.equal(await settled(page, null, calc.tag), 'ready', `${calc.page} ${key}: computes again`);
        filled += 1;
      }
      const seen = await page.evaluate((tag) => ({
        trapped: window.__trapped, injected: document.querySelectorAll('img[src="x"], script:not([src]), [onerror], [onload]').length,
        same: JSON.stringify(document.querySelector(tag).result),
      }), calc.tag);
      assert.deepEqual(seen.trapped, []);
      assert.equal(seen.injected, 0);
      assert.equal(seen.same, first, `${calc.page}${run.query}: after every field was typed into and fixed, the first result again`);
    }
    // Every text field of the page was typed into, in some setting.
    const missed = allKeys.filter((k) => !tested.includes(k));
    assert.deepEqual(missed, [], `${calc.page}: fields never in use in the settings tried`);
    totals.typed += notes.cases;
    totals.fields += tested.length;
    totals.pages += 1;
    const perField = notes.text ? `${CORPUS.length} entries per number cell, the ${CORPUS.filter((e) => e.name).length} odd as text per name cell` : `${CORPUS.length} entries`;
    t.diagnostic(`${calc.page}: ${perField} × ${tested.length} fields = ${notes.cases} typed cases; `
      + `refused with their message ${notes.refused}; valid spellings that computed ${notes.sameComputed}, refused by the calculator's range like their plain spelling ${notes.sameRefused}; `
      + `blank left out ${notes.blankOmitted}, blank refused ${notes.blankRefused}; extreme numbers computed ${notes.numberComputed}, refused at their field ${notes.numberRefused}, refused at the other field of a relation ${notes.numberRelated}`
      + `; typed back to the good value and the first result computed again ${notes.fixed} times`
      + (notes.text ? `; name cells ${notes.text}` : '') + `; and a payload typed with locator.fill into ${filled} fields`);
    assert.deepEqual(problems, [], 'no page errors or console errors');
    await context.close();
  });
}

for (const calc of CALCULATORS.filter((c) => c.tag !== 'railnote-tree')) {
  test(`hostile corpus in every link key of ${calc.page}`, async (t) => {
    const { context, page, problems } = await trappedContext();
    await page.goto(url(calc.page));
    await settled(page, 'ready', calc.tag);
    const good = await page.locator(calc.tag).evaluate((el) => ({ texts: el.fields.map((f) => [f.def.key, f.input.value]), result: JSON.stringify(el.result) }));
    const r = await page.evaluate(linkCorpusInPage, { tag: calc.tag, corpus: DATA, nouns: NOUN });
    assert.deepEqual(r.failures.slice(0, 40), [], `${r.failures.length} failures`);
    // A few of the links opened for real, as a person following them would.
    for (const id of ['img onerror', 'script tag', 'null byte']) {
      const entry = DATA.find((e) => e.id === id);
      const keys = await page.evaluate((tag) => customElements.get(tag).fieldDefs.map((d) => [d.key, d.type === 'select' ? 'text' : d.kind]), calc.tag);
      const params = new URLSearchParams(keys.map(([k, kind]) => [k, entry.texts[kind]]));
      await page.goto(url(`${calc.page}?${params}`));
      await settled(page, 'error', calc.tag);
      const opened = await page.evaluate(linkCorpusInPage, { tag: calc.tag, corpus: [entry], nouns: NOUN, existing: true, good });
      assert.deepEqual(opened.failures, [], `${calc.page} opened with every key ← ${id}`);
    }
    totals.linkCases += r.notes.cases * r.notes.keys;
    totals.linkKeys += r.notes.keys;
    totals.linkPages += 1;
    t.diagnostic(`${calc.page}: ${r.notes.cases} entries × ${r.notes.keys} link keys (all at once) = ${r.notes.cases * r.notes.keys} key values; `
      + `${r.notes.equivalent} valid spellings gave the same page as their plain spelling (${r.notes.ms} ms in the page); 3 links opened for real`);
    assert.deepEqual(problems, []);
    await context.close();
  });
}

test('hostile embed links: calc= and every key of each calculator in the embed page', async () => {
  const { context, page, problems } = await trappedContext();
  for (const entry of DATA.filter((e) => e.class === 'refused' && e.texts.text.length < 200)) {
    await page.goto(url(`embed.html?calc=${encodeURIComponent(entry.texts.text)}`));
    const seen = await page.evaluate(() => ({
      box: document.querySelector('.rn-error-box')?.textContent || '',
      trapped: window.__trapped,
      injected: document.querySelectorAll('img[src="x"], script:not([src]), [onerror], [onload], svg').length,
    }));
    assert.match(seen.box, /names a calculator railnote does not have/, `calc=${entry.id}`);
    assert.ok(seen.box.includes(entry.texts.text.slice(0, 80).trim()) || entry.texts.text.trim() === '' || /[\u0000\u202e\u200b]/.test(entry.texts.text), `the name is shown as text: ${entry.id}`);
    assert.deepEqual(seen.trapped, []);
    assert.equal(seen.injected, 0, entry.id);
  }
  const entry = DATA.find((e) => e.id === 'img onerror');
  for (const calc of CALCULATORS.filter((c) => c.tag !== 'railnote-tree')) {
    const name = calc.page.replace('.html', '');
    await page.goto(url(`embed.html?calc=${name}`));
    await settled(page, 'ready', calc.tag);
    const keys = await page.evaluate((tag) => customElements.get(tag).fieldDefs.map((d) => [d.key, d.type === 'select' ? 'text' : d.kind]), calc.tag);
    const good = await page.locator(calc.tag).evaluate((el) => ({ texts: el.fields.map((f) => [f.def.key, f.input.value]), result: JSON.stringify(el.result) }));
    const params = new URLSearchParams([['calc', name], ...keys.map(([k, kind]) => [k, entry.texts[kind]])]);
    await page.goto(url(`embed.html?${params}`));
    await settled(page, 'error', calc.tag);
    const r = await page.evaluate(linkCorpusInPage, { tag: calc.tag, corpus: [entry], nouns: NOUN, existing: true, good });
    assert.deepEqual(r.failures, [], `embed ${name}`);
  }
  assert.deepEqual(problems, []);
  await context.close();
});

test('hostile tree documents in #doc=: names shown as text, nothing runs', async () => {
  const { context, page, problems } = await trappedContext();
  await page.goto(url('tree.html'));
  await settled(page, 'ready', 'railnote-tree');
  const payloads = DATA.filter((e) => e.class === 'refused' && e.texts.text.length < 100).map((e) => e.texts.text.replace(/\u0000/g, ''));
  const link = await page.evaluate(async (names) => {
    const doc = await import('./js/tree-doc.js');
    const d = doc.demoDoc();
    d.sources[0].name = names[0];
    d.rails.forEach((r, i) => { r.name = `${names[(i + 1) % names.length]} ${i}`; });
    d.rails[0].parent = d.sources[0].name;
    d.rails[1].parent = d.rails[0].name;
    d.rails[2].parent = d.rails[1].name;
    d.loads[0].rail = d.rails[1].name;
    d.loads[1].rail = d.rails[2].name;
    d.loads.forEach((l, i) => { l.name = names[(i + 5) % names.length]; });
    return { url: await doc.shareUrl(location.href.split('#')[0], d), names: [d.sources[0].name, ...d.rails.map((r) => r.name), ...d.loads.map((l) => l.name)] };
  }, payloads);
  const fresh = await browser.newContext();
  await fresh.addInitScript(() => { window.__trapped = []; window.alert = (m) => window.__trapped.push(String(m)); });
  const p2 = await fresh.newPage();
  await p2.goto(link.url);
  const state = await settled(p2, null, 'railnote-tree');
  const seen = await p2.evaluate(() => ({
    text: document.querySelector('railnote-tree').textContent,
    trapped: window.__trapped,
    injected: document.querySelectorAll('img[src="x"], script:not([src]), [onerror], [onload]').length,
  }));
  assert.equal(state, 'ready', 'a tree with odd names still computes');
  for (const n of link.names.filter((x) => x.trim() && !/[\u202e\u200b]/.test(x))) assert.ok(seen.text.includes(n.trim()), `name shown as text: ${n}`);
  assert.deepEqual(seen.trapped, []);
  assert.equal(seen.injected, 0);
  for (const code of ['<script>alert(1)</script>', '"><img src=x onerror=alert(1)>', 'javascript:alert(1)', '%00%00', 'A'.repeat(20000)]) {
    await p2.goto(url(`tree.html#doc=${encodeURIComponent(code)}`));
    await settled(p2, null, 'railnote-tree');
    const after = await p2.evaluate(() => ({ trapped: window.__trapped, injected: document.querySelectorAll('img[src="x"], script:not([src]), [onerror], [onload]').length }));
    assert.deepEqual(after.trapped, [], code.slice(0, 30));
    assert.equal(after.injected, 0, code.slice(0, 30));
  }
  await fresh.close();
  assert.deepEqual(problems, []);
  await context.close();
});

after(() => {
  // The corpus size of this run (tests left out by a name pattern count nothing).
  console.log(`# hostile corpus: ${CORPUS.length} entries; typed: ${totals.typed} cases over ${totals.fields} fields of ${totals.pages} calculator pages; `
    + `links: ${totals.linkCases} key values over ${totals.linkKeys} link keys of ${totals.linkPages} calculators (every key at once, per entry)`);
});
