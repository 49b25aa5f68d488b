// Shared launch and page helpers for the browser tests (not a test file itself).
//
// Uses Debian's Chromium through playwright-core's executablePath, so no test ever downloads a
// browser. Playwright gives every launch a fresh, throw-away profile. The site is served by
// `cargo xtask test`, which passes its address in RAILNOTE_BASE_URL.
import { chromium } from 'playwright-core';
import assert from 'node:assert/strict';
import path from 'node:path';
import fs from 'node:fs';
import { fileURLToPath } from 'node:url';

export const BASE_URL = (() => {
  const base = process.env.RAILNOTE_BASE_URL;
  if (!base) {
    throw new Error('RAILNOTE_BASE_URL is not set: run the browser tests through `cargo xtask test`, '
      + 'or serve site/ yourself and set RAILNOTE_BASE_URL=http://127.0.0.1:PORT/');
  }
  return base.endsWith('/') ? base : `${base}/`;
})();

export const ORIGIN = new URL(BASE_URL).origin;

/** Where screenshots go (git-ignored). */
export const OUT_DIR = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../out');
fs.mkdirSync(OUT_DIR, { recursive: true });

export function url(pathAndQuery) {
  return new URL(pathAndQuery, BASE_URL).href;
}

export async function launch() {
  return chromium.launch({
    executablePath: '/usr/bin/chromium',
    args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking',
      '--disable-component-update', '--disable-sync', '--no-first-run'],
  });
}

/**
 * A fresh context that records every request (pages, iframes, workers) and every uncaught page
 * error and console error, so a test can assert the site fetched nothing from elsewhere and ran
 * cleanly. Returns { context, page, requests, problems }.
 */
export async function open(browser, options = {}) {
  // Service workers are blocked unless a test asks for them (offline.test.mjs): site/sw.js would
  // otherwise precache the whole site behind every test and answer requests page.route expects.
  const context = await browser.newContext({ viewport: { width: 1280, height: 900 }, serviceWorkers: 'block', ...options });
  const requests = [];
  const problems = [];
  context.on('request', (r) => requests.push(r.url()));
  const watch = (page) => {
    page.on('pageerror', (e) => problems.push(`pageerror: ${e.message}`));
    page.on('console', (m) => { if (m.type() === 'error') problems.push(`console.error: ${m.text()}`); });
  };
  context.on('page', watch);
  const page = await context.newPage();
  return { context, page, requests, problems };
}

/** Every recorded request went to the site's own origin. */
export function assertSameOrigin(requests) {
  assert.ok(requests.length > 0, 'some requests were recorded');
  const foreign = requests.filter((u) => new URL(u).origin !== ORIGIN);
  assert.deepEqual(foreign, [], `requests left the origin ${ORIGIN}`);
}

/**
 * Wait until the widget (by default <railnote-linear>; pass the tag for another calculator) has
 * rendered a result or an error, and return that state.
 */
export async function settled(scope, state, tag = 'railnote-linear') {
  const sel = state ? `${tag}[data-state="${state}"]` : `${tag}[data-state="ready"], ${tag}[data-state="error"]`;
  try {
    await scope.locator(sel).waitFor({ timeout: 15000 });
  } catch (err) {
    // Say what the widget was showing instead, so a failure explains itself.
    const seen = await scope.locator(tag).evaluate((el) => ({
      state: el.dataset.state, text: el.textContent.slice(0, 300),
    })).catch((e) => ({ state: 'no widget', text: String(e) }));
    throw new Error(`widget did not reach ${state || 'ready/error'}: state ${seen.state}; it shows: ${seen.text}`, { cause: err });
  }
  return scope.locator(tag).getAttribute('data-state');
}

/** The input (or select) of a field, by its key (the URL key / attribute name). */
export function field(scope, key, tag = 'railnote-linear') {
  return scope.locator(`${tag} .rn-field[data-key="${key}"] input, ${tag} .rn-field[data-key="${key}"] select`);
}

/** The message element of a field. */
export function message(scope, key, tag = 'railnote-linear') {
  return scope.locator(`${tag} .rn-field[data-key="${key}"] .rn-msg`);
}

/** The last result object the widget rendered (null if it shows an error). */
export async function result(page, tag = 'railnote-linear') {
  return page.locator(tag).evaluate((el) => el.result);
}

/** Relative closeness, for comparing the engine's numbers with hand-worked ones. */
export function close(actual, expected, rel = 1e-9, what = '') {
  const ok = Math.abs(actual - expected) <= rel * Math.max(Math.abs(expected), 1e-30);
  assert.ok(ok, `${what}: got ${actual}, expected ${expected} (relative tolerance ${rel})`);
}

/**
 * Open a made-up host page (standing in for a wiki page; served by page.route, never on disk) at
 * made-up-host/NAME holding one iframe of `src`, and collect the embed's height messages in the
 * host's window.heights. Returns the frame locator of the iframe (#rn).
 */
export async function openEmbedHost(page, name, src, title) {
  const hostUrl = url(`made-up-host/${name}`);
  await page.route(hostUrl, (route) => route.fulfill({
    status: 200, contentType: 'text/html',
    body: `<!doctype html><html><head><meta charset="utf-8"><title>host</title></head><body>
<iframe id="rn" src="${src}" title="${title}" width="900" height="400" style="border:0"></iframe>
<script>window.heights = []; addEventListener('message', (e) => { if (e.data && e.data.type === 'railnote-height') window.heights.push(e.data); });</script>
</body></html>`,
  }));
  await page.goto(hostUrl);
  return page.frameLocator('#rn');
}
