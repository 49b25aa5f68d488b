// Shared by a11y.test.mjs, keyboard.test.mjs and print.test.mjs (not a test file itself): the
// pages and their widgets, the Content Security Policy the hosted pages carry, and axe-core.
//
// CSP: every page these tests open is served with the site's policy as a <meta> in its <head>
// (added here in flight by a route when the file on disk does not carry it yet), so the tests see
// what a hosted page does: no inline script, no style attributes, Trusted Types required.
//
// axe-core under that CSP: an injected <script> (page.addScriptTag, with content or with path —
// Playwright inlines the file either way) is inline script and the policy refuses it;
// `cspIsActive` checks exactly that, so the injection below is known to run under the policy.
// axe is instead evaluated through the DevTools protocol (page.evaluate of the file's source),
// which page CSP does not govern. No bypassCSP context is used anywhere: the page itself runs
// under the real policy while axe looks at it.
import fs from 'node:fs';
import { createRequire } from 'node:module';
import { url, ORIGIN } from './browser.mjs';

const require = createRequire(import.meta.url);

/** The policy every hosted page carries (the csp work adds it to site/*.html). */
export const CSP = "default-src 'self'; script-src 'self' 'wasm-unsafe-eval'; style-src 'self'; "
  + "img-src 'self' data:; connect-src 'self'; worker-src 'self'; manifest-src 'self'; "
  + "object-src 'none'; base-uri 'none'; form-action 'self'; require-trusted-types-for 'script'; "
  + 'trusted-types railnote-sw';

const CSP_META = `<meta http-equiv="Content-Security-Policy" content="${CSP}">`;

/** axe-core's browser build, as installed by npm (package.json pins the version). */
export const AXE_SOURCE = fs.readFileSync(require.resolve('axe-core/axe.min.js'), 'utf8');
export const AXE_VERSION = JSON.parse(fs.readFileSync(require.resolve('axe-core/package.json'), 'utf8')).version;

/**
 * Serve the site's HTML documents with the CSP meta (unless the file already has one) and record
 * every CSP violation the page reports in window.__rnCsp (an init script, which page CSP does not
 * govern). Call on a context before opening pages.
 */
export async function withCsp(context) {
  await context.addInitScript(() => {
    window.__rnCsp = [];
    document.addEventListener('securitypolicyviolation', (e) => {
      window.__rnCsp.push(`${e.violatedDirective}: ${e.blockedURI || '(inline)'} ${e.sourceFile || ''}:${e.lineNumber || ''}`);
    });
  });
  await context.route((u) => u.origin === ORIGIN, async (route) => {
    const req = route.request();
    if (req.resourceType() !== 'document') return route.continue();
    const response = await route.fetch();
    const body = await response.text();
    const type = response.headers()['content-type'] || '';
    if (!type.includes('text/html') || /http-equiv="Content-Security-Policy"/i.test(body)) {
      return route.fulfill({ response, body });
    }
    return route.fulfill({ response, body: body.replace(/<head>/i, `<head>\n${CSP_META}`) });
  });
}

/** True when the page's policy refuses an injected inline script (the CSP is really in force). */
export async function cspIsActive(page) {
  try {
    await page.addScriptTag({ content: 'window.__rnInlineRan = true;' });
  } catch {
    // Playwright may reject when the element's script is refused; the check below decides.
  }
  return page.evaluate(() => window.__rnInlineRan !== true);
}

/** Load axe-core into the page (see the header: DevTools evaluation, not a <script>). */
export async function injectAxe(page) {
  const has = await page.evaluate(() => typeof window.axe === 'object' && window.axe !== null);
  if (has) return;
  await page.evaluate(AXE_SOURCE);
  const version = await page.evaluate(() => (window.axe ? window.axe.version : null));
  if (version !== AXE_VERSION) throw new Error(`axe-core did not load into ${page.url()} (got ${version})`);
}

/**
 * Run axe on the whole document; returns every violation as
 * { id, impact, help, nodes: [{ target, summary }] }.
 */
export async function runAxe(page) {
  await injectAxe(page);
  return page.evaluate(async () => {
    const r = await window.axe.run(document, { resultTypes: ['violations'] });
    return r.violations.map((v) => ({
      id: v.id,
      impact: v.impact,
      help: v.help,
      nodes: v.nodes.map((n) => ({ target: n.target.join(' '), summary: (n.failureSummary || '').replace(/\s+/g, ' ').slice(0, 300) })),
    }));
  });
}

/** Violations as readable lines. */
export function describeViolations(violations) {
  return violations.map((v) => `[${v.impact}] ${v.id}: ${v.help}\n${v.nodes.slice(0, 8).map((n) => `    at ${n.target}\n      ${n.summary}`).join('\n')}${v.nodes.length > 8 ? `\n    … and ${v.nodes.length - 8} more` : ''}`).join('\n');
}

/**
 * Every page, with its widget's tag (null: no widget) and a text field to break and fix:
 * `bad` is typed to make an error, `good` a valid value different from the demo's.
 */
export const CALCULATORS = [
  { name: 'linear', page: 'linear.html', tag: 'railnote-linear', key: 'vin-min', bad: 'lots', good: '4.9 V' },
  { name: 'thermal', page: 'thermal.html', tag: 'railnote-thermal', key: 'power', bad: 'lots', good: '0.5 W' },
  { name: 'divider', page: 'divider.html', tag: 'railnote-divider', key: 'vout-target', bad: 'lots', good: '1.25 V' },
  { name: 'switching', page: 'switching.html', tag: 'railnote-switching', key: 'vin-min', bad: 'lots', good: '11 V' },
  { name: 'compare', page: 'compare.html', tag: 'railnote-compare', key: 'ta-max', bad: 'lots', good: '55 °C' },
  { name: 'tree', page: 'tree.html', tag: 'railnote-tree', key: null, bad: 'lots', good: null },
];

export const PLAIN_PAGES = ['index.html', 'reference.html'];

export { url };
