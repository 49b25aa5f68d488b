// <railnote-compare>: the same rail through a linear regulator and a switching converter, side by
// side: dissipation, efficiency, junction temperature with each θJA, input current, the load where
// their dissipations cross, the trade-offs no number shows, and dissipation against load.
//
// Its attributes are the link keys. The converter's keys are the switching estimate's own
// (topology, fsw, inductance, …: the same names, so one link can open either page); the linear
// regulator's carry an ldo- prefix (ldo-theta-ja, ldo-iq, …) and the rail's shared limits are the
// linear check's names (ta-max, tj-max, vout-tol, …). With `sync-url` they are the page's query
// keys; `compact` folds the side-by-side table (embeds). data-state and the `railnote-result`
// event are as for every railnote element (common.js, CalculatorElement).
//
// The comparison has no single verdict: each side keeps its own, so this element lays out its
// result itself instead of the shared verdict block.
//
// The numbers all come from the WASM API (compareRails, formatQuantity, parseQuantity); this file
// lays them out and never computes them.
import { ready } from './engine.js';
import {
  h, symbol, formatWith, shareLink, CalculatorElement, VERDICT_WORDS, keyboardScrollable,
} from './common.js';
import { renderChart } from './chart.js';
import { FIELD_DEFS as SWITCHING_DEFS, markRectifierFields, otherRectifierField } from './switching-widget.js';

const DROPOUT_MODELS = [
  { value: 'resistive', label: 'MOS pass element (dropout scales with load)' },
  { value: 'constant', label: 'bipolar pass element (roughly constant dropout)' },
  { value: 'classic', label: 'classic three-terminal (about 2 V, common practice)' },
];

/** A switching field as the switching estimate defines it, with this page's default. */
function sw(key, def, extra = {}) {
  const base = SWITCHING_DEFS.find((d) => d.key === key);
  if (!base) throw new Error(`no switching field ${key}`);
  return { ...base, def, ...extra };
}

/**
 * The fields, in groups. The defaults are the brief's invented demo: the soil-moisture logger's
 * 3.3 V rail for its microcontroller and radio (250 mA peak), fed from the 5.0 V rail (±3 %) in a
 * 60 °C enclosure — the linear regulator of the linear page's demo against a small invented
 * synchronous buck at 1 MHz. At full load the buck wastes far less; at the light loads where the
 * logger spends its time the fixed losses of the buck come close to the linear regulator's.
 */
export const GROUPS = [
  {
    id: 'rail',
    title: 'The rail',
    fields: [
      sw('vin-min', '4.85 V'), sw('vin-nom', '5.0 V'), sw('vin-max', '5.15 V'),
      sw('vout', '3.3 V', { note: 'A linear regulator only steps down: for a boost or inverting converter only the switching side is computed.' }),
      { key: 'vout-tol', prop: 'voutTolPct', kind: 'percent', unit: '± %', label: 'Output tolerance (linear headroom and heat)', optional: true, def: '2 %' },
      sw('iout', '250 mA'),
      { key: 'ta-max', prop: 'taMax', kind: 'temperature', unit: '°C', label: 'Hottest ambient', sym: ['T', 'a,max'], def: '60 °C' },
      { key: 'tj-max', prop: 'tjMax', kind: 'temperature', unit: '°C', label: 'Junction limit (both regulators)', sym: ['T', 'j,max'], def: '125 °C' },
      { key: 'headroom-margin', prop: 'headroomMarginV', kind: 'voltage', unit: 'V', label: 'Wanted headroom margin (linear)', optional: true, def: '0.3 V' },
      { key: 'thermal-margin', prop: 'thermalMarginC', kind: 'temperatureDifference', unit: 'K', label: 'Wanted margin below the junction limit', optional: true, def: '15 K' },
    ],
  },
  {
    id: 'linear',
    title: 'Linear regulator',
    fields: [
      { key: 'ldo-dropout-model', prop: 'ldoDropoutModel', type: 'select', options: DROPOUT_MODELS, label: 'Dropout model', def: 'resistive',
        choiceMessage: 'choose one of the listed models.' },
      { key: 'ldo-dropout', prop: 'ldoDropoutV', kind: 'voltage', unit: 'V', label: 'Dropout voltage', sym: ['V', 'do'], def: '300 mV' },
      { key: 'ldo-dropout-at', prop: 'ldoDropoutAtA', kind: 'current', unit: 'A', label: 'Dropout rated at load', def: '300 mA' },
      { key: 'ldo-rated', prop: 'ldoRatedA', kind: 'current', unit: 'A', label: 'Rated output current', def: '300 mA' },
      { key: 'ldo-iq', prop: 'ldoIq', kind: 'current', unit: 'A', label: 'Quiescent ground current', sym: ['I', 'q'], def: '50 µA' },
      { key: 'ldo-gnd', prop: 'ldoGndPct', kind: 'percent', unit: '% of load', label: 'Ground current added per load', def: '1 %' },
      { key: 'ldo-theta-ja', prop: 'ldoThetaJa', kind: 'thermalResistance', unit: 'K/W', label: 'Junction to ambient', sym: ['θ', 'JA'], def: '100 K/W' },
    ],
  },
  {
    id: 'converter',
    title: 'Switching converter',
    fields: [
      sw('topology', 'buck'), sw('rectifier', 'synchronous'), sw('light-load', 'discontinuousAllowed'),
      sw('fsw', '1 MHz'), sw('iq', '300 µA'), sw('min-on', '80 ns'), sw('max-duty', '95 %'),
      { key: 'sw-theta-ja', prop: 'swThetaJa', kind: 'thermalResistance', unit: 'K/W', label: 'Junction to ambient of the converter’s package', sym: ['θ', 'JA,sw'], def: '60 K/W',
        note: 'Switches and controller in one package; the inductor and a diode sit outside it.' },
    ],
  },
  {
    id: 'converter-lc',
    title: 'Converter: inductor and output capacitor',
    fields: [
      sw('inductance', '15 µH'), sw('ripple-ratio', '30 %'), sw('isat', '600 mA'), sw('dcr', '150 mΩ'), sw('core-loss', '5 mW'),
      sw('cout', '22 µF'), sw('esr', '5 mΩ'),
    ],
  },
  {
    id: 'converter-switches',
    title: 'Converter: switches',
    fields: [
      sw('main-rds-on', '150 mΩ'), sw('main-qg', '1.5 nC'), sw('rise-time', '5 ns'), sw('fall-time', '5 ns'), sw('drive-v', '5 V'),
      sw('rect-rds-on', '100 mΩ'), sw('rect-qg', '1.5 nC'), sw('dead-time', '15 ns'), sw('body-vf', '0.8 V'), sw('diode-vf', '0.4 V'),
      sw('coss-charge', '0.8 nC'), sw('coss', ''),
    ],
  },
];

export const FIELD_DEFS = GROUPS.flatMap((g) => g.fields);

/** The switching estimate's link keys: the ones this page shares with it. */
const SWITCHING_KEYS = new Set(SWITCHING_DEFS.map((d) => d.key));

const CORNER_SUB = { min: 'in,min', nom: 'in,nom', max: 'in,max' };
const CORNER_WORDS = { min: 'lowest input', nom: 'nominal input', max: 'highest input' };
const VERDICT_MARKS = { pass: '✓', marginal: '!', fail: '✗' };

const FULL_PAGE = new URL('../compare.html', import.meta.url).href;
const SWITCHING_PAGE = new URL('../switching.html', import.meta.url).href;

export class RailnoteCompare extends CalculatorElement {
  static spec = {
    name: 'compare',
    engine: ready,
    groups: GROUPS,
    page: FULL_PAGE,
    inputsLabel: 'Inputs of the linear-or-switching comparison',
    resultsLabel: 'Results of the linear-or-switching comparison',
    demoWords: 'the demo rail',
    subjectWords: 'the two regulators',
  };

  run(api, values) {
    return api.compareRails(values);
  }

  skipField(f) {
    return otherRectifierField(this, f);
  }

  /** As on the switching page: the other rectifier's fields are disabled and marked in words. */
  beforeCompute() {
    markRectifierFields(this);
    const model = this.fieldByKey('ldo-dropout-model').input.value;
    const unused = { classic: ['ldo-dropout', 'ldo-dropout-at'], constant: ['ldo-dropout-at'] }[model] || [];
    for (const f of this.fields) f.root.classList.toggle('rn-unused', unused.includes(f.def.key));
  }

  /** No shared verdict: each regulator's verdict side by side, then the comparison. */
  renderResult(r) {
    this.status.textContent = '';
    const parts = [
      this.sidesHead(r),
      this.tableBlock(r),
      this.crossingBlock(r),
      this.chartBlock(r),
      this.tradeoffsBlock(r),
      this.switchingCarry(),
      this.recordBlock(),
    ];
    this.results.replaceChildren(...parts.flat(Infinity).filter(Boolean));
    const lin = r.linearPossible ? `Linear: ${VERDICT_WORDS[r.linearVerdict] || r.linearVerdict}.` : 'No linear regulator can do this rail.';
    this.announcer.announce(`${lin} Switching: ${VERDICT_WORDS[r.switchingVerdict] || r.switchingVerdict}.`);
    keyboardScrollable(this.results);
    this.finish('ready', r);
  }

  sideVerdict(side, title, verdict, summary) {
    if (!verdict) {
      return h('div', { class: 'rn-verdict rn-verdict-fail rn-side-verdict', 'data-side': side, 'data-verdict': 'impossible' },
        h('p', { class: 'rn-side-title' }, title),
        h('p', { class: 'rn-verdict-word' },
          h('span', { class: 'rn-verdict-mark', 'aria-hidden': 'true' }, '✗'), h('span', {}, 'Not possible')),
        h('p', { class: 'rn-summary' }, summary));
    }
    return h('div', { class: `rn-verdict rn-verdict-${verdict} rn-side-verdict`, 'data-side': side, 'data-verdict': verdict },
      h('p', { class: 'rn-side-title' }, title),
      h('p', { class: 'rn-verdict-word' },
        h('span', { class: 'rn-verdict-mark', 'aria-hidden': 'true' }, VERDICT_MARKS[verdict] || ''),
        h('span', {}, VERDICT_WORDS[verdict] || String(verdict))),
      h('p', { class: 'rn-summary' }, summary));
  }

  sidesHead(r) {
    return h('div', { class: 'rn-sides' },
      r.linearPossible
        ? this.sideVerdict('linear', 'Linear regulator', r.linearVerdict, r.linearSummary)
        : this.sideVerdict('linear', 'Linear regulator', null, r.linearImpossible || 'A linear regulator cannot make this rail.'),
      this.sideVerdict('switching', 'Switching converter', r.switchingVerdict, r.switchingSummary));
  }

  tableBlock(r) {
    const cs = r.corners || [];
    const f = (v, k) => this.fmt(v, k);
    const rows = [
      ['Dissipation, all of it', 'dissipationW', 'power'],
      ['Dissipation in the regulator’s package', 'packageW', 'power'],
      ['Efficiency', 'efficiencyPct', 'percent'],
      ['Junction temperature at the hottest ambient', 'tjC', 'temperature'],
      ['Input current', 'inputCurrentA', 'current'],
    ];
    const head1 = h('tr', {}, h('th', { scope: 'col', rowspan: 2 }, 'At full load'),
      cs.map((c) => h('th', { scope: 'colgroup', colspan: 2 }, symbol('V', CORNER_SUB[c.label] || c.label), ' = ', f(c.vin, 'voltage'))));
    const head2 = h('tr', {}, cs.map(() => [h('th', { scope: 'col' }, 'linear'), h('th', { scope: 'col' }, 'switching')]));
    const body = rows.map(([label, q, kind]) => h('tr', { 'data-row': q }, h('th', { scope: 'row' }, label),
      cs.map((c) => [
        h('td', { 'data-corner': c.label, 'data-side': 'linear', 'data-q': q }, c.linear ? f(c.linear[q], kind) : '—'),
        h('td', { 'data-corner': c.label, 'data-side': 'switching', 'data-q': q, class: 'rn-side-sw' }, f(c.switching[q], kind)),
      ])));
    const table = h('table', { class: 'rn-corners rn-compare-table' },
      h('caption', {}, `Side by side at each input corner, full load ${f(this.values.iout, 'current')}, hottest ambient ${f(this.values.taMax, 'temperature')}; `
        + `junction through θJA ${f(this.values.ldoThetaJa, 'thermalResistance')} (linear) and ${f(this.values.swThetaJa, 'thermalResistance')} (switching)`),
      h('thead', {}, head1, head2), h('tbody', {}, body));
    const note = h('p', { class: 'rn-note-text' },
      'The converter’s package holds its switches and controller; its inductor (and a rectifier diode) dissipate outside it, so they count in the total but not in its junction temperature.');
    const inner = [h('div', { class: 'rn-table-scroll' }, table), note];
    if (this.hasAttribute('compact')) {
      return h('section', { class: 'rn-block', 'data-block': 'sides' }, h('details', {}, h('summary', {}, 'Side by side'), inner));
    }
    return h('section', { class: 'rn-block', 'data-block': 'sides' }, h('h3', {}, 'Side by side'), ...inner);
  }

  crossingBlock(r) {
    const items = (r.corners || []).map((c) => {
      const where = [symbol('V', CORNER_SUB[c.label] || c.label), ' = ', this.fmt(c.vin, 'voltage'), ': '];
      if (!c.linear) return h('li', { 'data-corner': c.label }, ...where, 'no linear regulator, so no crossing.');
      if (c.crossingLoadA === null || c.crossingLoadA === undefined) {
        const better = c.linear.dissipationW < c.switching.dissipationW ? 'the linear regulator' : 'the switching converter';
        return h('li', { 'data-corner': c.label }, ...where, 'they do not cross between 1 % and 120 % of the full load; ',
          better, ' dissipates less all along.');
      }
      // Which side wins above the crossing, read from the report's full-load figures.
      const swAbove = c.switching.dissipationW < c.linear.dissipationW;
      return h('li', { 'data-corner': c.label }, ...where, 'equal dissipation at ',
        h('strong', { 'data-q': 'crossingLoadA' }, this.fmt(c.crossingLoadA, 'current')),
        swAbove
          ? '; below it the linear regulator wastes less, above it the switching converter does.'
          : '; below it the switching converter wastes less, above it the linear regulator does.');
    });
    return h('section', { class: 'rn-block', 'data-block': 'crossing' }, h('h3', {}, 'Where they cross'),
      h('ul', { class: 'rn-crossing' }, items));
  }

  chartBlock(r) {
    const cv = r.curves;
    if (!cv || !cv.ioutA || cv.ioutA.length < 2) return null;
    const api = this.api;
    const fmtAxis = (kind) => (v) => formatWith(api, v, kind, 3);
    const xs = cv.ioutA;
    const ys = [...cv.switchingW, ...(cv.linearW || [])].filter((v) => v > 0);
    const series = [];
    if (cv.linearW) {
      series.push({ kind: 'line', tone: 2, dash: 'dashed', width: 2.5, points: xs.map((x, i) => [x, cv.linearW[i]]),
        label: 'Linear regulator: (V_in − V_out)·I_out plus its ground current' });
    }
    series.push({ kind: 'line', tone: 1, dash: 'solid', width: 2.5, points: xs.map((x, i) => [x, cv.switchingW[i]]),
      label: 'Switching converter: every loss, inductor included' });
    const nom = (r.corners || []).find((c) => c.label === 'nom');
    if (nom && nom.crossingLoadA !== null && nom.crossingLoadA !== undefined) {
      series.push({ kind: 'line', tone: 5, dash: 'dotted', width: 2, points: [[nom.crossingLoadA, Math.min(...ys) / 10], [nom.crossingLoadA, Math.max(...ys) * 10]],
        label: `Equal dissipation at ${this.fmt(nom.crossingLoadA, 'current')}` });
    }
    const iout = this.values.iout;
    series.push({ kind: 'line', tone: 4, dash: 'dashdot', width: 1.5, points: [[iout, Math.min(...ys) / 10], [iout, Math.max(...ys) * 10]],
      label: `Full load ${this.fmt(iout, 'current')}` });
    const width = this.columnWidth();
    this.chartWidth = width;
    const chart = renderChart({
      width, height: Math.round(Math.min(380, Math.max(280, width * 0.55))),
      title: 'Dissipation against load at the nominal input, both ways',
      description: `Load from ${fmtAxis('current')(xs[0])} to ${fmtAxis('current')(xs[xs.length - 1])} and dissipation on log axes, at the nominal input ${fmtAxis('voltage')(nom ? nom.vin : this.values.vinNom)}. `
        + (cv.linearW ? `Linear: ${fmtAxis('power')(cv.linearW[0])} to ${fmtAxis('power')(cv.linearW[cv.linearW.length - 1])}; ` : 'No linear curve; ')
        + `switching: ${fmtAxis('power')(cv.switchingW[0])} to ${fmtAxis('power')(cv.switchingW[cv.switchingW.length - 1])}.`,
      margin: { left: 88 },
      x: { label: 'Load current (log)', type: 'log', domain: [xs[0], xs[xs.length - 1]], format: fmtAxis('current'), nice: false },
      y: { label: 'Dissipation (log)', type: 'log', domain: [Math.min(...ys), Math.max(...ys)], format: fmtAxis('power') },
      series,
    });
    return h('section', { class: 'rn-block rn-window rn-dissipation', 'data-block': 'dissipation' }, h('h3', {}, 'Dissipation against load'),
      h('figure', {}, chart.svg, h('figcaption', {},
        'A linear regulator wastes in proportion to its load; a converter has fixed losses that dominate at light load. The lower line is the cooler choice at that load.',
        chart.legend)));
  }

  tradeoffsBlock(r) {
    if (!r.tradeoffs || !r.tradeoffs.length) return null;
    return h('section', { class: 'rn-block', 'data-block': 'tradeoffs' }, h('h3', {}, 'What the numbers do not show'),
      h('ul', { class: 'rn-tradeoffs' }, r.tradeoffs.map((t) => h('li', {}, t))));
  }

  /** The converter alone, in the switching estimate: this page's switching keys, as typed. */
  switchingLink() {
    const texts = new Map([...this.texts()].filter(([k]) => SWITCHING_KEYS.has(k)));
    return shareLink(SWITCHING_PAGE, texts);
  }

  switchingCarry() {
    return h('p', { class: 'rn-carry' },
      h('a', { href: this.switchingLink(), class: 'rn-switching-link', 'data-carry': 'switching' }, 'Open this converter in the switching estimate'),
      ': duty, ripple, currents, output ripple, each loss and efficiency against load at every input corner.');
  }
}

if (!customElements.get('railnote-compare')) customElements.define('railnote-compare', RailnoteCompare);
