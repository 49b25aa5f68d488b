// railnote chart: the one chart module every calculator shares.
//
// Why hand-built SVG and not a library. A chart here ends up in review records: people print the
// page or save it as PDF and file it with the design. Vector SVG prints crisply at any scale,
// needs no canvas, is built with createElementNS (so it works under a strict CSP and Trusted
// Types, and data never passes through innerHTML), and the whole module is a few KB. A canvas
// library such as uPlot costs about 22 KB gzip and prints as a bitmap; Observable Plot with d3 is
// about 160 KB gzip. The charts railnote needs (lines, dashed lines, shaded regions, markers,
// linear and log axes) are few and simple, so writing them is smaller than depending on one.
//
// Layout of this file. The maths (scales, ticks, clipping, path data) are pure exported functions
// with no DOM, tested by tests/node/chart.test.mjs under node:test. renderChart() is the only
// part that touches the DOM.
//
// Accessibility. The <svg> has role="img", an aria-label, and <title>/<desc>. Every series has a
// legend entry in words drawn with the same dash pattern as the series, so no series relies on
// colour alone. Colours come from CSS custom properties (--rn-chart-1 … --rn-chart-5, --rn-chart-ink,
// --rn-chart-grid, --rn-chart-bg) so the page's light and dark schemes and the print stylesheet
// decide them.

const SVG_NS = 'http://www.w3.org/2000/svg';

/** Dash patterns by name, in px. Distinct enough to tell apart in greyscale print. */
export const DASHES = {
  solid: '',
  dashed: '6 4',
  dotted: '1.5 3.5',
  dashdot: '9 3 2 3',
  dashdotdot: '16 4 3 4 3 4',
};

/** Replace a degenerate or reversed domain with a usable one. Always returns finite [lo, hi], lo < hi. */
export function saneDomain(domain, log = false) {
  let [a, b] = Array.isArray(domain) ? domain : [NaN, NaN];
  a = Number(a);
  b = Number(b);
  if (log) {
    // A log axis cannot show zero or negatives: fall back to the positive part, or one decade.
    if (!(Number.isFinite(a) && a > 0)) a = Number.isFinite(b) && b > 0 ? b / 10 : 1;
    if (!(Number.isFinite(b) && b > 0)) b = a * 10;
    if (a > b) [a, b] = [b, a];
    if (a === b) {
      a /= Math.sqrt(10);
      b *= Math.sqrt(10);
    }
    return [a, b];
  }
  if (!Number.isFinite(a) && !Number.isFinite(b)) return [0, 1];
  if (!Number.isFinite(a)) a = b - 1;
  if (!Number.isFinite(b)) b = a + 1;
  if (a > b) [a, b] = [b, a];
  if (a === b) {
    const pad = a === 0 ? 1 : Math.abs(a) * 0.5;
    a -= pad;
    b += pad;
  }
  return [a, b];
}

/** Round away binary noise (0.30000000000000004 -> 0.3) without changing real values. */
function clean(v) {
  return v === 0 ? 0 : Number(v.toPrecision(12));
}

/** The "nice" step (1, 2 or 5 × 10^n) nearest above span/target. */
export function niceStep(span, target = 5) {
  if (!(span > 0) || !Number.isFinite(span)) return 1;
  const raw = span / Math.max(1, target);
  const power = Math.pow(10, Math.floor(Math.log10(raw)));
  const fraction = raw / power;
  let nice;
  if (fraction <= 1) nice = 1;
  else if (fraction <= 2) nice = 2;
  else if (fraction <= 5) nice = 5;
  else nice = 10;
  return clean(nice * power);
}

/** Widen [lo, hi] outward to whole multiples of the nice step so the ticks cover the domain. */
export function niceDomain(domain, target = 5) {
  const [lo, hi] = saneDomain(domain);
  const step = niceStep(hi - lo, target);
  return [clean(Math.floor(lo / step) * step), clean(Math.ceil(hi / step) * step)];
}

/** Ticks at multiples of a nice step inside [lo, hi] (inclusive). */
export function linearTicks(domain, target = 5) {
  const [lo, hi] = saneDomain(domain);
  let step = niceStep(hi - lo, target);
  // On a domain that was not widened to the step (nice: false), rounding the step up can leave
  // only two ticks inside; step down through the nice sequence (1 → 0.5 → 0.2 → 0.1) until at
  // least three ticks fall inside, as a reader needs for interpolating.
  for (let guard = 0; guard < 6 && countTicks(lo, hi, step) < 3; guard++) step = smallerNice(step);
  const first = Math.ceil(lo / step - 1e-9);
  const last = Math.floor(hi / step + 1e-9);
  const ticks = [];
  for (let i = first; i <= last && ticks.length < 1000; i++) ticks.push(clean(i * step));
  return ticks;
}

function countTicks(lo, hi, step) {
  return Math.floor(hi / step + 1e-9) - Math.ceil(lo / step - 1e-9) + 1;
}

/** The next nice step below: 10 → 5 → 2 → 1 (× 10^n). */
export function smallerNice(step) {
  const power = Math.pow(10, Math.floor(Math.log10(step) + 1e-12));
  const m = Math.round(step / power);
  return clean(m >= 10 ? 5 * power : m >= 5 ? 2 * power : m >= 2 ? power : 0.5 * power);
}

/** Widen a positive domain to whole decades. */
export function logDomain(domain) {
  const [lo, hi] = saneDomain(domain, true);
  const d0 = Math.floor(Math.log10(lo) + 1e-9);
  let d1 = Math.ceil(Math.log10(hi) - 1e-9);
  if (d1 <= d0) d1 = d0 + 1;
  return [clean(Math.pow(10, d0)), clean(Math.pow(10, d1))];
}

/**
 * Log-axis ticks: major ticks at every decade inside the domain, and minor ticks at 2× and 5×
 * when the domain spans three decades or fewer (so the axis stays readable).
 * Returns { major: number[], minor: number[] }.
 */
export function logTicks(domain) {
  const [lo, hi] = saneDomain(domain, true);
  const d0 = Math.ceil(Math.log10(lo) - 1e-9);
  const d1 = Math.floor(Math.log10(hi) + 1e-9);
  const major = [];
  for (let d = d0; d <= d1 && major.length < 400; d++) major.push(clean(Math.pow(10, d)));
  const minor = [];
  if (Math.log10(hi / lo) <= 3.0001) {
    for (let d = Math.floor(Math.log10(lo)); d <= d1; d++) {
      for (const m of [2, 5]) {
        const v = clean(m * Math.pow(10, d));
        if (v >= lo * (1 - 1e-12) && v <= hi * (1 + 1e-12)) minor.push(v);
      }
    }
  }
  return { major, minor };
}

/**
 * A scale maps data to pixels. linear: r0 + (v − d0)/(d1 − d0)·(r1 − r0); log: the same on
 * log10(v). Values a log scale cannot show (≤ 0) map to NaN, which path building skips.
 */
export function makeScale(type, domain, range) {
  const log = type === 'log';
  const [d0, d1] = saneDomain(domain, log);
  const [r0, r1] = range.map(Number);
  const t = log ? (v) => (v > 0 ? Math.log10(v) : NaN) : (v) => v;
  const t0 = t(d0);
  const t1 = t(d1);
  const scale = (v) => {
    const tv = t(Number(v));
    if (!Number.isFinite(tv)) return NaN;
    return r0 + ((tv - t0) / (t1 - t0)) * (r1 - r0);
  };
  scale.domain = [d0, d1];
  scale.range = [r0, r1];
  scale.type = log ? 'log' : 'linear';
  return scale;
}

/**
 * Clip the segment p→q to the rectangle {x0, y0, x1, y1} (Liang–Barsky; Liang & Barsky, "A new
 * concept and method for line clipping", ACM TOG 1984). Returns [p', q'] or null if outside.
 */
export function clipSegment(p, q, rect) {
  const [px, py] = p;
  const dx = q[0] - px;
  const dy = q[1] - py;
  let t0 = 0;
  let t1 = 1;
  const edges = [
    [-dx, px - rect.x0],
    [dx, rect.x1 - px],
    [-dy, py - rect.y0],
    [dy, rect.y1 - py],
  ];
  for (const [pe, qe] of edges) {
    if (pe === 0) {
      if (qe < 0) return null;
    } else {
      const r = qe / pe;
      if (pe < 0) {
        if (r > t1) return null;
        if (r > t0) t0 = r;
      } else {
        if (r < t0) return null;
        if (r < t1) t1 = r;
      }
    }
  }
  return [
    [px + t0 * dx, py + t0 * dy],
    [px + t1 * dx, py + t1 * dy],
  ];
}

/**
 * Clip a polygon to the rectangle (Sutherland–Hodgman; Sutherland & Hodgman, "Reentrant polygon
 * clipping", CACM 1974). Non-finite vertices are dropped first.
 */
export function clipPolygon(points, rect) {
  let out = points.filter((p) => Number.isFinite(p[0]) && Number.isFinite(p[1]));
  const edges = [
    [(p) => p[0] >= rect.x0, (a, b) => cutX(a, b, rect.x0)],
    [(p) => p[0] <= rect.x1, (a, b) => cutX(a, b, rect.x1)],
    [(p) => p[1] >= rect.y0, (a, b) => cutY(a, b, rect.y0)],
    [(p) => p[1] <= rect.y1, (a, b) => cutY(a, b, rect.y1)],
  ];
  for (const [inside, cut] of edges) {
    if (out.length === 0) break;
    const input = out;
    out = [];
    for (let i = 0; i < input.length; i++) {
      const cur = input[i];
      const prev = input[(i + input.length - 1) % input.length];
      if (inside(cur)) {
        if (!inside(prev)) out.push(cut(prev, cur));
        out.push(cur);
      } else if (inside(prev)) {
        out.push(cut(prev, cur));
      }
    }
  }
  return out;
}

function cutX(a, b, x) {
  const t = (x - a[0]) / (b[0] - a[0]);
  return [x, a[1] + t * (b[1] - a[1])];
}

function cutY(a, b, y) {
  const t = (y - a[1]) / (b[1] - a[1]);
  return [a[0] + t * (b[0] - a[0]), y];
}

function num(v) {
  // Two decimals of a pixel is finer than any screen or printer resolves.
  const r = Math.round(v * 100) / 100;
  return Object.is(r, -0) ? '0' : String(r);
}

/**
 * SVG path data for a polyline of pixel points, clipped to rect. Non-finite points break the
 * line into separate runs rather than producing NaN. Returns '' when nothing is visible.
 */
export function linePath(pixelPoints, rect) {
  const parts = [];
  let penAt = null; // last point written, to continue a run without a new M
  for (let i = 1; i < pixelPoints.length; i++) {
    const p = pixelPoints[i - 1];
    const q = pixelPoints[i];
    if (![p[0], p[1], q[0], q[1]].every(Number.isFinite)) {
      penAt = null;
      continue;
    }
    const seg = clipSegment(p, q, rect);
    if (!seg) {
      penAt = null;
      continue;
    }
    const [a, b] = seg;
    if (!penAt || penAt[0] !== a[0] || penAt[1] !== a[1]) parts.push(`M${num(a[0])} ${num(a[1])}`);
    parts.push(`L${num(b[0])} ${num(b[1])}`);
    penAt = b;
  }
  // A single finite point inside the rect would draw nothing as a line; that is right for lines.
  return parts.join('');
}

/** SVG path data for a closed filled region of pixel points, clipped to rect. */
export function areaPath(pixelPoints, rect) {
  const poly = clipPolygon(pixelPoints, rect);
  if (poly.length < 3) return '';
  return poly.map((p, i) => `${i === 0 ? 'M' : 'L'}${num(p[0])} ${num(p[1])}`).join('') + 'Z';
}

/** Data points → pixel points through the two scales. */
export function project(points, xScale, yScale) {
  return (points || []).map((p) => [xScale(p[0]), yScale(p[1])]);
}

/** Plain fallback label when no formatter is given: three significant figures. */
export function plainLabel(v) {
  if (!Number.isFinite(v)) return '—';
  return String(Number(v.toPrecision(3)));
}

/**
 * Everything renderChart draws, computed without the DOM: the plot rectangle, the scales, the
 * ticks with labels, and each series' path data. Exported so it can be tested in Node.
 *
 * spec = {
 *   width, height,                       // viewBox size in px (the SVG scales to its box)
 *   x: { label, type: 'linear'|'log', domain: [lo, hi], format: v => string, nice: true },
 *   y: { … same … },
 *   series: [ { kind: 'line'|'area'|'marker', points: [[x, y], …], label, tone: 1..5,
 *               dash: 'solid'|'dashed'|'dotted'|'dashdot'|'dashdotdot', width } ],
 *   notes:  [ { x, y, text, anchor: 'start'|'middle'|'end' } ]   // labels placed in data space
 * }
 */
export function layoutChart(spec) {
  const width = spec.width || 640;
  const height = spec.height || 400;
  const margin = { top: 14, right: 18, bottom: 50, left: 72, ...(spec.margin || {}) };
  const rect = {
    x0: margin.left,
    x1: Math.max(margin.left + 10, width - margin.right),
    y0: margin.top,
    y1: Math.max(margin.top + 10, height - margin.bottom),
  };
  const axis = (a, r, horizontal) => {
    const type = a.type === 'log' ? 'log' : 'linear';
    const nice = a.nice !== false;
    let domain = saneDomain(a.domain, type === 'log');
    if (nice) domain = type === 'log' ? logDomain(domain) : niceDomain(domain, a.ticks || 5);
    const scale = makeScale(type, domain, r);
    const format = typeof a.format === 'function' ? a.format : plainLabel;
    let major;
    let minor = [];
    if (type === 'log') ({ major, minor } = logTicks(domain));
    else major = linearTicks(domain, a.ticks || 5);
    let ticks = major.map((v) => ({ value: v, pos: scale(v), label: safeLabel(format, v) }));
    // Many decades across a narrow plot crowd their labels: label every k-th decade (the grid
    // keeps every line). A label is about 7 px per character at the 12 px chart font.
    if (type === 'log' && ticks.length > 2) {
      const gap = Math.abs(ticks[1].pos - ticks[0].pos);
      const widest = horizontal ? Math.max(...ticks.map((t) => t.label.length)) * 7 + 8 : 16;
      const k = Math.ceil(widest / Math.max(gap, 1));
      if (k > 1) ticks = ticks.map((t, i) => (i % k === 0 ? t : { ...t, label: '' }));
    }
    const minorTicks = minor.map((v) => ({ value: v, pos: scale(v) }));
    return { type, domain, scale, ticks, minorTicks, label: a.label || '' };
  };
  const x = axis(spec.x || {}, [rect.x0, rect.x1], true);
  // SVG y grows downwards: the lowest value sits at the bottom edge.
  const y = axis(spec.y || {}, [rect.y1, rect.y0], false);
  const series = (spec.series || []).map((s, i) => {
    const px = project(s.points, x.scale, y.scale);
    let d = '';
    let markers = [];
    if (s.kind === 'area') d = areaPath(px, rect);
    else if (s.kind === 'marker') {
      markers = px.filter(
        (p) => Number.isFinite(p[0]) && Number.isFinite(p[1]) &&
          p[0] >= rect.x0 && p[0] <= rect.x1 && p[1] >= rect.y0 && p[1] <= rect.y1,
      );
    } else d = linePath(px, rect);
    return {
      kind: s.kind || 'line',
      label: s.label || `series ${i + 1}`,
      tone: Math.min(5, Math.max(1, Math.round(s.tone || i + 1))),
      dash: Object.prototype.hasOwnProperty.call(DASHES, s.dash) ? s.dash : 'solid',
      width: s.width || 2,
      d,
      markers,
      legend: s.legend !== false,
    };
  });
  const notes = (spec.notes || [])
    .map((n) => ({ ...n, px: x.scale(n.x), py: y.scale(n.y) }))
    .filter((n) => Number.isFinite(n.px) && Number.isFinite(n.py));
  return { width, height, rect, x, y, series, notes };
}

function safeLabel(format, v) {
  try {
    const s = format(v);
    return typeof s === 'string' ? s : String(s);
  } catch {
    return plainLabel(v);
  }
}

let chartCounter = 0;

function el(name, attrs = {}, text) {
  const node = document.createElementNS(SVG_NS, name);
  for (const [k, v] of Object.entries(attrs)) {
    if (v !== undefined && v !== null && v !== '') node.setAttribute(k, String(v));
  }
  if (text !== undefined) node.textContent = text;
  return node;
}

/**
 * Draw a chart. Returns { svg, legend }: the <svg> element and an HTML <ul> legend in words.
 * spec is as for layoutChart, plus title (short) and description (a sentence for screen readers).
 */
export function renderChart(spec) {
  const L = layoutChart(spec);
  const id = `rn-chart-${++chartCounter}`;
  const svg = el('svg', {
    viewBox: `0 0 ${L.width} ${L.height}`,
    role: 'img',
    'aria-label': spec.title || 'chart',
    class: 'rn-chart',
    preserveAspectRatio: 'xMidYMid meet',
  });
  svg.append(el('title', {}, spec.title || 'chart'));
  if (spec.description) svg.append(el('desc', {}, spec.description));

  const { rect } = L;
  const defs = el('defs');
  const clip = el('clipPath', { id: `${id}-clip` });
  clip.append(el('rect', { x: rect.x0, y: rect.y0, width: rect.x1 - rect.x0, height: rect.y1 - rect.y0 }));
  defs.append(clip);
  svg.append(defs);

  svg.append(el('rect', {
    class: 'rn-chart-plot', x: rect.x0, y: rect.y0, width: rect.x1 - rect.x0, height: rect.y1 - rect.y0,
  }));

  // Grid and ticks.
  const grid = el('g', { class: 'rn-chart-grid', 'aria-hidden': 'true' });
  for (const t of L.x.minorTicks) grid.append(el('line', { class: 'rn-minor', x1: t.pos, x2: t.pos, y1: rect.y0, y2: rect.y1 }));
  for (const t of L.y.minorTicks) grid.append(el('line', { class: 'rn-minor', x1: rect.x0, x2: rect.x1, y1: t.pos, y2: t.pos }));
  for (const t of L.x.ticks) grid.append(el('line', { x1: t.pos, x2: t.pos, y1: rect.y0, y2: rect.y1 }));
  for (const t of L.y.ticks) grid.append(el('line', { x1: rect.x0, x2: rect.x1, y1: t.pos, y2: t.pos }));
  svg.append(grid);

  const axes = el('g', { class: 'rn-chart-axes' });
  axes.append(el('line', { x1: rect.x0, x2: rect.x1, y1: rect.y1, y2: rect.y1 }));
  axes.append(el('line', { x1: rect.x0, x2: rect.x0, y1: rect.y0, y2: rect.y1 }));
  for (const t of L.x.ticks) {
    axes.append(el('line', { x1: t.pos, x2: t.pos, y1: rect.y1, y2: rect.y1 + 5 }));
    axes.append(el('text', { x: t.pos, y: rect.y1 + 18, 'text-anchor': 'middle' }, t.label));
  }
  for (const t of L.y.ticks) {
    axes.append(el('line', { x1: rect.x0 - 5, x2: rect.x0, y1: t.pos, y2: t.pos }));
    axes.append(el('text', { x: rect.x0 - 8, y: t.pos + 4, 'text-anchor': 'end' }, t.label));
  }
  axes.append(el('text', { class: 'rn-axis-label', x: (rect.x0 + rect.x1) / 2, y: L.height - 8, 'text-anchor': 'middle' }, L.x.label));
  const yl = el('text', {
    class: 'rn-axis-label', x: 0, y: 0, 'text-anchor': 'middle',
    transform: `translate(14 ${(rect.y0 + rect.y1) / 2}) rotate(-90)`,
  }, L.y.label);
  axes.append(yl);
  svg.append(axes);

  // Series, clipped to the plot area (path data is clipped already; the clipPath also trims
  // stroke caps and marker shapes that overhang the edge).
  const body = el('g', { 'clip-path': `url(#${id}-clip)` });
  for (const s of L.series) {
    const cls = `rn-series rn-${s.kind} rn-tone-${s.tone}`;
    if (s.kind === 'marker') {
      const g = el('g', { class: cls });
      for (const [mx, my] of s.markers) {
        g.append(el('path', { d: `M${num(mx - 5)} ${num(my)}L${num(mx)} ${num(my - 5)}L${num(mx + 5)} ${num(my)}L${num(mx)} ${num(my + 5)}Z` }));
      }
      body.append(g);
    } else if (s.d) {
      body.append(el('path', {
        class: cls, d: s.d, 'stroke-width': s.kind === 'area' ? undefined : s.width,
        'stroke-dasharray': DASHES[s.dash] || undefined,
      }));
    }
  }
  svg.append(body);

  const notes = el('g', { class: 'rn-chart-notes' });
  for (const n of L.notes) {
    notes.append(el('text', { x: n.px, y: n.py, 'text-anchor': n.anchor || 'middle' }, n.text));
  }
  svg.append(notes);

  // Legend in words, with a swatch drawn in the series' own dash pattern.
  const legend = document.createElement('ul');
  legend.className = 'rn-legend';
  for (const s of L.series) {
    if (!s.legend) continue;
    const li = document.createElement('li');
    const sw = el('svg', { viewBox: '0 0 36 14', width: 36, height: 14, 'aria-hidden': 'true', class: 'rn-swatch' });
    const cls = `rn-series rn-${s.kind} rn-tone-${s.tone}`;
    if (s.kind === 'area') sw.append(el('rect', { class: cls, x: 1, y: 1, width: 34, height: 12 }));
    else if (s.kind === 'marker') sw.append(el('path', { class: cls, d: 'M13 7L18 2L23 7L18 12Z' }));
    else sw.append(el('line', { class: cls, x1: 1, x2: 35, y1: 7, y2: 7, 'stroke-width': s.width, 'stroke-dasharray': DASHES[s.dash] || undefined }));
    li.append(sw);
    const span = document.createElement('span');
    span.textContent = s.label;
    li.append(span);
    legend.append(li);
  }
  return { svg, legend };
}

// ---- Histograms and range bars (added for the divider picker) ----
//
// Both reuse the scales and ticks above. renderHistogram draws a Monte Carlo histogram on the
// same axes, legend and colours as renderChart (it is renderChart with the bars added beneath
// the marks); renderRangeBars draws horizontal bars between a low and a high value per row, all
// on one value axis around a centre line (a tornado-style chart of contributions).

/**
 * The bars of an equal-width histogram { lo, hi, counts }: [{ x0, x1, count }] left to right.
 * A degenerate range is widened (saneDomain); counts that are not finite non-negative numbers
 * count as zero. No counts, no bars.
 */
export function histogramBins(histogram) {
  const counts = histogram && Array.isArray(histogram.counts) ? histogram.counts : [];
  if (!counts.length) return [];
  const [lo, hi] = saneDomain([histogram.lo, histogram.hi]);
  const w = (hi - lo) / counts.length;
  return counts.map((c, i) => ({
    x0: lo + i * w,
    x1: i === counts.length - 1 ? hi : lo + (i + 1) * w,
    count: Number.isFinite(Number(c)) && Number(c) > 0 ? Number(c) : 0,
  }));
}

/**
 * Draw a histogram. Returns { svg, legend } as renderChart does.
 *
 * spec = {
 *   width, height, title, description, margin,
 *   histogram: { lo, hi, counts: [n, …] },          // equal-width bins over [lo, hi]
 *   barLabel: 'legend words for the bars', barTone,
 *   x: { label, format }, y: { label, format },    // the x domain is the histogram's own range
 *   marks: [ { id, value, label, tone, dash, width } ],   // vertical lines (window edges, mean)
 *   shade: [ { from, to, label, tone, legend } ],          // shaded x ranges (outside the window)
 * }
 * Each bar is a <rect class="rn-hist-bar"> with data-count; each mark's path carries data-mark
 * = its id, so a test or a reader of the DOM can find the window edges.
 */
export function renderHistogram(spec) {
  const bins = histogramBins(spec.histogram);
  const lo = bins.length ? bins[0].x0 : 0;
  const hi = bins.length ? bins[bins.length - 1].x1 : 1;
  const peak = Math.max(1, ...bins.map((b) => b.count));
  const tall = peak * 4;
  const series = [];
  const ids = [];
  for (const s of spec.shade || []) {
    series.push({ kind: 'area', tone: s.tone || 2, label: s.label, legend: s.legend,
      points: [[s.from, 0], [s.to, 0], [s.to, tall], [s.from, tall]] });
    ids.push(null);
  }
  // The bars are drawn below; this entry only gives them a legend line.
  series.push({ kind: 'area', tone: spec.barTone || 1, label: spec.barLabel || 'samples per bin', points: [] });
  ids.push(null);
  for (const m of spec.marks || []) {
    series.push({ kind: 'line', tone: m.tone || 4, dash: m.dash || 'dashed', width: m.width || 2, label: m.label,
      points: [[m.value, 0], [m.value, tall]] });
    ids.push(m.id || null);
  }
  const chartSpec = {
    ...spec,
    x: { ...(spec.x || {}), domain: [lo, hi], nice: false },
    y: { ...(spec.y || {}), domain: [0, peak * 1.1] },
    series,
  };
  const L = layoutChart(chartSpec);
  const { svg, legend } = renderChart(chartSpec);
  svg.classList.add('rn-histogram');
  const body = svg.querySelector('g[clip-path]');
  // renderChart appends one child per marker series and one per series with path data, in order.
  const drawn = L.series.map((s, i) => ({ s, id: ids[i] })).filter(({ s }) => s.kind === 'marker' || s.d);
  const children = [...body.children];
  drawn.forEach(({ id }, k) => { if (id && children[k]) children[k].setAttribute('data-mark', id); });
  const bars = el('g', { class: `rn-hist-bars rn-tone-${spec.barTone || 1}` });
  const y0 = L.y.scale(0);
  for (const b of bins) {
    const xa = L.x.scale(b.x0);
    const xb = L.x.scale(b.x1);
    const yc = L.y.scale(b.count);
    bars.append(el('rect', {
      class: 'rn-hist-bar', 'data-count': String(b.count),
      x: num(xa + 0.5), y: num(yc), width: num(Math.max(0.5, xb - xa - 1)), height: num(Math.max(0, y0 - yc)),
    }));
  }
  const firstMark = drawn.findIndex(({ s }) => s.kind === 'line');
  body.insertBefore(bars, firstMark >= 0 ? children[firstMark] : null);
  return { svg, legend };
}

/**
 * Layout of horizontal range bars, without the DOM. spec = { width, rows: [{ label, low, high }],
 * center, format, labelWidth, rowHeight }. Returns { width, height, rect, scale, ticks, rows }
 * with each row's pixel extent (x0 ≤ x1, whatever the order of low and high) and the centre's
 * position. The domain spans every low, high and the centre, padded by a twentieth each side.
 */
export function layoutRangeBars(spec) {
  const width = spec.width || 640;
  const rowHeight = spec.rowHeight || 30;
  const labelWidth = spec.labelWidth || Math.min(220, Math.round(width * 0.34));
  const rows = spec.rows || [];
  const values = rows.flatMap((r) => [Number(r.low), Number(r.high)]).concat([Number(spec.center)])
    .filter(Number.isFinite);
  let [lo, hi] = saneDomain(values.length ? [Math.min(...values), Math.max(...values)] : [0, 1]);
  const pad = (hi - lo) / 20;
  lo -= pad;
  hi += pad;
  const rect = { x0: labelWidth, x1: Math.max(labelWidth + 10, width - 16), y0: 8, y1: 8 + rows.length * rowHeight };
  const height = rect.y1 + 42;
  const scale = makeScale('linear', [lo, hi], [rect.x0, rect.x1]);
  const format = typeof spec.format === 'function' ? spec.format : plainLabel;
  const ticks = linearTicks([lo, hi], Math.max(2, Math.floor((rect.x1 - rect.x0) / 110)))
    .map((v) => ({ value: v, pos: scale(v), label: safeLabel(format, v) }));
  const laid = rows.map((r, i) => {
    const a = scale(Number(r.low));
    const b = scale(Number(r.high));
    const ok = Number.isFinite(a) && Number.isFinite(b);
    return {
      ...r,
      y: rect.y0 + i * rowHeight + rowHeight * 0.2,
      h: rowHeight * 0.6,
      x0: ok ? Math.min(a, b) : NaN,
      x1: ok ? Math.max(a, b) : NaN,
      lowPos: a,
      highPos: b,
    };
  });
  return { width, height, rect, scale, ticks, rows: laid, centerPos: scale(Number(spec.center)), rowHeight };
}

/**
 * Draw horizontal range bars (spec as for layoutRangeBars, plus title, description and
 * centerLabel). Each bar is split at the centre: the part below it in tone 1, the part above in
 * tone 2, and the two ends carry a small tick so the bars read without colour. Returns the <svg>.
 */
export function renderRangeBars(spec) {
  const L = layoutRangeBars(spec);
  const svg = el('svg', {
    viewBox: `0 0 ${L.width} ${L.height}`, role: 'img', 'aria-label': spec.title || 'range bars',
    class: 'rn-chart rn-range-bars', preserveAspectRatio: 'xMidYMid meet',
  });
  svg.append(el('title', {}, spec.title || 'range bars'));
  if (spec.description) svg.append(el('desc', {}, spec.description));
  const { rect } = L;
  svg.append(el('rect', { class: 'rn-chart-plot', x: rect.x0, y: rect.y0, width: rect.x1 - rect.x0, height: rect.y1 - rect.y0 }));
  const grid = el('g', { class: 'rn-chart-grid', 'aria-hidden': 'true' });
  for (const t of L.ticks) grid.append(el('line', { x1: t.pos, x2: t.pos, y1: rect.y0, y2: rect.y1 }));
  svg.append(grid);
  const axes = el('g', { class: 'rn-chart-axes' });
  axes.append(el('line', { x1: rect.x0, x2: rect.x1, y1: rect.y1, y2: rect.y1 }));
  for (const t of L.ticks) {
    axes.append(el('line', { x1: t.pos, x2: t.pos, y1: rect.y1, y2: rect.y1 + 5 }));
    axes.append(el('text', { x: t.pos, y: rect.y1 + 18, 'text-anchor': 'middle' }, t.label));
  }
  if (spec.axisLabel) axes.append(el('text', { class: 'rn-axis-label', x: (rect.x0 + rect.x1) / 2, y: L.height - 6, 'text-anchor': 'middle' }, spec.axisLabel));
  for (const r of L.rows) {
    axes.append(el('text', { x: rect.x0 - 8, y: r.y + r.h / 2 + 4, 'text-anchor': 'end' }, r.label));
  }
  svg.append(axes);
  const bars = el('g', { class: 'rn-range-rows' });
  const c = L.centerPos;
  for (const r of L.rows) {
    if (!Number.isFinite(r.x0)) continue;
    const g = el('g', { class: 'rn-range-row', 'data-id': r.id || '' });
    const below = [r.x0, Math.min(r.x1, c)];
    const above = [Math.max(r.x0, c), r.x1];
    if (below[1] > below[0]) g.append(el('rect', { class: 'rn-range-bar rn-tone-1', x: num(below[0]), y: num(r.y), width: num(below[1] - below[0]), height: num(r.h) }));
    if (above[1] > above[0]) g.append(el('rect', { class: 'rn-range-bar rn-tone-2', x: num(above[0]), y: num(r.y), width: num(above[1] - above[0]), height: num(r.h) }));
    for (const x of [r.x0, r.x1]) g.append(el('line', { class: 'rn-range-end', x1: num(x), x2: num(x), y1: num(r.y - 3), y2: num(r.y + r.h + 3) }));
    bars.append(g);
  }
  svg.append(bars);
  if (Number.isFinite(c)) {
    svg.append(el('line', { class: 'rn-range-center', x1: num(c), x2: num(c), y1: rect.y0, y2: rect.y1, 'stroke-dasharray': DASHES.dashed }));
  }
  return svg;
}

// ---- Stacked bars (the loss breakdown of the switching estimate) ----
//
// Horizontal bars, one per case (an input corner), each split into parts (one per loss) laid end
// to end along a linear value axis from zero. A part is told apart by its tone *and* its fill
// (solid, hatched, dotted, cross-hatched: SVG patterns drawn in the tone), so ten or more parts
// stay distinct in greyscale print, and by its entry in the legend in words. Each bar ends with
// its total as text; a segment wide enough for its short tag carries it too.

/** Fill styles of bar segments, in the order parts take them when none is given. */
export const BAR_FILLS = ['solid', 'hatch', 'dots', 'cross'];

/**
 * Everything renderStackedBars draws, computed without the DOM (tested in Node).
 *
 * spec = {
 *   width, height,
 *   bars:  [ { label } ],                          // one bar per case, top to bottom
 *   parts: [ { label, short, tone: 1..5, fill: 'solid'|'hatch'|'dots'|'cross',
 *              values: [number per bar] } ],       // stacked left to right in this order
 *   x: { label, format: v => string, domain: [0, hi] (optional) },
 *   total: v => string                             // text at the end of each bar (optional)
 * }
 * Values that are not finite or not above zero draw nothing (a loss that does not apply).
 * Returns { width, height, rect, x (as layoutChart's axes), bars: [{ label, y, h, total,
 * totalLabel, segments: [{ part, x0, x1, value }] }], parts: [{ label, short, tone, fill, used }] }.
 */
export function layoutStackedBars(spec) {
  const width = spec.width || 640;
  const bars = spec.bars || [];
  const parts = (spec.parts || []).map((p, i) => ({
    label: p.label || `part ${i + 1}`,
    short: p.short || '',
    tone: Math.min(5, Math.max(1, Math.round(p.tone || (i % 5) + 1))),
    fill: BAR_FILLS.includes(p.fill) ? p.fill : BAR_FILLS[Math.floor(i / 5) % BAR_FILLS.length],
    values: (p.values || []).map((v) => (Number.isFinite(v) && v > 0 ? v : 0)),
  }));
  const barHeight = spec.barHeight || 30;
  const gap = spec.barGap || 18;
  const margin = { top: 14, right: 90, bottom: 50, left: 120, ...(spec.margin || {}) };
  const height = spec.height || margin.top + margin.bottom + bars.length * barHeight + Math.max(0, bars.length - 1) * gap + gap;
  const rect = {
    x0: margin.left,
    x1: Math.max(margin.left + 10, width - margin.right),
    y0: margin.top,
    y1: Math.max(margin.top + 10, height - margin.bottom),
  };
  const totals = bars.map((_, b) => parts.reduce((s, p) => s + (p.values[b] || 0), 0));
  const hi = Math.max(0, ...totals);
  const a = spec.x || {};
  const domain = niceDomain(a.domain || [0, hi > 0 ? hi : 1], a.ticks || 5);
  domain[0] = 0;
  const scale = makeScale('linear', domain, [rect.x0, rect.x1]);
  const format = typeof a.format === 'function' ? a.format : plainLabel;
  const ticks = linearTicks(domain, a.ticks || 5).map((v) => ({ value: v, pos: scale(v), label: safeLabel(format, v) }));
  const x = { type: 'linear', domain, scale, ticks, minorTicks: [], label: a.label || '' };
  const inner = rect.y1 - rect.y0;
  const pitch = bars.length ? inner / bars.length : inner;
  const h = Math.max(4, Math.min(barHeight, pitch - 6));
  const totalFormat = typeof spec.total === 'function' ? spec.total : format;
  const laid = bars.map((bar, b) => {
    const y = rect.y0 + pitch * b + (pitch - h) / 2;
    let at = 0;
    const segments = [];
    parts.forEach((p, k) => {
      const v = p.values[b] || 0;
      if (v <= 0) return;
      const x0 = scale(at);
      at += v;
      segments.push({ part: k, x0, x1: scale(at), value: v });
    });
    return { label: bar.label || `bar ${b + 1}`, y, h, total: totals[b], totalLabel: safeLabel(totalFormat, totals[b]), segments };
  });
  const used = parts.map((p) => p.values.some((v) => v > 0));
  return {
    width, height, rect, x, bars: laid,
    parts: parts.map((p, i) => ({ label: p.label, short: p.short, tone: p.tone, fill: p.fill, used: used[i] })),
  };
}

/** The fill pattern of one (tone, fill) pair, as an SVG <pattern> (none for solid). */
function barPattern(id, tone, fill) {
  const pat = el('pattern', { id, patternUnits: 'userSpaceOnUse', width: 6, height: 6 });
  pat.append(el('rect', { class: `rn-pat-bg rn-tone-${tone}`, x: 0, y: 0, width: 6, height: 6 }));
  const ink = `rn-pat-ink rn-tone-${tone}`;
  if (fill === 'hatch') pat.append(el('path', { class: ink, d: 'M-1 1L1 -1M0 6L6 0M5 7L7 5' }));
  else if (fill === 'cross') pat.append(el('path', { class: ink, d: 'M-1 1L1 -1M0 6L6 0M5 7L7 5M-1 5L1 7M0 0L6 6M5 -1L7 1' }));
  else if (fill === 'dots') pat.append(el('circle', { class: `rn-pat-dot rn-tone-${tone}`, cx: 3, cy: 3, r: 1.4 }));
  return pat;
}

/**
 * Draw stacked bars. Returns { svg, legend }: the <svg> and an HTML <ul> legend in words (parts
 * that are zero in every bar are left out of it), each entry with a swatch in the part's own
 * tone and fill. spec is as for layoutStackedBars, plus title and description.
 */
export function renderStackedBars(spec) {
  const L = layoutStackedBars(spec);
  const id = `rn-chart-${++chartCounter}`;
  const svg = el('svg', {
    viewBox: `0 0 ${L.width} ${L.height}`, role: 'img', 'aria-label': spec.title || 'chart',
    class: 'rn-chart rn-bars', preserveAspectRatio: 'xMidYMid meet',
  });
  svg.append(el('title', {}, spec.title || 'chart'));
  if (spec.description) svg.append(el('desc', {}, spec.description));
  const defs = el('defs');
  const fillOf = new Map();
  L.parts.forEach((p) => {
    const key = `${p.tone}-${p.fill}`;
    if (fillOf.has(key)) return;
    if (p.fill === 'solid') {
      fillOf.set(key, null);
    } else {
      const pid = `${id}-fill-${key}`;
      defs.append(barPattern(pid, p.tone, p.fill));
      fillOf.set(key, `url(#${pid})`);
    }
  });
  svg.append(defs);
  const { rect } = L;
  svg.append(el('rect', { class: 'rn-chart-plot', x: rect.x0, y: rect.y0, width: rect.x1 - rect.x0, height: rect.y1 - rect.y0 }));
  const grid = el('g', { class: 'rn-chart-grid', 'aria-hidden': 'true' });
  for (const t of L.x.ticks) grid.append(el('line', { x1: t.pos, x2: t.pos, y1: rect.y0, y2: rect.y1 }));
  svg.append(grid);
  const body = el('g', { class: 'rn-bar-body' });
  // A patterned segment takes its fill from the pattern (the fill attribute); a tone class would
  // override that attribute through the stylesheet, so only solid segments carry one.
  const segClass = (p) => (p.fill === 'solid' ? `rn-bar-seg rn-tone-${p.tone}` : 'rn-bar-seg rn-bar-patterned');
  for (const bar of L.bars) {
    const g = el('g', { class: 'rn-bar' });
    for (const s of bar.segments) {
      const p = L.parts[s.part];
      const w = Math.max(0, s.x1 - s.x0);
      g.append(el('rect', {
        class: segClass(p), x: num(s.x0), y: num(bar.y), width: num(w), height: num(bar.h),
        fill: fillOf.get(`${p.tone}-${p.fill}`) || undefined,
      }));
      // A short tag needs about 7 px per character plus some room at the 12 px chart font.
      if (p.short && w >= p.short.length * 7 + 8) {
        g.append(el('text', { class: 'rn-bar-tag', x: num((s.x0 + s.x1) / 2), y: num(bar.y + bar.h / 2 + 4), 'text-anchor': 'middle' }, p.short));
      }
    }
    const end = bar.segments.length ? bar.segments[bar.segments.length - 1].x1 : rect.x0;
    g.append(el('text', { class: 'rn-bar-total', x: num(end + 6), y: num(bar.y + bar.h / 2 + 4), 'text-anchor': 'start' }, bar.totalLabel));
    body.append(g);
  }
  svg.append(body);
  const axes = el('g', { class: 'rn-chart-axes' });
  axes.append(el('line', { x1: rect.x0, x2: rect.x1, y1: rect.y1, y2: rect.y1 }));
  axes.append(el('line', { x1: rect.x0, x2: rect.x0, y1: rect.y0, y2: rect.y1 }));
  for (const t of L.x.ticks) {
    axes.append(el('line', { x1: t.pos, x2: t.pos, y1: rect.y1, y2: rect.y1 + 5 }));
    axes.append(el('text', { x: t.pos, y: rect.y1 + 18, 'text-anchor': 'middle' }, t.label));
  }
  for (const bar of L.bars) {
    axes.append(el('text', { x: rect.x0 - 8, y: num(bar.y + bar.h / 2 + 4), 'text-anchor': 'end' }, bar.label));
  }
  axes.append(el('text', { class: 'rn-axis-label', x: (rect.x0 + rect.x1) / 2, y: L.height - 8, 'text-anchor': 'middle' }, L.x.label));
  svg.append(axes);

  const legend = document.createElement('ul');
  legend.className = 'rn-legend rn-legend-bars';
  for (const p of L.parts) {
    if (!p.used) continue;
    const li = document.createElement('li');
    const sw = el('svg', { viewBox: '0 0 36 14', width: 36, height: 14, 'aria-hidden': 'true', class: 'rn-swatch' });
    sw.append(el('rect', { class: segClass(p), x: 1, y: 1, width: 34, height: 12, fill: fillOf.get(`${p.tone}-${p.fill}`) || undefined }));
    li.append(sw);
    const span = document.createElement('span');
    span.textContent = p.short ? `${p.short}: ${p.label}` : p.label;
    li.append(span);
    legend.append(li);
  }
  return { svg, legend };
}
