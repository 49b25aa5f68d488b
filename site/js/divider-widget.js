// <railnote-divider>: the divider picker as a custom element.
//
// Three modes: a feedback divider found from the standard value series for a wanted output, the
// output and spread of two given resistors (reverse), and an enable / undervoltage threshold
// divider found for wanted start and stop voltages. Two feedback topologies: the reference at a
// ground-referenced feedback pin, or between the output and an adjust pin.
//
// Its attributes are the link keys (mode, vref, vout-target, series-top, pick, …); with `sync-url`
// they are the page's query keys too; `compact` folds the contribution table (embeds). data-state
// and the `railnote-result` event are as for every railnote element (common.js,
// CalculatorElement). Choosing a row of the candidate table sets `pick` (the rank, from 1), so a
// link reproduces the candidate shown in detail, and its Monte Carlo run (seeded).
//
// The numbers all come from the WASM API (checkDivider, formatQuantity, parseQuantity); this
// file lays them out, sorts the already computed rows of a table on request, and never computes
// them.
import { ready } from './engine.js';
import {
  h, formatWith, setFieldText, CalculatorElement, VERDICT_WORDS,
} from './common.js';
import { renderHistogram, renderRangeBars } from './chart.js';

const MODES = [
  { value: 'feedback', label: 'Feedback divider for an output voltage' },
  { value: 'reverse', label: 'Two given resistors: output and spread' },
  { value: 'threshold', label: 'Enable / undervoltage threshold divider' },
];

const TOPOLOGIES = [
  { value: 'feedback', label: 'Reference at a feedback pin, to ground (FB)' },
  { value: 'adjust', label: 'Reference between the output and an adjust pin (ADJ)' },
];

const SERIES = ['E3', 'E6', 'E12', 'E24', 'E48', 'E96', 'E192'].map((v) => ({ value: v, label: `${v} (IEC 60063)` }));

const DISTRIBUTIONS = [
  { value: 'normal', label: 'normal, tolerance = 3σ, cut at 3σ' },
  { value: 'uniform', label: 'uniform across the tolerance' },
];

// Which modes use a field: feedback (F), reverse (R), threshold (T).
const F = ['feedback'];
const R = ['reverse'];
const T = ['threshold'];
const FR = ['feedback', 'reverse'];
const FT = ['feedback', 'threshold'];

/**
 * The fields, in groups. key = attribute and URL query name; prop = the checkDivider input key;
 * kind = the parseQuantity kind; modes = the modes that read the field (the others neither show
 * nor send it). def = default text: the brief's invented soil-moisture logger, its 3.3 V rail set
 * by an invented regulator with a 0.800 V ±1 % reference and up to ±50 nA at its feedback pin,
 * E24 1 % 100 ppm/K resistors, −20 to 60 °C; its threshold divider starts the board from the
 * 12 V lead-acid battery at 12.0 V and stops it at 10.8 V, through an invented enable pin
 * (1.20 V rising, 1.15 V falling, ±1 %, sourcing 1 µA once on). Two given resistors: the
 * exact E24 pair for 3.3 V, 75 kΩ over 24 kΩ.
 */
export const GROUPS = [
  {
    id: 'mode',
    title: 'What to find',
    fields: [
      { key: 'mode', prop: 'mode', type: 'select', options: MODES, label: 'Mode', def: 'feedback',
        choiceMessage: 'choose one of the listed modes.' },
      { key: 'topology', prop: 'topology', type: 'select', options: TOPOLOGIES, label: 'Where the reference sits', def: 'feedback',
        modes: FR, choiceMessage: 'choose one of the listed topologies.',
        note: 'The sketch with the results shows which resistor is which.' },
    ],
  },
  {
    id: 'reference',
    title: 'Regulator reference',
    fields: [
      { key: 'vref', prop: 'vref', kind: 'voltage', unit: 'V', label: 'Reference voltage', sym: ['V', 'ref'], def: '0.800 V', modes: FR },
      { key: 'vref-tol', prop: 'vrefTolPct', kind: 'percent', unit: '± %', label: 'Reference tolerance', def: '1 %', modes: FR },
      { key: 'pin-current-min', prop: 'pinCurrentMin', kind: 'current', unit: 'A', label: 'Pin current, lowest', sym: ['I', 'pin,min'], def: '-50 nA', modes: FR,
        note: 'Positive flows from the divider into the pin.' },
      { key: 'pin-current-max', prop: 'pinCurrentMax', kind: 'current', unit: 'A', label: 'Pin current, highest', sym: ['I', 'pin,max'], def: '50 nA', modes: FR },
    ],
  },
  {
    id: 'enable',
    title: 'Enable pin',
    fields: [
      { key: 'pin-rise', prop: 'pinRise', kind: 'voltage', unit: 'V', label: 'Pin threshold, rising', sym: ['V', 'on'], def: '1.20 V', modes: T },
      { key: 'pin-fall', prop: 'pinFall', kind: 'voltage', unit: 'V', label: 'Pin threshold, falling', sym: ['V', 'off'], def: '1.15 V', modes: T },
      { key: 'pin-tol', prop: 'pinTolPct', kind: 'percent', unit: '± %', label: 'Threshold tolerance', def: '1 %', modes: T },
      { key: 'current-off', prop: 'currentOff', kind: 'current', unit: 'A', label: 'Pin current while off', def: '0.1 µA', modes: T,
        note: 'Positive flows into the pin.' },
      { key: 'current-on', prop: 'currentOn', kind: 'current', unit: 'A', label: 'Pin current while on', def: '-1 µA', modes: T,
        note: 'Negative: the pin sources a hysteresis current once on.' },
      { key: 'current-tol', prop: 'currentTolPct', kind: 'percent', unit: '± %', label: 'Pin current tolerance', def: '10 %', modes: T },
    ],
  },
  {
    id: 'wanted',
    title: 'Wanted result',
    fields: [
      { key: 'vout-target', prop: 'voutTarget', kind: 'voltage', unit: 'V', label: 'Output voltage', sym: ['V', 'out'], def: '3.3 V', modes: FR,
        note: 'With two given resistors it only centres the window: leave it empty to centre on their nominal output.' },
      { key: 'v-start', prop: 'vStart', kind: 'voltage', unit: 'V', label: 'Input that starts the part (rising)', sym: ['V', 'start'], def: '12.0 V', modes: T },
      { key: 'v-stop', prop: 'vStop', kind: 'voltage', unit: 'V', label: 'Input that stops it (falling)', sym: ['V', 'stop'], def: '10.8 V', modes: T },
      { key: 'window', prop: 'windowPct', kind: 'percent', unit: '± %', label: 'Window around the target', def: '3 %', optional: true,
        note: 'Or give the window’s edges below (feedback and reverse).' },
      { key: 'vout-min', prop: 'voutMin', kind: 'voltage', unit: 'V', label: 'Window, lowest output', def: '', modes: FR, optional: true },
      { key: 'vout-max', prop: 'voutMax', kind: 'voltage', unit: 'V', label: 'Window, highest output', def: '', modes: FR, optional: true },
    ],
  },
  {
    id: 'given',
    title: 'Given resistors',
    fields: [
      { key: 'r-top', prop: 'rTop', kind: 'resistance', unit: 'Ω', label: 'Upper resistor', sym: ['R', 'top'], def: '75 kΩ', modes: R },
      { key: 'r-bottom', prop: 'rBottom', kind: 'resistance', unit: 'Ω', label: 'Lower resistor', sym: ['R', 'bot'], def: '24 kΩ', modes: R },
    ],
  },
  {
    id: 'resistors',
    title: 'Resistors',
    fields: [
      { key: 'series-top', prop: 'seriesTop', type: 'select', options: SERIES, label: 'Series of the upper resistor', def: 'E24', modes: FT,
        choiceMessage: 'choose one of the listed series.' },
      { key: 'series-bottom', prop: 'seriesBottom', type: 'select', options: SERIES, label: 'Series of the lower resistor', def: 'E24', modes: FT,
        choiceMessage: 'choose one of the listed series.' },
      { key: 'tol-top', prop: 'tolTopPct', kind: 'percent', unit: '± %', label: 'Tolerance, upper', def: '1 %' },
      { key: 'tol-bottom', prop: 'tolBottomPct', kind: 'percent', unit: '± %', label: 'Tolerance, lower', def: '1 %' },
      { key: 'tcr-top', prop: 'tcrTopPpm', kind: 'tempco', unit: '± ppm/K', label: 'Temperature coefficient, upper', def: '100 ppm/K' },
      { key: 'tcr-bottom', prop: 'tcrBottomPpm', kind: 'tempco', unit: '± ppm/K', label: 'Temperature coefficient, lower', def: '100 ppm/K' },
      { key: 'temp-min', prop: 'tempMin', kind: 'temperature', unit: '°C', label: 'Coldest operating temperature', sym: ['T', 'min'], def: '-20 °C' },
      { key: 'temp-max', prop: 'tempMax', kind: 'temperature', unit: '°C', label: 'Hottest operating temperature', sym: ['T', 'max'], def: '60 °C',
        note: 'Drift is counted from 25 °C to either end.' },
    ],
  },
  {
    id: 'search',
    title: 'Search',
    fields: [
      { key: 'r-min', prop: 'rMin', kind: 'resistance', unit: 'Ω', label: 'Smallest resistor', def: '1 kΩ', modes: FT },
      { key: 'r-max', prop: 'rMax', kind: 'resistance', unit: 'Ω', label: 'Largest resistor', def: '1 MΩ', modes: FT },
      { key: 'current-min', prop: 'currentMin', kind: 'current', unit: 'A', label: 'Divider current, at least', def: '10 µA', modes: FT,
        note: 'Feedback: the current through the resistor across the reference. Threshold: through the divider at the start voltage.' },
      { key: 'current-max', prop: 'currentMax', kind: 'current', unit: 'A', label: 'Divider current, at most', def: '1 mA', modes: FT },
      { key: 'limit', prop: 'limit', kind: 'count', unit: 'rows', label: 'Candidates listed', def: '10', optional: true, modes: FT,
        note: 'From 1 to 200; empty lists 25.' },
    ],
  },
  {
    id: 'detail',
    title: 'Detail and Monte Carlo',
    fields: [
      { key: 'pick', prop: 'pick', kind: 'count', unit: 'rank', label: 'Candidate shown in detail', def: '', optional: true,
        note: 'Its rank in the table (empty: the first). Choosing a row sets it; the checks and the verdict are that candidate’s.' },
      { key: 'mc-samples', prop: 'mcSamples', kind: 'count', unit: 'samples', label: 'Monte Carlo samples', def: '20000', modes: FR,
        note: '0 turns the Monte Carlo run off; at most 1 000 000.' },
      { key: 'mc-seed', prop: 'mcSeed', kind: 'count', unit: '', label: 'Seed', def: '1', modes: FR,
        note: 'The same seed gives the same samples, so a link gives the same numbers.' },
      { key: 'mc-distribution', prop: 'mcDistribution', type: 'select', options: DISTRIBUTIONS, label: 'How each part varies', def: 'normal', modes: FR,
        choiceMessage: 'choose one of the listed distributions.' },
    ],
  },
];

export const FIELD_DEFS = GROUPS.flatMap((g) => g.fields);

const FULL_PAGE = new URL('../divider.html', import.meta.url).href;

const SVG_NS = 'http://www.w3.org/2000/svg';
function svgEl(name, attrs = {}, text) {
  const node = document.createElementNS(SVG_NS, name);
  for (const [k, v] of Object.entries(attrs)) if (v !== undefined && v !== null) node.setAttribute(k, String(v));
  if (text !== undefined) node.textContent = text;
  return node;
}

/** Words for the corner each part takes at an extreme of the output. */
const END_WORDS = { low: 'at its low end', high: 'at its high end', min: 'at its lowest', max: 'at its highest' };
const FIT_WORDS = { in: 'in range', low: 'below range', high: 'above range' };

export class RailnoteDivider extends CalculatorElement {
  static spec = {
    name: 'divider',
    engine: ready,
    groups: GROUPS,
    page: FULL_PAGE,
    inputsLabel: 'Divider picker inputs',
    resultsLabel: 'Results of the divider picker',
    demoWords: 'the demo rail',
    subjectWords: 'the divider',
  };

  constructor() {
    super();
    // The sort order of each table survives re-renders: { column id, 'ascending'|'descending' }.
    this.sorts = { feedback: null, threshold: null };
    this.refocus = null;
  }

  modeNow() {
    const f = this.fieldByKey('mode');
    return f ? f.input.value : 'feedback';
  }

  topologyNow() {
    return this.fieldByKey('topology').input.value === 'adjust' ? 'adjust' : 'feedback';
  }

  /** Whether the chosen mode uses a field (an unknown mode shows everything, with its message). */
  usedByMode(f) {
    const modes = f.def.modes;
    const mode = this.modeNow();
    if (!modes || !MODES.some((m) => m.value === mode)) return true;
    return modes.includes(mode);
  }

  /** A field the chosen mode does not use is not read and not sent. */
  skipField(f) {
    // Two given resistors need no target: an empty one is left out (the window centres on their output).
    if (f.def.key === 'vout-target' && this.modeNow() === 'reverse' && f.input.value.trim() === '') return true;
    return !this.usedByMode(f);
  }

  /** Show only the fields (and groups) the chosen mode uses; hidden ones keep their text for links. */
  beforeCompute() {
    for (const f of this.fields) f.root.hidden = !this.usedByMode(f);
    for (const fs of this.querySelectorAll('.rn-inputs fieldset.rn-group')) {
      fs.hidden = ![...fs.querySelectorAll('.rn-field')].some((el) => !el.hidden);
    }
  }

  run(api, values) {
    const input = { ...values };
    // The page counts ranks from 1, as the table shows them; the API indexes from 0.
    if (input.pick !== undefined) {
      if (input.pick < 1) {
        const err = new Error('ranks start at 1: type a rank from the table, or leave it empty for the first.');
        err.field = 'pick';
        throw err;
      }
      input.pick -= 1;
    }
    return api.checkDivider(input);
  }

  renderResult(r) {
    super.renderResult(r);
    // A row chosen from the keyboard is rebuilt by the render: give its radio the focus back.
    if (this.refocus) {
      const { table, index } = this.refocus;
      this.refocus = null;
      const target = this.querySelector(`table[data-table="${table}"] input[data-index="${index}"]`);
      if (target) target.focus();
    }
  }

  resultParts(r) {
    const parts = [this.checksBlock(r), this.warningsBlock(r), this.sketchBlock(r)];
    if (r.mode === 'threshold') {
      parts.push(this.thresholdBlock(r));
    } else {
      parts.push(this.candidatesBlock(r), this.detailBlock(r), this.monteCarloBlock(r));
    }
    return parts;
  }

  /**
   * Names of the two resistors in the words of the result: R_top and R_bot in every topology
   * (with the adjust pin, R1 and R2 as well, as the sketch shows).
   */
  names(r) {
    if (r.mode !== 'threshold' && this.topologyNow() === 'adjust') return { topShort: 'R_top (R1)', bottomShort: 'R_bot (R2)' };
    return { topShort: 'R_top', bottomShort: 'R_bot' };
  }

  /**
   * A nominal error in percent. An exact ratio (75 k / 24 k for 3.3 V from 0.8 V) leaves a
   * rounding residue of about 1e-14 %; below a billionth of a percent the error is shown as the
   * formatter's zero rather than as that residue.
   */
  fmtError(v) {
    return this.fmt(Math.abs(v) < 1e-9 ? 0 : v, 'percent', 3);
  }

  pickedCandidate(r) {
    if (r.mode === 'threshold') {
      const t = r.threshold;
      return t && t.candidates && t.candidates.length ? t.candidates[r.pick] || t.candidates[0] : null;
    }
    return r.candidates && r.candidates.length ? r.candidates[r.pick] || r.candidates[0] : null;
  }

  // ---- the sketch ----

  sketchBlock(r) {
    const mode = r.mode;
    const topo = mode === 'threshold' ? 'threshold' : this.topologyNow();
    const c = this.pickedCandidate(r);
    const fmtR = (v) => (c ? this.fmt(v, 'resistance', 3) : '');
    const x = 200; // the divider's vertical line
    const svg = svgEl('svg', { viewBox: '0 0 420 250', role: 'img', class: 'rn-sketch', 'data-topology': topo,
      'aria-label': topo === 'adjust' ? 'Sketch: R_top (R1) from the output to the adjust pin, R_bot (R2) from the adjust pin to ground; the reference sits across R_top'
        : topo === 'threshold' ? 'Sketch: R_top from the input to the enable pin, R_bot from the enable pin to ground'
          : 'Sketch: R_top from the output to the feedback pin, R_bot from the feedback pin to ground; the reference sits across R_bot' });
    const wire = (x1, y1, x2, y2) => svg.append(svgEl('line', { class: 'rn-sk-wire', x1, y1, x2, y2 }));
    // A symbol with a subscript (V_out, R_top) as one text element with a lowered tspan.
    const label = (tx, ty, main, sub, anchor = 'start', cls = 'rn-sk-name') => {
      const t = svgEl('text', { class: cls, x: tx, y: ty, 'text-anchor': anchor }, main);
      if (sub) t.append(svgEl('tspan', { class: 'rn-sk-sub', dy: 4 }, sub));
      svg.append(t);
    };
    const text = (tx, ty, words, anchor = 'start', cls = 'rn-sk-text') => svg.append(svgEl('text', { class: cls, x: tx, y: ty, 'text-anchor': anchor }, words));
    const resistor = (y0, sub, alias, value) => {
      svg.append(svgEl('rect', { class: 'rn-sk-part', x: x - 9, y: y0, width: 18, height: 52 }));
      label(x + 18, y0 + 20, 'R', sub);
      if (alias) text(x + 50, y0 + 20, alias);
      if (value) text(x + 18, y0 + 41, value, 'start', 'rn-sk-value');
    };
    // The top rail: the output (or the input of a threshold divider).
    wire(x - 56, 24, x, 24);
    svg.append(svgEl('circle', { class: 'rn-sk-node', cx: x - 56, cy: 24, r: 3.5 }));
    label(x - 64, 28, 'V', topo === 'threshold' ? 'in' : 'out', 'end');
    wire(x, 24, x, 44);
    resistor(44, 'top', topo === 'adjust' ? '(R1)' : '', c ? fmtR(c.rTop) : '');
    wire(x, 96, x, 152);
    svg.append(svgEl('circle', { class: 'rn-sk-node', cx: x, cy: 124, r: 3.5 }));
    resistor(152, 'bot', topo === 'adjust' ? '(R2)' : '', c ? fmtR(c.rBottom) : '');
    wire(x, 204, x, 220);
    // Ground: three shortening bars.
    wire(x - 14, 220, x + 14, 220);
    wire(x - 9, 225, x + 9, 225);
    wire(x - 4, 230, x + 4, 230);
    text(x + 20, 230, 'GND');
    // The pin, on a dashed box standing for the part.
    const pinName = topo === 'adjust' ? 'ADJ' : topo === 'threshold' ? 'EN' : 'FB';
    wire(x, 124, 112, 124);
    svg.append(svgEl('rect', { class: 'rn-sk-chip', x: 22, y: 102, width: 90, height: 44 }));
    text(67, 122, pinName, 'middle', 'rn-sk-name');
    text(67, 139, 'pin', 'middle', 'rn-sk-text');
    // The pin current, drawn in its positive direction: from the divider node into the pin.
    svg.append(svgEl('path', { class: 'rn-sk-arrow', d: 'M170 114 H124 M131 109 L124 114 L131 119' }));
    label(148, 106, 'I', topo === 'threshold' ? 'pin' : topo === 'adjust' ? 'adj' : 'fb', 'middle', 'rn-sk-text');
    // Where the reference sits: a bracket beside the resistor that carries it.
    const bx = x + 120;
    if (topo === 'feedback') {
      svg.append(svgEl('path', { class: 'rn-sk-bracket', d: `M${bx - 6} 124 H${bx} V220 H${bx - 6}` }));
      label(bx + 8, 168, 'V', 'ref');
      text(bx + 8, 186, 'FB to GND');
    } else if (topo === 'adjust') {
      svg.append(svgEl('path', { class: 'rn-sk-bracket', d: `M${bx - 6} 24 H${bx} V124 H${bx - 6}` }));
      label(bx + 8, 68, 'V', 'ref');
      text(bx + 8, 86, 'OUT to ADJ');
    } else {
      label(67, 168, 'on above V', 'on', 'middle', 'rn-sk-text');
      label(67, 188, 'off below V', 'off', 'middle', 'rn-sk-text');
    }
    const words = {
      feedback: 'R_top runs from the output to the feedback pin and R_bot from that pin to ground; the regulator holds the pin at V_ref above ground, so R_bot carries V_ref.',
      adjust: 'R_top (R1) runs from the output to the adjust pin and R_bot (R2) from that pin to ground; the regulator holds V_ref between its output and the adjust pin, so R_top carries V_ref.',
      threshold: 'R_top runs from the input to the enable pin and R_bot from that pin to ground; the part starts when the pin rises past its rising threshold and stops when it falls below its falling one.',
    }[topo];
    const caption = [words, c ? ' Values shown: the chosen candidate.' : ''];
    return h('section', { class: 'rn-block rn-sketch-block', 'data-block': 'sketch' },
      h('h3', {}, 'Which resistor is which'),
      h('figure', {}, svg, h('figcaption', {}, caption)));
  }

  // ---- sortable candidate tables ----

  /**
   * A table of rows with sortable columns. columns: [{ id, head (nodes), cell(row, i) → nodes,
   * key(row, i) → number (absent: not sortable) }]. Header cells hold buttons; aria-sort says the
   * order. choose(i): a radio per row (arrow keys move between rows), or null for no choice.
   */
  sortableTable({ id, caption, rows, columns, chosen, choose }) {
    const state = this.sorts[id];
    const prefix = `${this.spec.name}-${id}-${this.uidPrefix()}`;
    const headCells = columns.map((col) => {
      if (!col.key) return h('th', { scope: 'col' }, col.head);
      const sorted = state && state.column === col.id ? state.dir : null;
      const button = h('button', { type: 'button', class: 'rn-sort', 'data-column': col.id,
        on: { click: () => this.sortBy(id, col.id) } },
      col.head, h('span', { class: 'rn-sort-mark', 'aria-hidden': 'true' }, sorted === 'ascending' ? ' ▲' : sorted === 'descending' ? ' ▼' : ' ⇅'));
      return h('th', { scope: 'col', 'aria-sort': sorted || 'none' }, button);
    });
    const body = h('tbody');
    const trs = rows.map((row, i) => {
      const tr = h('tr', { 'data-index': i, class: i === chosen ? 'rn-chosen' : null });
      columns.forEach((col, k) => {
        const content = col.cell(row, i);
        if (k === 0 && choose) {
          const radio = h('input', { type: 'radio', name: `${prefix}-pick`, 'data-index': i, 'aria-label': `Choose candidate ${i + 1}`,
            on: { change: () => choose(i) } });
          radio.checked = i === chosen;
          if (i === chosen) radio.setAttribute('data-chosen', 'true');
          tr.append(h('th', { scope: 'row' }, h('label', { class: 'rn-pick' }, radio, content)));
        } else if (k === 0) {
          tr.append(h('th', { scope: 'row' }, content));
        } else {
          tr.append(h('td', { 'data-q': col.id }, content));
        }
      });
      if (choose) {
        tr.addEventListener('click', (e) => {
          if (e.target.closest('input, button, a')) return;
          choose(i);
        });
      }
      return tr;
    });
    const ordered = this.sortedRows(trs, rows, columns, state);
    body.append(...ordered);
    const table = h('table', { class: 'rn-corners rn-candidates', 'data-table': id },
      h('caption', {}, caption), h('thead', {}, h('tr', {}, headCells)), body);
    table.rowsData = { rows, columns, trs };
    return table;
  }

  uidPrefix() {
    if (!this.tableUid) this.tableUid = Math.random().toString(36).slice(2, 8);
    return this.tableUid;
  }

  sortedRows(trs, rows, columns, state) {
    const order = trs.map((tr, i) => i);
    if (state) {
      const col = columns.find((c) => c.id === state.column);
      if (col && col.key) {
        const sign = state.dir === 'descending' ? -1 : 1;
        // Stable: ties keep rank order.
        order.sort((a, b) => (sign * (col.key(rows[a], a) - col.key(rows[b], b))) || a - b);
      }
    }
    return order.map((i) => trs[i]);
  }

  /** Click or Enter on a column heading: ascending, then descending, on the same column. */
  sortBy(tableId, column) {
    const prev = this.sorts[tableId];
    const dir = prev && prev.column === column && prev.dir === 'ascending' ? 'descending' : 'ascending';
    this.sorts[tableId] = { column, dir };
    const table = this.querySelector(`table[data-table="${tableId}"]`);
    if (!table || !table.rowsData) return;
    const { rows, columns, trs } = table.rowsData;
    table.tBodies[0].append(...this.sortedRows(trs, rows, columns, this.sorts[tableId]));
    for (const th of table.tHead.rows[0].cells) {
      const b = th.querySelector('button.rn-sort');
      if (!b) continue;
      const on = b.dataset.column === column;
      th.setAttribute('aria-sort', on ? dir : 'none');
      b.querySelector('.rn-sort-mark').textContent = on ? (dir === 'ascending' ? ' ▲' : ' ▼') : ' ⇅';
    }
    const col = columns.find((c) => c.id === column);
    this.toolStatus.textContent = `Sorted by ${col && col.words ? col.words : column}, ${dir}.`;
  }

  /** Choosing a row: its rank goes into the pick field, and the check runs again. */
  choose(index, table = 'feedback') {
    const f = this.fieldByKey('pick');
    if (!f || !this.api) return;
    setFieldText(f, String(index + 1));
    this.reflecting = true;
    this.setAttribute('pick', f.input.value);
    this.reflecting = false;
    this.refocus = { table, index };
    this.compute();
    if (this.urlState) this.urlState.write(this.texts());
  }

  candidatesBlock(r) {
    const cands = r.candidates || [];
    const head = h('h3', {}, r.mode === 'reverse' ? 'The given pair' : 'Candidates, best first');
    const fmt = (v, k, d) => this.fmt(v, k, d);
    const intro = h('p', { class: 'rn-note-text' },
      r.mode === 'reverse'
        ? 'The two resistors as given; beside each value, the lowest E series that holds it.'
        : [`${fmt(r.searched, 'count')} pairs evaluated; ranked by the size of the nominal error, then by how near the divider current is to the middle of the wanted range, then by the coarser series. `,
          'Window: ', fmt(r.windowMin, 'voltage', 4), ' to ', fmt(r.windowMax, 'voltage', 4),
          '. Choose a row to see its worst case and Monte Carlo run; the column headings sort the table.']);
    if (!cands.length) {
      return h('section', { class: 'rn-block', 'data-block': 'candidates' }, head,
        h('p', { class: 'rn-error-box', 'data-empty': 'true' }, 'No pair of standard values meets these inputs. Widen the resistance range or the divider current range, or choose a finer series.'));
    }
    const names = this.names(r);
    const withSeries = (v, series) => [fmt(v, 'resistance', 3), ' ', h('span', { class: 'rn-fit' }, series || 'no series')];
    const columns = [
      { id: 'rank', words: 'rank', head: 'Rank', cell: (c, i) => String(i + 1), key: (c, i) => i },
      { id: 'rTop', words: names.topShort, head: names.topShort, cell: (c) => withSeries(c.rTop, c.seriesTop), key: (c) => c.rTop },
      { id: 'rBottom', words: names.bottomShort, head: names.bottomShort, cell: (c) => withSeries(c.rBottom, c.seriesBottom), key: (c) => c.rBottom },
      { id: 'vout', words: 'nominal output', head: ['V', h('sub', {}, 'out')], cell: (c) => fmt(c.vout, 'voltage', 4), key: (c) => c.vout },
      { id: 'errorPct', words: 'size of the error', head: 'Error', cell: (c) => this.fmtError(c.errorPct), key: (c) => Math.abs(c.errorPct) },
      { id: 'senseCurrent', words: 'divider current', head: 'Current', cell: (c) => [fmt(c.senseCurrent, 'current', 3), c.currentFit === 'in' ? '' : [' ', h('span', { class: 'rn-no', 'data-fit': c.currentFit }, FIT_WORDS[c.currentFit] || c.currentFit)]], key: (c) => c.senseCurrent },
      { id: 'powerW', words: 'dissipation', head: 'Power', cell: (c) => fmt(c.powerW, 'power', 3), key: (c) => c.powerW },
      { id: 'worst', words: 'lowest worst-case output', head: 'Worst case', cell: (c) => [fmt(c.worstMin, 'voltage', 4), h('br'), fmt(c.worstMax, 'voltage', 4)], key: (c) => c.worstMin },
      { id: 'rss', words: 'root-sum-square spread', head: 'RSS ±', cell: (c) => fmt(c.rss, 'voltage', 3), key: (c) => c.rss },
      { id: 'fitsWindow', words: 'window fit', head: 'Fits?', cell: (c) => h('span', { class: c.fitsWindow ? 'rn-yes' : 'rn-no' }, c.fitsWindow ? 'yes' : 'no'), key: (c) => (c.fitsWindow ? 0 : 1) },
    ];
    // One given pair has nothing to sort.
    if (r.mode === 'reverse') for (const col of columns) delete col.key;
    const table = this.sortableTable({
      id: 'feedback',
      caption: r.mode === 'reverse' ? 'The given resistors' : `${cands.length} candidates for ${fmt(this.values.voutTarget, 'voltage', 4)}`,
      rows: cands,
      columns,
      chosen: r.pick,
      choose: r.mode === 'reverse' ? null : (i) => this.choose(i),
    });
    return h('section', { class: 'rn-block', 'data-block': 'candidates' }, head, intro, h('div', { class: 'rn-table-scroll' }, table));
  }

  /** The corner of an extreme in words, in the chosen topology's names. */
  cornerWords(corner, r) {
    if (!corner) return '';
    const n = this.names(r);
    const part = (what, end) => `${what} ${END_WORDS[end] || end}`;
    return [part('V_ref', corner.vref), part(n.topShort, corner.rTop), part(n.bottomShort, corner.rBottom), part('the pin current', corner.pinCurrent)].join(', ');
  }

  detailBlock(r) {
    const d = r.detail;
    const c = this.pickedCandidate(r);
    const head = h('h3', {}, r.mode === 'reverse' ? 'Worst case of the given pair' : `Worst case of candidate ${r.pick + 1}`);
    if (!d || !c) return h('section', { class: 'rn-block', 'data-block': 'detail' }, head, h('p', {}, 'No candidate to show in detail.'));
    const fmt = (v, k, dg = 4) => this.fmt(v, k, dg);
    const n = this.names(r);
    const row = (dt, ...dd) => [h('dt', {}, dt), h('dd', {}, ...dd)];
    const dl = h('dl', { class: 'rn-limits' },
      row('Resistors', h('strong', { 'data-q': 'pair' }, `${n.topShort} ${fmt(c.rTop, 'resistance', 3)}, ${n.bottomShort} ${fmt(c.rBottom, 'resistance', 3)}`),
        ` (${c.seriesTop || 'no series'} / ${c.seriesBottom || 'no series'}).`),
      row('Nominal output', h('strong', { 'data-q': 'vout' }, fmt(c.vout, 'voltage')), `, error ${this.fmtError(c.errorPct)} from the target.`),
      row('Lowest output', h('strong', { 'data-q': 'worstMin' }, fmt(c.worstMin, 'voltage')), ` with ${this.cornerWords(d.minCorner, r)}.`),
      row('Highest output', h('strong', { 'data-q': 'worstMax' }, fmt(c.worstMax, 'voltage')), ` with ${this.cornerWords(d.maxCorner, r)}.`),
      row('Root-sum-square spread', h('strong', { 'data-q': 'rss' }, `± ${fmt(c.rss, 'voltage', 3)}`),
        ': the one-at-a-time half-ranges below added as independent errors; likelier than the worst case, not a bound.'),
      row('Window', h('strong', { 'data-q': 'window' }, `${fmt(r.windowMin, 'voltage')} to ${fmt(r.windowMax, 'voltage')}`), ': ',
        h('span', { class: c.fitsWindow ? 'rn-yes' : 'rn-no', 'data-q': 'fitsWindow' }, c.fitsWindow ? 'the worst case fits inside it.' : 'the worst case goes outside it.')),
      row('Temperature drift', `From 25 °C over up to ${fmt(d.deltaT, 'temperatureDifference', 3)}: ${n.topShort} ± ${fmt(d.driftTopPct, 'percent', 3)}, ${n.bottomShort} ± ${fmt(d.driftBottomPct, 'percent', 3)}, on top of the tolerances.`),
      row('Divider current', `${fmt(c.senseCurrent, 'current', 3)} through the resistor across the reference (${FIT_WORDS[c.currentFit] || c.currentFit}); ${fmt(c.setCurrent, 'current', 3)} through the other; ${fmt(c.powerW, 'power', 3)} in the pair.`));
    const contribs = d.contributions || [];
    const width = this.columnWidth();
    this.chartWidth = width;
    const bars = renderRangeBars({
      width,
      title: 'Output at each end of each tolerance, one at a time',
      description: `Each bar runs from the output with that term at its low end to the output with it at its high end, around the nominal ${fmt(c.vout, 'voltage')}.`,
      rows: contribs.map((k) => ({ id: k.id, label: k.title, low: k.low, high: k.high })),
      center: c.vout,
      format: (v) => formatWith(this.api, v, 'voltage', 4),
      axisLabel: 'Output voltage',
    });
    const table = h('table', { class: 'rn-corners', 'data-table': 'contributions' },
      h('caption', {}, 'Output with one term at a time at its end, the others nominal'),
      h('thead', {}, h('tr', {}, h('th', { scope: 'col' }, 'Term'), h('th', { scope: 'col' }, 'At its low end'), h('th', { scope: 'col' }, 'At its high end'))),
      h('tbody', {}, contribs.map((k) => h('tr', { 'data-id': k.id },
        h('th', { scope: 'row' }, k.title), h('td', {}, fmt(k.low, 'voltage', 5)), h('td', {}, fmt(k.high, 'voltage', 5))))));
    const tableWrap = h('div', { class: 'rn-table-scroll' }, table);
    const figure = h('figure', { class: 'rn-range-figure' }, bars,
      h('figcaption', {}, 'Left of the dashed nominal line the term lowers the output, right of it raises it. The worst case puts every term at the end that hurts at once.'));
    return h('section', { class: 'rn-block rn-window', 'data-block': 'detail' }, head, dl, figure,
      this.hasAttribute('compact') ? h('details', {}, h('summary', {}, 'The contributions as a table'), tableWrap) : tableWrap);
  }

  monteCarloBlock(r) {
    const m = r.monteCarlo;
    const head = h('h3', {}, 'Monte Carlo');
    if (!m) {
      return h('section', { class: 'rn-block', 'data-block': 'monteCarlo' }, head,
        h('p', {}, 'The Monte Carlo run is off (0 samples). Give a number of samples to see the yield and the histogram.'));
    }
    const c = this.pickedCandidate(r);
    const fmt = (v, k, dg = 4) => this.fmt(v, k, dg);
    const dist = m.distribution === 'uniform' ? 'uniform across each tolerance' : 'normal with σ = tolerance / 3, cut at 3σ';
    const words = h('p', { class: 'rn-mc-words' },
      h('strong', { 'data-q': 'yieldPct' }, fmt(m.yieldPct, 'percent', 4)), ' of ',
      h('span', { 'data-q': 'samples' }, fmt(m.samples, 'count')), ' samples land inside the window (',
      h('span', { 'data-q': 'inside' }, fmt(m.inside, 'count')), ' of them). Mean ',
      h('strong', { 'data-q': 'mean' }, fmt(m.mean, 'voltage', 5)), ', σ ',
      h('strong', { 'data-q': 'sigma' }, fmt(m.sigma, 'voltage', 3)), '; lowest ',
      h('span', { 'data-q': 'min' }, fmt(m.min, 'voltage')), ', highest ',
      h('span', { 'data-q': 'max' }, fmt(m.max, 'voltage')), '. Each part ', dist, '; seed ',
      h('span', { 'data-q': 'seed' }, fmt(m.seed, 'count')), '.');
    const hist = m.histogram || { lo: 0, hi: 1, counts: [] };
    const width = this.columnWidth();
    this.chartWidth = width;
    const marks = [
      { id: 'window-min', value: r.windowMin, label: `Window edges, ${fmt(r.windowMin, 'voltage')} and ${fmt(r.windowMax, 'voltage')}: the output belongs between them`, tone: 2, dash: 'dashdotdot', width: 2.5 },
      { id: 'window-max', value: r.windowMax, label: 'window high', tone: 2, dash: 'dashdotdot', width: 2.5 },
    ];
    if (c) {
      marks.push({ id: 'worst-min', value: c.worstMin, label: `Worst case, ${fmt(c.worstMin, 'voltage')} to ${fmt(c.worstMax, 'voltage')}: no sample lies beyond`, tone: 3, dash: 'dotted', width: 2 });
      marks.push({ id: 'worst-max', value: c.worstMax, label: 'worst high', tone: 3, dash: 'dotted', width: 2 });
    }
    marks.push({ id: 'mean', value: m.mean, label: `Mean of the samples, ${fmt(m.mean, 'voltage', 5)}`, tone: 4, dash: 'solid', width: 1.5 });
    const fmtAxis = (kind, dg) => (v) => formatWith(this.api, v, kind, dg);
    const { svg, legend } = renderHistogram({
      width, height: Math.round(Math.min(340, Math.max(260, width * 0.45))),
      title: 'Monte Carlo histogram of the output voltage',
      description: `${hist.counts.length} bins from ${fmt(hist.lo, 'voltage')} to ${fmt(hist.hi, 'voltage')}; window ${fmt(r.windowMin, 'voltage')} to ${fmt(r.windowMax, 'voltage')}; yield ${fmt(m.yieldPct, 'percent', 4)}. Verdict: ${VERDICT_WORDS[r.verdict] || r.verdict}.`,
      histogram: hist,
      barLabel: 'Samples in each bin (equal widths)',
      x: { label: 'Output voltage', format: fmtAxis('voltage', 4) },
      y: { label: 'Samples per bin' },
      margin: { left: 64 },
      marks,
      shade: [
        { from: hist.lo - (hist.hi - hist.lo), to: r.windowMin, tone: 2, label: 'Outside the window (shaded)' },
        { from: r.windowMax, to: hist.hi + (hist.hi - hist.lo), tone: 2, legend: false },
      ],
    });
    // The second line of each pair shares the first one's legend entry.
    for (const li of legend.querySelectorAll('li')) {
      if (['window high', 'worst high'].includes(li.textContent)) li.remove();
    }
    return h('section', { class: 'rn-block rn-window', 'data-block': 'monteCarlo' }, head, words,
      h('figure', {}, svg, h('figcaption', {}, 'Bars are the samples’ outputs; outside the dash-dot window lines is what would fail. ', legend)));
  }

  thresholdBlock(r) {
    const t = r.threshold;
    const head = h('h3', {}, 'Threshold candidates, best first');
    const chooseWords = 'Choose a row to make it the candidate the checks judge; the column headings sort the table.';
    if (!t) return h('section', { class: 'rn-block', 'data-block': 'threshold' }, head, h('p', {}, 'No threshold result.'));
    const fmt = (v, k, dg = 4) => this.fmt(v, k, dg);
    const intro = h('p', { class: 'rn-note-text' },
      `Exact solution (not standard values): R_top ${fmt(t.idealTop, 'resistance', 4)}, R_bot ${fmt(t.idealBottom, 'resistance', 4)}. `,
      `Start window ${fmt(t.startMin, 'voltage')} to ${fmt(t.startMax, 'voltage')}, stop window ${fmt(t.stopMin, 'voltage')} to ${fmt(t.stopMax, 'voltage')}. `,
      `${fmt(r.searched, 'count')} pairs evaluated. `, chooseWords);
    const cands = t.candidates || [];
    if (!cands.length) {
      return h('section', { class: 'rn-block', 'data-block': 'threshold' }, head, intro,
        h('p', { class: 'rn-error-box', 'data-empty': 'true' }, 'No pair of standard values meets these inputs. Widen the resistance range or the divider current range, or choose a finer series.'));
    }
    const withSeries = (v, series) => [fmt(v, 'resistance', 3), ' ', h('span', { class: 'rn-fit' }, series || 'no series')];
    const columns = [
      { id: 'rank', words: 'rank', head: 'Rank', cell: (c, i) => String(i + 1), key: (c, i) => i },
      { id: 'rTop', words: 'R_top', head: 'R_top', cell: (c) => withSeries(c.rTop, c.seriesTop), key: (c) => c.rTop },
      { id: 'rBottom', words: 'R_bot', head: 'R_bot', cell: (c) => withSeries(c.rBottom, c.seriesBottom), key: (c) => c.rBottom },
      // Nominal voltage and its error on the first line, the worst case below it.
      { id: 'start', words: 'start voltage', head: ['Start', h('br'), h('span', { class: 'rn-fit' }, 'worst case')],
        cell: (c) => [fmt(c.start, 'voltage'), ' ', h('span', { class: 'rn-fit' }, this.fmtError(c.startErrorPct)), h('br'),
          h('span', { class: 'rn-fit', 'data-q': 'startWorst' }, `${fmt(c.startLow, 'voltage')} to ${fmt(c.startHigh, 'voltage')}`)], key: (c) => c.start },
      { id: 'stop', words: 'stop voltage', head: ['Stop', h('br'), h('span', { class: 'rn-fit' }, 'worst case')],
        cell: (c) => [fmt(c.stop, 'voltage'), ' ', h('span', { class: 'rn-fit' }, this.fmtError(c.stopErrorPct)), h('br'),
          h('span', { class: 'rn-fit', 'data-q': 'stopWorst' }, `${fmt(c.stopLow, 'voltage')} to ${fmt(c.stopHigh, 'voltage')}`)], key: (c) => c.stop },
      { id: 'currentAtStart', words: 'divider current at start', head: 'Current', cell: (c) => fmt(c.currentAtStart, 'current', 3), key: (c) => c.currentAtStart },
      { id: 'powerW', words: 'dissipation', head: 'Power', cell: (c) => fmt(c.powerW, 'power', 3), key: (c) => c.powerW },
      { id: 'fits', words: 'window fit', head: 'Fits?', cell: (c) => h('span', { class: c.fits ? 'rn-yes' : 'rn-no' }, c.fits ? 'yes' : 'no'), key: (c) => (c.fits ? 0 : 1) },
    ];
    const table = this.sortableTable({
      id: 'threshold',
      caption: `${cands.length} candidates for a start at ${fmt(this.values.vStart, 'voltage')} and a stop at ${fmt(this.values.vStop, 'voltage')}`,
      rows: cands, columns, chosen: r.pick, choose: (i) => this.choose(i, 'threshold'),
    });
    return h('section', { class: 'rn-block', 'data-block': 'threshold' }, head, intro, h('div', { class: 'rn-table-scroll' }, table));
  }
}

if (!customElements.get('railnote-divider')) customElements.define('railnote-divider', RailnoteDivider);
