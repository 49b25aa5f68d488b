// <railnote-switching>: the switching estimate as a custom element.
//
// Buck, boost or inverting buck-boost, with a second switch (synchronous) or a diode as the
// rectifier: duty cycle ideal and with losses, inductor ripple and currents, conduction mode, output
// ripple, every loss, efficiency and input current at each input corner, the loss breakdown as
// stacked bars and efficiency against load (log axis) at the three input corners.
//
// Its attributes are the link keys (topology, vin-min, inductance, main-rds-on, …); with `sync-url`
// they are the page's query keys too; `compact` folds the long tables (embeds). data-state and the
// `railnote-result` event are as for every railnote element (common.js, CalculatorElement).
// Fields the chosen rectifier does not use are disabled, marked in words, and not sent.
//
// The numbers all come from the WASM API (checkSwitching, formatQuantity, parseQuantity); this file
// lays them out and never computes them. The one exception is display scaling: the report gives
// duty cycles as fractions, shown here as percent (×100), since percent is how duty is read.
import { ready } from './engine.js';
import {
  h, symbol, formatWith, shareLink, CalculatorElement,
} from './common.js';
import { renderChart, renderStackedBars } from './chart.js';

/** The converters, as the WASM API names them. */
export const TOPOLOGIES = [
  { value: 'buck', label: 'Buck: steps the voltage down' },
  { value: 'boost', label: 'Boost: steps the voltage up' },
  { value: 'inverting', label: 'Inverting buck-boost: a negative output' },
];

export const RECTIFIERS = [
  { value: 'synchronous', label: 'A second switch (synchronous)' },
  { value: 'diode', label: 'A diode' },
];

export const LIGHT_LOAD = [
  { value: 'discontinuousAllowed', label: 'Current may stop (discontinuous allowed)' },
  { value: 'forcedContinuous', label: 'Kept continuous (forced; may reverse)' },
];

/** Fields only one rectifier uses; the other rectifier disables them and leaves them out. */
export const RECTIFIER_FIELDS = {
  synchronous: ['rect-rds-on', 'rect-qg', 'dead-time', 'body-vf'],
  diode: ['diode-vf'],
};
/**
 * Fields a diode design does not use but the API still takes (and ignores): disabled like the
 * others, still sent. The light-load choice only steers a second switch.
 */
export const DIODE_IGNORES = ['light-load'];

/** Disable the fields the chosen rectifier does not use and say so at each (shared with compare). */
export function markRectifierFields(widget) {
  const r = widget.fieldByKey('rectifier').input.value;
  const words = r === 'diode' ? 'not used with a diode' : 'used with a diode only';
  for (const f of widget.fields) {
    const off = widget.skipField(f) || (r === 'diode' && DIODE_IGNORES.includes(f.def.key));
    f.input.disabled = off;
    f.root.classList.toggle('rn-inactive', off);
    let why = f.root.querySelector('.rn-inactive-why');
    if (off && !why) {
      why = h('span', { class: 'rn-inactive-why' });
      f.root.querySelector('.rn-label').append(why);
    }
    if (why) why.textContent = off ? ` (${words})` : '';
  }
}

/** Whether a field belongs to the rectifier not chosen (not read, not sent). */
export function otherRectifierField(widget, f) {
  const r = widget.fieldByKey('rectifier').input.value;
  const other = r === 'synchronous' ? RECTIFIER_FIELDS.diode : r === 'diode' ? RECTIFIER_FIELDS.synchronous : [];
  return other.includes(f.def.key);
}

/**
 * The fields, in groups. key = attribute and URL query name; prop = the checkSwitching input key;
 * kind = the parseQuantity kind; def = default text. The defaults are the brief's invented demo:
 * the soil-moisture logger's 5.0 V rail, a synchronous buck from its 12 V lead-acid battery
 * (10.8–14.4 V) at up to 0.8 A, with invented part values that make a sensible design (about a
 * third of the load as ripple, transitions of a few nanoseconds, a small controller).
 */
export const GROUPS = [
  {
    id: 'converter',
    title: 'Converter',
    fields: [
      { key: 'topology', prop: 'topology', type: 'select', options: TOPOLOGIES, label: 'Topology', def: 'buck',
        choiceMessage: 'choose one of the listed converters.' },
      { key: 'rectifier', prop: 'rectifier', type: 'select', options: RECTIFIERS, label: 'Rectifier', def: 'synchronous',
        choiceMessage: 'choose a second switch or a diode.' },
      { key: 'light-load', prop: 'lightLoad', type: 'select', options: LIGHT_LOAD, label: 'At light load', def: 'discontinuousAllowed',
        choiceMessage: 'choose one of the two light-load behaviours.',
        note: 'A diode lets the current stop on its own, so this applies to the second switch only.' },
    ],
  },
  {
    id: 'supply',
    title: 'Supply and load',
    fields: [
      { key: 'vin-min', prop: 'vinMin', kind: 'voltage', unit: 'V', label: 'Lowest input', sym: ['V', 'in,min'], def: '10.8 V' },
      { key: 'vin-nom', prop: 'vinNom', kind: 'voltage', unit: 'V', label: 'Nominal input', sym: ['V', 'in,nom'], def: '12 V' },
      { key: 'vin-max', prop: 'vinMax', kind: 'voltage', unit: 'V', label: 'Highest input', sym: ['V', 'in,max'], def: '14.4 V' },
      { key: 'vout', prop: 'vout', kind: 'voltage', unit: 'V', label: 'Output voltage', sym: ['V', 'out'], def: '5.0 V',
        note: 'For the inverting converter give its size: a −12 V output is 12 V here.' },
      { key: 'iout', prop: 'iout', kind: 'current', unit: 'A', label: 'Full load', sym: ['I', 'out'], def: '0.8 A' },
    ],
  },
  {
    id: 'inductor',
    title: 'Inductor',
    fields: [
      { key: 'inductance', prop: 'inductance', kind: 'inductance', unit: 'H', label: 'Inductance', sym: ['L', ''], optional: true, def: '22 µH',
        note: 'Leave empty to have one proposed from the wanted ripple ratio.' },
      { key: 'ripple-ratio', prop: 'rippleRatioPct', kind: 'percent', unit: '%', label: 'Wanted ripple ratio ΔI/I', optional: true, def: '30 %',
        note: '20–40 % is the usual starting point (common practice).' },
      { key: 'dcr', prop: 'dcr', kind: 'resistance', unit: 'Ω', label: 'Winding resistance', sym: ['R', 'DCR'], def: '60 mΩ' },
      { key: 'core-loss', prop: 'coreLoss', kind: 'power', unit: 'W', label: 'Core loss at the operating point', def: '20 mW' },
      { key: 'isat', prop: 'isat', kind: 'current', unit: 'A', label: 'Saturation current', sym: ['I', 'sat'], optional: true, def: '1.5 A' },
    ],
  },
  {
    id: 'switches',
    title: 'Switches',
    fields: [
      { key: 'main-rds-on', prop: 'mainRdsOn', kind: 'resistance', unit: 'Ω', label: 'Main switch on-resistance', sym: ['R', 'on,main'], def: '80 mΩ',
        note: 'The switch the controller drives: high side of a buck or inverting converter, low side of a boost.' },
      { key: 'main-qg', prop: 'mainGateCharge', kind: 'charge', unit: 'C', label: 'Main switch gate charge', sym: ['Q', 'g,main'], def: '4 nC' },
      { key: 'rise-time', prop: 'riseTime', kind: 'time', unit: 's', label: 'Rise time of the switch node', sym: ['t', 'r'], def: '8 ns' },
      { key: 'fall-time', prop: 'fallTime', kind: 'time', unit: 's', label: 'Fall time of the switch node', sym: ['t', 'f'], def: '8 ns' },
      { key: 'drive-v', prop: 'driveV', kind: 'voltage', unit: 'V', label: 'Gate drive voltage', sym: ['V', 'drv'], def: '5 V' },
      { key: 'rect-rds-on', prop: 'rectRdsOn', kind: 'resistance', unit: 'Ω', label: 'Rectifier switch on-resistance', sym: ['R', 'on,rect'], def: '40 mΩ' },
      { key: 'rect-qg', prop: 'rectGateCharge', kind: 'charge', unit: 'C', label: 'Rectifier switch gate charge', sym: ['Q', 'g,rect'], def: '5 nC' },
      { key: 'dead-time', prop: 'deadTime', kind: 'time', unit: 's', label: 'Dead time at each edge', sym: ['t', 'dead'], def: '20 ns' },
      { key: 'body-vf', prop: 'bodyDiodeVf', kind: 'voltage', unit: 'V', label: 'Body-diode forward voltage', sym: ['V', 'f,body'], def: '0.8 V' },
      { key: 'diode-vf', prop: 'diodeVf', kind: 'voltage', unit: 'V', label: 'Rectifier diode forward voltage', sym: ['V', 'f'], def: '0.45 V' },
      { key: 'coss-charge', prop: 'cossCharge', kind: 'charge', unit: 'C', label: 'Switch-node charge', sym: ['Q', 'oss'], optional: true, def: '2 nC',
        note: 'Both switches’ output capacitance at the switch-node swing; or give the capacitance below instead (not both).' },
      { key: 'coss', prop: 'coss', kind: 'capacitance', unit: 'F', label: 'Switch-node capacitance', sym: ['C', 'oss'], optional: true, def: '' },
    ],
  },
  {
    id: 'output',
    title: 'Output capacitor',
    fields: [
      { key: 'cout', prop: 'cout', kind: 'capacitance', unit: 'F', label: 'Output capacitance', sym: ['C', 'out'], def: '22 µF',
        note: 'The effective value at the output voltage (ceramics lose much of theirs under bias).' },
      { key: 'esr', prop: 'esr', kind: 'resistance', unit: 'Ω', label: 'Equivalent series resistance', sym: ['R', 'ESR'], def: '10 mΩ' },
    ],
  },
  {
    id: 'controller',
    title: 'Controller and limits',
    fields: [
      { key: 'fsw', prop: 'fsw', kind: 'frequency', unit: 'Hz', label: 'Switching frequency', sym: ['f', 'sw'], def: '500 kHz' },
      { key: 'iq', prop: 'iq', kind: 'current', unit: 'A', label: 'Controller quiescent current', sym: ['I', 'q'], def: '1 mA' },
      { key: 'min-on', prop: 'minOnTime', kind: 'time', unit: 's', label: 'Minimum on-time', sym: ['t', 'on,min'], def: '100 ns',
        note: '0 means no limit.' },
      { key: 'max-duty', prop: 'maxDutyPct', kind: 'percent', unit: '%', label: 'Maximum duty', sym: ['D', 'max'], def: '95 %' },
    ],
  },
];

export const FIELD_DEFS = GROUPS.flatMap((g) => g.fields);

/**
 * The loss terms, in the order they stack. tone and fill tell them apart in the chart (main
 * switch: tone 1; rectifier switch or diode: tone 2; inductor: tone 3; controller: tone 4;
 * switch-node capacitance: tone 5). The terms a design has are numbered in this order, the
 * number tagging its bar segment, its legend entry and its table row.
 */
export const LOSS_TERMS = [
  { prop: 'mainConductionW', tone: 1, fill: 'solid', label: 'Main switch conduction' },
  { prop: 'mainSwitchingW', tone: 1, fill: 'hatch', label: 'Main switch transitions (switching)' },
  { prop: 'mainGateW', tone: 1, fill: 'dots', label: 'Main switch gate drive' },
  { prop: 'rectConductionW', tone: 2, fill: 'solid', label: 'Rectifier switch conduction' },
  { prop: 'rectGateW', tone: 2, fill: 'dots', label: 'Rectifier switch gate drive' },
  { prop: 'deadTimeW', tone: 2, fill: 'hatch', label: 'Body diode during the dead time' },
  { prop: 'diodeW', tone: 2, fill: 'cross', label: 'Rectifier diode' },
  { prop: 'outputCapW', tone: 5, fill: 'solid', label: 'Switch-node capacitance' },
  { prop: 'inductorCopperW', tone: 3, fill: 'solid', label: 'Inductor winding (DCR)' },
  { prop: 'inductorCoreW', tone: 3, fill: 'hatch', label: 'Inductor core' },
  { prop: 'controllerW', tone: 4, fill: 'hatch', label: 'Controller quiescent' },
  { prop: 'outputEsrW', tone: 5, fill: 'hatch', label: 'Output capacitor ESR' },
];

const CORNER_SUB = { min: 'in,min', nom: 'in,nom', max: 'in,max' };
const CORNER_WORDS = { min: 'lowest input', nom: 'nominal input', max: 'highest input' };
const MODE_WORDS = { continuous: 'continuous', discontinuous: 'discontinuous' };
/** Line styles of the three input corners in the efficiency plot (never colour alone). */
const CURVE_STYLE = {
  min: { tone: 1, dash: 'dashed' },
  nom: { tone: 4, dash: 'solid' },
  max: { tone: 2, dash: 'dashdotdot' },
};

const FULL_PAGE = new URL('../switching.html', import.meta.url).href;
const COMPARE_PAGE = new URL('../compare.html', import.meta.url).href;

export class RailnoteSwitching extends CalculatorElement {
  static spec = {
    name: 'switching',
    engine: ready,
    groups: GROUPS,
    page: FULL_PAGE,
    inputsLabel: 'Switching estimate inputs',
    resultsLabel: 'Results of the switching estimate',
    demoWords: 'the demo converter',
    subjectWords: 'the converter',
  };

  run(api, values) {
    return api.checkSwitching(values);
  }

  /** A field of the other rectifier is not read and not sent. */
  skipField(f) {
    return otherRectifierField(this, f);
  }

  /**
   * Disable the fields the chosen rectifier does not use and say so at each (they keep their
   * text, so a link still holds it, and come back as they were when the rectifier changes back).
   */
  beforeCompute() {
    markRectifierFields(this);
  }

  resultParts(r) {
    return [
      this.checksBlock(r),
      this.warningsBlock(r),
      this.inductorBlock(r),
      this.cornersBlock(r),
      this.lossBlock(r),
      this.efficiencyBlock(r),
      this.compareCarry(r),
    ];
  }

  pct(fraction) {
    return fraction === null || fraction === undefined ? '—' : this.fmt(fraction * 100, 'percent');
  }

  inductorBlock(r) {
    const L = h('strong', { 'data-q': 'inductanceH' }, this.fmt(r.inductanceH, 'inductance'));
    const words = r.inductanceProposed
      ? ['Proposed inductance ', L, ': the value that gives the wanted ripple ratio of ',
        this.fmt(this.values.rippleRatioPct, 'percent'), ' at the input corner that needs the most (the highest input for a buck, the one with the largest ripple otherwise). Pick the next standard value up and type it in.']
      : ['Inductance ', L, ', as given.'];
    const peak = ['Highest inductor peak over the corners ', h('strong', { 'data-q': 'peakCurrentA' }, this.fmt(r.peakCurrentA, 'current')),
      this.values.isat === undefined ? ': choose an inductor that saturates well above it.' : ['; the inductor saturates at ', this.fmt(this.values.isat, 'current'), '.']];
    return h('section', { class: 'rn-block', 'data-block': 'inductor' }, h('h3', {}, 'Inductor'),
      h('p', {}, ...words), h('p', {}, ...peak));
  }

  /** One row of the corners table: a heading and a cell per corner. */
  cornerRow(corners, head, q, cell) {
    return h('tr', { 'data-row': q }, h('th', { scope: 'row' }, head),
      corners.map((c) => h('td', { 'data-corner': c.label, 'data-q': q }, cell(c))));
  }

  cornersBlock(r) {
    const cs = r.corners || [];
    const f = (k) => (v) => this.fmt(v, k);
    const rows = [
      ['Conduction mode', 'mode', (c) => MODE_WORDS[c.mode] || c.mode],
      ['Duty, lossless', 'dutyIdeal', (c) => this.pct(c.dutyIdeal)],
      ['Duty, with losses', 'duty', (c) => [this.pct(c.duty), c.dutyLimited ? ' (at its limit)' : '']],
      ['Rectifier conducts', 'freewheelDuty', (c) => this.pct(c.freewheelDuty)],
      ['No inductor current', 'idleDuty', (c) => this.pct(c.idleDuty)],
      ['On-time', 'onTimeS', (c) => f('time')(c.onTimeS)],
      ['Inductor ripple, peak to peak', 'rippleA', (c) => f('current')(c.rippleA)],
      ['Ripple ratio', 'rippleRatioPct', (c) => f('percent')(c.rippleRatioPct)],
      ['Inductor current, average', 'inductorAvgA', (c) => f('current')(c.inductorAvgA)],
      ['Inductor current, peak', 'inductorPeakA', (c) => f('current')(c.inductorPeakA)],
      ['Inductor current, valley', 'inductorValleyA', (c) => f('current')(c.inductorValleyA)],
      ['Inductor current, RMS', 'inductorRmsA', (c) => f('current')(c.inductorRmsA)],
      ['Main switch, average / RMS', 'mainRmsA', (c) => `${f('current')(c.mainAvgA)} / ${f('current')(c.mainRmsA)}`],
      [this.values.rectifier === 'diode' ? 'Diode, average / RMS' : 'Rectifier switch, average / RMS', 'rectRmsA', (c) => `${f('current')(c.rectAvgA)} / ${f('current')(c.rectRmsA)}`],
      ['Load at the continuous / discontinuous boundary', 'boundaryLoadA', (c) => f('current')(c.boundaryLoadA)],
      ['Output ripple, peak to peak', 'outputRippleV', (c) => f('voltage')(c.outputRippleV)],
      ['… from the capacitance', 'outputRippleCapV', (c) => f('voltage')(c.outputRippleCapV)],
      ['… from the ESR', 'outputRippleEsrV', (c) => f('voltage')(c.outputRippleEsrV)],
      ['Output power', 'outputW', (c) => f('power')(c.outputW)],
      ['Losses', 'lossW', (c) => f('power')(c.losses && c.losses.totalW)],
      ['Efficiency', 'efficiencyPct', (c) => f('percent')(c.efficiencyPct)],
      ['Input power', 'inputW', (c) => f('power')(c.inputW)],
      ['Input current', 'inputCurrentA', (c) => f('current')(c.inputCurrentA)],
    ];
    if (cs.some((c) => c.lForRatioH !== null && c.lForRatioH !== undefined)) {
      rows.push(['Inductance for the wanted ripple ratio', 'lForRatioH', (c) => f('inductance')(c.lForRatioH)]);
    }
    const head = h('tr', {}, h('th', { scope: 'col' }, 'At full load'),
      cs.map((c) => h('th', { scope: 'col' }, symbol('V', CORNER_SUB[c.label] || c.label), ' = ', this.fmt(c.vin, 'voltage'))));
    const table = h('table', { class: 'rn-corners rn-sw-corners' },
      h('caption', {}, `At each input corner, full load ${this.fmt(this.values.iout, 'current')}`),
      h('thead', {}, head),
      h('tbody', {}, rows.map(([label, q, cell]) => this.cornerRow(cs, label, q, cell))));
    const inner = [h('div', { class: 'rn-table-scroll' }, table)];
    if (this.hasAttribute('compact')) {
      return h('section', { class: 'rn-block', 'data-block': 'corners' }, h('details', {}, h('summary', {}, 'Input corners'), inner));
    }
    return h('section', { class: 'rn-block', 'data-block': 'corners' }, h('h3', {}, 'Input corners'), ...inner);
  }

  chartWidthNow() {
    const width = this.columnWidth();
    this.chartWidth = width;
    return width;
  }

  lossBlock(r) {
    const cs = r.corners || [];
    // Only the terms this design has, numbered in order (a diode design has no gate drive of a
    // second switch, a synchronous one no diode).
    const terms = LOSS_TERMS.filter((t) => cs.some((c) => c.losses && c.losses[t.prop] > 0))
      .map((t, i) => ({ ...t, short: String(i + 1) }));
    const api = this.api;
    const width = this.chartWidthNow();
    const chart = renderStackedBars({
      width,
      title: 'Loss breakdown at each input corner, full load',
      description: cs.map((c) => `${CORNER_WORDS[c.label] || c.label} ${formatWith(api, c.vin, 'voltage')}: losses ${formatWith(api, c.losses.totalW, 'power')}`).join('; ') + '.',
      bars: cs.map((c) => ({ label: `${c.label} ${formatWith(api, c.vin, 'voltage')}` })),
      parts: terms.map((t) => ({ label: t.label, short: t.short, tone: t.tone, fill: t.fill, values: cs.map((c) => c.losses[t.prop]) })),
      x: { label: 'Loss at full load', format: (v) => formatWith(api, v, 'power', 3) },
      margin: { left: 96, right: 80 },
    });
    const head = h('tr', {}, h('th', { scope: 'col' }, 'Loss'),
      cs.map((c) => h('th', { scope: 'col' }, symbol('V', CORNER_SUB[c.label] || c.label), ' = ', this.fmt(c.vin, 'voltage'))));
    const body = terms.map((t) => h('tr', { 'data-loss': t.prop },
      h('th', { scope: 'row' }, `${t.short}: ${t.label}`),
      cs.map((c) => h('td', { 'data-corner': c.label }, this.fmt(c.losses[t.prop], 'power')))));
    body.push(h('tr', { 'data-loss': 'totalW', class: 'rn-total-row' }, h('th', { scope: 'row' }, 'Total'),
      cs.map((c) => h('td', { 'data-corner': c.label }, this.fmt(c.losses.totalW, 'power')))));
    const table = h('table', { class: 'rn-corners rn-loss-table' },
      h('caption', {}, 'Each loss at full load (terms that are zero everywhere are left out)'),
      h('thead', {}, head), h('tbody', {}, body));
    const tableBlock = this.hasAttribute('compact')
      ? h('details', {}, h('summary', {}, 'Each loss as numbers'), h('div', { class: 'rn-table-scroll' }, table))
      : h('div', { class: 'rn-table-scroll' }, table);
    return h('section', { class: 'rn-block rn-window rn-losses', 'data-block': 'losses' }, h('h3', {}, 'Where the power goes'),
      h('figure', {}, chart.svg, h('figcaption', {},
        'Each bar is one input corner at full load, its losses laid end to end; the number at its end is their total. ',
        'Switches are drawn in one colour per switch, each loss with its own fill, numbered as in the table.', chart.legend)),
      tableBlock);
  }

  efficiencyBlock(r) {
    const curves = r.sweep || [];
    if (!curves.length) return null;
    const api = this.api;
    const fmtAxis = (kind) => (v) => formatWith(api, v, kind, 3);
    const xs = curves.flatMap((c) => c.ioutA || []);
    const ys = curves.flatMap((c) => c.efficiencyPct || []);
    const x0 = Math.min(...xs);
    const x1 = Math.max(...xs);
    const lo = Math.min(...ys);
    const series = curves.map((c) => ({
      kind: 'line', ...(CURVE_STYLE[c.label] || { tone: 3, dash: 'dotted' }), width: 2.5,
      points: c.ioutA.map((x, i) => [x, c.efficiencyPct[i]]),
      label: `${CORNER_WORDS[c.label] || c.label}, ${this.fmt(c.vin, 'voltage')}`,
    }));
    const iout = this.values.iout;
    series.push({ kind: 'line', tone: 5, dash: 'dotted', width: 2, points: [[iout, 0], [iout, 100]],
      label: `Full load ${this.fmt(iout, 'current')}` });
    const nom = (r.corners || []).find((c) => c.label === 'nom');
    const nomCurve = curves.find((c) => c.label === 'nom');
    if (nom && nomCurve && (nomCurve.discontinuous || []).some(Boolean) && nom.boundaryLoadA > x0 && nom.boundaryLoadA < x1) {
      series.push({ kind: 'line', tone: 3, dash: 'dashdot', width: 1.5, points: [[nom.boundaryLoadA, 0], [nom.boundaryLoadA, 100]],
        label: `Continuous above, discontinuous below: ${this.fmt(nom.boundaryLoadA, 'current')} at the nominal input` });
    }
    const width = this.chartWidthNow();
    const chart = renderChart({
      width, height: Math.round(Math.min(380, Math.max(280, width * 0.55))),
      title: 'Efficiency against load at the three input corners',
      description: `Load from ${fmtAxis('current')(x0)} to ${fmtAxis('current')(x1)} on a log axis, efficiency in percent up. `
        + curves.map((c) => `${CORNER_WORDS[c.label] || c.label}: ${fmtAxis('percent')(c.efficiencyPct[0])} at the lightest load, `
          + `${fmtAxis('percent')(c.efficiencyPct[c.efficiencyPct.length - 1])} at the heaviest`).join('; ') + '.',
      margin: { left: 84 },
      // The sweep's own extent (nice: false): 1 % to 120 % of the load, not whole decades.
      x: { label: 'Load current (log)', type: 'log', domain: [x0, x1], format: fmtAxis('current'), nice: false },
      y: { label: 'Efficiency', domain: [Math.max(0, Math.floor(lo / 10) * 10), 100], format: fmtAxis('percent'), nice: false },
      series,
    });
    return h('section', { class: 'rn-block rn-window rn-efficiency', 'data-block': 'efficiency' }, h('h3', {}, 'Efficiency against load'),
      h('figure', {}, chart.svg, h('figcaption', {},
        'From 1 % to 120 % of the full load. At light load the fixed losses (gate drive, core, controller, switch-node charge) are a large share of a small output, so efficiency falls.',
        chart.legend)));
  }

  /** A link to the comparison page with the same rail and the same converter. */
  compareLink() {
    const texts = new Map([...this.texts()]);
    return shareLink(COMPARE_PAGE, texts);
  }

  compareCarry() {
    if (this.values.topology === 'boost' || this.values.topology === 'inverting') {
      return h('p', { class: 'rn-carry' },
        'A linear regulator cannot step up or invert, so there is no linear version of this rail to compare with.');
    }
    return h('p', { class: 'rn-carry' },
      h('a', { href: this.compareLink(), class: 'rn-compare-link', 'data-carry': 'compare' }, 'Compare with a linear regulator'),
      ': opens the comparison with this rail and this converter, beside a linear regulator whose numbers you set there.');
  }
}

if (!customElements.get('railnote-switching')) customElements.define('railnote-switching', RailnoteSwitching);
