// <railnote-linear>: the linear rail check as a custom element.
//
// Its state is its attributes: each input field has an attribute of the same name (vin-min,
// vout, theta-ja, …), which prefills it and is kept up to date as the user types. With the
// attribute `sync-url` the same names are also the page's query keys, holding the raw text the
// user typed, so a link reproduces the check exactly. `compact` folds the long tables (embeds).
//
// After every render the element sets data-state ("ready" with a result, "error" when a field is
// bad, "failed" if the engine could not load) and dispatches a bubbling `railnote-result`
// CustomEvent whose detail is { state, result } (result is null unless state is "ready").
// All of that is common.js's CalculatorElement; this file has the fields, the call and the layout.
//
// The numbers all come from the WASM API (checkLinear, formatQuantity, parseQuantity); this file
// lays them out and never computes them.
import { ready } from './engine.js';
import {
  h, symbol, shareLink, formatWith, CalculatorElement, VERDICT_WORDS,
} from './common.js';
import { renderChart } from './chart.js';

/** Dropout models, as the WASM API names them. */
const DROPOUT_MODELS = [
  { value: 'resistive', label: 'MOS pass element (dropout scales with load)' },
  { value: 'constant', label: 'bipolar pass element (roughly constant dropout)' },
  { value: 'classic', label: 'classic three-terminal (about 2 V, common practice)' },
];

/**
 * The fields, in groups. key = attribute and URL query name; prop = the checkLinear input key;
 * kind = the parseQuantity kind; def = default text (the brief's demo rail: the 3.3 V LDO of the
 * soil-moisture logger, fed from its 5.0 V buck rail, enclosure up to 60 °C).
 */
export const GROUPS = [
  {
    title: 'Supply',
    fields: [
      { key: 'vin-min', prop: 'vinMin', kind: 'voltage', unit: 'V', label: 'Lowest input', sym: ['V', 'in,min'], def: '4.85 V' },
      { key: 'vin-nom', prop: 'vinNom', kind: 'voltage', unit: 'V', label: 'Nominal input', sym: ['V', 'in,nom'], def: '5.0 V' },
      { key: 'vin-max', prop: 'vinMax', kind: 'voltage', unit: 'V', label: 'Highest input', sym: ['V', 'in,max'], def: '5.15 V' },
      { key: 'input-budget', prop: 'inputBudgetA', kind: 'current', unit: 'A', label: 'Current the parent supply can give', optional: true, def: '' },
    ],
  },
  {
    title: 'Output',
    fields: [
      { key: 'vout', prop: 'vout', kind: 'voltage', unit: 'V', label: 'Output voltage', sym: ['V', 'out'], def: '3.3 V' },
      { key: 'vout-tol', prop: 'voutTolPct', kind: 'percent', unit: '± %', label: 'Output tolerance', def: '2 %' },
      { key: 'iout-max', prop: 'ioutMax', kind: 'current', unit: 'A', label: 'Highest load', sym: ['I', 'out,max'], def: '250 mA' },
      { key: 'iout-typ', prop: 'ioutTyp', kind: 'current', unit: 'A', label: 'Typical load', sym: ['I', 'out,typ'], def: '30 mA' },
    ],
  },
  {
    title: 'Regulator',
    fields: [
      { key: 'dropout-model', prop: 'dropoutModel', type: 'select', options: DROPOUT_MODELS, label: 'Dropout model', def: 'resistive',
        note: 'The classic model uses 2.0 V and ignores the two dropout fields below.' },
      { key: 'dropout', prop: 'dropoutV', kind: 'voltage', unit: 'V', label: 'Dropout voltage', sym: ['V', 'do'], def: '300 mV' },
      { key: 'dropout-at', prop: 'dropoutAtA', kind: 'current', unit: 'A', label: 'Dropout rated at load', def: '300 mA',
        note: 'Used by the MOS model only.' },
      { key: 'rated', prop: 'ratedA', kind: 'current', unit: 'A', label: 'Rated output current', def: '300 mA' },
      { key: 'iq', prop: 'iq', kind: 'current', unit: 'A', label: 'Quiescent ground current', sym: ['I', 'q'], def: '50 µA' },
      { key: 'gnd', prop: 'gndPct', kind: 'percent', unit: '% of load', label: 'Ground current added per load', def: '1 %' },
    ],
  },
  {
    title: 'Thermal and limits',
    fields: [
      { key: 'theta-ja', prop: 'thetaJa', kind: 'thermalResistance', unit: 'K/W', label: 'Junction to ambient', sym: ['θ', 'JA'], def: '100 K/W' },
      { key: 'ta-max', prop: 'taMax', kind: 'temperature', unit: '°C', label: 'Hottest ambient', sym: ['T', 'a,max'], def: '60 °C' },
      { key: 'tj-max', prop: 'tjMax', kind: 'temperature', unit: '°C', label: 'Junction limit', sym: ['T', 'j,max'], def: '125 °C' },
      { key: 'headroom-margin', prop: 'headroomMarginV', kind: 'voltage', unit: 'V', label: 'Wanted headroom margin', def: '0.3 V' },
      { key: 'thermal-margin', prop: 'thermalMarginC', kind: 'temperatureDifference', unit: 'K', label: 'Wanted margin below the junction limit', def: '15 K' },
      { key: 'eff-min', prop: 'effMinPct', kind: 'percent', unit: '%', label: 'Wanted efficiency (nominal input, typical load)', optional: true, def: '' },
    ],
  },
];

export const FIELD_DEFS = GROUPS.flatMap((g) => g.fields);

/** The thermal page's own example inputs, cleared in the carry-over link (see thermalLink). */
const THERMAL_EXAMPLE_KEYS = ['r1', 'tau1', 'r2', 'tau2', 'r3', 'tau3', 'r4', 'tau4',
  'pulse-power', 'pulse-on', 'pulse-period', 'psi-jt', 'case-top'];

const BOUND_WORDS = {
  thermal: 'the junction temperature limit (with its margin)',
  headroom: 'headroom over dropout (with its margin)',
  rating: 'the regulator’s current rating',
};

const FULL_PAGE = new URL('../linear.html', import.meta.url).href;
const THERMAL_PAGE = new URL('../thermal.html', import.meta.url).href;
const SWITCHING_PAGE = new URL('../switching.html', import.meta.url).href;
const COMPARE_PAGE = new URL('../compare.html', import.meta.url).href;

/**
 * This rail's fields as the switching estimate's and the comparison's link keys (see
 * switchingLink). The comparison's linear regulator takes the ldo- prefixed names.
 */
const TO_SWITCHING = [['vin-min', 'vin-min'], ['vin-nom', 'vin-nom'], ['vin-max', 'vin-max'], ['vout', 'vout'], ['iout-max', 'iout']];
const TO_COMPARE = [...TO_SWITCHING, ['vout-tol', 'vout-tol'], ['ta-max', 'ta-max'], ['tj-max', 'tj-max'],
  ['headroom-margin', 'headroom-margin'], ['thermal-margin', 'thermal-margin'],
  ['dropout-model', 'ldo-dropout-model'], ['dropout', 'ldo-dropout'], ['dropout-at', 'ldo-dropout-at'],
  ['rated', 'ldo-rated'], ['iq', 'ldo-iq'], ['gnd', 'ldo-gnd'], ['theta-ja', 'ldo-theta-ja']];
const DIVIDER_PAGE = new URL('../divider.html', import.meta.url).href;

export class RailnoteLinear extends CalculatorElement {
  static spec = {
    name: 'linear',
    engine: ready,
    groups: GROUPS,
    page: FULL_PAGE,
    inputsLabel: 'Linear rail inputs',
    resultsLabel: 'Results of the linear rail check',
    demoWords: 'the demo rail',
    subjectWords: 'the rail',
  };

  run(api, values) {
    return api.checkLinear(values);
  }

  /** Mark the dropout fields the chosen model does not use (they keep their text for links). */
  beforeCompute() {
    const model = this.fieldByKey('dropout-model').input.value;
    const unused = { classic: ['dropout', 'dropout-at'], constant: ['dropout-at'] }[model] || [];
    for (const f of this.fields) f.root.classList.toggle('rn-unused', unused.includes(f.def.key));
  }

  resultParts(r) {
    const parts = [];
    if (r.suggestSwitching) {
      parts.push(h('p', { class: 'rn-suggest' },
        'Heat or efficiency is what limits this rail, so a switching regulator may suit it better: ',
        h('a', { href: this.switchingLink('switching'), class: 'rn-switching-link', 'data-carry': 'switching-suggested' }, 'try this rail as a switcher'),
        ', or ', h('a', { href: this.switchingLink('compare'), 'data-carry': 'compare-suggested' }, 'compare it with a switching converter'),
        ' side by side.'));
    }
    parts.push(this.checksBlock(r));
    parts.push(this.warningsBlock(r));
    parts.push(this.limitsBlock(r));
    parts.push(this.cornersBlock(r));
    parts.push(this.thermalCarryOver(r));
    parts.push(this.switchingCarryOver());
    parts.push(this.dividerCarryOver());
    parts.push(this.windowBlock(r));
    return parts;
  }

  /**
   * A link to the thermal path calculator holding this rail's worst-case dissipation (as the
   * engine formats it, to six figures) and the thermal fields exactly as typed. The thermal
   * page's own example (its Foster network, pulse and case-top reading) is cleared, so only this
   * rail's numbers are in it.
   */
  thermalLink(r) {
    const w = r.worst || {};
    const text = (key) => this.fieldByKey(key).input.value;
    const texts = new Map([
      ['power', this.fmt(w.powerW, 'power', 6)],
      ['path', 'ja'],
      ['theta-ja', text('theta-ja')],
      ['ta-max', text('ta-max')],
      ['tj-max', text('tj-max')],
      ['margin', text('thermal-margin')],
    ]);
    for (const key of THERMAL_EXAMPLE_KEYS) texts.set(key, '');
    return shareLink(THERMAL_PAGE, texts);
  }

  thermalCarryOver(r) {
    if (!r.worst || r.worst.powerW === null || r.worst.powerW === undefined) return null;
    return h('p', { class: 'rn-carry' },
      h('a', { href: this.thermalLink(r), class: 'rn-thermal-link', 'data-carry': 'thermal' }, 'Check the thermal path'),
      ` of this rail: opens the thermal path calculator with its worst-case dissipation (${this.fmt(r.worst.powerW, 'power')}), θJA, hottest ambient, junction limit and thermal margin, for a heat sink, a measured case temperature or a pulsed load.`);
  }

  /**
   * A link to the divider picker with this rail's output voltage as the target and its tolerance
   * as the window, both exactly as typed, in feedback mode; the picker's other inputs keep its
   * demo values.
   */
  dividerLink() {
    const text = (key) => this.fieldByKey(key).input.value;
    return shareLink(DIVIDER_PAGE, new Map([
      ['mode', 'feedback'],
      ['vout-target', text('vout')],
      ['window', text('vout-tol')],
    ]));
  }

  dividerCarryOver() {
    return h('p', { class: 'rn-carry' },
      h('a', { href: this.dividerLink(), class: 'rn-divider-link', 'data-carry': 'divider' }, 'Pick the divider for this output'),
      `: opens the divider picker with ${this.fmt(this.values.vout, 'voltage', 4)} as the target and ±${this.fmt(this.values.voutTolPct, 'percent', 3)} as the window, to choose the feedback resistors from standard values with their worst case.`);
  }

  /**
   * A link to the switching estimate (or the comparison) holding this rail as a buck: its input
   * corners, output and highest load exactly as typed (the comparison also its limits and this
   * regulator). The inductance is left empty so the page proposes one for this rail from a 30 %
   * ripple ratio; the converter's other parts stay that page's example values.
   */
  switchingLink(page) {
    const text = (key) => this.fieldByKey(key).input.value;
    const texts = new Map([['topology', 'buck']]);
    for (const [from, to] of page === 'compare' ? TO_COMPARE : TO_SWITCHING) texts.set(to, text(from));
    texts.set('inductance', '');
    texts.set('ripple-ratio', '30 %');
    return shareLink(page === 'compare' ? COMPARE_PAGE : SWITCHING_PAGE, texts);
  }

  switchingCarryOver() {
    return h('p', { class: 'rn-carry' },
      h('a', { href: this.switchingLink('switching'), class: 'rn-switching-link', 'data-carry': 'switching' }, 'Try this rail as a switcher'),
      ': opens the switching estimate with this rail’s input range, output and highest load as a buck; or ',
      h('a', { href: this.switchingLink('compare'), 'data-carry': 'compare' }, 'compare it with a switching converter'),
      ', with this regulator, ambient and junction limit.');
  }

  limitsBlock(r) {
    const L = r.limits || {};
    const f = (v, k) => this.fmt(v, k);
    const row = (dt, ...dd) => [h('dt', {}, dt), h('dd', {}, ...dd)];
    const dl = h('dl', { class: 'rn-limits' },
      row('Largest load that passes',
        h('strong', { 'data-limit': 'maxLoadA' }, f(L.maxLoadA, 'current')),
        `, bounded by ${BOUND_WORDS[L.maxLoadBy] || L.maxLoadBy}. `,
        `Thermal: ${f(L.maxLoadThermalA, 'current')}; headroom: `,
        L.maxLoadHeadroomA === null || L.maxLoadHeadroomA === undefined
          ? 'no bound (with this dropout model headroom does not depend on load, and its margin is met)'
          : L.maxLoadHeadroomA === 0
            ? 'none (the headroom margin is not met at any load)'
            : f(L.maxLoadHeadroomA, 'current'),
        `; rating: ${f(r.window && r.window.ratedA, 'current')}.`),
      row('Hottest ambient that passes at full load',
        h('strong', { 'data-limit': 'hottestAmbientC' }, f(L.hottestAmbientC, 'temperature')),
        ' (highest input, wanted thermal margin kept).'),
      row('Smallest input that regulates at full load',
        h('strong', { 'data-limit': 'vinMinRegulating' }, f(L.vinMinRegulating, 'voltage')),
        ` at zero margin; ${f(L.vinMinWithMargin, 'voltage')} with the wanted headroom margin.`),
      row('Highest input the junction allows at full load',
        L.vinMaxThermal === null || L.vinMaxThermal === undefined
          ? h('strong', { 'data-limit': 'vinMaxThermal' }, 'none: even the lowest input runs the junction too hot')
          : h('strong', { 'data-limit': 'vinMaxThermal' }, f(L.vinMaxThermal, 'voltage')),
        ' (hottest ambient, wanted thermal margin kept).'));
    return h('section', { class: 'rn-block' }, h('h3', {}, 'Limits solved back from the inputs'), dl);
  }

  cornersBlock(r) {
    const head = h('tr', {},
      h('th', { scope: 'col' }, 'Input corner'),
      h('th', { scope: 'col' }, 'Load'),
      h('th', { scope: 'col' }, 'Dissipation'),
      h('th', { scope: 'col' }, 'Efficiency'),
      h('th', { scope: 'col' }, symbol('T', 'j'), ' at ', symbol('T', 'a,max')),
      h('th', { scope: 'col' }, 'Thermal margin'),
      h('th', { scope: 'col' }, 'Headroom at full load'),
      h('th', { scope: 'col' }, 'Input current'));
    const body = h('tbody');
    const names = { min: 'min', nom: 'nom', max: 'max' };
    for (const c of r.corners || []) {
      for (const [i, load] of ['full', 'typ'].entries()) {
        const p = c[load] || {};
        const tr = h('tr', { 'data-corner': c.label, 'data-load': load });
        if (i === 0) {
          tr.append(h('th', { scope: 'rowgroup', rowspan: 2 }, symbol('V', `in,${names[c.label] || c.label}`), ' = ', this.fmt(c.vin, 'voltage')));
        }
        tr.append(
          h('td', {}, `${load === 'full' ? 'full' : 'typical'} ${this.fmt(p.ioutA, 'current')}`),
          h('td', { 'data-q': 'totalW' }, this.fmt(p.totalW, 'power')),
          h('td', { 'data-q': 'efficiencyPct' }, this.fmt(p.efficiencyPct, 'percent')),
          h('td', { 'data-q': 'tjC' }, this.fmt(p.tjC, 'temperature')),
          h('td', { 'data-q': 'thermalMarginC' }, this.fmt(p.thermalMarginC, 'temperatureDifference')));
        if (i === 0) tr.append(h('td', { rowspan: 2, 'data-q': 'headroomV' }, this.fmt(c.headroomV, 'voltage')));
        tr.append(h('td', { 'data-q': 'inputA' }, this.fmt(p.inputA, 'current')));
        body.append(tr);
      }
    }
    const table = h('table', { class: 'rn-corners' },
      h('caption', {}, 'At each input corner, nominal output, hottest ambient'),
      h('thead', {}, head), body);
    const w = r.worst || {};
    const worst = h('p', { class: 'rn-worst' },
      'Worst case: dissipation ', h('strong', { 'data-worst': 'powerW' }, this.fmt(w.powerW, 'power')),
      ' (highest input, lowest output, full load), junction ', h('strong', { 'data-worst': 'tjC' }, this.fmt(w.tjC, 'temperature')),
      ', thermal margin ', h('strong', { 'data-worst': 'thermalMarginC' }, this.fmt(w.thermalMarginC, 'temperatureDifference')),
      '; headroom ', h('strong', { 'data-worst': 'headroomV' }, this.fmt(w.headroomV, 'voltage')),
      ' over a dropout of ', this.fmt(w.dropoutV, 'voltage'),
      ' (lowest input, highest output ', this.fmt(w.voutMax, 'voltage'), '); input current ',
      h('strong', { 'data-worst': 'inputCurrentA' }, this.fmt(w.inputCurrentA, 'current')), '.');
    const inner = [worst, h('div', { class: 'rn-table-scroll' }, table)];
    if (this.hasAttribute('compact')) {
      return h('section', { class: 'rn-block' }, h('details', {}, h('summary', {}, 'Worst case and input corners'), inner));
    }
    return h('section', { class: 'rn-block' }, h('h3', {}, 'Worst case and input corners'), inner);
  }

  windowBlock(r) {
    const w = r.window;
    if (!w) return null;
    const api = this.api;
    const fmtAxis = (kind) => (v) => formatWith(api, v, kind, 3);
    const spanV = Math.abs(w.vinTo - w.vinFrom) || 1;
    const far = spanV * 100;
    const top = (w.ioutTo || 1) * 100;
    const dropout = (w.dropout || []).slice();
    const thermal = (w.thermal || []).slice().sort((a, b) => a[0] - b[0]);
    const series = [];
    // Shaded regions outside the window: left of dropout, above the thermal boundary, above the rating.
    if (dropout.length >= 2) {
      const lo = dropout[0];
      const hi = dropout[dropout.length - 1];
      series.push({ kind: 'area', tone: 1, legend: false, points: [...dropout, [hi[0] - far, hi[1]], [lo[0] - far, lo[1]]] });
    }
    if (thermal.length >= 2) {
      series.push({ kind: 'area', tone: 2, legend: false, points: [...thermal, [thermal[thermal.length - 1][0] + far, thermal[thermal.length - 1][1]], [thermal[thermal.length - 1][0] + far, top], [thermal[0][0], top]] });
    }
    series.push({ kind: 'area', tone: 3, legend: false, points: [[w.vinFrom - far, w.ratedA], [w.vinTo + far, w.ratedA], [w.vinTo + far, top], [w.vinFrom - far, top]] });
    series.push({ kind: 'line', tone: 1, dash: 'dashed', width: 2.5, points: dropout,
      label: 'Dropout boundary (headroom = 0): the regulator regulates to the right of it' });
    series.push({ kind: 'line', tone: 2, dash: 'dashdotdot', width: 2.5, points: thermal,
      label: 'Thermal boundary (junction exactly at its limit, no margin, at the hottest ambient): cool enough below it' });
    series.push({ kind: 'line', tone: 3, dash: 'dotted', width: 2.5, points: [[w.vinFrom - far, w.ratedA], [w.vinTo + far, w.ratedA]],
      label: 'Current rating: within rating below it' });
    series.push({ kind: 'line', tone: 4, dash: 'solid', width: 3, points: [[w.vinMin, 0], [w.vinMax, 0], [w.vinMax, w.ioutMax], [w.vinMin, w.ioutMax], [w.vinMin, 0]],
      label: 'Operating box: lowest to highest input, up to the highest load' });
    series.push({ kind: 'line', tone: 4, dash: 'dashdot', width: 2, points: [[w.vinMin, w.ioutTyp], [w.vinMax, w.ioutTyp]],
      label: 'Typical load' });
    series.push({ kind: 'marker', tone: 5, points: [[w.vinMin, w.ioutMax], [w.vinMax, w.ioutMax]],
      label: 'Worst corners: lowest input for headroom, highest input for heat' });
    // Words inside the plot on the wrong side of each boundary, so the picture reads without
    // the legend (and without colour).
    const notes = [];
    const yNote = w.ioutTo * 0.93;
    if (dropout.length >= 2) notes.push({ x: w.vinFrom + 0.015 * spanV, y: yNote, text: 'drops out', anchor: 'start' });
    // The thermal curve falls to the right, so its right end is the lowest point: label the
    // region above it at the top right when the curve is below the label there.
    if (thermal.length >= 2) {
      const end = thermal[thermal.length - 1];
      const y = end[1] < yNote * 0.95 ? yNote : (end[1] + w.ioutTo) / 2;
      notes.push({ x: w.vinTo - 0.015 * spanV, y, text: 'too hot', anchor: 'end' });
    }
    if (w.ratedA < w.ioutTo * 0.9) {
      const left = dropout.length ? dropout[dropout.length - 1][0] : w.vinFrom;
      const right = thermal.length ? thermal[0][0] : w.vinTo;
      // Only where there is room between the other two boundaries; the legend says it anyway.
      if (right - left > 0.3 * spanV) {
        notes.push({ x: (left + right) / 2, y: (w.ratedA + w.ioutTo) / 2 - w.ioutTo * 0.02, text: 'over the rating', anchor: 'middle' });
      }
    }
    notes.push({ x: (w.vinMin + w.vinMax) / 2, y: w.ioutMax / 2, text: 'operating box', anchor: 'middle' });
    // Size the drawing to the column it sits in, so its 12 px text stays 12 px on screen
    // (an SVG scaled down from a fixed width would shrink its labels in narrow embeds).
    const width = this.columnWidth();
    this.chartWidth = width;
    const { svg, legend } = renderChart({
      notes,
      width, height: Math.round(Math.min(400, Math.max(300, width * 0.6))),
      title: 'Operating window of the linear rail',
      description: `Input voltage from ${fmtAxis('voltage')(w.vinFrom)} to ${fmtAxis('voltage')(w.vinTo)} across, load current from 0 to ${fmtAxis('current')(w.ioutTo)} up. `
        + `The operating box spans ${fmtAxis('voltage')(w.vinMin)} to ${fmtAxis('voltage')(w.vinMax)} and up to ${fmtAxis('current')(w.ioutMax)}. `
        + `Verdict: ${VERDICT_WORDS[r.verdict] || r.verdict}.`,
      // The axes keep the window's own extents (nice: false) so the boundaries reach the edges.
      x: { label: 'Input voltage', domain: [w.vinFrom, w.vinTo], format: fmtAxis('voltage'), nice: false },
      y: { label: 'Load current', domain: [0, w.ioutTo], format: fmtAxis('current'), nice: false },
      series,
    });
    return h('section', { class: 'rn-block rn-window' },
      h('h3', {}, 'Operating window'),
      h('figure', {}, svg,
        h('figcaption', {},
          'Shaded areas are outside the window: too little headroom (left), too hot (top right), over the rating (top). ',
          'The rail is sound when the whole operating box sits in the clear area.', legend)));
  }
}

if (!customElements.get('railnote-linear')) customElements.define('railnote-linear', RailnoteLinear);
