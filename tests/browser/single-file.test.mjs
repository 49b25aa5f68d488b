// Browser tests of the single-file build (dist/single/, written by `cargo xtask dist` and by the
// browser-test step of `cargo xtask test`, which passes the folder in RAILNOTE_SINGLE_DIR).
//
// Each file is opened from disk (file://) in a context where every request that is not file://
// is aborted and recorded: a single file must need nothing else. Each calculator gets a value
// typed into one field, and its result must equal, field for field, the result the hosted page
// (served at RAILNOTE_BASE_URL) gives for the same typing; a bad value must get its field's
// message and a good one must compute again. The whole-site file must reach every calculator,
// carry values between them and keep its links inside the one file. The tree's draft
// (localStorage) and its #doc= share link are checked on file://, where Chromium gives the page an
// opaque origin.
import { test, before, after } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { launch, open, url, settled, field, message } from './browser.mjs';

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const SINGLE_DIR = process.env.RAILNOTE_SINGLE_DIR || path.join(ROOT, 'dist/single');
const WHOLE = 'railnote.html';

/** The file:// URL of a single file, with an optional query or fragment. */
function fileUrl(name, rest = '') {
  const file = path.join(SINGLE_DIR, name);
  assert.ok(fs.existsSync(file), `${file} is missing: run \`cargo xtask dist\` (or the browser-test step of \`cargo xtask test\`), which writes the single files`);
  return pathToFileURL(file).href + rest;
}

// One field per calculator: a value that changes the result, and one that must be refused at the
// field (a wrong unit, a word, a value out of range).
const CASES = [
  { page: 'linear', tag: 'railnote-linear', key: 'vout', value: '2.5 V', bad: '2.5 A', says: /voltage|V\b/i },
  { page: 'thermal', tag: 'railnote-thermal', key: 'power', value: '0.7 W', bad: 'warm', says: /./ },
  { page: 'divider', tag: 'railnote-divider', key: 'vout-target', value: '5 V', bad: '5 Ω', says: /./ },
  { page: 'switching', tag: 'railnote-switching', key: 'iout', value: '0.5 A', bad: '1e400 A', says: /./ },
  { page: 'compare', tag: 'railnote-compare', key: 'iout', value: '0.5 A', bad: 'NaN', says: /./ },
  { page: 'tree', tag: 'railnote-tree', cell: 'taMax', value: '50 °C', bad: 'hot', says: /./ },
];

const input = (page, c) => (c.cell
  ? page.locator(`${c.tag} input[data-path="${c.cell}"]`)
  : field(page, c.key, c.tag));
const msg = (page, c) => (c.cell
  ? page.locator(`${c.tag} span.rn-cell[data-path="${c.cell}"] .rn-msg`)
  : message(page, c.key, c.tag));

/** Fill a field and wait for the widget's next render; returns its state. */
async function typeInto(page, c, text) {
  await page.locator(c.tag).evaluate((el) => { el.dataset.state = 'pending'; });
  await input(page, c).fill(text);
  return settled(page, undefined, c.tag);
}

const resultOf = (page, tag) => page.locator(tag).evaluate((el) => el.result);

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser?.close(); });

/**
 * A context for files on disk: every request other than file:// (and the data: URLs a file
 * holds) is aborted and kept in `foreign`; `check()` asserts none happened and nothing failed.
 */
async function openOnDisk() {
  const o = await open(browser);
  const foreign = [];
  await o.context.route('**/*', (route) => {
    const u = route.request().url();
    if (u.startsWith('file:') || u.startsWith('data:')) return route.continue();
    foreign.push(u);
    return route.abort();
  });
  o.check = () => {
    assert.deepEqual(foreign, [], 'a single file asked for something beyond itself');
    assert.deepEqual(o.requests.filter((u) => !u.startsWith('file:') && !u.startsWith('data:')), [], 'only file:// and data: requests');
    assert.deepEqual(o.problems, [], 'no page error and no console error');
  };
  return o;
}

for (const c of CASES) {
  test(`${c.page}.html from disk computes what the hosted page computes, and refuses a bad value at its field`, async () => {
    const disk = await openOnDisk();
    const hosted = await open(browser);
    try {
      await disk.page.goto(fileUrl(`${c.page}.html`));
      await hosted.page.goto(url(`${c.page}.html`));
      assert.equal(await settled(disk.page, 'ready', c.tag), 'ready', 'the demo computes from disk');
      await settled(hosted.page, 'ready', c.tag);
      const demo = await resultOf(disk.page, c.tag);
      assert.deepStrictEqual(demo, await resultOf(hosted.page, c.tag), 'the demo result equals the hosted one');

      assert.equal(await typeInto(disk.page, c, c.value), 'ready');
      assert.equal(await typeInto(hosted.page, c, c.value), 'ready');
      const fromDisk = await resultOf(disk.page, c.tag);
      assert.notDeepStrictEqual(fromDisk, demo, `typing ${c.value} changed the result`);
      assert.deepStrictEqual(fromDisk, await resultOf(hosted.page, c.tag), `with ${c.value}, the file's result equals the hosted page's`);

      assert.equal(await typeInto(disk.page, c, c.bad), 'error', `${c.bad} is refused`);
      const said = (await msg(disk.page, c).textContent()).trim();
      assert.ok(said.length > 0, `the field says why ${c.bad} is refused`);
      assert.match(said, c.says);
      assert.equal(await input(disk.page, c).getAttribute('aria-invalid'), 'true');
      assert.equal(await typeInto(disk.page, c, c.value), 'ready', 'the widget computes again once fixed');
      assert.deepStrictEqual(await resultOf(disk.page, c.tag), fromDisk);
      disk.check();
    } finally {
      await disk.context.close();
      await hosted.context.close();
    }
  });
}

test('from disk the link state works: the address keeps the typed keys and the permalink opens the same check', async () => {
  const disk = await openOnDisk();
  try {
    const c = CASES[0];
    await disk.page.goto(fileUrl('linear.html'));
    await settled(disk.page, 'ready', c.tag);
    await typeInto(disk.page, c, c.value);
    // replaceState on a file:// page (same file, new query) is allowed by Chromium.
    await disk.page.waitForFunction(() => new URLSearchParams(window.location.search).get('vout') === '2.5 V');
    const link = await disk.page.locator(`${c.tag} .rn-permalink`).getAttribute('href');
    assert.ok(link.startsWith(fileUrl('linear.html', '?')), `the permalink points to this file: ${link}`);
    const r = await resultOf(disk.page, c.tag);
    await disk.page.goto(link);
    await settled(disk.page, 'ready', c.tag);
    assert.equal(await field(disk.page, 'vout', c.tag).inputValue(), '2.5 V');
    assert.deepStrictEqual(await resultOf(disk.page, c.tag), r, 'the link reproduces the check');
    // The link to the thermal page is the sibling single file.
    const thermal = await disk.page.locator(`${c.tag} a.rn-thermal-link`).getAttribute('href');
    assert.ok(thermal.startsWith(fileUrl('thermal.html', '?')), thermal);
    await disk.page.locator(`${c.tag} a.rn-thermal-link`).click();
    await settled(disk.page, 'ready', 'railnote-thermal');
    assert.equal(await field(disk.page, 'power', 'railnote-thermal').inputValue(), new URL(thermal).searchParams.get('power'));
    disk.check();
  } finally {
    await disk.context.close();
  }
});

test('tree.html from disk: the draft survives a reload (localStorage works on file://) and the #doc= link opens the tree elsewhere', async () => {
  const c = CASES.find((x) => x.page === 'tree');
  const disk = await openOnDisk();
  try {
    await disk.page.goto(fileUrl('tree.html'));
    await settled(disk.page, 'ready', c.tag);
    await typeInto(disk.page, c, c.value);
    await disk.page.reload();
    await settled(disk.page, 'ready', c.tag);
    assert.equal(await input(disk.page, c).inputValue(), c.value, 'the draft came back after a reload');
    const doc = await disk.page.locator(c.tag).evaluate((el) => el.doc);
    assert.equal(doc.taMax, 50);
    // The share link (CompressionStream, deflate-raw) of this file.
    const link = await disk.page.locator(`${c.tag} .rn-permalink`).getAttribute('href');
    assert.match(link, /#doc=[A-Za-z0-9_-]+$/);
    assert.ok(link.startsWith(fileUrl('tree.html', '#doc=')), link);
    disk.check();
  } finally {
    await disk.context.close();
  }
  // A fresh context has no draft: the tree comes from the link alone.
  const fresh = await openOnDisk();
  try {
    const link = await (async () => {
      await fresh.page.goto(fileUrl('tree.html'));
      await settled(fresh.page, 'ready', c.tag);
      assert.notEqual(await input(fresh.page, c).inputValue(), c.value, 'a fresh browser has no draft');
      await typeInto(fresh.page, c, c.value);
      const l = await fresh.page.locator(`${c.tag} .rn-permalink`).getAttribute('href');
      await fresh.page.evaluate(() => window.localStorage.clear());
      return l;
    })();
    await fresh.page.goto('about:blank');
    await fresh.page.goto(link);
    await settled(fresh.page, 'ready', c.tag);
    assert.equal((await fresh.page.locator(c.tag).evaluate((el) => el.doc)).taMax, 50, 'the link carried the tree');
    fresh.check();
  } finally {
    await fresh.context.close();
  }
});

test('the whole-site file reaches every calculator from its index and keeps every link inside itself', async () => {
  const disk = await openOnDisk();
  const { page } = disk;
  const here = fileUrl(WHOLE);
  try {
    await page.goto(here);
    assert.match(await page.title(), /railnote/);
    assert.ok(await page.locator('main').count() > 0, 'the index page is shown');
    for (const c of CASES) {
      await page.goto(here);
      const link = page.locator(`main a[href="${WHOLE}?page=${c.page}"]`).first();
      assert.equal(await link.count(), 1, `the index links ${c.page} inside the file`);
      await link.click();
      await page.waitForURL(`${here}?page=${c.page}`);
      assert.equal(await settled(page, 'ready', c.tag), 'ready', `${c.page} computes inside the whole-site file`);
      assert.equal(await typeInto(page, c, c.value), 'ready');
      // Every link on the page to a page of the site now points into this file.
      const hrefs = await page.locator('a[href]').evaluateAll((as) => as.map((a) => a.getAttribute('href')));
      const outside = hrefs.filter((h) => /^[a-z-]+\.html(\?|#|$)/.test(h) && !h.startsWith(`${WHOLE}?`));
      assert.deepEqual(outside, [], `links on ${c.page} that leave the file`);
      assert.ok(hrefs.some((h) => h === `${WHOLE}?page=index`), 'the nav leads back to the index');
    }

    // Values carried from one calculator to another, and the permalink, stay in the file.
    await page.goto(`${here}?page=linear`);
    await settled(page, 'ready', 'railnote-linear');
    await typeInto(page, CASES[0], '2.5 V');
    const permalink = await page.locator('railnote-linear .rn-permalink').getAttribute('href');
    assert.ok(permalink.startsWith(`${here}?page=linear&`), `the permalink reopens this file at the linear check: ${permalink}`);
    const toThermal = page.locator('railnote-linear a.rn-thermal-link');
    const power = new URL(await toThermal.getAttribute('href'), here).searchParams.get('power');
    assert.ok(power, 'the thermal link carries the worst-case power');
    await toThermal.click();
    await settled(page, 'ready', 'railnote-thermal');
    assert.equal(new URL(page.url()).searchParams.get('page'), 'thermal');
    assert.equal(await field(page, 'power', 'railnote-thermal').inputValue(), power);

    // The tree's rail links (made by the widget as linear.html?…) are turned into this file's.
    await page.goto(`${here}?page=tree`);
    await settled(page, 'ready', 'railnote-tree');
    const railLink = page.locator('railnote-tree a.rn-rail-link').first();
    assert.match(await railLink.getAttribute('href'), new RegExp(`^${WHOLE.replace('.', '\\.')}\\?page=(linear|switching)&`));
    const share = await page.locator('railnote-tree .rn-permalink').getAttribute('href');
    assert.ok(share.startsWith(`${here}?page=tree#doc=`), `the tree's share link opens this file: ${share}`);
    await railLink.click();
    await page.waitForURL(/page=(linear|switching)/);
    const tag = page.url().includes('page=linear') ? 'railnote-linear' : 'railnote-switching';
    assert.equal(await settled(page, 'ready', tag), 'ready', 'the rail opens in its calculator inside the file');

    // A page the file does not hold: the index, with a sentence.
    await page.goto(`${here}?page=nope`);
    assert.match(await page.locator('.rn-error-box').first().textContent(), /holds no page “nope”/);
    disk.check();
  } finally {
    await disk.context.close();
  }
});

test('each single file carries its own CSP: hashes in place of self, wasm-unsafe-eval, no unsafe-inline, Trusted Types', async () => {
  const names = fs.readdirSync(SINGLE_DIR).filter((n) => n.endsWith('.html')).sort();
  assert.ok(names.includes(WHOLE) && names.includes('linear.html') && names.length >= 8, names.join(' '));
  const disk = await openOnDisk();
  try {
    for (const name of names) {
      const html = fs.readFileSync(path.join(SINGLE_DIR, name), 'utf8');
      const metas = html.match(/<meta http-equiv="Content-Security-Policy" content="[^"]*">/g) || [];
      assert.equal(metas.length, 1, `${name}: one CSP meta`);
      const policy = metas[0];
      assert.ok(!policy.includes("'self'") && !policy.includes('unsafe-inline'), `${name}: ${policy}`);
      assert.match(policy, /require-trusted-types-for 'script'; trusted-types railnote-sw/);
      assert.match(policy, /style-src 'sha256-[A-Za-z0-9+/]+=*';/);
      if (html.includes('<script')) assert.match(policy, /script-src 'sha256-[A-Za-z0-9+/]+=*' 'wasm-unsafe-eval';/);
      assert.ok(!/<script[^>]* src=|<link rel="stylesheet"/.test(html), `${name}: nothing loaded from beside it`);
      // The browser agrees: a violation would be a console error, which disk.check() fails on.
      await disk.page.goto(fileUrl(name));
      await disk.page.waitForLoadState('load');
      await disk.page.waitForTimeout(200);
    }
    disk.check();
    // And the policy is in force: a style the file does not carry is refused.
    await disk.page.goto(fileUrl('linear.html'));
    const applied = await disk.page.evaluate(() => {
      const s = document.createElement('style');
      s.textContent = 'body { outline: 7px solid rgb(1, 2, 3); }';
      document.head.append(s);
      return getComputedStyle(document.body).outlineWidth;
    });
    assert.notEqual(applied, '7px', 'an inline style without its hash is not applied');
    assert.ok(disk.problems.some((p) => /Content Security Policy/.test(p)), 'the browser reported the refused style');
  } finally {
    await disk.context.close();
  }
});
