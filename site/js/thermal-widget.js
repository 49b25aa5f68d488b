// <railnote-thermal>: the thermal path calculator as a custom element.
//
// Steady state through θJA or the chain θJC + θCS + θSA, the heat sink a design needs, junction
// estimates from a measured case-top or board temperature (ΨJT, ΨJB), the derating plot, and the
// transient of a Foster network: Z_th(t), a periodic pulse train and T_j over time.
//
// Its attributes are the link keys (power, ta-max, theta-jc, r1, tau1, …); with `sync-url` they
// are the page's query keys too; `compact` folds the Z_th plot (embeds). data-state and the
// `railnote-result` event are as for every railnote element (common.js, CalculatorElement).
//
// The numbers all come from the WASM API (checkThermal, formatQuantity, parseQuantity); this file
// lays them out and never computes them.
import { ready } from './engine.js';
import {
  h, symbol, formatWith, rowFieldDefs, CalculatorElement, VERDICT_WORDS,
} from './common.js';
import { renderChart } from './chart.js';

/** The two paths, as the WASM API names them. */
const PATHS = [
  { value: 'ja', label: 'θJA alone: the part on its board, no heat sink' },
  { value: 'chain', label: 'θJC + θCS + θSA: the part on a heat sink' },
];

/** Which path fields each path uses; the others are hidden and not sent. */
const PATH_FIELDS = { ja: ['theta-ja'], chain: ['theta-jc', 'theta-cs', 'theta-sa'] };

/** Repeats of the profile in the T_j(t) series: a count, so a list to choose from. */
const PERIOD_CHOICES = [1, 2, 3, 5, 10, 20, 50, 100, 200, 500, 1000]
  .map((n) => ({ value: String(n), apiValue: n, label: n === 1 ? 'once' : `${n} times` }));

const STAGES = 8;
const STEPS = 8;

/**
 * The fields, in groups. key = attribute and URL query name; prop = the checkThermal input key;
 * kind = the parseQuantity kind; def = default text: the brief's invented demo, the soil-moisture
 * logger's 3.3 V regulator (0.49 W at its worst) in a 60 °C enclosure, its radio sending in
 * bursts, with an invented package-like Foster network whose stages add up to its θJA.
 */
export const GROUPS = [
  {
    id: 'limits',
    title: 'Power and limits',
    fields: [
      { key: 'power', prop: 'powerW', kind: 'power', unit: 'W', label: 'Steady dissipation', sym: ['P', ''], def: '0.49 W' },
      { key: 'ta-max', prop: 'taMax', kind: 'temperature', unit: '°C', label: 'Hottest ambient', sym: ['T', 'a,max'], def: '60 °C' },
      { key: 'ta-min', prop: 'taMin', kind: 'temperature', unit: '°C', label: 'Coldest ambient', sym: ['T', 'a,min'], def: '-20 °C',
        note: 'Where the derating plot starts.' },
      { key: 'tj-max', prop: 'tjMax', kind: 'temperature', unit: '°C', label: 'Junction limit', sym: ['T', 'j,max'], def: '125 °C' },
      { key: 'margin', prop: 'marginC', kind: 'temperatureDifference', unit: 'K', label: 'Wanted margin below the junction limit', def: '15 K' },
      { key: 'power-rating', prop: 'powerRatingW', kind: 'power', unit: 'W', label: 'Package power rating', optional: true, def: '',
        note: 'Caps the derating curve.' },
    ],
  },
  {
    id: 'path',
    title: 'Thermal path',
    fields: [
      { key: 'path', prop: 'path', type: 'select', options: PATHS, label: 'Path from junction to ambient', def: 'ja',
        choiceMessage: 'choose one of the listed paths.' },
      { key: 'theta-ja', prop: 'thetaJa', kind: 'thermalResistance', unit: 'K/W', label: 'Junction to ambient', sym: ['θ', 'JA'], def: '100 K/W' },
      { key: 'theta-jc', prop: 'thetaJc', kind: 'thermalResistance', unit: 'K/W', label: 'Junction to case', sym: ['θ', 'JC'], def: '15 K/W' },
      { key: 'theta-cs', prop: 'thetaCs', kind: 'thermalResistance', unit: 'K/W', label: 'Case to sink (interface material)', sym: ['θ', 'CS'], def: '1.5 K/W' },
      { key: 'theta-sa', prop: 'thetaSa', kind: 'thermalResistance', unit: 'K/W', label: 'Sink to ambient (the chosen heat sink)', sym: ['θ', 'SA'], optional: true, def: '',
        note: 'Leave empty to get the θSA the design needs.' },
    ],
  },
  {
    id: 'measured',
    title: 'Measured temperatures',
    note: 'Optional: a reading and its Ψ together give a junction estimate.',
    fields: [
      { key: 'psi-jt', prop: 'psiJt', kind: 'thermalResistance', unit: 'K/W', label: 'Junction to case top', sym: ['Ψ', 'JT'], optional: true, def: '8 K/W' },
      { key: 'case-top', prop: 'caseTopC', kind: 'temperature', unit: '°C', label: 'Measured case-top temperature', sym: ['T', 'top'], optional: true, def: '95 °C' },
      { key: 'psi-jb', prop: 'psiJb', kind: 'thermalResistance', unit: 'K/W', label: 'Junction to board', sym: ['Ψ', 'JB'], optional: true, def: '' },
      { key: 'board', prop: 'boardC', kind: 'temperature', unit: '°C', label: 'Measured board temperature next to the part', sym: ['T', 'b'], optional: true, def: '' },
    ],
  },
  {
    id: 'foster',
    title: 'Foster network (transient)',
    note: 'Stages of the part’s thermal impedance, from its datasheet or a fit to a measured curve. Empty rows are left out; no stages, no transient.',
    rows: {
      caption: 'Foster network stages',
      rowWord: 'Stage',
      columns: [
        { label: 'R', sym: ['R', ''], unit: 'K/W' },
        { label: 'τ', sym: ['τ', ''], unit: 's' },
      ],
    },
    fields: rowFieldDefs('foster', STAGES, [
      { key: 'r', prop: 'r', kind: 'thermalResistance', unit: 'K/W', label: 'thermal resistance', sym: ['R', ''],
        defaults: ['2 K/W', '8 K/W', '25 K/W', '65 K/W'] },
      { key: 'tau', prop: 'tau', kind: 'time', unit: 's', label: 'time constant', sym: ['τ', ''],
        defaults: ['1 ms', '10 ms', '100 ms', '2 s'] },
    ], 'Stage'),
  },
  {
    id: 'pulse',
    title: 'Pulsed load',
    note: 'Optional: a power for the on time, then nothing, every period.',
    fields: [
      { key: 'pulse-power', prop: 'pulsePowerW', kind: 'power', unit: 'W', label: 'Power during a pulse', sym: ['P', 'pulse'], optional: true, def: '0.49 W' },
      { key: 'pulse-on', prop: 'pulseOnS', kind: 'time', unit: 's', label: 'On time of each pulse', sym: ['t', 'on'], optional: true, def: '50 ms' },
      { key: 'pulse-period', prop: 'pulsePeriodS', kind: 'time', unit: 's', label: 'Period', sym: ['T', ''], optional: true, def: '500 ms' },
      { key: 'periods', prop: 'profilePeriods', type: 'select', options: PERIOD_CHOICES, label: 'Repeats shown in the plot over time', def: '10',
        choiceMessage: 'choose one of the listed counts.' },
    ],
  },
  {
    id: 'profile',
    title: 'Power profile (instead of the pulse)',
    note: 'Optional: steps of power and duration, repeated. Empty: the pulse is the profile.',
    rows: {
      caption: 'Power profile steps',
      rowWord: 'Step',
      columns: [
        { label: 'P', sym: ['P', ''], unit: 'W' },
        { label: 'duration', sym: ['Δt', ''], unit: 's' },
      ],
    },
    folded: 'Profile steps',
    fields: rowFieldDefs('profile', STEPS, [
      { key: 'p', prop: 'powerW', kind: 'power', unit: 'W', label: 'power', sym: ['P', ''] },
      { key: 'd', prop: 'durationS', kind: 'time', unit: 's', label: 'duration', sym: ['Δt', ''] },
    ], 'Step'),
  },
];

export const FIELD_DEFS = GROUPS.flatMap((g) => g.fields);

const FULL_PAGE = new URL('../thermal.html', import.meta.url).href;

export class RailnoteThermal extends CalculatorElement {
  static spec = {
    name: 'thermal',
    engine: ready,
    groups: GROUPS,
    page: FULL_PAGE,
    inputsLabel: 'Thermal path inputs',
    resultsLabel: 'Results of the thermal path check',
    demoWords: 'the demo part',
    subjectWords: 'the thermal path',
  };

  run(api, values) {
    return api.checkThermal(values);
  }

  pathNow() {
    return this.fieldByKey('path').input.value;
  }

  /** A path field the chosen path does not use is not read and not sent. */
  skipField(f) {
    const used = PATH_FIELDS[this.pathNow()];
    const all = [...PATH_FIELDS.ja, ...PATH_FIELDS.chain];
    return Boolean(used) && all.includes(f.def.key) && !used.includes(f.def.key);
  }

  /** Show only the fields the chosen path uses (hidden ones keep their text for links). */
  beforeCompute() {
    for (const f of this.fields) f.root.hidden = this.skipField(f);
  }

  resultParts(r) {
    return [
      this.checksBlock(r),
      this.warningsBlock(r),
      this.steadyBlock(r),
      this.heatSinkBlock(r),
      this.measuredBlock(r),
      this.deratingBlock(r),
      this.transientBlock(r),
    ];
  }

  /** A term and its description, for the definition lists of results. */
  row(dt, ...dd) {
    return [h('dt', {}, dt), h('dd', {}, ...dd)];
  }

  steadyBlock(r) {
    const s = r.steady || {};
    const chain = this.values.path === 'chain';
    const block = (...children) => h('section', { class: 'rn-block', 'data-block': 'steady' }, h('h3', {}, 'Steady path'), ...children);
    if (s.tjC === null || s.tjC === undefined) {
      return block(h('p', {},
        'No heat sink is chosen (θSA is empty), so the junction temperature is not computed: ',
        'the heat-sink need below says which θSA would do.'));
    }
    const theta = chain ? ['θ = θJC + θCS + θSA = ', h('strong', { 'data-q': 'thetaTotal' }, this.fmt(s.thetaTotal, 'thermalResistance'))]
      : ['θJA = ', h('strong', { 'data-q': 'thetaTotal' }, this.fmt(s.thetaTotal, 'thermalResistance'))];
    return block(h('dl', { class: 'rn-limits' },
      this.row('Junction temperature', h('strong', { 'data-q': 'tjC' }, this.fmt(s.tjC, 'temperature')),
        ' at the hottest ambient, through ', ...theta, '.'),
      this.row('Margin to the limit', h('strong', { 'data-q': 'marginC' }, this.fmt(s.marginC, 'temperatureDifference')),
        ' (wanted ', this.fmt(this.values.marginC, 'temperatureDifference'), ').'),
      this.row('Largest steady power', h('strong', { 'data-q': 'maxPowerW' }, this.fmt(s.maxPowerW, 'power')),
        ' at the hottest ambient, keeping the wanted margin.'),
      this.row('Hottest ambient', h('strong', { 'data-q': 'hottestAmbientC' }, this.fmt(s.hottestAmbientC, 'temperature')),
        ' at this dissipation, keeping the wanted margin.')));
  }

  heatSinkBlock(r) {
    const s = r.steady || {};
    const head = h('h3', {}, 'Heat-sink need');
    if (this.values.path !== 'chain') {
      return h('section', { class: 'rn-block', 'data-block': 'heatSink' }, head,
        h('p', {}, 'The path is θJA alone, with no heat sink in it. To size a heat sink, choose the path θJC + θCS + θSA.'));
    }
    const need = s.thetaSaNeededKPerW;
    let words;
    if (need === null || need === undefined) {
      words = h('p', {}, 'The engine gave no heat-sink need for these inputs.');
    } else if (need < 0) {
      words = h('p', { class: 'rn-no-sink' },
        'No heat sink can do it. The θSA needed comes out negative (', h('strong', { 'data-q': 'thetaSaNeeded' }, this.fmt(need, 'thermalResistance')),
        '): θJC and θCS alone already take the junction past its limit less the margin, so even a perfect heat sink (θSA = 0) would leave it too hot. ',
        'Lower the dissipation, or find a lower θJC (another package) or θCS (a better interface material).');
    } else {
      words = h('p', {},
        'A heat sink with θSA at most ', h('strong', { 'data-q': 'thetaSaNeeded' }, this.fmt(need, 'thermalResistance')),
        ' keeps the junction at the wanted margin below its limit at the hottest ambient; a lower θSA (a larger sink, or airflow) keeps it cooler. ',
        'Read the sink’s θSA at its real airflow and orientation.',
        this.values.thetaSa === undefined ? '' : [' The chosen one has ', this.fmt(this.values.thetaSa, 'thermalResistance'), '.']);
    }
    return h('section', { class: 'rn-block', 'data-block': 'heatSink' }, head, words);
  }

  measuredBlock(r) {
    const m = r.measured || {};
    const items = [];
    if (m.fromCaseTopC !== null && m.fromCaseTopC !== undefined) {
      items.push(this.row(['From the case top (', symbol('Ψ', 'JT'), ', JESD51-2)'],
        h('strong', { 'data-q': 'fromCaseTopC' }, this.fmt(m.fromCaseTopC, 'temperature')),
        ': the reading ', this.fmt(this.values.caseTopC, 'temperature'), ' plus ΨJT ', this.fmt(this.values.psiJt, 'thermalResistance'),
        ' times the dissipation.'));
    }
    if (m.fromBoardC !== null && m.fromBoardC !== undefined) {
      items.push(this.row(['From the board (', symbol('Ψ', 'JB'), ', JESD51-12)'],
        h('strong', { 'data-q': 'fromBoardC' }, this.fmt(m.fromBoardC, 'temperature')),
        ': the reading ', this.fmt(this.values.boardC, 'temperature'), ' plus ΨJB ', this.fmt(this.values.psiJb, 'thermalResistance'),
        ' times the dissipation.'));
    }
    const head = h('h3', {}, 'Junction from a measured temperature');
    if (!items.length) {
      return h('section', { class: 'rn-block', 'data-block': 'measured' }, head,
        h('p', {}, 'No reading given. Measure the case top or the board next to the part, and give it with ΨJT or ΨJB from the datasheet, for an estimate from the real board.'));
    }
    return h('section', { class: 'rn-block', 'data-block': 'measured' }, head,
      h('dl', { class: 'rn-limits' }, items),
      h('p', { class: 'rn-note-text' }, 'Ψ is a characterisation figure, not a resistance the heat flows through: it turns a reading into an estimate only. A measured temperature beats any estimate.'));
  }

  chartWidthNow() {
    const width = this.columnWidth();
    this.chartWidth = width;
    return width;
  }

  figure(cls, title, chart, caption) {
    return h('section', { class: `rn-block rn-window ${cls}` }, h('h3', {}, title),
      h('figure', {}, chart.svg, h('figcaption', {}, caption, chart.legend)));
  }

  deratingBlock(r) {
    const d = r.derating;
    if (!d) {
      return h('section', { class: 'rn-block rn-derating' }, h('h3', {}, 'Derating'),
        h('p', {}, 'The derating plot needs the whole path: give the chosen heat sink’s θSA.'));
    }
    const api = this.api;
    const fmtAxis = (kind) => (v) => formatWith(api, v, kind, 3);
    const limit = d.limit || [];
    const withMargin = d.withMargin || [];
    const x0 = limit.length ? limit[0][0] : 0;
    const x1 = limit.length ? limit[limit.length - 1][0] : 1;
    const peak = Math.max(...limit.map((p) => p[1]), d.powerW || 0);
    const top = peak * 1.15 || 1;
    const series = [];
    if (limit.length >= 2) {
      series.push({ kind: 'area', tone: 2, legend: false, points: [...limit, [x1, top * 10], [x0, top * 10]] });
      series.push({ kind: 'line', tone: 2, dash: 'dashdotdot', width: 2.5, points: limit,
        label: d.ratingW === null || d.ratingW === undefined
          ? 'Largest power with the junction exactly at its limit: too hot above it'
          : 'Largest power with the junction exactly at its limit, capped by the rating: not allowed above it' });
    }
    if (withMargin.length >= 2) {
      series.push({ kind: 'line', tone: 1, dash: 'dashed', width: 2.5, points: withMargin,
        label: 'Largest power keeping the wanted margin: the design belongs below it' });
    }
    if (d.ratingW !== null && d.ratingW !== undefined) {
      series.push({ kind: 'line', tone: 3, dash: 'dotted', width: 2.5, points: [[x0, d.ratingW], [x1, d.ratingW]],
        label: `Package power rating (${this.fmt(d.ratingW, 'power')}): the curves stop there` });
    }
    series.push({ kind: 'marker', tone: 5, points: [[d.taMax, d.powerW]],
      label: `Operating point: ${this.fmt(d.powerW, 'power')} at ${this.fmt(d.taMax, 'temperature')}` });
    const notes = [];
    if (limit.length >= 2) notes.push({ x: x1 - (x1 - x0) * 0.02, y: top * 0.93, text: d.ratingW === null || d.ratingW === undefined ? 'too hot' : 'too hot or over the rating', anchor: 'end' });
    const width = this.chartWidthNow();
    const chart = renderChart({
      width, height: Math.round(Math.min(360, Math.max(280, width * 0.5))),
      title: 'Derating: the largest power against ambient temperature',
      description: `Ambient from ${fmtAxis('temperature')(x0)} to ${fmtAxis('temperature')(x1)} across, power from 0 up. `
        + `The operating point is ${fmtAxis('power')(d.powerW)} at ${fmtAxis('temperature')(d.taMax)}. Verdict: ${VERDICT_WORDS[r.verdict] || r.verdict}.`,
      margin: { left: 80 },
      x: { label: 'Ambient temperature', domain: [x0, x1], format: fmtAxis('temperature'), nice: false },
      y: { label: 'Power', domain: [0, top], format: fmtAxis('power'), nice: false },
      series,
      notes,
    });
    return this.figure('rn-derating', 'Derating', chart,
      d.ratingW === null || d.ratingW === undefined
        ? 'The shaded area is beyond the junction limit. The operating point should sit below the margin line.'
        : 'The shaded area is beyond the junction limit or the package rating. The operating point should sit below the margin line.');
  }

  transientBlock(r) {
    const t = r.transient;
    if (!t) {
      return h('section', { class: 'rn-block rn-transient' }, h('h3', {}, 'Transient'),
        h('p', {}, 'No Foster network given, so there is no transient result. Fill in its stages (R and τ) to see Z_th(t), a pulse train and T_j over time.'));
    }
    const parts = [];
    const p = t.pulse;
    const dl = h('dl', { class: 'rn-limits' },
      this.row('Network total', h('strong', { 'data-q': 'rTotal' }, this.fmt(t.rTotal, 'thermalResistance')),
        ': Z_th after a long time, which should match the steady θ.'));
    if (p) {
      dl.append(...this.row('Pulse train', h('strong', { 'data-q': 'dutyPct' }, this.fmt(p.dutyPct, 'percent')), ' duty.'),
        ...this.row('One pulse from cold', h('strong', { 'data-q': 'singlePeakC' }, this.fmt(p.singlePeakC, 'temperature')),
          ' at its end, starting at the hottest ambient.'),
        ...this.row('Periodic peak', h('strong', { 'data-q': 'trainPeakC' }, this.fmt(p.trainPeakC, 'temperature')),
          ' at the end of each pulse once the train has settled; valley ',
          h('strong', { 'data-q': 'trainValleyC' }, this.fmt(p.trainValleyC, 'temperature')), ' just before the next.'),
        ...this.row('Average alone', h('strong', { 'data-q': 'averageC' }, this.fmt(p.averageC, 'temperature')),
          ': what the duty-weighted power predicts; the peak is what the junction sees.'));
    }
    dl.append(...this.row('Highest in the series', h('strong', { 'data-q': 'seriesPeakC' }, this.fmt(t.seriesPeakC, 'temperature')),
      ' over the repeats plotted below, from a cold start.'));
    parts.push(h('section', { class: 'rn-block', 'data-block': 'transient' }, h('h3', {}, 'Transient'), dl));
    parts.push(this.zthBlock(t));
    parts.push(this.seriesBlock(r));
    return parts;
  }

  zthBlock(t) {
    const api = this.api;
    const fmtAxis = (kind) => (v) => formatWith(api, v, kind, 3);
    const z = t.zth || [];
    if (z.length < 2) return null;
    const series = [
      { kind: 'line', tone: 1, dash: 'solid', width: 2.5, points: z, label: 'Z_th(t): the junction’s rise per watt after a step of power' },
      { kind: 'line', tone: 4, dash: 'dotted', width: 2, points: [[z[0][0], t.rTotal], [z[z.length - 1][0], t.rTotal]],
        label: `Σ R_i = ${this.fmt(t.rTotal, 'thermalResistance')}: where Z_th settles` },
    ];
    if (this.values.pulseOnS !== undefined && t.pulse) {
      series.push({ kind: 'line', tone: 5, dash: 'dashdot', width: 2, points: [[this.values.pulseOnS, 0], [this.values.pulseOnS, t.rTotal * 2]],
        label: `Pulse on time t_on = ${this.fmt(this.values.pulseOnS, 'time')}` });
    }
    const width = this.chartWidthNow();
    const chart = renderChart({
      width, height: Math.round(Math.min(340, Math.max(260, width * 0.45))),
      title: 'Transient thermal impedance Z_th(t) of the Foster network',
      description: `Time from ${fmtAxis('time')(z[0][0])} to ${fmtAxis('time')(z[z.length - 1][0])} on a log axis, Z_th from 0 to ${fmtAxis('thermalResistance')(t.rTotal)}.`,
      // Room left of the axis for its longest tick labels ("50.0 K/W") beside the axis title.
      margin: { left: 88 },
      x: { label: 'Time after a step of power (log)', type: 'log', domain: [z[0][0], z[z.length - 1][0]], format: fmtAxis('time') },
      y: { label: 'Z_th', domain: [0, t.rTotal * 1.08], format: fmtAxis('thermalResistance'), nice: false },
      series,
    });
    const block = this.figure('rn-zth', 'Thermal impedance after a step of power', chart,
      'A short pulse heats the junction by P·Z_th(t_on), much less than P·θ: the slow stages have no time to fill.');
    if (this.hasAttribute('compact')) {
      const inner = [...block.childNodes].slice(1);
      return h('section', { class: 'rn-block rn-window rn-zth' }, h('details', {}, h('summary', {}, 'Thermal impedance after a step of power'), inner));
    }
    return block;
  }

  seriesBlock(r) {
    const t = r.transient;
    const s = t.series || [];
    if (s.length < 2) return null;
    const api = this.api;
    const fmtAxis = (kind) => (v) => formatWith(api, v, kind, 3);
    const tEnd = s[s.length - 1][0];
    const limitC = this.values.tjMax;
    const withMarginC = r.steady.limitWithMarginC;
    const temps = s.map((q) => q[1]);
    const lo = Math.min(...temps, this.values.taMax);
    const hi = Math.max(...temps, limitC);
    const series = [
      { kind: 'line', tone: 1, dash: 'solid', width: 2.5, points: s,
        label: 'T_j(t) from a cold start at the hottest ambient' },
      { kind: 'line', tone: 2, dash: 'dashdotdot', width: 2.5, points: [[0, limitC], [tEnd, limitC]],
        label: `Junction limit ${this.fmt(limitC, 'temperature')}` },
    ];
    if (withMarginC !== null) {
      series.push({ kind: 'line', tone: 3, dash: 'dashed', width: 2, points: [[0, withMarginC], [tEnd, withMarginC]],
        label: `Limit less the wanted margin, ${this.fmt(withMarginC, 'temperature')}` });
    }
    const p = t.pulse;
    if (p) {
      series.push({ kind: 'line', tone: 4, dash: 'dotted', width: 1.5, points: [[0, p.trainPeakC], [tEnd, p.trainPeakC]],
        label: `Settled pulse-train peak ${this.fmt(p.trainPeakC, 'temperature')}` });
      series.push({ kind: 'line', tone: 4, dash: 'dashdot', width: 1.5, points: [[0, p.trainValleyC], [tEnd, p.trainValleyC]],
        label: `Settled pulse-train valley ${this.fmt(p.trainValleyC, 'temperature')}` });
    }
    const peakPoint = s.find((q) => q[1] === t.seriesPeakC);
    if (peakPoint) {
      series.push({ kind: 'marker', tone: 5, points: [peakPoint],
        label: `Highest in the series: ${this.fmt(t.seriesPeakC, 'temperature')} at ${this.fmt(peakPoint[0], 'time')}` });
    }
    const width = this.chartWidthNow();
    const chart = renderChart({
      width, height: Math.round(Math.min(360, Math.max(280, width * 0.5))),
      title: 'Junction temperature over time',
      description: `Time from 0 to ${fmtAxis('time')(tEnd)} across, junction temperature up. Highest in the series ${fmtAxis('temperature')(t.seriesPeakC)}; `
        + `limit ${fmtAxis('temperature')(limitC)}.`,
      margin: { left: 80 },
      x: { label: 'Time', domain: [0, tEnd], format: fmtAxis('time') },
      y: { label: 'Junction temperature', domain: [lo, hi], format: fmtAxis('temperature') },
      series,
    });
    return this.figure('rn-series-plot', 'Junction temperature over time', chart,
      'The profile repeats from a cold start at the hottest ambient; the settled peak and valley are where the train ends up after many periods.');
  }
}

if (!customElements.get('railnote-thermal')) customElements.define('railnote-thermal', RailnoteThermal);
