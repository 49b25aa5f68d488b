// Keyboard use of every calculator page, with the keyboard only (under the hosted CSP, see
// a11y-kit.mjs):
// - Tab from the top of the page: the first stop is the skip link, shown on screen when focused;
//   Tab then reaches every field and control the widget shows, its fields in document order
//   (the order they are laid out in), and no element uses a positive tabindex;
// - every stop shows a focus indicator: :focus-visible matches and the computed outline (at least
//   2 px, not "none") or box-shadow is there;
// - the skip link moves the next Tab into the widget;
// - selects, buttons (reset, copy link, the error list's "go to field"), sortable headings,
//   folded sections and the tree's row buttons and corner selector work from the keyboard.
import { test, before, after } from 'node:test';
import assert from 'node:assert/strict';
import { launch, open, url, settled, field } from './browser.mjs';
import { withCsp, CALCULATORS } from './a11y-kit.mjs';

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser.close(); });

async function openPage(path) {
  const o = await open(browser);
  await withCsp(o.context);
  await o.page.goto(url(path));
  return o;
}

/** Press Tab until focus returns to the body (or `limit` stops); describe each stop. */
async function tabWalk(page, limit = 400) {
  const stops = [];
  for (let i = 0; i < limit; i++) {
    await page.keyboard.press('Tab');
    const stop = await page.evaluate(() => {
      const e = document.activeElement;
      if (!e || e === document.body) return null;
      if (!e.hasAttribute('data-rn-walk')) e.setAttribute('data-rn-walk', String(document.querySelectorAll('[data-rn-walk]').length));
      const cs = getComputedStyle(e);
      const box = e.getBoundingClientRect();
      return {
        walk: e.getAttribute('data-rn-walk'),
        tag: e.tagName.toLowerCase(), id: e.id, cls: String(e.className),
        text: (e.getAttribute('aria-label') || e.textContent || '').trim().slice(0, 40),
        focusVisible: e.matches(':focus-visible'),
        outline: `${cs.outlineStyle} ${cs.outlineWidth}`, outlineWidth: parseFloat(cs.outlineWidth) || 0,
        outlineStyle: cs.outlineStyle, boxShadow: cs.boxShadow,
        onScreen: box.bottom > 0 && box.top < window.innerHeight && box.right > 0 && box.left < window.innerWidth,
      };
    });
    if (!stop) break;
    stops.push(stop);
  }
  return stops;
}

const describe = (s) => `${s.tag}${s.id ? `#${s.id}` : ''}${s.cls ? `.${s.cls.split(/\s+/).join('.')}` : ''} "${s.text}"`;

for (const calc of CALCULATORS) {
  test(`${calc.page}: Tab reaches the skip link, every field and control in order, each with a visible focus indicator`, async () => {
    const { context, page, problems } = await openPage(calc.page);
    await settled(page, 'ready', calc.tag);
    // Open what is folded by default so its controls are in the walk too.
    await page.evaluate(() => { for (const d of document.querySelectorAll('main details')) d.open = true; });
    // The fields and controls the widget shows, in document order (marked so the walk can match them).
    const expected = await page.locator(calc.tag).evaluate((w) => {
      const all = [...w.querySelectorAll('input, select, textarea, button, a[href], summary')];
      const shown = all.filter((e) => {
        if (e.disabled || e.hidden || e.closest('[hidden]') || e.getAttribute('tabindex') === '-1') return false;
        if (e.type === 'file' || e.type === 'hidden') return false;
        const details = e.closest('details');
        if (details && !details.open && e.tagName !== 'SUMMARY') return false;
        const cs = getComputedStyle(e);
        if (cs.display === 'none' || cs.visibility === 'hidden') return false;
        // A radio group is one Tab stop (arrow keys move within it): only its checked radio.
        if (e.type === 'radio') {
          const group = [...w.querySelectorAll(`input[type="radio"][name="${CSS.escape(e.name)}"]`)];
          const checked = group.find((r) => r.checked) || group[0];
          return e === checked;
        }
        return true;
      });
      shown.forEach((e, i) => e.setAttribute('data-rn-expect', String(i)));
      return shown.map((e) => ({ tag: e.tagName.toLowerCase(), id: e.id, field: Boolean(e.closest('.rn-field')), text: (e.getAttribute('aria-label') || e.textContent).trim().slice(0, 40) }));
    });
    assert.ok(expected.filter((e) => e.field).length >= 8, `the widget shows its fields (${expected.length} controls)`);

    const positive = await page.evaluate(() => [...document.querySelectorAll('[tabindex]')].filter((e) => e.tabIndex > 0).map((e) => e.outerHTML.slice(0, 80)));
    assert.deepEqual(positive, [], 'no positive tabindex (it would break the document order)');

    await page.evaluate(() => { document.activeElement?.blur(); window.scrollTo(0, 0); });
    const stops = await tabWalk(page);
    assert.ok(stops.length > expected.length, `the walk went through the page (${stops.length} stops)`);

    // The first stop is the skip link, and it is on screen while focused.
    assert.match(stops[0].cls, /\brn-skip\b/, `first Tab stop is the skip link, not ${describe(stops[0])}`);
    assert.ok(stops[0].onScreen, 'the focused skip link is shown on screen');

    // Every stop has a visible focus indicator.
    const unmarked = stops.filter((s) => !s.focusVisible
      || !((s.outlineStyle !== 'none' && s.outlineWidth >= 2) || (s.boxShadow && s.boxShadow !== 'none')));
    assert.deepEqual(unmarked.map((s) => `${describe(s)}: ${s.outline} / ${s.boxShadow}`), [], 'stops without a visible focus indicator');

    // Every control the widget shows was reached, and the widget's own stops come in document order.
    const reached = await page.locator(calc.tag).evaluate((w) => [...w.querySelectorAll('[data-rn-expect]')]
      .map((e) => ({ expect: Number(e.getAttribute('data-rn-expect')), walk: e.hasAttribute('data-rn-walk') ? Number(e.getAttribute('data-rn-walk')) : null })));
    const missed = reached.filter((r) => r.walk === null).map((r) => expected[r.expect]);
    assert.deepEqual(missed, [], `controls of ${calc.tag} that Tab never reached`);
    const order = reached.slice().sort((a, b) => a.walk - b.walk).map((r) => r.expect);
    assert.deepEqual(order, order.slice().sort((a, b) => a - b), 'Tab visits the widget\'s controls in document order');
    assert.deepEqual(problems, []);
    await context.close();
  });
}

for (const calc of CALCULATORS) {
  test(`${calc.page}: the skip link moves the next Tab into the widget`, async () => {
    const { context, page } = await openPage(calc.page);
    await settled(page, 'ready', calc.tag);
    await page.keyboard.press('Tab');
    const skip = await page.evaluate(() => ({ cls: document.activeElement.className, href: document.activeElement.getAttribute('href') }));
    assert.match(skip.cls, /rn-skip/);
    await page.keyboard.press('Enter');
    assert.equal(new URL(page.url()).hash, skip.href, 'the skip link was followed');
    await page.keyboard.press('Tab');
    const inside = await page.evaluate((tag) => {
      const e = document.activeElement;
      return { inWidget: Boolean(e.closest(tag)), what: `${e.tagName} ${e.id} ${e.getAttribute('aria-label') || ''}` };
    }, calc.tag);
    assert.ok(inside.inWidget, `after the skip link, Tab lands in ${calc.tag} (got ${inside.what})`);
    await context.close();
  });
}

/** Focus a control (the Tab walk above shows each is reachable) and press a key on it. */
async function press(locator, key) {
  await locator.focus();
  await locator.press(key);
}

test('linear: a select, typing, the error list, reset and copy link, by keyboard', async () => {
  const tag = 'railnote-linear';
  const { context, page } = await openPage('linear.html');
  await settled(page, 'ready', tag);
  const before = await page.locator(tag).evaluate((el) => JSON.stringify(el.result));
  // The select: ArrowDown picks the next model, which changes the result.
  await press(field(page, 'dropout-model'), 'ArrowDown');
  await settled(page, 'ready', tag);
  assert.equal(await page.locator(tag).getAttribute('dropout-model'), 'constant', 'ArrowDown chose the next dropout model');
  const after = await page.locator(tag).evaluate((el) => JSON.stringify(el.result));
  assert.notEqual(after, before, 'the result followed the select');
  // A bad value typed; the error list's button (Enter) takes focus to the field.
  const vin = field(page, 'vin-min');
  await vin.focus();
  await page.keyboard.press('Control+A');
  await page.keyboard.type('four');
  await settled(page, 'error', tag);
  const goTo = page.locator(`${tag} .rn-error-list button`).first();
  await press(goTo, 'Enter');
  assert.equal(await page.evaluate(() => document.activeElement.name), 'vin-min', 'Enter on the error list item focused its field');
  // Reset (Enter) brings the demo back.
  await press(page.locator(`${tag} .rn-reset`), 'Enter');
  await settled(page, 'ready', tag);
  assert.equal(await vin.inputValue(), '4.85 V');
  assert.equal(await field(page, 'dropout-model').inputValue(), 'resistive');
  // Copy link (Space) says what it did.
  await press(page.locator(`${tag} .rn-copy`), 'Space');
  await page.locator(`${tag} .rn-tool-status`).filter({ hasText: /Link copied|selected below/ }).waitFor({ timeout: 5000 });
  await context.close();
});

test('embed linear: a folded section opens and closes with Enter', async () => {
  const tag = 'railnote-linear';
  const { context, page } = await openPage('embed.html?calc=linear');
  await settled(page, 'ready', tag);
  const summary = page.locator(`${tag} details > summary`).first();
  assert.equal(await summary.evaluate((s) => s.parentElement.open), false, 'folded in the embed');
  await press(summary, 'Enter');
  assert.equal(await summary.evaluate((s) => s.parentElement.open), true, 'Enter opened it');
  await page.keyboard.press('Space');
  assert.equal(await summary.evaluate((s) => s.parentElement.open), false, 'Space closed it');
  await context.close();
});

test('thermal: the path select shows the heat-sink fields, by keyboard', async () => {
  const tag = 'railnote-thermal';
  const { context, page } = await openPage('thermal.html');
  await settled(page, 'ready', tag);
  assert.equal(await field(page, 'theta-jc', tag).isVisible(), false, 'θJC hidden on the θJA path');
  await press(field(page, 'path', tag), 'ArrowDown');
  await settled(page, 'ready', tag);
  assert.equal(await field(page, 'path', tag).inputValue(), 'chain');
  assert.equal(await field(page, 'theta-jc', tag).isVisible(), true, 'θJC shown on the heat-sink path');
  await context.close();
});

test('divider: sorting by a heading with Enter and Space', async () => {
  const tag = 'railnote-divider';
  const { context, page } = await openPage('divider.html');
  await settled(page, 'ready', tag);
  const heading = page.locator(`${tag} [data-block="candidates"] th button.rn-sort`).nth(4);
  const th = page.locator(`${tag} [data-block="candidates"] th`).nth(4);
  const first = await th.getAttribute('aria-sort');
  await press(heading, 'Enter');
  const second = await page.locator(`${tag} [data-block="candidates"] th`).nth(4).getAttribute('aria-sort');
  assert.notEqual(second, first, `Enter sorted by the column (${first} → ${second})`);
  await press(page.locator(`${tag} [data-block="candidates"] th button.rn-sort`).nth(4), 'Space');
  const third = await page.locator(`${tag} [data-block="candidates"] th`).nth(4).getAttribute('aria-sort');
  assert.notEqual(third, second, `Space reversed it (${second} → ${third})`);
  await context.close();
});

test('switching and compare: the topology select changes the estimate, by keyboard', async () => {
  for (const [pagePath, tag] of [['switching.html', 'railnote-switching'], ['compare.html', 'railnote-compare']]) {
    const { context, page } = await openPage(pagePath);
    await settled(page, 'ready', tag);
    const before = await page.locator(tag).evaluate((el) => JSON.stringify(el.result));
    await press(field(page, 'topology', tag), 'ArrowDown');
    await page.locator(`${tag}[topology="boost"]`).waitFor({ timeout: 5000 });
    await settled(page, null, tag);
    const after = await page.locator(tag).evaluate((el) => JSON.stringify(el.result));
    assert.notEqual(after, before, `${pagePath}: the select changed what is shown`);
    await context.close();
  }
});

test('tree: add a rail, remove it, and change the corner, by keyboard', async () => {
  const tag = 'railnote-tree';
  const { context, page } = await openPage('tree.html');
  await settled(page, 'ready', tag);
  const rails = () => page.locator(`${tag} [data-table="rails"] tbody tr`).count();
  const n = await rails();
  await press(page.locator(`${tag} .rn-add-rail`), 'Enter');
  assert.equal(await rails(), n + 1, 'Enter on "Add a rail" added a row');
  await press(page.locator(`${tag} .rn-remove`).nth(n), 'Enter');
  assert.equal(await rails(), n, 'Enter on its remove button removed it');
  const corner = page.locator(`${tag} #rn-tree-corner`);
  const was = await corner.inputValue();
  await press(corner, 'ArrowDown');
  assert.notEqual(await corner.inputValue(), was, 'ArrowDown changed the corner');
  await context.close();
});
