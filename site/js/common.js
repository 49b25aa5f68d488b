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
  const message = h('span', { class: 'rn-msg', id: msgId, role: 'status' });
  const root = h('div', { class: 'rn-field', 'data-key': def.key }, label, control, note, message);
  return { def, root, input, message };
}

/** Show (or, with null, clear) the message at a field. */
export function setFieldMessage(field, text) {
  field.message.textContent = text || '';
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
 * Read each field's text and turn it into a number through the WASM parser.
 * Selects must hold one of their options. Empty optional fields are left out (undefined).
 * Returns { values: {prop: number|string}, bad: [[field, message]] }.
 */
export function parseFields(api, fields) {
  const values = {};
  const bad = [];
  for (const f of fields) {
    const { def } = f;
    const text = f.input.value;
    if (def.type === 'select') {
      if (def.options.some((o) => o.value === text)) values[def.prop] = text;
      else bad.push([f, 'choose one of the listed models.']);
      continue;
    }
    if (def.optional && text.trim() === '') continue;
    try {
      values[def.prop] = api.parseQuantity(text, def.kind);
    } catch (err) {
      bad.push([f, errorText(err)]);
    }
  }
  return { values, bad };
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

/** A link to `pagePath` (resolved against the site root) holding these texts as query keys. */
export function shareLink(pageUrl, texts, extra = {}) {
  const url = new URL(pageUrl);
  const params = new URLSearchParams();
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
