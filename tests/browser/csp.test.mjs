// The Content-Security-Policy every page carries in a <meta> right after <meta charset>: the site's
// own files only, WebAssembly compiled with 'wasm-unsafe-eval', Trusted Types required for every
// script sink, with one policy name (railnote-sw, the service worker's script URL).
//
// Every page (and the embed page with each calc) is opened with a listener for
// `securitypolicyviolation` registered before any page script runs; each widget is used (a value
// typed, a result seen, a bad value refused, the first value back); no violation and no console
// error may appear. Then the policy is shown to bite: Trusted Types refuses a string in innerHTML,
// other policy names, eval and inline style, and the listener sees those; and without
// 'wasm-unsafe-eval' the engine does not instantiate (so that source is needed, not decoration).
import { test, before, after } from 'node:test';
import assert from 'node:assert/strict';
import { launch, open, url, settled, field, assertSameOrigin } from './browser.mjs';

/** The policy, exactly as the pages carry it. */
export const POLICY = "default-src 'self'; script-src 'self' 'wasm-unsafe-eval'; style-src 'self'; img-src 'self' data:; "
  + "connect-src 'self'; worker-src 'self'; manifest-src 'self'; object-src 'none'; base-uri 'none'; form-action 'self'; "
  + "require-trusted-types-for 'script'; trusted-types railnote-sw";

const HTML_FILES = ['index.html', 'linear.html', 'thermal.html', 'divider.html', 'switching.html', 'compare.html',
  'tree.html', 'embed.html', 'reference.html'];

/** Each page, the calculator element it shows and a probe: field key, another good value. */
const PROBES = {
  'railnote-linear': ['vout', '2.5 V'],
  'railnote-thermal': ['power', '0.3 W'],
  'railnote-divider': ['vout-target', '2.5 V'],
  'railnote-switching': ['fsw', '1 MHz'],
  'railnote-compare': ['iout', '0.2 A'],
  'railnote-tree': ['loads[0].peakA', '200 mA'],
};
const PAGES = [
  ['index.html', null], ['linear.html', 'railnote-linear'], ['thermal.html', 'railnote-thermal'],
  ['divider.html', 'railnote-divider'], ['switching.html', 'railnote-switching'], ['compare.html', 'railnote-compare'],
  ['tree.html', 'railnote-tree'],
  ['embed.html?calc=linear', 'railnote-linear'], ['embed.html?calc=thermal', 'railnote-thermal'],
  ['embed.html?calc=divider', 'railnote-divider'], ['embed.html?calc=switching', 'railnote-switching'],
  ['embed.html?calc=compare', 'railnote-compare'], ['embed.html?calc=tree', 'railnote-tree'],
  ['reference.html', null],
];

/** What the enforcement test runs inside the page, as page code. */
const PROBE_MODULE = `
export const out = {};
const attempt = (name, fn) => {
  try { fn(); out[name] = 'allowed'; } catch (e) { out[name] = e.constructor.name + ': ' + e.message; }
};
attempt('innerHTML', () => { document.querySelector('.rn-summary').innerHTML = '<b id="tt-probe">x</b>'; });
attempt('insertAdjacentHTML', () => { document.body.insertAdjacentHTML('beforeend', '<i id="tt-probe2">x</i>'); });
attempt('otherPolicy', () => trustedTypes.createPolicy('not-railnote', { createHTML: (s) => s }));
attempt('eval', () => eval('1 + 1'));
attempt('newFunction', () => new Function('return 1'));
attempt('scriptText', () => { const s = document.createElement('script'); s.textContent = 'window.__ran = true'; document.head.append(s); });
// The one allowed name: creatable unless the page made it already (it may not be made twice).
attempt('railnoteSw', () => trustedTypes.createPolicy('railnote-sw', { createScriptURL: (s) => s }));
const div = document.createElement('div');
div.setAttribute('style', 'color: rgb(255, 0, 0)');
document.body.append(div);
out.styleApplied = getComputedStyle(div).color === 'rgb(255, 0, 0)';
out.probes = document.querySelectorAll('#tt-probe, #tt-probe2').length;
out.ran = Boolean(window.__ran);
`;

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser?.close(); });

/** A context whose pages record every policy violation in window.__violations, from the start. */
async function watchedContext() {
  const opened = await open(browser);
  await opened.context.addInitScript(() => {
    window.__violations = [];
    document.addEventListener('securitypolicyviolation', (e) => {
      window.__violations.push({ directive: e.effectiveDirective, blocked: e.blockedURI, sample: e.sample, at: `${e.sourceFile}:${e.lineNumber}` });
    }, true);
  });
  return opened;
}

test('every page carries exactly the policy, as the first element after <meta charset>', async () => {
  const { context, page } = await open(browser);
  for (const file of HTML_FILES) {
    const res = await page.request.get(url(file));
    const text = await res.text();
    const m = /<head>\s*<meta charset="utf-8">\s*<meta http-equiv="Content-Security-Policy" content="([^"]*)">/.exec(text);
    assert.ok(m, `${file}: the policy meta follows <meta charset> directly`);
    assert.equal(m[1], POLICY, `${file}: the policy text`);
    assert.equal((text.match(/Content-Security-Policy/g) || []).length, 1, `${file}: one policy`);
    await page.goto(url(file));
    const head = await page.evaluate(() => [...document.head.children].slice(0, 2).map((el) => el.outerHTML));
    assert.match(head[0], /^<meta charset="utf-8">$/, file);
    assert.match(head[1], /^<meta http-equiv="Content-Security-Policy"/, file);
  }
  await context.close();
});

test('every page works under the policy: no violation, no console error, each widget computes', async (t) => {
  const { context, page, requests, problems } = await watchedContext();
  for (const [p, tag] of PAGES) {
    await page.goto(url(p));
    // The engine instantiates on every page, with or without a calculator on it.
    const version = await page.evaluate(async () => (await (await import('./js/engine.js')).ready).version());
    assert.match(version, /^\d+\.\d+\.\d+/, `${p}: the wasm instantiated`);
    if (tag) {
      assert.equal(await settled(page, 'ready', tag), 'ready', `${p} computes under the policy`);
      const [key, other] = PROBES[tag];
      const input = field(page, key, tag);
      const first = await page.locator(tag).evaluate((el) => JSON.stringify(el.result));
      const good = await input.inputValue();
      await input.fill(other);
      assert.equal(await settled(page, 'ready', tag), 'ready', `${p}: ${key} = ${other} computes`);
      const changed = await page.locator(tag).evaluate((el) => JSON.stringify(el.result));
      assert.notEqual(changed, first, `${p}: typing ${other} into ${key} changes the result`);
      await input.fill('abc');
      assert.equal(await settled(page, 'error', tag), 'error', `${p}: a bad value is refused`);
      await input.fill(good);
      assert.equal(await settled(page, 'ready', tag), 'ready');
      assert.equal(await page.locator(tag).evaluate((el) => JSON.stringify(el.result)), first, `${p}: the first value gives the first result`);
    }
    const seen = await page.evaluate(() => ({ violations: window.__violations, styled: document.querySelectorAll('[style]').length }));
    assert.deepEqual(seen.violations, [], `${p}: no policy violations`);
    assert.equal(seen.styled, 0, `${p}: no style attributes (style-src 'self' would refuse them)`);
    t.diagnostic(`${p}: no violation${tag ? `, ${tag} computed, changed, refused and recovered` : ''}; engine ${version}`);
  }
  assert.deepEqual(problems, [], 'no page errors or console errors');
  assertSameOrigin(requests);
  await context.close();
});

test('Trusted Types and the policy are enforced: the listener sees each refusal', async () => {
  const { context, page, problems } = await watchedContext();
  await page.goto(url('linear.html'));
  await settled(page, 'ready');
  // The probes run as a module of the page (served at a made-up path of the site's origin, so
  // script-src 'self' lets it load), not as DevTools code, which the policy does not cover.
  await context.route(url('csp-probe.js'), (route) => route.fulfill({ status: 200, contentType: 'text/javascript', body: PROBE_MODULE }));
  const seen = await page.evaluate(async () => (await import('./csp-probe.js')).out);
  // The violation events are queued tasks: give them a moment.
  await page.waitForTimeout(200);
  const directives = await page.evaluate(() => window.__violations.map((v) => v.directive));
  assert.match(seen.innerHTML, /^TypeError: .*TrustedHTML/, 'a string into innerHTML throws');
  assert.match(seen.insertAdjacentHTML, /^TypeError: .*TrustedHTML/);
  assert.match(seen.otherPolicy, /^TypeError: .*disallowed/, 'no other policy name may be created');
  assert.match(seen.eval, /^EvalError/, 'no eval');
  assert.match(seen.newFunction, /^EvalError/, 'no new Function');
  assert.match(seen.scriptText, /^TypeError: .*TrustedScript/, 'no inline script text');
  assert.ok(seen.railnoteSw === 'allowed' || /already exists/.test(seen.railnoteSw), `railnote-sw is the allowed name: ${seen.railnoteSw}`);
  assert.equal(seen.styleApplied, false, 'an inline style attribute is not applied');
  assert.equal(seen.probes, 0);
  assert.equal(seen.ran, false);
  // (eval and new Function are refused by Trusted Types before script-src is asked; the
  // script-src refusal of WebAssembly without 'wasm-unsafe-eval' is the next test's.)
  for (const d of ['require-trusted-types-for', 'trusted-types', 'style-src-attr']) {
    assert.ok(directives.includes(d), `the listener saw a ${d} violation (saw ${directives.join(', ')})`);
  }
  // Chromium reports each refusal on the console too: those are these probes' own.
  assert.ok(problems.every((m) => /Trusted|TrustedHTML|TrustedScript|Content Security Policy|unsafe-eval|Refused/i.test(m)), problems.join('\n'));
  await context.close();
});

test("the engine needs 'wasm-unsafe-eval': without it the wasm does not instantiate", async () => {
  const { context, page } = await watchedContext();
  await context.route((u) => u.pathname.endsWith('/linear.html'), async (route) => {
    const response = await route.fetch();
    const body = (await response.text()).replace(" 'wasm-unsafe-eval'", '');
    assert.ok(!body.includes('wasm-unsafe-eval'));
    await route.fulfill({ response, body });
  });
  await page.goto(url('linear.html'));
  assert.equal(await settled(page, 'failed'), 'failed', 'the widget says the engine could not load');
  assert.match(await page.locator('railnote-linear .rn-status').textContent(), /calculation engine could not load/);
  await page.waitForTimeout(200);
  const violations = await page.evaluate(() => window.__violations);
  assert.ok(violations.some((v) => v.directive === 'script-src' && v.blocked === 'wasm-eval'), JSON.stringify(violations));
  await context.close();
});
