// What every railnote widget shares: fields (label, unit, message), parsing each field through
// the WASM parser, URL state, copy link, reset, embed height reporting and result announcement.
//
// Rules this module keeps for every widget:
// - The page never computes. Parsing, checking and formatting go through the WASM API; this
//   module only moves text between the DOM, the URL and that API.
// - Text reaches the page through textContent and DOM construction only, never innerHTML, so a
//   hostile value in a link is shown as text and can do nothing.
// - A field's message names the reason (the WASM error's sentence) and sits next to the field,
//   linked with aria-describedby; the input gets aria-invalid.

/**
 * Build an element. attrs: plain attributes, except `class`, `text` (textContent) and `on`
 * ({event: handler}, attached with addEventListener: no inline handlers anywhere).
 * children: nodes or strings (strings become text nodes); null/undefined/false are skipped.
 */
export function h(tag, attrs = {}, ...children) {
  const node = document.createElement(tag);
  for (const [k, v] of Object.entries(attrs || {})) {
    if (v === undefined || v === null || v === false) continue;
    if (k === 'text') node.textContent = String(v);
    else if (k === 'class') node.className = v;
    else if (k === 'on') for (const [ev, fn] of Object.entries(v)) node.addEventListener(ev, fn);
    else node.setAttribute(k, v === true ? '' : String(v));
  }
  appendChildren(node, children);
  return node;
}

function appendChildren(node, children) {
  for (const c of children.flat(Infinity)) {
    if (c === undefined || c === null || c === false) continue;
    node.append(c instanceof Node ? c : document.createTextNode(String(c)));
  }
}

/**
 * A trade symbol with a subscript, e.g. symbol('V', 'in,min') → V<sub>in,min</sub>, as nodes.
 * Greek letters are plain text (θJA).
 */
export function symbol(main, sub) {
  const span = h('span', { class: 'rn-sym' }, main);
  if (sub) span.append(h('sub', {}, sub));
  return span;
}

let uid = 0;
/** A page-unique id prefix for one widget instance. */
export function uniquePrefix(name) {
  uid += 1;
  return `${name}-${uid}`;
}

/**
 * Build the DOM for one field definition.
 *
 * def = { key, prop, kind, unit, label, sym: [main, sub], def, optional, note,
 *         type: 'select', options: [{ value, label }] }
 * Returns { def, root, input, message }.
 */
export function buildField(def, prefix) {
  const id = `${prefix}-${def.key}`;
  const unitId = `${id}-unit`;
  const msgId = `${id}-msg`;
  const noteId = `${id}-note`;
  const described = [def.type === 'select' ? null : unitId, def.note ? noteId : null, msgId]
    .filter(Boolean).join(' ');
  let input;
  if (def.type === 'select') {
    input = h('select', { id, name: def.key, 'aria-describedby': described });
    for (const o of def.options) input.append(h('option', { value: o.value, text: o.label }));
  } else {
    input = h('input', {
      id, name: def.key, type: 'text', inputmode: 'text', autocomplete: 'off',
      spellcheck: 'false', 'aria-describedby': described, size: 10,
    });
  }
  const label = h('label', { for: id, class: 'rn-label' },
    h('span', { class: 'rn-label-words' }, def.label),
    def.sym ? [' ', symbol(def.sym[0], def.sym[1])] : null,
    def.optional ? h('span', { class: 'rn-optional' }, ' (optional)') : null);
  const control = h('span', { class: 'rn-control' }, input,
    def.type === 'select' ? null : h('span', { class: 'rn-unit', id: unitId }, def.unit));
  const note = def.note ? h('span', { class: 'rn-note', id: noteId }, def.note) : null;
  // Not a live region: the message is the field's description (read with the field), and the
  // widget's one polite announcer says it once typing settles (a live message per field would
  // speak again at every keystroke).
  const message = h('span', { class: 'rn-msg', id: msgId });
  const root = h('div', { class: 'rn-field', 'data-key': def.key }, label, control, note, message);
  return { def, root, input, message };
}

/**
 * Build repeated rows of fields (defs from rowFieldDefs) as a compact grid: a visible column
 * heading per column, a row number, and per cell an input with its unit and its own message.
 * Each input keeps a full label for screen readers ("Stage 2: thermal resistance R2").
 * Returns { root, fields } with fields shaped as buildField's.
 */
export function buildFieldRows(defs, prefix, { caption, rowWord, columns }) {
  const fields = [];
  const head = h('div', { class: 'rn-rows-head', 'aria-hidden': 'true' },
    h('span', {}, rowWord),
    columns.map((c) => h('span', {}, c.sym ? symbol(c.sym[0], c.sym[1] ? c.sym[1] : 'i') : c.label, ` (${c.unit})`)));
  const body = [];
  const byRow = new Map();
  for (const d of defs) {
    if (!byRow.has(d.row.index)) byRow.set(d.row.index, []);
    byRow.get(d.row.index).push(d);
  }
  for (const [index, rowDefs] of byRow) {
    const cells = rowDefs.map((def) => {
      const id = `${prefix}-${def.key}`;
      const unitId = `${id}-unit`;
      const msgId = `${id}-msg`;
      const input = h('input', {
        id, name: def.key, type: 'text', inputmode: 'text', autocomplete: 'off',
        spellcheck: 'false', 'aria-describedby': `${unitId} ${msgId}`, size: 8,
      });
      const message = h('span', { class: 'rn-msg', id: msgId });
      const root = h('div', { class: 'rn-field rn-cell', 'data-key': def.key },
        h('label', { for: id, class: 'rn-visually-hidden' }, def.label),
        h('span', { class: 'rn-control' }, input, h('span', { class: 'rn-unit', id: unitId }, def.unit)),
        message);
      const f = { def, root, input, message };
      fields.push(f);
      return root;
    });
    body.push(h('div', { class: 'rn-row', 'data-row': index + 1 },
      h('span', { class: 'rn-row-label', 'aria-hidden': 'true' }, String(index + 1)), cells));
  }
  const root = h('div', { class: 'rn-rows', role: 'group', 'aria-label': caption }, head, body);
  return { root, fields };
}

/** Show (or, with null, clear) the message at a field. */
export function setFieldMessage(field, text) {
  // Only on a change, so a message that stays while the user types is not rewritten each time.
  if (field.message.textContent !== (text || '')) field.message.textContent = text || '';
  field.root.classList.toggle('rn-bad', Boolean(text));
  if (text) field.input.setAttribute('aria-invalid', 'true');
  else field.input.removeAttribute('aria-invalid');
}

/** The message of a thrown value, as a sentence for the user. Never a stack trace. */
export function errorText(err) {
  if (err && typeof err.message === 'string' && err.message) return err.message;
  return 'this value could not be read.';
}

/**
 * Repeated rows of fields (the stages of a Foster network, the steps of a power profile): the
 * field definitions of `count` rows, each with the given columns. Column n of row i has the key
 * `${column.key}${i + 1}` (r1, tau1, …) and def.row = { list, index: i, prop }, so parseFields
 * puts the row into values[list] as { [prop]: number } and an API error named `list[k].prop`
 * can be led back to its field. Row fields are optional: a row left empty is left out.
 */
export function rowFieldDefs(list, count, columns, rowWord) {
  const defs = [];
  for (let i = 0; i < count; i++) {
    for (const c of columns) {
      defs.push({
        ...c, key: `${c.key}${i + 1}`, optional: true, def: c.defaults ? (c.defaults[i] ?? '') : '',
        label: `${rowWord} ${i + 1}: ${c.label}`, sym: c.sym ? [c.sym[0], `${c.sym[1] || ''}${i + 1}`] : null,
        apiName: `${list}[].${c.prop}`, row: { list, index: i, prop: c.prop },
      });
    }
  }
  return defs;
}

/**
 * Read each field's text and turn it into a number through the WASM parser.
 * Selects must hold one of their options. Empty optional fields are left out (undefined).
 * Fields for which `skip(field)` is true (a path that does not use them) are not read.
 * Row fields (see rowFieldDefs) are gathered per list, in row order, leaving out empty rows; a
 * row filled in only partly gets a message at its empty cell.
 * Returns { values: {prop: number|string, list: [{…}]}, bad: [[field, message]],
 *           rows: {list: [row index of each entry]} } (rows leads an API error back to a field).
 */
export function parseFields(api, fields, { skip } = {}) {
  const values = {};
  const bad = [];
  const rows = {};
  const rowCells = new Map();
  const read = (f) => {
    try {
      return { ok: true, value: api.parseQuantity(f.input.value, f.def.kind) };
    } catch (err) {
      bad.push([f, errorText(err)]);
      return { ok: false };
    }
  };
  for (const f of fields) {
    const { def } = f;
    if (skip && skip(f)) continue;
    if (def.row) {
      const byRow = rowCells.get(def.row.list) || new Map();
      rowCells.set(def.row.list, byRow);
      if (!byRow.has(def.row.index)) byRow.set(def.row.index, []);
      byRow.get(def.row.index).push(f);
      continue;
    }
    const text = f.input.value;
    if (def.type === 'select') {
      // An option may stand for a value of another type (a count): `apiValue` is what the API gets.
      const option = def.options.find((o) => o.value === text);
      if (option) values[def.prop] = option.apiValue === undefined ? text : option.apiValue;
      else bad.push([f, def.choiceMessage || 'choose one of the listed models.']);
      continue;
    }
    if (def.optional && text.trim() === '') continue;
    const r = read(f);
    if (r.ok) values[def.prop] = r.value;
  }
  for (const [list, byRow] of rowCells) {
    values[list] = [];
    rows[list] = [];
    for (const index of [...byRow.keys()].sort((a, b) => a - b)) {
      const cells = byRow.get(index);
      if (cells.every((f) => f.input.value.trim() === '')) continue;
      const entry = {};
      let complete = true;
      for (const f of cells) {
        if (f.input.value.trim() === '') {
          bad.push([f, 'fill in this value too, or clear the whole row.']);
          complete = false;
          continue;
        }
        const r = read(f);
        if (r.ok) entry[f.def.row.prop] = r.value;
        else complete = false;
      }
      if (complete) {
        values[list].push(entry);
        rows[list].push(index);
      }
    }
  }
  return { values, bad, rows };
}

/**
 * The field an API error names: a top-level key (`thetaJc`) or an entry of a list
 * (`foster[2].tau`, led back through `rows` to the row it came from; `foster` alone: the first
 * row). Null when no field matches.
 */
export function fieldForError(fields, name, rows = {}) {
  if (typeof name !== 'string') return null;
  const m = /^(\w+)(?:\[(\d+)\])?(?:\.(\w+))?$/.exec(name);
  if (!m) return null;
  const [, list, k, prop] = m;
  const inList = fields.filter((f) => f.def.row && f.def.row.list === list);
  if (inList.length) {
    const index = k === undefined ? 0 : (rows[list] || [])[Number(k)];
    const row = inList.filter((f) => f.def.row.index === (index === undefined ? 0 : index));
    return row.find((f) => f.def.row.prop === prop) || row[0] || inList[0];
  }
  return fields.find((f) => !f.def.row && f.def.prop === name) || null;
}

/**
 * Put a value into a field exactly as given. For a select, a value that is not one of its options
 * (from a hand-edited or hostile link) selects an empty placeholder so the field shows as bad.
 */
export function setFieldText(field, text) {
  const { def, input } = field;
  if (def.type !== 'select') {
    input.value = text;
    return;
  }
  const placeholder = input.querySelector('option[data-placeholder]');
  if (def.options.some((o) => o.value === text)) {
    if (placeholder) placeholder.remove();
    input.value = text;
    return;
  }
  let ph = placeholder;
  if (!ph) {
    ph = h('option', { value: '', 'data-placeholder': true, text: '— choose —' });
    input.prepend(ph);
  }
  input.value = '';
}

/** Query values for the given keys from a search string; missing keys are absent. */
export function readQuery(keys, search = window.location.search) {
  const params = new URLSearchParams(search);
  const found = new Map();
  for (const k of keys) if (params.has(k)) found.set(k, params.get(k));
  return found;
}

/**
 * Keeps a widget's inputs in the page URL (readable keys, raw typed text). replaceState is
 * debounced: browsers rate-limit it (about 100–200 calls per 10–30 s).
 */
export class UrlState {
  constructor(keys, delayMs = 300) {
    this.keys = keys;
    this.delayMs = delayMs;
    this.timer = null;
    this.pending = null;
  }

  /** Schedule writing these texts (Map key → text) into the URL; this widget's other keys go. */
  write(texts) {
    this.pending = texts;
    clearTimeout(this.timer);
    this.timer = setTimeout(() => this.flush(), this.delayMs);
  }

  /** Write any pending texts now. */
  flush() {
    clearTimeout(this.timer);
    this.timer = null;
    if (!this.pending) return;
    const params = new URLSearchParams(window.location.search);
    // Keys left out of `pending` (empty optional fields) are removed, so the link stays short.
    for (const k of this.keys) {
      if (this.pending.has(k)) params.set(k, this.pending.get(k));
      else params.delete(k);
    }
    this.pending = null;
    replaceSearch(params);
  }

  /** Remove this widget's keys from the URL (other keys, such as calc=, stay). */
  clear() {
    clearTimeout(this.timer);
    this.pending = null;
    const params = new URLSearchParams(window.location.search);
    for (const k of this.keys) params.delete(k);
    replaceSearch(params);
  }
}

function replaceSearch(params) {
  const q = params.toString();
  const url = window.location.pathname + (q ? `?${q}` : '') + window.location.hash;
  window.history.replaceState(window.history.state, '', url);
}

/**
 * A link to `pagePath` (resolved against the site root) holding these texts as query keys. Keys
 * already in `pageUrl` stay first (the whole-site single file's `?page=NAME`).
 */
export function shareLink(pageUrl, texts, extra = {}) {
  const url = new URL(pageUrl);
  const params = new URLSearchParams(url.search);
  for (const [k, v] of Object.entries(extra)) params.set(k, v);
  for (const [k, v] of texts) params.set(k, v);
  url.search = params.toString();
  url.hash = '';
  return url.href;
}

/**
 * Copy text to the clipboard. When the Clipboard API is refused (an iframe without
 * clipboard-write, an insecure context), show the text selected in `fallbackInput` so the user can
 * copy it with the keyboard. Resolves to 'copied' or 'selected'.
 */
export async function copyText(text, fallbackInput) {
  try {
    if (!navigator.clipboard || !navigator.clipboard.writeText) throw new Error('no clipboard');
    await navigator.clipboard.writeText(text);
    return 'copied';
  } catch {
    fallbackInput.hidden = false;
    fallbackInput.value = text;
    fallbackInput.focus();
    fallbackInput.select();
    return 'selected';
  }
}

/**
 * Inside an iframe, tell the parent page how tall the content is, whenever it changes, as
 * { type: 'railnote-height', calc, height } (a parent script may size the iframe from it; the
 * embed docs also give a fixed height for hosts that allow no script).
 */
export function reportEmbedHeight(calc, target = document.body) {
  if (window.parent === window) return () => {};
  let last = -1;
  const send = () => {
    const box = target.getBoundingClientRect();
    const style = getComputedStyle(target);
    const height = Math.ceil(box.height + parseFloat(style.marginTop || '0') + parseFloat(style.marginBottom || '0'));
    if (height === last) return;
    last = height;
    window.parent.postMessage({ type: 'railnote-height', calc, height }, '*');
  };
  const ro = new ResizeObserver(send);
  ro.observe(target);
  send();
  return () => ro.disconnect();
}

/**
 * A polite live region. announce() replaces its text; repeated identical text is re-announced
 * only after a change, so typing does not make a screen reader repeat itself.
 */
export function createAnnouncer() {
  const region = h('p', { class: 'rn-visually-hidden', 'aria-live': 'polite', 'aria-atomic': 'true' });
  let last = '';
  let timer = null;
  return {
    region,
    announce(text) {
      if (text === last) return;
      last = text;
      clearTimeout(timer);
      // A short delay lets a burst of keystrokes settle into one announcement.
      timer = setTimeout(() => { region.textContent = text; }, 500);
    },
  };
}

/** What a sideways-scrolling region is called when it takes keyboard focus. */
const SCROLL_WORDS = [['.rn-eq', 'Equation'], ['pre', 'Code'], ['.rn-table-scroll', 'Table or figure']];

/**
 * Make each region under `root` that scrolls sideways (an equation, a code block, a wide table
 * or figure) reachable by keyboard: one that overflows and holds nothing focusable gets
 * tabindex="0" (arrow keys then scroll it), and, unless it has a role and name of its own, the
 * role group and a name ("Equation, scrolls sideways"). One that no longer overflows loses what
 * this added (marked data-rn-scroll). Called after each render and on resize; pages without a
 * widget have no such region that overflows at their widths (the browser tests run axe there).
 */
export function keyboardScrollable(root = document) {
  const focusable = 'a[href], button, input, select, textarea, [tabindex]:not([data-rn-scroll])';
  for (const [selector, words] of SCROLL_WORDS) {
    for (const el of root.querySelectorAll(selector)) {
      const overflows = el.scrollWidth > el.clientWidth + 1 && getComputedStyle(el).overflowX !== 'visible';
      const marked = el.hasAttribute('data-rn-scroll');
      if (overflows && !marked && !el.querySelector(focusable) && !el.hasAttribute('tabindex')) {
        el.setAttribute('tabindex', '0');
        el.setAttribute('data-rn-scroll', '');
        if (!el.hasAttribute('role') && !el.hasAttribute('aria-label')) {
          el.setAttribute('role', 'group');
          el.setAttribute('aria-label', `${words}, scrolls sideways`);
          el.setAttribute('data-rn-scroll', 'named');
        }
      } else if (!overflows && marked) {
        if (el.getAttribute('data-rn-scroll') === 'named') {
          el.removeAttribute('role');
          el.removeAttribute('aria-label');
        }
        el.removeAttribute('tabindex');
        el.removeAttribute('data-rn-scroll');
      }
    }
  }
}

if (typeof window !== 'undefined' && typeof document !== 'undefined') {
  // The page's own prose (equations, code): once now (module scripts run after parsing) and
  // again after a resize settles.
  let scrollTimer = null;
  const recheck = () => keyboardScrollable(document);
  if (document.readyState === 'loading') document.addEventListener('DOMContentLoaded', recheck, { once: true });
  else recheck();
  window.addEventListener('load', recheck, { once: true });
  window.addEventListener('resize', () => {
    clearTimeout(scrollTimer);
    scrollTimer = setTimeout(recheck, 200);
  });
}

/**
 * Run `fn` when the page is about to print: the `beforeprint` event (the browser's print, and
 * printing to PDF), and a change of matchMedia('print') (engines that fire only that). Both may
 * fire for one print; `fn` must be idempotent.
 */
export function onPrint(fn, signal) {
  window.addEventListener('beforeprint', fn, { signal });
  const mq = window.matchMedia ? window.matchMedia('print') : null;
  if (mq && mq.addEventListener) mq.addEventListener('change', (e) => { if (e.matches) fn(); }, { signal });
}

/** A unit's symbol when it is one symbol (V, K/W, °C; "± %" gives %); null for a phrase ("% of load"). */
function unitSymbol(unit) {
  const u = String(unit || '').replace(/^±\s*/, '').trim();
  return u && !/\s/.test(u) ? u : null;
}

/**
 * Make the page a review record at print time: every `.rn-printed` element (each widget's record
 * has one; a page without one gets one under its h1) says when it was printed, and a field whose
 * typed text already ends with its unit ("4.85 V") hides the unit beside it in print, so the
 * record reads "4.85 V", not "4.85 V V". Text only (textContent), no styles: CSP-safe.
 */
export function preparePrint(doc = document) {
  const stamp = stampNow();
  let slots = [...doc.querySelectorAll('.rn-printed')];
  if (!slots.length) {
    const main = doc.querySelector('main') || doc.body;
    const p = h('p', { class: 'rn-printed rn-print-only' });
    const h1 = main.querySelector('h1');
    if (h1) h1.after(p); else main.prepend(p);
    slots = [p];
  }
  for (const slot of slots) {
    slot.replaceChildren('Printed ', h('time', { datetime: stamp.iso }, stamp.text), '.');
  }
  for (const f of doc.querySelectorAll('.rn-field')) {
    const input = f.querySelector('input');
    const unit = f.querySelector('.rn-unit');
    if (!input || !unit) continue;
    const symbol = unitSymbol(unit.textContent);
    const typed = input.value.trim();
    f.classList.toggle('rn-unit-typed', Boolean(symbol && typed.endsWith(symbol)));
  }
}

if (typeof window !== 'undefined' && typeof document !== 'undefined') onPrint(() => preparePrint(document));

/** A widget record's "Printed …" line: empty on screen, filled at print (also if built while printing). */
export function printedSlot() {
  const p = h('p', { class: 'rn-printed rn-print-only' });
  if (window.matchMedia && window.matchMedia('print').matches) {
    const stamp = stampNow();
    p.append('Printed ', h('time', { datetime: stamp.iso }, stamp.text), '.');
  }
  return p;
}

/**
 * Format a number through the WASM formatter; null/undefined (absent optional results) and
 * formatter failures show as an em dash.
 */
export function formatWith(api, value, kind, digits = 3) {
  if (value === null || value === undefined) return '—';
  try {
    return api.formatQuantity(value, kind, digits);
  } catch {
    return '—';
  }
}

/** "2026-12-02 00:41 UTC" for the review record. */
export function stampNow(date = new Date()) {
  const iso = date.toISOString();
  return { iso, text: `${iso.slice(0, 10)} ${iso.slice(11, 16)} UTC` };
}

export const VERDICT_WORDS = { pass: 'Pass', marginal: 'Marginal', fail: 'Fail' };
const VERDICT_MARKS = { pass: '✓', marginal: '!', fail: '✗' };

/**
 * What every calculator element does, so each widget file only says what is its own: its
 * fields, how its input object is made, which API function it calls and how its result is laid
 * out.
 *
 * A subclass defines `static spec` = {
 *   name,                  // 'linear': the embed's calc= name and the id prefix
 *   engine,                // the engine's `ready` promise (passed in so this module loads no wasm)
 *   groups,                // [{ title, fields: [defs] , rows?: { caption, rowWord, columns } }]
 *   page,                  // absolute URL of the calculator's full page (links point there)
 *   inputsLabel, resultsLabel, demoWords ('the demo rail'), subjectWords ('the rail')
 * }
 * and the methods run(api, values) → report (throws the API's errors), resultParts(report) →
 * nodes between the verdict and the record, and optionally skipField(field) (fields the current
 * choices do not use: not read, not sent) and beforeCompute() (mark or hide those fields).
 *
 * Its state is its attributes: each field has an attribute of the same name as its link key,
 * which prefills it and is kept up to date as the user types. With `sync-url` the same names are
 * the page's query keys, holding the raw typed text. `compact` folds long tables (embeds).
 * After every render the element sets data-state ("ready", "error", or "failed" when the engine
 * could not load) and dispatches a bubbling `railnote-result` CustomEvent whose detail is
 * { state, result } (result is null unless state is "ready").
 */
export class CalculatorElement extends HTMLElement {
  static get fieldDefs() {
    return this.spec.groups.flatMap((g) => g.fields);
  }

  static get observedAttributes() {
    return this.fieldDefs.map((d) => d.key);
  }

  constructor() {
    super();
    this.spec = this.constructor.spec;
    this.defs = this.constructor.fieldDefs;
    this.keys = this.defs.map((d) => d.key);
    this.built = false;
    this.api = null;
    this.fields = [];
    this.result = null;
    this.rows = {};
    this.reflecting = false;
    this.initial = new Map();
    this.listening = null;
  }

  connectedCallback() {
    if (!this.listening) this.listen();
    if (this.built) return;
    this.built = true;
    for (const d of this.defs) this.initial.set(d.key, this.hasAttribute(d.key) ? this.getAttribute(d.key) : d.def);
    this.dataset.state = 'loading';
    this.build();
    this.spec.engine.then(
      (api) => {
        this.api = api;
        this.restore();
        this.compute();
      },
      (err) => {
        this.dataset.state = 'failed';
        this.status.textContent = `The calculation engine could not load (${errorText(err)}). Reload the page; if it persists, the site's pkg/ folder is missing or damaged.`;
        this.dispatchEvent(new CustomEvent('railnote-result', { bubbles: true, detail: { state: 'failed', result: null } }));
      },
    );
  }

  attributeChangedCallback(name, _old, value) {
    if (this.reflecting || !this.built || !this.api) return;
    const f = this.fields.find((x) => x.def.key === name);
    if (!f) return;
    const text = value === null ? f.def.def : value;
    if (f.input.value !== text) {
      setFieldText(f, text);
      this.compute();
      if (this.urlState) this.urlState.write(this.texts());
    }
  }

  /**
   * The current text of every field, in field order, as it goes into links: empty optional
   * fields are left out when their default is empty too (a missing key restores as empty, so
   * the link means the same); an emptied field whose default is not empty stays, as key=.
   */
  texts() {
    return new Map(this.fields
      .filter((f) => !(f.def.optional && f.input.value === '' && this.initial.get(f.def.key) === ''))
      .map((f) => [f.def.key, f.input.value]));
  }

  build() {
    const prefix = uniquePrefix(`rn-${this.spec.name.slice(0, 3)}`);
    this.classList.add('rn-widget');
    const form = h('form', { class: 'rn-inputs', novalidate: true, 'aria-label': this.spec.inputsLabel });
    form.addEventListener('submit', (e) => e.preventDefault());
    for (const g of this.spec.groups) {
      const fs = h('fieldset', { class: 'rn-group', 'data-group': g.id || null }, h('legend', {}, g.title));
      if (g.note) fs.append(h('p', { class: 'rn-group-note' }, g.note));
      if (g.rows) {
        const { root, fields } = buildFieldRows(g.fields, prefix, g.rows);
        this.fields.push(...fields);
        // A long optional table can sit folded; it opens when it holds text or a message.
        if (g.folded) fs.append(h('details', { class: 'rn-fold' }, h('summary', {}, g.folded), root));
        else fs.append(root);
      } else {
        for (const d of g.fields) {
          const f = buildField(d, prefix);
          this.fields.push(f);
          fs.append(f.root);
        }
      }
      form.append(fs);
    }
    form.addEventListener('input', (e) => this.onEdit(e));
    form.addEventListener('change', (e) => this.onEdit(e));

    this.linkField = h('input', { type: 'text', readonly: true, class: 'rn-link-fallback', hidden: true, 'aria-label': 'Link to this check' });
    this.toolStatus = h('span', { class: 'rn-tool-status', role: 'status' });
    const tools = h('div', { class: 'rn-tools' },
      h('button', { type: 'button', class: 'rn-copy', on: { click: () => this.copyLink() } }, 'Copy link'),
      h('button', { type: 'button', class: 'rn-reset', on: { click: () => this.reset() } }, 'Reset to ' + (this.hasAnyInitialAttribute() ? 'the embedded values' : this.spec.demoWords)),
      this.toolStatus, this.linkField);

    this.status = h('p', { class: 'rn-status', text: 'Loading the calculation engine…' });
    this.announcer = createAnnouncer();
    this.results = h('section', { class: 'rn-results', 'aria-label': this.spec.resultsLabel });

    this.append(
      h('div', { class: 'rn-sheet' },
        h('div', { class: 'rn-sheet-inputs' }, form, tools),
        h('div', { class: 'rn-sheet-results' },
          // The results' own headings are h3: this h2 keeps the page's outline in order.
          h('h2', { class: 'rn-visually-hidden rn-results-heading' }, this.spec.resultsLabel),
          this.status, this.results)),
      this.announcer.region);
    if (this.hasAttribute('sync-url')) this.urlState = new UrlState(this.keys);
  }

  /** Window listeners live while the element is in the document. */
  listen() {
    this.listening = new AbortController();
    const { signal } = this.listening;
    // Redraw for a new column width (debounced), so the chart text keeps its size.
    let resizeTimer = null;
    window.addEventListener('resize', () => {
      clearTimeout(resizeTimer);
      resizeTimer = setTimeout(() => {
        if (this.result && this.chartWidth && Math.abs(this.columnWidth() - this.chartWidth) > 40) this.renderResult(this.result);
      }, 200);
    }, { signal });
    // Folded sections print open: a review record shows everything.
    window.addEventListener('beforeprint', () => {
      for (const d of this.querySelectorAll('details')) d.open = true;
    }, { signal });
  }

  disconnectedCallback() {
    if (this.listening) this.listening.abort();
    this.listening = null;
  }

  /**
   * The width to draw charts at: the results column, within 340–760 px, so chart text keeps its
   * 12 px on screen (an SVG scaled down from a fixed width would shrink its labels in embeds).
   */
  columnWidth() {
    const column = this.results.clientWidth || 640;
    return Math.round(Math.min(760, Math.max(340, column)));
  }

  hasAnyInitialAttribute() {
    return this.defs.some((d) => this.hasAttribute(d.key));
  }

  /** Fill the fields from attributes, then (with sync-url) from the page URL, exactly as given. */
  restore() {
    const fromUrl = this.urlState ? readQuery(this.keys) : new Map();
    for (const f of this.fields) {
      const k = f.def.key;
      setFieldText(f, fromUrl.has(k) ? fromUrl.get(k) : this.initial.get(k));
    }
    this.reflectAll();
    this.unfoldFilled();
  }

  /** Open a folded group that holds text, so nothing typed or linked is out of sight. */
  unfoldFilled() {
    for (const d of this.querySelectorAll('.rn-inputs details.rn-fold')) {
      if ([...d.querySelectorAll('input')].some((i) => i.value.trim() !== '')) d.open = true;
    }
  }

  reflectAll() {
    this.reflecting = true;
    for (const f of this.fields) this.setAttribute(f.def.key, f.input.value);
    this.reflecting = false;
  }

  onEdit(e) {
    // A text field has computed on each `input` already; its `change` on blur would only
    // recompute the same values and rebuild the results under a click that caused the blur
    // (a row, a link), losing that click.
    if (e.type === 'change' && e.target instanceof HTMLInputElement && e.target.type === 'text') return;
    const f = this.fields.find((x) => x.input === e.target);
    if (!f || !this.api) return;
    if (f.def.type === 'select' && f.input.value !== '') setFieldText(f, f.input.value);
    this.reflecting = true;
    this.setAttribute(f.def.key, f.input.value);
    this.reflecting = false;
    this.compute();
    if (this.urlState) this.urlState.write(this.texts());
  }

  reset() {
    for (const f of this.fields) {
      setFieldText(f, this.initial.get(f.def.key));
    }
    this.reflectAll();
    this.unfoldFilled();
    if (this.urlState) this.urlState.clear();
    this.compute();
    this.toolStatus.textContent = 'Reset.';
  }

  currentLink() {
    return shareLink(this.spec.page, this.texts());
  }

  async copyLink() {
    if (this.urlState) this.urlState.flush();
    const link = this.currentLink();
    const how = await copyText(link, this.linkField);
    this.toolStatus.textContent = how === 'copied'
      ? 'Link copied.'
      : 'Copying was refused here: the link is selected below, copy it with Ctrl+C (⌘C).';
  }

  /** The field with this link key. */
  fieldByKey(key) {
    return this.fields.find((f) => f.def.key === key);
  }

  beforeCompute() {}

  skipField() {
    return false;
  }

  compute() {
    const api = this.api;
    this.beforeCompute();
    // Each field's message is set once per compute (cleared where no message remains), so a
    // message that stays the same is not rewritten at every keystroke.
    const showMessages = (bad) => {
      const byField = new Map(bad.filter(([f]) => f));
      for (const f of this.fields) {
        const msg = byField.get(f) || null;
        setFieldMessage(f, msg);
        const fold = msg ? f.root.closest('details') : null;
        if (fold) fold.open = true;
      }
    };
    const { values, bad, rows } = parseFields(api, this.fields, { skip: (f) => this.skipField(f) });
    this.rows = rows;
    this.values = values;
    if (bad.length) {
      showMessages(bad);
      this.renderError(bad);
      return;
    }
    let result;
    try {
      result = this.run(api, values);
    } catch (err) {
      const f = err ? fieldForError(this.fields, err.field, rows) : null;
      const bad1 = [[f, errorText(err)]];
      showMessages(bad1);
      this.renderError(bad1);
      return;
    }
    showMessages([]);
    this.renderResult(result);
  }

  finish(state, result) {
    this.result = result;
    this.dataset.state = state;
    this.dispatchEvent(new CustomEvent('railnote-result', { bubbles: true, detail: { state, result } }));
  }

  renderError(bad) {
    this.status.textContent = '';
    const n = bad.length;
    const list = h('ul', { class: 'rn-error-list' });
    for (const [f, msg] of bad) {
      if (f) {
        list.append(h('li', {},
          h('button', { type: 'button', class: 'rn-linkish', on: { click: () => f.input.focus() } }, f.def.label),
          ': ', msg));
      } else list.append(h('li', {}, msg));
    }
    const subject = this.spec.subjectWords;
    this.results.replaceChildren(
      h('div', { class: 'rn-error-box' },
        h('p', { class: 'rn-error-head' }, n === 1 ? `One input needs fixing before ${subject} can be checked:` : `${n} inputs need fixing before ${subject} can be checked:`),
        list));
    this.announcer.announce(n === 1 ? `Input problem: ${bad[0][0] ? bad[0][0].def.label + ': ' : ''}${bad[0][1]}` : `${n} input problems.`);
    keyboardScrollable(this.results);
    this.finish('error', null);
  }

  fmt(v, kind, digits = 3) {
    return formatWith(this.api, v, kind, digits);
  }

  renderResult(r) {
    this.status.textContent = '';
    const word = VERDICT_WORDS[r.verdict] || String(r.verdict);
    const parts = [this.verdictBlock(r), ...this.resultParts(r), this.recordBlock()];
    this.results.replaceChildren(...parts.flat(Infinity).filter(Boolean));
    this.announcer.announce(`${word}. ${r.summary}`);
    keyboardScrollable(this.results);
    this.finish('ready', r);
  }

  verdictBlock(r) {
    return h('div', { class: `rn-verdict rn-verdict-${r.verdict}`, 'data-verdict': r.verdict },
      h('p', { class: 'rn-verdict-word' },
        h('span', { class: 'rn-verdict-mark', 'aria-hidden': 'true' }, VERDICT_MARKS[r.verdict] || ''),
        h('span', {}, VERDICT_WORDS[r.verdict] || String(r.verdict))),
      h('p', { class: 'rn-summary' }, r.summary));
  }

  /** The checks, each with its status in words, its title and its reason. */
  checksBlock(r) {
    const checks = h('ul', { class: 'rn-checks' });
    for (const c of r.checks || []) {
      checks.append(h('li', { class: `rn-check rn-status-${c.status}`, 'data-check': c.id },
        h('span', { class: 'rn-check-status' }, VERDICT_WORDS[c.status] || c.status),
        h('span', { class: 'rn-check-title' }, c.title),
        h('span', { class: 'rn-check-text' }, c.text)));
    }
    return h('section', { class: 'rn-block' }, h('h3', {}, 'Checks'), checks);
  }

  warningsBlock(r) {
    if (!r.warnings || !r.warnings.length) return null;
    return h('section', { class: 'rn-block rn-warnings' }, h('h3', {}, 'Warnings'),
      h('ul', {}, r.warnings.map((w) => h('li', {}, w))));
  }

  /** The record for a review: the link that reproduces the check, the date and the version. */
  recordBlock() {
    const stamp = stampNow();
    const link = this.currentLink();
    let version = '';
    try { version = this.api.version(); } catch { version = ''; }
    return h('footer', { class: 'rn-record' },
      h('p', {}, 'Link to this check: ', h('a', { href: link, class: 'rn-permalink' }, link)),
      h('p', {}, 'Computed ', h('time', { datetime: stamp.iso }, stamp.text),
        version ? ` with railnote ${version}` : '',
        '. First-order estimate: verify against the datasheet and by measurement.'),
      // Filled when the page prints (preparePrint): the date of the paper record.
      printedSlot());
  }
}

// ---- Offline: the service worker (site/sw.js) ----
// Every page that loads this module registers the site's service worker, which caches every site
// file so a hosted copy keeps working without a network. Only over http(s): a page opened from
// disk (file://, the single-file build) has no worker and needs none. The worker URL goes through
// the Trusted Types policy `railnote-sw`, the only policy the pages' CSP allows, which lets exactly
// that one URL through.
function registerServiceWorker() {
  if (!('serviceWorker' in navigator)) return;
  if (window.location.protocol !== 'https:' && window.location.protocol !== 'http:') return;
  const workerUrl = new URL('../sw.js', import.meta.url).href;
  let scriptUrl = workerUrl;
  if (window.trustedTypes && window.trustedTypes.createPolicy) {
    const policy = window.trustedTypes.createPolicy('railnote-sw', {
      createScriptURL(u) {
        if (u === workerUrl) return u;
        throw new TypeError(`railnote-sw lets only ${workerUrl} through, not ${String(u).slice(0, 200)}`);
      },
    });
    scriptUrl = policy.createScriptURL(workerUrl);
  }
  navigator.serviceWorker.register(scriptUrl, { updateViaCache: 'none' }).catch((err) => {
    console.warn(`railnote: offline use is not available (the service worker did not register: ${err && err.message ? err.message : err})`);
  });
}

// A page must keep working whatever happens here (a policy refused, a storage-less frame).
try {
  registerServiceWorker();
} catch (err) {
  console.warn(`railnote: offline use is not available (${err && err.message ? err.message : err})`);
}
