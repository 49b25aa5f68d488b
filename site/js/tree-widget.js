// <railnote-tree>: the whole power tree of a board, from its source through every rail to every
// load, in one element.
//
// Not a CalculatorElement: that base class has a fixed set of named fields, one link key each;
// a tree has any number of rails and loads, and its state is a document (tree-doc.js), kept as a
// local draft, exported as a file and shared as a compressed `#doc=` link. From common.js it uses
// h(), field messages' look, copyText, embed height and the announcer.
//
// State: `this.state` is the page state of tree-doc.js (the typed text of every cell). Every
// edit updates it, saves the draft (with the `draft` attribute, on the full page only: an embed
// must not overwrite the page's draft) and recomputes: docFromState parses each cell through the
// engine, checkTree computes, and the result is drawn. The page never computes.
// On load: a `#doc=` link wins (it is then kept as the draft and leaves the address bar, so a
// reload shows the edits, not the link again), else the draft, else the demo board.
//
// After every render the element sets data-state ("ready" | "error" | "failed") and keeps
// `.result` (checkTree's report, null on error) and `.doc` (the document sent).
import { ready } from './engine.js';
import {
  h, copyText, reportEmbedHeight, createAnnouncer, formatWith, stampNow, VERDICT_WORDS, keyboardScrollable, printedSlot,
} from './common.js';
import {
  demoState, stateFromDoc, docFromState, sanitizeState, importJson, exportJson, shareUrl, decodeDoc,
  codeFromHash, emptyRow, railUses, RAIL_KINDS, MAX_RAILS, MAX_LOADS, ESTIMATE_KEYS,
} from './tree-doc.js';
// The switching page's own field list (labels, units, link keys, starting values) for the parts
// of a rail estimated from them; importing it also defines <railnote-switching>, unused here.
import { FIELD_DEFS as SWITCHING_DEFS } from './switching-widget.js';

const DRAFT_KEY = 'railnote.tree.draft';
const SVG_NS = 'http://www.w3.org/2000/svg';
const PAGE = new URL('../tree.html', import.meta.url).href;
const CORNERS = [
  { value: '0', label: 'lowest source voltage' },
  { value: '1', label: 'nominal source voltage' },
  { value: '2', label: 'highest source voltage' },
];
const KIND_WORDS = { linear: 'linear regulator', switching: 'switching regulator', switch: 'plain switch' };

// Columns of each table: key (document key), heading, unit, engine kind (for the placeholder).
const SOURCE_COLUMNS = [
  { key: 'name', head: 'Name', unit: '' },
  { key: 'vMin', head: 'Lowest', unit: 'V' },
  { key: 'vNom', head: 'Nominal', unit: 'V' },
  { key: 'vMax', head: 'Highest', unit: 'V' },
  { key: 'capacityAh', head: 'Capacity', unit: 'Ah, mAh' },
  { key: 'capacityWh', head: 'or capacity', unit: 'Wh' },
  { key: 'currentLimitA', head: 'Current limit', unit: 'A' },
];
const RAIL_COLUMNS = [
  { key: 'name', head: 'Name', unit: '' },
  { key: 'parent', head: 'Fed from', unit: '' },
  { key: 'kind', head: 'Kind', unit: '' },
  { key: 'vout', head: 'Output', unit: 'V' },
  { key: 'efficiencyFrom', head: 'Efficiency from', unit: '', options: [['fixed', 'a fixed figure'], ['estimate', 'its parts (estimate)']] },
  { key: 'efficiencyPct', head: 'Efficiency', unit: '%' },
  { key: 'iq', head: 'Quiescent', unit: 'A' },
  { key: 'dropoutV', head: 'Dropout', unit: 'V' },
  { key: 'rOn', head: 'On-resistance', unit: 'Ω' },
  { key: 'thetaJa', head: 'θJA', unit: 'K/W' },
  { key: 'tjMax', head: 'Junction limit', unit: '°C' },
  { key: 'ratedA', head: 'Rated', unit: 'A' },
];
// A linear rail's further inputs of the linear rail check (blank: constant dropout, no extra
// ground current, exact output, no margins wanted).
const LINEAR_COLUMNS = [
  { key: 'dropoutModel', head: 'Dropout model', unit: '', options: [['constant', 'constant (bipolar)'], ['resistive', 'scales with load (MOS)'], ['classic', 'classic 2 V (common practice)']] },
  { key: 'dropoutAtA', head: 'Dropout rated at', unit: 'A' },
  { key: 'gndPct', head: 'Ground current', unit: '% of load' },
  { key: 'voutTolPct', head: 'Output tolerance', unit: '± %' },
  { key: 'headroomMarginV', head: 'Headroom margin', unit: 'V' },
  { key: 'thermalMarginC', head: 'Junction margin', unit: 'K' },
];
// A switching rail estimated from its parts: the switching page's fields for them.
const ESTIMATE_COLUMNS = SWITCHING_DEFS.filter((d) => d.prop in ESTIMATE_KEYS).map((d) => ({
  key: d.prop, head: d.label, unit: d.type === 'select' ? '' : d.unit, linkKey: d.key, def: d.def,
  options: d.type === 'select' ? d.options.map((o) => [o.value, o.label]) : undefined,
}));
const LOAD_COLUMNS = [
  { key: 'name', head: 'Name', unit: '' },
  { key: 'rail', head: 'On rail', unit: '' },
  { key: 'typA', head: 'Typical', unit: 'A' },
  { key: 'peakA', head: 'Peak', unit: 'A' },
  { key: 'typW', head: 'or typical', unit: 'W' },
  { key: 'peakW', head: 'or peak', unit: 'W' },
  { key: 'activityPct', head: 'Active', unit: '%' },
  { key: 'sleepA', head: 'Asleep', unit: 'A' },
];

function svg(tag, attrs = {}, ...children) {
  const node = document.createElementNS(SVG_NS, tag);
  for (const [k, v] of Object.entries(attrs)) if (v !== undefined && v !== null) node.setAttribute(k, String(v));
  for (const c of children.flat()) if (c !== null && c !== undefined) node.append(c instanceof Node ? c : document.createTextNode(String(c)));
  return node;
}

/** The rail (or load) a message of checkTree is about: `Rail "x": …` → ['rails', 'x']. */
function subjectOf(message) {
  const m = /^(Rail|Load) "((?:[^"\\]|\\.)*)"/.exec(message || '');
  return m ? [m[1] === 'Rail' ? 'rails' : 'loads', m[2]] : null;
}

/** Worst status of a list ('pass' < 'marginal' < 'fail'); null for none. */
function worst(statuses) {
  const rank = { pass: 0, marginal: 1, fail: 2 };
  let w = null;
  for (const s of statuses) if (w === null || rank[s] > rank[w]) w = s;
  return w;
}

export class TreeElement extends HTMLElement {
  connectedCallback() {
    if (this.built) return;
    this.built = true;
    this.corner = 1;
    this.result = null;
    this.doc = null;
    this.classList.add('rn-widget', 'rn-tree');
    this.announcer = createAnnouncer();
    this.buildShell();
    ready.then((api) => {
      this.api = api;
      return this.loadInitial();
    }).then(() => {
      if (this.closest('.rn-embed')) reportEmbedHeight('tree');
    }, (err) => {
      this.status.textContent = `The calculation engine could not load: ${err && err.message ? err.message : err}`;
      this.dataset.state = 'failed';
    });
  }

  buildShell() {
    this.status = h('p', { class: 'rn-status', text: 'Loading the calculation engine…' });
    this.toolStatus = h('p', { class: 'rn-tool-status', role: 'status' });
    this.linkField = h('input', { type: 'text', readonly: true, class: 'rn-link-fallback', hidden: true, 'aria-label': 'Share link of this tree' });
    this.fileInput = h('input', { type: 'file', accept: '.json,application/json', class: 'rn-visually-hidden', tabindex: '-1', 'aria-hidden': 'true',
      on: { change: () => this.importFile() } });
    this.pasteArea = h('textarea', { id: 'rn-tree-paste', rows: 4, cols: 60, spellcheck: 'false', 'aria-describedby': 'rn-tree-paste-msg' });
    this.pasteMsg = h('span', { class: 'rn-msg', id: 'rn-tree-paste-msg', role: 'status' });
    const button = (cls, text, fn) => h('button', { type: 'button', class: cls, on: { click: fn } }, text);
    const tools = h('div', { class: 'rn-tools rn-tree-tools' },
      button('rn-copy', 'Copy share link', () => this.copyShare()),
      button('rn-export', 'Export .json', () => this.exportFile()),
      button('rn-import', 'Import .json…', () => this.fileInput.click()),
      this.hasAttribute('draft') ? button('rn-discard', 'Discard draft', () => this.discardDraft()) : null,
      button('rn-reset', 'Reset to the demo board', () => this.resetDemo()),
      this.fileInput, this.toolStatus, this.linkField);
    const paste = h('details', { class: 'rn-fold rn-tree-paste' },
      h('summary', {}, 'Paste a tree document'),
      h('label', { for: 'rn-tree-paste', class: 'rn-label' }, 'Document text (JSON, as exported)'),
      this.pasteArea,
      h('p', {}, button('rn-paste-read', 'Open the pasted document', () => this.importPaste()), ' ', this.pasteMsg));
    this.tables = h('div', { class: 'rn-tree-tables' });
    this.cornerSelect = h('select', { id: 'rn-tree-corner', on: { change: () => { this.corner = Number(this.cornerSelect.value); if (this.result) this.renderResult(); } } },
      CORNERS.map((c) => h('option', { value: c.value, text: c.label })));
    this.cornerSelect.value = '1';
    this.results = h('section', { class: 'rn-results', 'aria-label': 'The tree computed' });
    this.append(
      h('form', { class: 'rn-inputs rn-tree-inputs', novalidate: true, 'aria-label': 'The tree', on: { submit: (e) => e.preventDefault() } },
        this.tables, tools, paste),
      h('p', { class: 'rn-tree-corner' }, h('label', { for: 'rn-tree-corner' }, 'Show the tree at the '), this.cornerSelect),
      h('h2', { class: 'rn-visually-hidden rn-results-heading' }, 'Results of the rail tree'),
      this.status, this.results, this.announcer.region);
  }

  async loadInitial() {
    const code = codeFromHash(window.location.hash);
    if (code !== null) {
      try {
        const doc = await decodeDoc(code);
        this.setState(stateFromDoc(doc));
        this.toolStatus.textContent = 'Opened the tree held in the link.';
        // The link's tree becomes the draft; the address bar drops the code so a reload shows edits.
        this.saveDraft();
        if (this.hasAttribute('draft')) window.history.replaceState(window.history.state, '', window.location.pathname + window.location.search);
        return;
      } catch (err) {
        this.toolStatus.textContent = `The link's tree could not be opened: ${err.message}. Showing ${this.hasAttribute('draft') && this.readDraft() ? 'your draft' : 'the demo board'} instead.`;
      }
    }
    const draft = this.hasAttribute('draft') ? this.readDraft() : null;
    if (draft) {
      this.setState(draft);
      if (!this.toolStatus.textContent) this.toolStatus.textContent = 'Your draft from this browser is back. “Discard draft” starts again from the demo board.';
    } else {
      this.setState(demoState());
    }
  }

  readDraft() {
    try {
      const text = window.localStorage.getItem(DRAFT_KEY);
      if (!text || text.length > 5_000_000) return null;
      const stored = JSON.parse(text);
      return stored && stored.v === 1 ? sanitizeState(stored.state) : null;
    } catch {
      return null;
    }
  }

  saveDraft() {
    if (!this.hasAttribute('draft')) return;
    try {
      window.localStorage.setItem(DRAFT_KEY, JSON.stringify({ v: 1, state: this.state }));
    } catch {
      this.toolStatus.textContent = 'This browser refused to keep a draft (storage full or disabled); export the tree to keep it.';
    }
  }

  discardDraft() {
    try { window.localStorage.removeItem(DRAFT_KEY); } catch { /* nothing kept */ }
    this.setState(demoState(), false);
    this.toolStatus.textContent = 'Draft discarded; this is the demo board.';
  }

  resetDemo() {
    this.setState(demoState());
    this.toolStatus.textContent = 'Reset to the demo board.';
  }

  /** Replace the whole state: rebuild the tables, save, compute. */
  setState(state, save = true) {
    this.state = state;
    this.buildTables();
    if (save) this.saveDraft();
    this.compute();
  }

  // ---- tables ----

  buildTables() {
    this.cells = new Map(); // path → { input, message, root }
    const s = this.state;
    const ambient = this.cellNode('taMax', s.taMax, { head: 'Hottest ambient', unit: '°C' }, 'Hottest ambient (°C)');
    const sourceTable = this.table('source', 'Source (exactly one)', SOURCE_COLUMNS, [s.source], 'sources', 'Source');
    const railTable = this.table('rails', 'Rails', RAIL_COLUMNS, s.rails, 'rails', 'Rail');
    const loadTable = this.table('loads', 'Loads', LOAD_COLUMNS, s.loads, 'loads', 'Load');
    const listMsg = (list) => {
      const m = h('p', { class: 'rn-msg rn-list-msg', 'data-list': list });
      this.cells.set(list, { input: null, message: m, root: m });
      return m;
    };
    this.tables.replaceChildren(
      h('fieldset', { class: 'rn-group' }, h('legend', {}, 'Source and ambient'), sourceTable, listMsg('sources'),
        h('div', { class: 'rn-tree-ambient' }, h('label', { for: 'rn-tree-taMax', class: 'rn-label' }, 'Hottest ambient, for every rail ', h('span', { class: 'rn-unit' }, '(°C)')), ambient)),
      h('fieldset', { class: 'rn-group' }, h('legend', {}, 'Rails'),
        h('p', { class: 'rn-group-note' }, 'Each rail is fed from the source or another rail, by name. Cells a kind does not use are marked “not used” and are not sent.'),
        railTable, listMsg('rails'),
        h('button', { type: 'button', class: 'rn-add-rail', on: { click: () => this.addRow('rails') } }, 'Add a rail'),
        this.detailTable('linear', 'Linear rails: the linear rail check’s further inputs', LINEAR_COLUMNS,
          (r) => r.kind === 'linear',
          'Blank cells: a constant dropout, no ground current beyond the quiescent one, an exact output and no margins wanted.'),
        this.detailTable('estimate', 'Switching rails estimated from their parts', ESTIMATE_COLUMNS,
          (r) => r.kind === 'switching' && r.efficiencyFrom === 'estimate',
          'Each rail whose efficiency comes from its parts goes through the switching estimate at the input and load the tree gives it. New rows start from the switching page’s demo parts: replace them with yours.')),
      h('fieldset', { class: 'rn-group' }, h('legend', {}, 'Loads'),
        h('p', { class: 'rn-group-note' }, 'A load draws a current or a power (give one pair). Active: the share of time at the typical draw; asleep: the draw the rest of the time.'),
        loadTable, listMsg('loads'),
        h('button', { type: 'button', class: 'rn-add-load', on: { click: () => this.addRow('loads') } }, 'Add a load')));
    this.markUnused();
  }

  /** The rails that `wanted` picks, with more of their cells (same paths as the rails table). */
  detailTable(id, caption, columns, wanted, note) {
    const picked = this.state.rails.map((r, i) => [r, i]).filter(([r]) => wanted(r));
    if (!picked.length) return null;
    const head = h('tr', {}, h('th', { scope: 'col' }, 'Rail'),
      columns.map((c) => h('th', { scope: 'col' }, c.head, c.unit ? h('span', { class: 'rn-unit' }, ` (${c.unit})`) : null)));
    const body = picked.map(([r, i]) => h('tr', { 'data-row': i },
      h('th', { scope: 'row' }, `${i + 1}: ${r.name || '(no name)'}`),
      columns.map((c) => h('td', {}, this.cellNode(`rails[${i}].${c.key}`, r[c.key], c, `Rail ${i + 1}: ${c.head}${c.unit ? ` (${c.unit})` : ''}`)))));
    return h('div', { class: 'rn-tree-detail', 'data-detail': id },
      h('p', { class: 'rn-group-note' }, h('strong', {}, caption)),
      h('p', { class: 'rn-group-note' }, note),
      h('div', { class: 'rn-table-scroll' },
        h('table', { class: 'rn-tree-table', 'data-table': id }, h('caption', { class: 'rn-visually-hidden' }, caption),
          h('thead', {}, head), h('tbody', {}, body))));
  }

  table(id, caption, columns, rows, list, rowWord) {
    const head = h('tr', {}, h('th', { scope: 'col' }, '#'),
      columns.map((c) => h('th', { scope: 'col' }, c.head, c.unit ? h('span', { class: 'rn-unit' }, ` (${c.unit})`) : null)),
      list === 'sources' ? null : h('th', { scope: 'col' }, h('span', { class: 'rn-visually-hidden' }, 'Remove')));
    const body = rows.map((row, i) => h('tr', { 'data-row': i },
      h('th', { scope: 'row' }, String(i + 1)),
      columns.map((c) => h('td', {}, this.cellNode(`${list}[${i}].${c.key}`, row[c.key], c, `${rowWord} ${i + 1}: ${c.head}${c.unit ? ` (${c.unit})` : ''}`))),
      list === 'sources' ? null : h('td', {}, h('button', {
        type: 'button', class: 'rn-remove', 'aria-label': `Remove ${rowWord.toLowerCase()} ${i + 1}`,
        on: { click: () => this.removeRow(list, i) },
      }, 'Remove'))));
    return h('div', { class: 'rn-table-scroll' },
      h('table', { class: 'rn-tree-table', 'data-table': id }, h('caption', { class: 'rn-visually-hidden' }, caption),
        h('thead', {}, head), h('tbody', {}, body)));
  }

  cellNode(path, text, column, label) {
    const id = `rn-tree-${path.replace(/[^\w]/g, '-')}`;
    const msgId = `${id}-msg`;
    let input;
    if (column.key === 'kind') {
      input = h('select', { id, 'data-path': path, 'aria-label': label, 'aria-describedby': msgId },
        RAIL_KINDS.map((k) => h('option', { value: k, text: KIND_WORDS[k] })));
      if (RAIL_KINDS.includes(text)) input.value = text;
      else {
        input.prepend(h('option', { value: '', text: '— choose —' }));
        input.value = '';
      }
    } else if (column.options) {
      // A choice; blank text shows (and means) the first option.
      input = h('select', { id, 'data-path': path, 'aria-label': label, 'aria-describedby': msgId },
        column.options.map(([value, words]) => h('option', { value, text: words })));
      if (column.options.some(([value]) => value === text)) input.value = text;
    } else {
      input = h('input', {
        id, type: 'text', autocomplete: 'off', spellcheck: 'false', 'data-path': path, 'aria-label': label,
        'aria-describedby': msgId, size: column.unit ? 7 : 14,
      });
      input.value = text || '';
    }
    input.addEventListener(input.tagName === 'SELECT' ? 'change' : 'input', () => this.onEdit(path, input.value));
    const message = h('span', { class: 'rn-msg', id: msgId });
    const root = h('span', { class: `rn-field rn-cell${column.unit ? '' : ' rn-text-cell'}`, 'data-path': path, 'data-key': path }, input, message);
    this.cells.set(path, { input, message, root });
    return root;
  }

  /** Cells a rail's kind does not use are disabled and said so in words. */
  markUnused() {
    this.state.rails.forEach((r, i) => {
      for (const c of RAIL_COLUMNS) {
        const cell = this.cells.get(`rails[${i}].${c.key}`);
        if (!cell || c.key === 'name' || c.key === 'parent' || c.key === 'kind') continue;
        const unused = !railUses(r, c.key);
        cell.input.disabled = unused;
        cell.input.placeholder = unused ? 'not used' : '';
        cell.root.classList.toggle('rn-unused', unused);
      }
    });
  }

  onEdit(path, value) {
    const m = /^(?:(rails|loads|sources)\[(\d+)\]\.(\w+)|taMax)$/.exec(path);
    if (!m) return;
    if (path === 'taMax') this.state.taMax = value;
    else if (m[1] === 'sources') this.state.source[m[3]] = value;
    else this.state[m[1]][Number(m[2])][m[3]] = value;
    if (m[1] === 'rails' && (m[3] === 'kind' || m[3] === 'efficiencyFrom')) {
      const rail = this.state.rails[Number(m[2])];
      // Parts start from the switching page's demo, so the estimate computes at once.
      if (railUses(rail, 'fsw')) for (const c of ESTIMATE_COLUMNS) if (!rail[c.key]) rail[c.key] = c.def || '';
      // The detail tables show other rows now; rebuild them and keep the focus where it was.
      this.buildTables();
      const cell = this.cells.get(path);
      if (cell && cell.input) cell.input.focus();
    }
    this.saveDraft();
    this.compute();
  }

  addRow(list) {
    const max = list === 'rails' ? MAX_RAILS : MAX_LOADS;
    if (this.state[list].length >= max) {
      this.toolStatus.textContent = `A tree holds at most ${max} ${list}.`;
      return;
    }
    this.state[list].push(emptyRow(list));
    this.buildTables();
    this.saveDraft();
    this.compute();
    const i = this.state[list].length - 1;
    this.cells.get(`${list}[${i}].name`).input.focus();
  }

  removeRow(list, i) {
    this.state[list].splice(i, 1);
    this.buildTables();
    this.saveDraft();
    this.compute();
    this.toolStatus.textContent = `${list === 'rails' ? 'Rail' : 'Load'} ${i + 1} removed.`;
  }

  // ---- computing ----

  /** The document the page state gives, with unused cells of each rail's kind left out. */
  currentDoc() {
    const state = { ...this.state, rails: this.state.rails.map((r) => {
      const copy = { ...r };
      for (const k of Object.keys(copy)) if (!railUses(r, k)) copy[k] = '';
      return copy;
    }) };
    return docFromState(state, (text, kind) => this.api.parseQuantity(text, kind));
  }

  compute() {
    if (!this.api) return;
    const { doc, errors } = this.currentDoc();
    this.doc = doc;
    if (errors.length) {
      this.renderErrors(errors);
      return;
    }
    let report;
    try {
      report = this.api.checkTree(doc);
    } catch (err) {
      this.renderErrors([{ field: err && typeof err.field === 'string' ? err.field : 'document', message: err && err.message ? err.message : 'the tree could not be checked' }]);
      return;
    }
    this.result = report;
    this.showMessages(new Map());
    this.renderResult();
  }

  /** Each cell's message set once per compute (a message that stays is not rewritten). */
  showMessages(byCell) {
    for (const cell of this.cells.values()) this.setMessage(cell, byCell.get(cell) || null);
  }

  setMessage(cell, text) {
    if (cell.message.textContent !== (text || '')) cell.message.textContent = text || '';
    if (cell.input) {
      cell.root.classList.toggle('rn-bad', Boolean(text));
      if (text) cell.input.setAttribute('aria-invalid', 'true');
      else cell.input.removeAttribute('aria-invalid');
    }
  }

  /** The cell an error belongs to: its path, or for a whole-list error the row its sentence names. */
  cellFor(field, message) {
    // checkTree names a rail's or load's value by its column (`rails.vout`) and the row in its
    // sentence (`Rail "3V3 LDO": …`); a whole-row problem by the list alone.
    const subject = subjectOf(message);
    const m = /^(rails|loads)(?:\.(\w+))?$/.exec(field || '');
    if (subject && m && subject[0] === m[1]) {
      const [list, name] = subject;
      const i = this.state[list].findIndex((r) => r.name.trim() === name);
      if (i >= 0) {
        const key = m[2] || (list === 'loads' ? (/rail/.test(message) ? 'rail' : 'name')
          : (/parent|cycle|feeds itself/.test(message) ? 'parent' : 'name'));
        const cell = this.cells.get(`${list}[${i}].${key}`);
        if (cell) return cell;
        return this.cells.get(`${list}[${i}].name`);
      }
    }
    if (this.cells.has(field)) return this.cells.get(field);
    const top = /^(\w+)/.exec(field || '');
    return top && this.cells.has(top[1]) ? this.cells.get(top[1]) : null;
  }

  renderErrors(errors) {
    this.result = null;
    this.status.textContent = '';
    const list = h('ul', { class: 'rn-error-list' });
    const byCell = new Map();
    for (const e of errors) {
      const cell = this.cellFor(e.field, e.message);
      if (cell) byCell.set(cell, e.message);
    }
    this.showMessages(byCell);
    for (const e of errors) {
      const cell = this.cellFor(e.field, e.message);
      const target = cell && cell.input;
      list.append(h('li', {}, target
        ? h('button', { type: 'button', class: 'rn-linkish', on: { click: () => target.focus() } }, target.getAttribute('aria-label'))
        : null, target ? ': ' : '', e.message));
    }
    const n = errors.length;
    this.results.replaceChildren(h('div', { class: 'rn-error-box' },
      h('p', { class: 'rn-error-head' }, n === 1 ? 'One thing needs fixing before the tree can be computed:' : `${n} things need fixing before the tree can be computed:`),
      list));
    const first = this.cellFor(errors[0].field, errors[0].message);
    const where = first && first.input ? ` at ${first.input.getAttribute('aria-label')}` : '';
    this.announcer.announce(n === 1 ? `Input problem${where}: ${errors[0].message}` : `${n} input problems; the first${where}: ${errors[0].message}`);
    this.finish('error');
  }

  finish(state) {
    this.dataset.state = state;
    this.dispatchEvent(new CustomEvent('railnote-result', { bubbles: true, detail: { state, result: this.result } }));
  }

  fmt(v, kind, digits = 3) {
    return formatWith(this.api, v, kind, digits);
  }

  /** Per rail (and the source), its checks and worst status. */
  railVerdicts(r) {
    const names = [this.doc.sources[0].name, ...this.doc.rails.map((x) => x.name)];
    const by = new Map(names.map((n) => [n, []]));
    for (const c of r.checks) if (by.has(c.rail)) by.get(c.rail).push(c);
    return by;
  }

  renderResult() {
    const r = this.result;
    const doc = this.doc;
    const k = this.corner;
    const c = r.corners[k];
    this.status.textContent = '';
    const verdicts = this.railVerdicts(r);
    const verdictWord = (name) => {
      const list = verdicts.get(name) || [];
      const w = worst(list.map((x) => x.status));
      return w ? (VERDICT_WORDS[w] || w) : 'no checks asked';
    };
    const word = VERDICT_WORDS[r.verdict] || r.verdict;
    const verdict = h('div', { class: `rn-verdict rn-verdict-${r.verdict}`, 'data-verdict': r.verdict },
      h('p', { class: 'rn-verdict-word' }, h('span', {}, word)),
      h('p', { class: 'rn-summary' }, r.summary),
      h('p', { class: 'rn-first-failure' }, r.firstFailure ? `First to fail: ${r.firstFailure}` : 'No rail fails a check.'));

    const fmtCases = (cases, kind) => `${this.fmt(cases.typ, kind)} typical · ${this.fmt(cases.peak, kind)} peak · ${this.fmt(cases.avg, kind)} average`;
    const totals = h('section', { class: 'rn-block rn-tree-totals' }, h('h3', {}, `Totals at ${CORNERS[k].label} (${this.fmt(c.vin, 'voltage')})`),
      h('dl', { class: 'rn-limits' },
        h('dt', {}, 'Source current'), h('dd', { 'data-out': 'sourceA' }, fmtCases(c.sourceA, 'current')),
        h('dt', {}, 'Source power'), h('dd', { 'data-out': 'sourceW' }, fmtCases(c.sourceW, 'power')),
        h('dt', {}, 'Power into the loads'), h('dd', { 'data-out': 'loadsW' }, fmtCases(c.loadsW, 'power')),
        h('dt', {}, 'Lost in the rails'), h('dd', { 'data-out': 'lossesW' }, fmtCases(c.lossesW, 'power')),
        h('dt', {}, 'End-to-end efficiency (average)'), h('dd', { 'data-out': 'efficiencyPct' }, this.fmt(c.efficiencyPct, 'percent')),
        h('dt', {}, 'Battery runtime (nominal voltage, average load)'),
        h('dd', { 'data-out': 'runtimeH' }, r.runtimeH === null || r.runtimeH === undefined ? 'no capacity given' : `${this.fmt(r.runtimeH, 'count', 3).replace(/\s*$/, '')} h (${this.fmt(r.runtimeH / 24, 'count', 3)} days)`)));

    const railRows = doc.rails.map((rail, i) => {
      const res = c.rails[i];
      return h('tr', { 'data-rail': i },
        h('th', { scope: 'row' }, rail.name),
        h('td', {}, KIND_WORDS[rail.kind]),
        h('td', { 'data-out': 'vin' }, this.fmt(res.vin, 'voltage')),
        h('td', { 'data-out': 'vout' }, this.fmt(res.vout, 'voltage')),
        h('td', { 'data-out': 'ioutPeak' }, this.fmt(res.ioutA.peak, 'current')),
        h('td', { 'data-out': 'ioutAvg' }, this.fmt(res.ioutA.avg, 'current')),
        h('td', { 'data-out': 'iinPeak' }, this.fmt(res.iinA.peak, 'current')),
        h('td', { 'data-out': 'lossPeak' }, this.fmt(res.lossW.peak, 'power')),
        h('td', { 'data-out': 'lossAvg' }, this.fmt(res.lossW.avg, 'power')),
        h('td', { 'data-out': 'verdict' }, verdictWord(rail.name)),
        h('td', {}, this.calculatorLink(rail, i)));
    });
    const railTable = h('section', { class: 'rn-block' }, h('h3', {}, 'Rails'),
      h('div', { class: 'rn-table-scroll' }, h('table', { class: 'rn-tree-out', 'data-out-table': 'rails' },
        h('caption', { class: 'rn-visually-hidden' }, `Rails at the ${CORNERS[k].label}`),
        h('thead', {}, h('tr', {}, ['Rail', 'Kind', 'Input', 'Output', 'Out, peak', 'Out, average', 'In, peak', 'Loss, peak', 'Loss, average', 'Verdict', 'Open in its calculator']
          .map((t) => h('th', { scope: 'col' }, t)))),
        h('tbody', {}, railRows))));
    const loadRows = doc.loads.map((load, i) => {
      const res = c.loads[i];
      return h('tr', { 'data-load': i },
        h('th', { scope: 'row' }, load.name),
        h('td', {}, load.rail),
        h('td', { 'data-out': 'v' }, this.fmt(res.v, 'voltage')),
        h('td', { 'data-out': 'iTyp' }, this.fmt(res.iA.typ, 'current')),
        h('td', { 'data-out': 'iPeak' }, this.fmt(res.iA.peak, 'current')),
        h('td', { 'data-out': 'iAvg' }, this.fmt(res.iA.avg, 'current')),
        h('td', { 'data-out': 'pAvg' }, this.fmt(res.pW.avg, 'power')));
    });
    const loadTable = h('section', { class: 'rn-block' }, h('h3', {}, 'Loads'),
      h('div', { class: 'rn-table-scroll' }, h('table', { class: 'rn-tree-out', 'data-out-table': 'loads' },
        h('caption', { class: 'rn-visually-hidden' }, `Loads at the ${CORNERS[k].label}`),
        h('thead', {}, h('tr', {}, ['Load', 'On', 'Voltage', 'Typical', 'Peak', 'Average', 'Power, average'].map((t) => h('th', { scope: 'col' }, t)))),
        h('tbody', {}, loadRows))));

    const checks = h('ul', { class: 'rn-checks' });
    for (const ch of r.checks) {
      checks.append(h('li', { class: `rn-check rn-status-${ch.status}`, 'data-check': ch.id },
        h('span', { class: 'rn-check-status' }, VERDICT_WORDS[ch.status] || ch.status),
        h('span', { class: 'rn-check-title' }, ch.title),
        h('span', { class: 'rn-check-text' }, ch.text)));
    }
    const stamp = stampNow();
    this.permalink = h('a', { class: 'rn-permalink', href: '#' }, 'making the link…');
    let version = '';
    try { version = this.api.version(); } catch { version = ''; }
    const record = h('footer', { class: 'rn-record' },
      h('p', {}, 'Link to this tree: ', this.permalink),
      h('p', {}, 'Computed ', h('time', { datetime: stamp.iso }, stamp.text), version ? ` with railnote ${version}` : '',
        '. First-order estimate: verify against the datasheets and by measurement.'),
      printedSlot());
    const linkDoc = doc;
    shareUrl(PAGE, linkDoc).then((href) => {
      if (this.doc !== linkDoc) return;
      this.permalink.href = href;
      this.permalink.textContent = href.length > 120 ? `${href.slice(0, 100)}… (${href.length} characters)` : href;
    }, () => { this.permalink.textContent = 'this browser could not compress the link'; });

    this.results.replaceChildren(verdict,
      h('section', { class: 'rn-block' }, h('h3', {}, 'The tree'), this.diagram(r, verdictWord)),
      totals, railTable, loadTable,
      h('section', { class: 'rn-block' }, h('h3', {}, 'Checks'), checks), record);
    keyboardScrollable(this.results);
    this.announcer.announce(`${word}. ${r.summary}`);
    this.finish('ready');
  }

  /** A link to a rail's own calculator page, prefilled with its numbers from the tree. */
  calculatorLink(rail, i) {
    const [lo, nom, hi] = this.result.corners.map((c) => c.rails[i]);
    const peak = Math.max(lo.ioutA.peak, nom.ioutA.peak, hi.ioutA.peak);
    const p = new URLSearchParams();
    const put = (key, v) => { if (v !== undefined && v !== null) p.set(key, String(v)); };
    let page;
    if (rail.kind === 'linear') {
      page = 'linear.html';
      put('vin-min', lo.vin); put('vin-nom', nom.vin); put('vin-max', hi.vin);
      put('vout', rail.vout);
      put('iout-max', peak); put('iout-typ', nom.ioutA.typ);
      // What the tree checked with: blank details are the tree's defaults, sent as such.
      const or = (v, d) => (v === undefined ? d : v);
      put('dropout-model', or(rail.dropoutModel, 'constant')); put('dropout', or(rail.dropoutV, 0));
      put('dropout-at', rail.dropoutAtA);
      put('iq', or(rail.iq, 0)); put('gnd', or(rail.gndPct, 0)); put('vout-tol', or(rail.voutTolPct, 0));
      put('headroom-margin', or(rail.headroomMarginV, 0)); put('thermal-margin', or(rail.thermalMarginC, 0));
      put('rated', rail.ratedA); put('theta-ja', rail.thetaJa);
      put('ta-max', this.doc.taMax); put('tj-max', rail.tjMax);
    } else if (rail.kind === 'switching') {
      page = 'switching.html';
      put('vin-min', lo.vin); put('vin-nom', nom.vin); put('vin-max', hi.vin);
      put('vout', rail.vout); put('iout', peak);
      // A rail estimated from its parts takes them along (the tree wants L, not a ripple ratio).
      if (rail.efficiencyFrom === 'estimate') {
        put('iq', rail.iq === undefined ? 0 : rail.iq);
        for (const c of ESTIMATE_COLUMNS) put(c.linkKey, rail[c.key]);
        p.set('ripple-ratio', '');
      }
    } else {
      return h('span', { class: 'rn-note' }, 'a plain switch: its drop is I·R_on, no calculator page');
    }
    return h('a', { href: `${page}?${p}`, class: 'rn-rail-link', 'data-rail-link': i, target: this.closest('.rn-embed') ? '_blank' : null },
      rail.kind === 'linear' ? `Check ${rail.name} in the linear rail check` : `Estimate ${rail.name} in the switching estimate`);
  }

  /** The tree drawn left to right: source → rails → loads, edges labelled with their currents. */
  diagram(r, verdictWord) {
    const doc = this.doc;
    const c = r.corners[this.corner];
    const source = doc.sources[0].name;
    const children = new Map([[source, []]]);
    doc.rails.forEach((rail) => children.set(rail.name, []));
    doc.rails.forEach((rail, i) => children.get(rail.parent).push({ type: 'rail', i, name: rail.name }));
    doc.loads.forEach((load, i) => children.get(load.rail).push({ type: 'load', i, name: load.name }));
    // Node width, height, column pitch (room for two label lines of an edge), row pitch, margin.
    const W = 184; const H = 58; const COL = 306; const ROW = 78; const PAD = 12;
    const nodes = [];
    let row = 0;
    let maxDepth = 0;
    const place = (item, depth) => {
      maxDepth = Math.max(maxDepth, depth);
      const kids = item.type === 'load' ? [] : children.get(item.name);
      const placed = kids.map((kid) => place(kid, depth + 1));
      let y;
      if (placed.length) y = (placed[0].y + placed[placed.length - 1].y) / 2;
      else { y = row * ROW; row += 1; }
      const node = { ...item, depth, x: PAD + depth * COL, y: PAD + y, kids: placed };
      nodes.push(node);
      return { ...node, y: y };
    };
    const root = place({ type: 'source', name: source }, 0);
    const width = PAD * 2 + maxDepth * COL + W;
    const height = PAD * 2 + Math.max(1, row) * ROW - (ROW - H);
    const byKey = new Map(nodes.map((n) => [`${n.type}:${n.name}:${n.i}`, n]));
    const g = svg('svg', {
      class: 'rn-tree-diagram', width, height, viewBox: `0 0 ${width} ${height}`, role: 'img',
      'aria-label': `Tree diagram at the ${CORNERS[this.corner].label}: ${doc.rails.length} rails, ${doc.loads.length} loads, fed from ${source}`,
    });
    const text = (x, y, cls, s) => svg('text', { x, y, class: cls }, s);
    for (const n of nodes) {
      for (const kid of n.kids) {
        const child = byKey.get(`${kid.type}:${kid.name}:${kid.i}`);
        const x1 = n.x + W; const y1 = n.y + H / 2; const x2 = child.x; const y2 = child.y + H / 2; const xm = x1 + 18;
        g.append(svg('path', { class: 'rn-tree-edge', d: `M${x1} ${y1} H${xm} V${y2} H${x2}` }));
        const cur = child.type === 'rail' ? c.rails[child.i].iinA : c.loads[child.i].iA;
        // Peak above the line, average below it, in the gap before the child.
        g.append(svg('text', { class: 'rn-tree-edge-label', 'data-edge': `${child.type}:${child.i}` },
          svg('tspan', { x: xm + 6, y: y2 - 5 }, `${this.fmt(cur.peak, 'current')} peak`),
          svg('tspan', { x: xm + 6, y: y2 + 14 }, `${this.fmt(cur.avg, 'current')} avg`)));
      }
      const cls = n.type === 'rail' ? `rn-tree-node rn-tree-rail rn-status-${worst((this.railVerdicts(r).get(n.name) || []).map((x) => x.status)) || 'none'}` : `rn-tree-node rn-tree-${n.type}`;
      const lines = [];
      if (n.type === 'source') lines.push(`${this.fmt(c.vin, 'voltage')} · ${this.fmt(c.sourceW.avg, 'power')} avg`, `verdict: ${verdictWord(n.name)}`);
      else if (n.type === 'rail') {
        const res = c.rails[n.i];
        lines.push(`${this.fmt(res.vout, 'voltage')} · loss ${this.fmt(res.lossW.peak, 'power')} peak`, `${KIND_WORDS[doc.rails[n.i].kind]} · ${verdictWord(n.name)}`);
      } else {
        const res = c.loads[n.i];
        lines.push(`${this.fmt(res.pW.avg, 'power')} average`, `${this.fmt(res.iA.typ, 'current')} typical`);
      }
      const short = (s, n = 28) => (s.length > n ? `${s.slice(0, n - 1)}…` : s);
      g.append(svg('g', { class: cls, 'data-node': n.type, 'data-name': n.name },
        svg('title', {}, n.name),
        svg('rect', { x: n.x, y: n.y, width: W, height: H, rx: n.type === 'load' ? 14 : 3 }),
        text(n.x + 8, n.y + 17, 'rn-tree-name', short(n.name, 24)),
        text(n.x + 8, n.y + 34, 'rn-tree-line', short(lines[0])),
        text(n.x + 8, n.y + 50, 'rn-tree-line', short(lines[1]))));
    }
    void root;
    return h('div', { class: 'rn-table-scroll rn-tree-figure' }, g);
  }

  // ---- saving and sharing ----

  async copyShare() {
    if (!this.doc) return;
    const { doc, errors } = this.currentDoc();
    if (errors.length) {
      this.toolStatus.textContent = 'Fix the cells with messages first: a link holds numbers only.';
      return;
    }
    const link = await shareUrl(PAGE, doc);
    this.lastShare = link;
    const how = await copyText(link, this.linkField);
    this.toolStatus.textContent = how === 'copied'
      ? `Share link copied (${link.length} characters).`
      : 'Copying was refused here: the link is selected below, copy it with Ctrl+C (⌘C).';
  }

  exportFile() {
    const { doc, errors } = this.currentDoc();
    if (errors.length) {
      this.toolStatus.textContent = 'Fix the cells with messages first: the file holds numbers only.';
      return;
    }
    const blob = new Blob([exportJson(doc)], { type: 'application/json' });
    const a = h('a', { href: URL.createObjectURL(blob), download: 'rail-tree.json' });
    document.body.append(a);
    a.click();
    a.remove();
    setTimeout(() => URL.revokeObjectURL(a.href), 1000);
    this.toolStatus.textContent = 'Exported rail-tree.json.';
  }

  openDoc(text, where) {
    try {
      const doc = importJson(text);
      this.setState(stateFromDoc(doc));
      return `Opened the ${where}.`;
    } catch (err) {
      return `The ${where} could not be opened: ${err.message}`;
    }
  }

  importFile() {
    const file = this.fileInput.files && this.fileInput.files[0];
    if (!file) return;
    if (file.size > 1_000_000) {
      this.toolStatus.textContent = `The file could not be opened: it holds ${file.size} bytes, more than a tree document may (1 000 000).`;
      this.fileInput.value = '';
      return;
    }
    file.text().then((text) => {
      this.toolStatus.textContent = this.openDoc(text, 'file');
      this.fileInput.value = '';
    });
  }

  importPaste() {
    const said = this.openDoc(this.pasteArea.value, 'pasted document');
    this.pasteMsg.textContent = said;
    this.toolStatus.textContent = said;
    if (said.startsWith('Opened')) this.pasteArea.value = '';
  }
}

customElements.define('railnote-tree', TreeElement);
