// Browser tests of hosted offline use: the service worker (site/sw.js) and its precache list
// (site/pkg/precache.js, written by the site build).
//
// The site is copied to a scratch folder and served by a small server of this file (so that the
// copy can be changed for a version bump and the server stopped, without touching site/ or the
// server the other tests share). The server sends the hosted pages' Content-Security-Policy as a
// header, so registration must pass Trusted Types through the `railnote-sw` policy. A page is
// loaded, the worker must control it and hold every listed file in `railnote-<version>`; then the
// server is stopped and the context set offline, and every page (each calculator, the embed of
// each, the index and the reference) must load from the cache and compute. Then a new version
// (a changed page and a new list, as a rebuild writes them) must take over and the old cache go.
import { test, before, after } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'node:fs';
import http from 'node:http';
import path from 'node:path';
import vm from 'node:vm';
import { fileURLToPath } from 'node:url';
import { launch, open, settled, field, OUT_DIR } from './browser.mjs';

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const SITE = path.join(ROOT, 'site');

// The policy every hosted page carries (the session's rules), here as a header.
const CSP = "default-src 'self'; script-src 'self' 'wasm-unsafe-eval'; style-src 'self'; img-src 'self' data:; "
  + "connect-src 'self'; worker-src 'self'; manifest-src 'self'; object-src 'none'; base-uri 'none'; "
  + "form-action 'self'; require-trusted-types-for 'script'; trusted-types railnote-sw";

const TYPES = {
  '.html': 'text/html; charset=utf-8', '.js': 'text/javascript; charset=utf-8', '.css': 'text/css; charset=utf-8',
  '.wasm': 'application/wasm', '.svg': 'image/svg+xml', '.json': 'application/json', '.ts': 'text/plain',
};

const CALCULATORS = [
  ['linear', 'railnote-linear'], ['thermal', 'railnote-thermal'], ['divider', 'railnote-divider'],
  ['switching', 'railnote-switching'], ['compare', 'railnote-compare'], ['tree', 'railnote-tree'],
];

/** A static server of `dir` on 127.0.0.1; every request path is kept in `served`. */
function serve(dir, port = 0) {
  const served = [];
  const sockets = new Set();
  const server = http.createServer((req, res) => {
    const p = decodeURIComponent(new URL(req.url, 'http://x').pathname);
    served.push(p);
    const file = path.join(dir, p.endsWith('/') ? `${p}index.html` : p);
    if (!file.startsWith(dir) || !fs.existsSync(file) || !fs.statSync(file).isFile()) {
      res.writeHead(404, { 'Content-Type': 'text/plain' }).end('not found\n');
      return;
    }
    const ext = path.extname(file);
    const headers = { 'Content-Type': TYPES[ext] || 'application/octet-stream', 'Cache-Control': 'no-cache' };
    if (ext === '.html') headers['Content-Security-Policy'] = CSP;
    res.writeHead(200, headers).end(fs.readFileSync(file));
  });
  server.on('connection', (s) => { sockets.add(s); s.on('close', () => sockets.delete(s)); });
  return new Promise((resolve) => server.listen(port, '127.0.0.1', () => resolve({
    served,
    port: server.address().port,
    base: `http://127.0.0.1:${server.address().port}/`,
    stop: () => new Promise((done) => { for (const s of sockets) s.destroy(); server.close(done); }),
  })));
}

/** The list and version the build wrote into a site folder. */
function precache(dir) {
  const sandbox = { self: {} };
  vm.runInNewContext(fs.readFileSync(path.join(dir, 'pkg/precache.js'), 'utf8'), sandbox);
  return JSON.parse(JSON.stringify(sandbox.self.RAILNOTE_PRECACHE)); // out of the vm realm
}

/** What the page's origin holds: cache names and, for each, its request paths. */
const cachesOf = (page) => page.evaluate(async () => {
  const out = {};
  for (const name of await caches.keys()) {
    out[name] = (await (await caches.open(name)).keys()).map((r) => new URL(r.url).pathname);
  }
  return out;
});

let browser;
let copy;
before(async () => {
  browser = await launch();
  copy = fs.mkdtempSync(path.join(OUT_DIR, 'offline-site-'));
  fs.cpSync(SITE, copy, { recursive: true });
});
after(async () => {
  await browser?.close();
  if (copy) fs.rmSync(copy, { recursive: true, force: true });
});

test('precache list: every site file is listed (nothing else), with a version', () => {
  const { version, files } = precache(copy);
  assert.match(version, /^[0-9a-f]{16}$/);
  const onDisk = [];
  const walk = (d, rel = '') => {
    for (const e of fs.readdirSync(d, { withFileTypes: true })) {
      if (e.name.startsWith('.')) continue;
      const r = rel ? `${rel}/${e.name}` : e.name;
      if (e.isDirectory()) walk(path.join(d, e.name), r);
      else if (!e.name.endsWith('.d.ts') && r !== 'sw.js' && r !== 'pkg/precache.js') onDisk.push(r);
    }
  };
  walk(SITE);
  assert.deepEqual([...files].sort(), ['./', ...onDisk].sort(), 'the list is exactly the site files (and ./)');
  for (const must of ['index.html', 'linear.html', 'embed.html', 'js/engine.js', 'pkg/railnote.js', 'pkg/railnote_bg.wasm', 'css/railnote.css', 'favicon.svg']) {
    assert.ok(files.includes(must), must);
  }
});

test('offline: once the worker controls a page, every page loads and computes with no network, and a new version takes over', async () => {
  let server = await serve(copy);
  const { port } = server;
  const o = await open(browser, { serviceWorkers: 'allow' });
  const { page, context } = o;
  try {
    const first = precache(copy);
    await page.goto(`${server.base}linear.html`);
    await settled(page, 'ready', 'railnote-linear');
    await page.waitForFunction(() => navigator.serviceWorker.controller !== null, null, { timeout: 30000 });
    const worker = await page.evaluate(() => navigator.serviceWorker.controller.scriptURL);
    assert.equal(worker, `${server.base}sw.js`);
    const held = await cachesOf(page);
    assert.deepEqual(Object.keys(held), [`railnote-${first.version}`], 'one cache, named by the version');
    const expectedPaths = first.files.map((f) => new URL(f, server.base).pathname).sort();
    assert.deepEqual(held[`railnote-${first.version}`].sort(), expectedPaths, 'every listed file is cached');

    // No network at all: the server is gone and the browser is offline.
    await server.stop();
    await context.setOffline(true);
    for (const [name, tag] of CALCULATORS) {
      await page.goto(`${server.base}${name}.html`);
      assert.equal(await settled(page, 'ready', tag), 'ready', `${name}.html computes offline`);
      await page.goto(`${server.base}embed.html?calc=${name}`);
      assert.equal(await settled(page, 'ready', tag), 'ready', `embed.html?calc=${name} computes offline`);
    }
    // A page with its query keys (the cache ignores the query) computes what the keys say.
    await page.goto(`${server.base}linear.html?vout=2.5+V`);
    await settled(page, 'ready', 'railnote-linear');
    assert.equal(await field(page, 'vout', 'railnote-linear').inputValue(), '2.5 V');
    assert.equal((await page.locator('railnote-linear').evaluate((el) => el.result)).verdict !== undefined, true);
    for (const plain of ['', 'index.html', 'reference.html']) {
      const response = await page.goto(`${server.base}${plain}`);
      assert.ok(response && response.ok(), `${plain || '/'} loads offline`);
      assert.match(await page.title(), /railnote/);
    }

    // A rebuild: a page changed, so the build writes a new version; the server comes back.
    await context.setOffline(false);
    const marker = `rebuilt-${Date.now()}`;
    const indexFile = path.join(copy, 'index.html');
    fs.writeFileSync(indexFile, fs.readFileSync(indexFile, 'utf8').replace('</body>', `<p id="marker">${marker}</p>\n</body>`));
    const bumped = `${first.version.slice(0, 8)}00000000`;
    assert.notEqual(bumped, first.version);
    const listFile = path.join(copy, 'pkg/precache.js');
    fs.writeFileSync(listFile, fs.readFileSync(listFile, 'utf8').replace(first.version, bumped));
    server = await serve(copy, port);
    // The browser checks the worker on navigation; update() asks now.
    await page.goto(`${server.base}linear.html`);
    await settled(page, 'ready', 'railnote-linear');
    await page.evaluate(() => navigator.serviceWorker.getRegistration().then((r) => r.update()));
    // The new worker installs (caching the new list), activates and deletes the old cache.
    const deadline = Date.now() + 30000;
    let names = [];
    while (Date.now() < deadline) {
      names = Object.keys(await cachesOf(page));
      if (names.length === 1 && names[0] === `railnote-${bumped}`) break;
      await page.waitForTimeout(200);
    }
    assert.deepEqual(names, [`railnote-${bumped}`], 'within 30 s the new version replaced the old one');
    assert.equal(await page.evaluate(() => navigator.serviceWorker.getRegistration().then((r) => r.active && r.active.state)), 'activated');
    await page.waitForFunction(() => navigator.serviceWorker.controller !== null);
    const after = await cachesOf(page);
    assert.deepEqual(Object.keys(after), [`railnote-${bumped}`], 'the old cache was deleted');
    assert.equal(after[`railnote-${bumped}`].length, expectedPaths.length);

    // Offline again, the new version's files are the ones served.
    await server.stop();
    await context.setOffline(true);
    await page.goto(`${server.base}index.html`);
    assert.equal(await page.locator('#marker').textContent(), marker, 'the rebuilt page is served from the new cache');
    await page.goto(`${server.base}tree.html`);
    assert.equal(await settled(page, 'ready', 'railnote-tree'), 'ready');
    assert.deepEqual(o.problems, [], 'no page error and no console error (a CSP or Trusted Types refusal would be one)');
  } finally {
    await context.setOffline(false).catch(() => {});
    await context.close();
    await server.stop().catch(() => {});
  }
});
