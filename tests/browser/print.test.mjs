// Printing each calculator page makes a review record: headless Chromium prints it to PDF
// (page.pdf, which fires the page's beforeprint as a real print does) and the PDF's text is read
// back with pdftotext from Debian's poppler-utils (`cargo xtask test` installs it; chosen over
// npm's pdfjs-dist because it is one small system tool beside chromium and ngspice, adds nothing
// to node_modules and gives the text in reading order with -raw).
//
// The record must hold: the page title; each value the test typed, as typed; the key figures
// as the screen shows them (verdict words, the summary, the first check's sentence or the main
// figures); the link that reproduces the check, in full (it may wrap: compared with whitespace
// removed); the date and time of the print (filled at print time: empty before); and a caution
// sentence of the page. It must not hold the navigation, the skip link or the buttons.
// The pages are served with the hosted CSP (a11y-kit.mjs), so the print-time stamp is shown to
// work under it.
import { test, before, after } from 'node:test';
import assert from 'node:assert/strict';
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { launch, open, url, settled, field, OUT_DIR } from './browser.mjs';
import { withCsp } from './a11y-kit.mjs';

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser.close(); });

function pdfText(file) {
  try {
    return execFileSync('pdftotext', ['-raw', '-enc', 'UTF-8', file, '-'], { encoding: 'utf8' });
  } catch (err) {
    if (err.code === 'ENOENT') throw new Error('pdftotext is missing: `apt-get install poppler-utils` (cargo xtask test installs it)');
    throw err;
  }
}

/** Whitespace folded to one space, compatibility forms folded (ligatures). */
const words = (s) => s.normalize('NFKC').replace(/\s+/g, ' ').trim();
const squeezed = (s) => s.normalize('NFKC').replace(/\s+/g, '');

/**
 * Per page: the values typed (key → text; on the tree a cell's data-path) and how to read the
 * key figures off the screen (selectors whose text must appear in the PDF).
 */
const PAGES = [
  { name: 'linear', page: 'linear.html', tag: 'railnote-linear',
    typed: { 'vin-min': '4.91 V', 'iout-max': '0.221 A', 'ta-max': '55.5 °C' },
    figures: ['.rn-verdict .rn-summary', '.rn-check .rn-check-text', '.rn-limits dd'] },
  { name: 'thermal', page: 'thermal.html', tag: 'railnote-thermal',
    typed: { power: '0.452 W', 'ta-max': '57.5 °C' },
    figures: ['.rn-verdict .rn-summary', '.rn-check .rn-check-text', '.rn-limits dd'] },
  { name: 'divider', page: 'divider.html', tag: 'railnote-divider',
    typed: { 'vout-target': '1.27 V', 'temp-max': '71 °C' },
    figures: ['.rn-verdict .rn-summary', '.rn-check .rn-check-text', '.rn-limits dd'] },
  { name: 'switching', page: 'switching.html', tag: 'railnote-switching',
    typed: { 'vin-min': '10.9 V', iout: '0.71 A' },
    figures: ['.rn-verdict .rn-summary', '.rn-check .rn-check-text'] },
  { name: 'compare', page: 'compare.html', tag: 'railnote-compare',
    typed: { 'ta-max': '56.5 °C', iout: '0.231 A' },
    figures: ['.rn-side-verdict .rn-summary'] },
  { name: 'tree', page: 'tree.html', tag: 'railnote-tree',
    typed: { 'loads[0].typA': '31.5 mA', 'rails[1].thetaJa': '95 K/W' },
    figures: ['.rn-verdict .rn-summary', '.rn-check .rn-check-text', '.rn-tree-totals dd'] },
];

for (const p of PAGES) {
  test(`print of ${p.page}: a review record with the typed inputs, results, verdict, link, date and caution, without navigation`, async (t) => {
    const { context, page, problems } = await open(browser);
    await withCsp(context);
    await page.goto(url(p.page));
    await settled(page, 'ready', p.tag);
    for (const [key, text] of Object.entries(p.typed)) {
      const input = p.name === 'tree'
        ? page.locator(`${p.tag} input[data-path="${key}"]`)
        : field(page, key, p.tag);
      await input.fill(text);
    }
    await settled(page, 'ready', p.tag);
    // What the screen shows, read before printing.
    const screen = await page.evaluate(({ tag, figures }) => {
      const w = document.querySelector(tag);
      const text = (e) => (e ? e.textContent.replace(/\s+/g, ' ').trim() : null);
      const nav = [...document.querySelectorAll('header nav a')].map(text);
      const main = document.querySelector('main');
      const mainText = main.textContent.replace(/\s+/g, ' ');
      return {
        title: text(document.querySelector('h1')),
        verdicts: [...w.querySelectorAll('.rn-verdict-word')].map((e) => text(e).replace(/[✓!✗]/g, '').trim()),
        figures: figures.map((sel) => [sel, text(w.querySelector(sel))]),
        link: w.querySelector('.rn-permalink').getAttribute('href'),
        caution: text(document.querySelector('.rn-caution')).replace(/^(Caution|Before you build)\.\s*/, '').split(/(?<=\.)\s/)[0],
        // Navigation words that occur nowhere else on the page: their presence in print means the nav printed.
        navOnly: nav.filter((t) => !mainText.includes(t)),
        printedBefore: [...document.querySelectorAll('.rn-printed')].map((e) => e.textContent),
        // Sort headings print as their words and the error list's field names are text: not those.
        buttons: [...document.querySelectorAll('button:not(.rn-sort):not(.rn-linkish)')].map(text).filter((t) => t && !mainText.replace(t, '').includes(t)),
      };
    }, { tag: p.tag, figures: p.figures });
    assert.ok(screen.verdicts.length >= 1, 'the screen shows a verdict');
    assert.ok(screen.navOnly.length >= 2, `some navigation words occur only in the nav: ${JSON.stringify(screen.navOnly)}`);
    assert.ok(screen.printedBefore.every((t) => t === ''), `no print date before printing: ${JSON.stringify(screen.printedBefore)}`);
    for (const [sel, t] of screen.figures) assert.ok(t, `the screen shows ${sel}`);

    t.diagnostic(`checked in the PDF: ${JSON.stringify({ typed: p.typed, verdicts: screen.verdicts, figures: screen.figures, caution: screen.caution, navOnly: screen.navOnly })}`);
    const file = path.join(OUT_DIR, `${p.name}-print.pdf`);
    const t0 = Date.now();
    await page.pdf({ path: file, format: 'A4', printBackground: true });
    const raw = pdfText(file);
    fs.writeFileSync(path.join(OUT_DIR, `${p.name}-print.txt`), raw);
    const text = words(raw);
    const flat = squeezed(raw);
    const where = `(PDF text in tests/out/${p.name}-print.txt)`;

    assert.ok(text.includes(words(screen.title)), `the title "${screen.title}" ${where}`);
    for (const typed of Object.values(p.typed)) {
      assert.ok(text.includes(words(typed)), `the typed input "${typed}" ${where}`);
    }
    for (const v of screen.verdicts) assert.ok(text.includes(v) || text.includes(v.toUpperCase()), `the verdict "${v}" ${where}`);
    for (const [sel, shown] of screen.figures) {
      assert.ok(text.includes(words(shown)), `the figures of ${sel} as shown: "${shown}" ${where}`);
    }
    assert.ok(flat.includes(squeezed(screen.link)), `the whole link ${screen.link} ${where}`);
    assert.ok(screen.link.startsWith(url(p.page)), 'the link is the full address of the page');
    const m = /Printed (\d{4}-\d{2}-\d{2}) (\d{2}):(\d{2}) UTC/.exec(text);
    assert.ok(m, `a "Printed <date> UTC" line ${where}`);
    const printed = Date.parse(`${m[1]}T${m[2]}:${m[3]}:00Z`);
    assert.ok(printed >= Math.floor(t0 / 60000) * 60000 - 60000 && printed <= Date.now() + 60000,
      `the print date is the time of printing (${m[0]})`);
    assert.ok(text.includes(words(screen.caution)), `the caution "${screen.caution}" ${where}`);
    for (const n of screen.navOnly) assert.ok(!text.includes(n), `navigation "${n}" is not printed ${where}`);
    assert.ok(!/Skip to the/.test(text), 'the skip link is not printed');
    for (const b of screen.buttons) assert.ok(!text.includes(b), `the button "${b}" is not printed`);
    assert.ok(!/\bNaN\b|Infinity/.test(text), 'no NaN or Infinity in the record');
    assert.deepEqual(problems, [], 'no page errors');
    await context.close();
  });
}

test('print with a bad value: the record names the field and its message, and shows no result', async () => {
  const tag = 'railnote-linear';
  const { context, page } = await open(browser);
  await withCsp(context);
  await page.goto(url('linear.html'));
  await settled(page, 'ready', tag);
  await field(page, 'vin-min', tag).fill('4.8 apples');
  await settled(page, 'error', tag);
  const msg = (await page.locator(`${tag} .rn-field[data-key="vin-min"] .rn-msg`).textContent()).trim();
  assert.ok(msg.length > 10, 'the field shows a message');
  const file = path.join(OUT_DIR, 'linear-error-print.pdf');
  await page.pdf({ path: file, format: 'A4' });
  const text = words(pdfText(file));
  assert.ok(text.includes('4.8 apples'), 'the bad value as typed');
  assert.ok(text.includes(`Lowest input: ${words(msg)}`), `the error list names the field: "Lowest input: ${msg}"`);
  assert.ok(!/\b(Pass|Marginal|Fail|PASS|MARGINAL|FAIL)\b/.test(text), 'no verdict is printed for a check that did not run');
  await context.close();
});
