// Accessibility of every page, in real Chromium under the hosted pages' CSP (see a11y-kit.mjs):
// - axe-core (npm, pinned in package.json) on every page — index, the six calculators, reference
//   and the embed of each calculator — in the demo state, with a bad value in a field, and with
//   results shown again after the field is fixed (every folded section opened): any violation of
//   impact "serious" or "critical" fails the test and is printed; lesser ones are printed as
//   diagnostics. The rule set is axe's own (WCAG 2.x A/AA and its best practices).
// - every number field's accessible name or description, as Chromium computes it (DevTools
//   accessibility tree), names its unit; the unit expected comes from the field's quantity kind
//   (or, on the tree page, from the document key), not from the unit text the widget shows;
// - each widget has one polite live region that says the verdict in a short sentence when the
//   result changes, and says it once after a burst of typing, not per keystroke.
import { test, before, after } from 'node:test';
import assert from 'node:assert/strict';
import { launch, open, url, settled, field } from './browser.mjs';
import {
  withCsp, cspIsActive, runAxe, describeViolations, injectAxe, CALCULATORS, PLAIN_PAGES, AXE_VERSION,
} from './a11y-kit.mjs';

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser.close(); });

const FAILING = new Set(['serious', 'critical']);

/** Open a page under the CSP; returns { context, page, problems }. */
async function openPage(path) {
  const o = await open(browser);
  await withCsp(o.context);
  await o.page.goto(url(path));
  return o;
}

/** The text input a test breaks and fixes: a calculator's field by key; on the tree a rail's output. */
function target(page, calc) {
  if (calc.name === 'tree') return page.locator('railnote-tree input[data-path="rails[0].vout"]');
  return field(page, calc.key, calc.tag);
}

async function axeCheck(t, page, where) {
  const violations = await runAxe(page);
  const bad = violations.filter((v) => FAILING.has(v.impact));
  const minor = violations.filter((v) => !FAILING.has(v.impact));
  if (minor.length) t.diagnostic(`axe, below serious, on ${where}:\n${describeViolations(minor)}`);
  assert.equal(bad.length, 0, `axe ${AXE_VERSION}: serious or critical violations on ${where}:\n${describeViolations(bad)}`);
}

test('the pages run under the hosted CSP here, and axe-core loads under it', async () => {
  const { context, page } = await openPage('linear.html');
  await settled(page, 'ready');
  const meta = await page.locator('meta[http-equiv="Content-Security-Policy"]').getAttribute('content');
  assert.match(meta, /script-src 'self' 'wasm-unsafe-eval'/);
  assert.equal(await cspIsActive(page), true, 'an injected inline <script> (addScriptTag) is refused by the policy');
  await injectAxe(page);
  assert.equal(await page.evaluate(() => window.axe.version), AXE_VERSION);
  await context.close();
});

for (const path of PLAIN_PAGES) {
  test(`axe: ${path}`, async (t) => {
    const { context, page, problems } = await openPage(path);
    await page.waitForLoadState('load');
    await axeCheck(t, page, path);
    assert.deepEqual(problems, [], 'no page errors');
    await context.close();
  });
}

for (const calc of CALCULATORS) {
  for (const path of [calc.page, `embed.html?calc=${calc.name}`]) {
    test(`axe: ${path} — demo, bad value, results again`, async (t) => {
      const { context, page, problems } = await openPage(path);
      await settled(page, 'ready', calc.tag);
      await axeCheck(t, page, `${path} (demo)`);

      const input = target(page, calc);
      const original = await input.inputValue();
      await input.fill(calc.bad);
      await settled(page, 'error', calc.tag);
      await axeCheck(t, page, `${path} (error: "${calc.bad}" typed)`);

      await input.fill(calc.good || original);
      await settled(page, 'ready', calc.tag);
      await page.evaluate(() => { for (const d of document.querySelectorAll('details')) d.open = true; });
      await axeCheck(t, page, `${path} (results again, every folded section open)`);
      assert.deepEqual(problems, [], 'no page errors or console errors');
      await context.close();
    });
  }
}

/** The unit each quantity kind is stated in (core/src/units.rs kinds; SI and common practice). */
const KIND_UNIT = {
  voltage: /\bV\b/, current: /\bA\b/, power: /\bW\b/, percent: /%/, temperature: /°C/,
  temperatureDifference: /\bK\b/, thermalResistance: /K\/W/, resistance: /Ω/, frequency: /Hz/,
  inductance: /\bH\b/, capacitance: /\bF\b/, time: /\bs\b/, energy: /\bJ\b/, charge: /\bC\b|Ah/,
  thermalCapacitance: /J\/K/, tempco: /ppm\/K/, count: null,
};

/** The tree document's units by key (tree-doc.js schema v1: names say the unit). */
const TREE_UNIT = [
  [/^(vMin|vNom|vMax|vout|dropoutV)$/, /\bV\b/], [/^capacityMah$/, /mAh/], [/^capacityWh$/, /Wh/],
  [/^(currentLimitA|iq|ratedA|typA|peakA|sleepA)$/, /\bA\b/], [/^(typW|peakW)$/, /\bW\b/],
  [/^(efficiencyPct|activityPct)$/, /%/], [/^rOn$/, /Ω/], [/^thetaJa$/, /K\/W/], [/^(tjMax|taMax)$/, /°C/],
];

/** Chromium's computed name and description of every input/select under `selector`. */
async function axNames(context, page, selector) {
  const cdp = await context.newCDPSession(page);
  await cdp.send('DOM.enable');
  await cdp.send('Accessibility.enable');
  const { root } = await cdp.send('DOM.getDocument', { depth: 0 });
  const { nodeIds } = await cdp.send('DOM.querySelectorAll', { nodeId: root.nodeId, selector });
  const out = [];
  for (const nodeId of nodeIds) {
    const { nodes } = await cdp.send('Accessibility.getPartialAXTree', { nodeId, fetchRelatives: false });
    const { node } = await cdp.send('DOM.describeNode', { nodeId });
    const attrs = {};
    for (let i = 0; i < (node.attributes || []).length; i += 2) attrs[node.attributes[i]] = node.attributes[i + 1];
    const ax = nodes[0] || {};
    out.push({
      id: attrs.id, path: attrs['data-path'], tag: node.nodeName.toLowerCase(),
      name: ax.name ? ax.name.value : '', description: ax.description ? ax.description.value : '',
      rendered: !ax.ignored,
    });
  }
  await cdp.detach();
  return out;
}

for (const calc of CALCULATORS) {
  test(`every field of ${calc.page} has a name, and a number field names its unit`, async () => {
    const { context, page } = await openPage(calc.page);
    await settled(page, 'ready', calc.tag);
    await page.evaluate(() => { for (const d of document.querySelectorAll('details')) d.open = true; });
    // Fields of a choice not taken (another mode, path or topology) are not rendered: not in the
    // accessibility tree, so not read here.
    const seen = (await axNames(context, page, `${calc.tag} input:not([type="file"]):not([hidden]), ${calc.tag} select`))
      .filter((s) => s.rendered);
    assert.ok(seen.length >= 8, `found the fields (${seen.length})`);
    let kinds = new Map();
    if (calc.name !== 'tree') {
      kinds = new Map(await page.locator(calc.tag).evaluate((el) => el.fields.map((f) => [f.input.id, f.def.kind || null])));
    }
    const missing = [];
    for (const s of seen) {
      const said = `${s.name} ${s.description}`;
      if (!s.name.trim()) { missing.push(`${s.id || s.path}: no accessible name`); continue; }
      let unit = null;
      if (calc.name === 'tree') {
        const key = (s.path || '').split('.').pop();
        const row = TREE_UNIT.find(([k]) => k.test(key));
        unit = row ? row[1] : null;
      } else if (kinds.get(s.id)) {
        const kind = kinds.get(s.id);
        assert.ok(kind in KIND_UNIT, `the test knows the unit of kind ${kind}`);
        unit = KIND_UNIT[kind];
      }
      if (unit && !unit.test(said)) missing.push(`${s.id || s.path}: "${said.trim()}" does not name ${unit}`);
    }
    assert.deepEqual(missing, [], `fields on ${calc.page} whose name/description lack the unit`);
    await context.close();
  });
}

const LIVE = '[aria-live], [role="status"], [role="alert"], [role="log"]';

for (const calc of CALCULATORS) {
  test(`${calc.page}: one polite live region says the verdict once per change, not per keystroke`, async () => {
    const { context, page } = await openPage(calc.page);
    await settled(page, 'ready', calc.tag);
    const regions = await page.locator(`${calc.tag} :is(${LIVE})`).evaluateAll((els) => els.map((e) => ({
      live: e.getAttribute('aria-live'), role: e.getAttribute('role'), cls: e.className, id: e.id,
    })));
    const announcers = regions.filter((r) => r.live === 'polite');
    assert.equal(announcers.length, 1, `one aria-live="polite" region in ${calc.tag}: ${JSON.stringify(regions)}`);
    const region = page.locator(`${calc.tag} [aria-live="polite"]`);
    // The demo result is announced (after its short settling delay).
    await assert.doesNotReject(region.evaluate((r) => new Promise((ok, no) => {
      const t0 = Date.now();
      const tick = () => (/^(Pass|Marginal|Fail|Linear|No linear)\b/.test(r.textContent) ? ok() : Date.now() - t0 > 3000 ? no(new Error(r.textContent)) : setTimeout(tick, 50));
      tick();
    })), 'the demo verdict is announced');
    // Record every change of every live region while a value is typed key by key.
    await page.locator(calc.tag).evaluate((w, sel) => {
      window.__rnChanges = [];
      for (const r of w.querySelectorAll(sel)) {
        new MutationObserver(() => window.__rnChanges.push(`${r.getAttribute('aria-live') === 'polite' ? 'announcer' : r.className}: ${r.textContent}`))
          .observe(r, { childList: true, characterData: true, subtree: true });
      }
    }, LIVE);
    const input = target(page, calc);
    const original = await input.inputValue();
    await input.focus();
    await input.press('Control+A');
    await page.keyboard.type(calc.bad, { delay: 40 });
    await settled(page, 'error', calc.tag);
    await page.waitForTimeout(900);
    let changes = await page.evaluate(() => window.__rnChanges.splice(0));
    assert.equal(changes.length, 1, `one announcement for "${calc.bad}" typed key by key: ${JSON.stringify(changes)}`);
    assert.match(changes[0], /^announcer: input problem/i);
    await input.press('Control+A');
    await page.keyboard.type(calc.good || original, { delay: 40 });
    await settled(page, 'ready', calc.tag);
    await page.waitForTimeout(900);
    changes = await page.evaluate(() => window.__rnChanges.splice(0));
    assert.equal(changes.length, 1, `one announcement after the fix was typed: ${JSON.stringify(changes)}`);
    const said = changes[0].replace(/^announcer: /, '');
    // The comparison has two verdicts: "Linear: Pass. Switching: Pass." (or no linear regulator).
    assert.match(said, /^(Pass|Marginal|Fail|Linear: (Pass|Marginal|Fail)|No linear)\b/, `it starts with the verdict: ${said}`);
    assert.ok(said.length <= 400, `short (${said.length} characters): ${said}`);
    const verdict = await page.locator(`${calc.tag} .rn-verdict-word`).first().textContent();
    assert.ok(said.includes(verdict.replace(/[✓!✗]/g, '').trim().split(/\s+/)[0]), `it says the verdict shown (${verdict})`);
    // Besides it, only lines that answer a button may be live: the tools' status (what Copy link
    // or Reset did) and the tree's paste box result (its "Open the pasted document" button).
    const others = regions.filter((r) => r.live !== 'polite' && !/\brn-tool-status\b/.test(r.cls) && r.id !== 'rn-tree-paste-msg');
    assert.deepEqual(others, [], `no other live regions (each would speak on its own): ${others.length} more`);
    await context.close();
  });
}

// Dark scheme (the stylesheet's prefers-color-scheme: dark colours): axe again, colour contrast
// included, on the index and each calculator's demo. Forced colours (Windows high contrast):
// the focus indicator is an outline, which forced colours keep (a box-shadow they drop).
for (const path of ['index.html', ...CALCULATORS.map((c) => c.page)]) {
  test(`axe in the dark scheme: ${path}`, async (t) => {
    const o = await open(browser, { colorScheme: 'dark' });
    await withCsp(o.context);
    await o.page.goto(url(path));
    const calc = CALCULATORS.find((c) => c.page === path);
    if (calc) await settled(o.page, 'ready', calc.tag);
    assert.equal(await o.page.evaluate(() => matchMedia('(prefers-color-scheme: dark)').matches), true);
    await axeCheck(t, o.page, `${path} (dark)`);
    await o.context.close();
  });
}

test('forced colours: a focused field still shows its focus outline', async () => {
  const o = await open(browser, { forcedColors: 'active' });
  await withCsp(o.context);
  await o.page.goto(url('linear.html'));
  await settled(o.page, 'ready');
  assert.equal(await o.page.evaluate(() => matchMedia('(forced-colors: active)').matches), true);
  await field(o.page, 'vin-min').focus();
  await o.page.keyboard.press('Shift+Tab');
  await o.page.keyboard.press('Tab');
  const ring = await o.page.evaluate(() => {
    const cs = getComputedStyle(document.activeElement);
    return { name: document.activeElement.name, style: cs.outlineStyle, width: parseFloat(cs.outlineWidth), visible: document.activeElement.matches(':focus-visible') };
  });
  assert.equal(ring.name, 'vin-min');
  assert.ok(ring.visible && ring.style !== 'none' && ring.width >= 2, JSON.stringify(ring));
  await o.context.close();
});
