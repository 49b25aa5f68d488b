// Tests of the pure maths in site/js/chart.js (scales, ticks, clipping, path data).
// Run: node --test tests/node/chart.test.mjs
//
// "Nice" tick steps of 1, 2 and 5 × 10^n and decade ticks on log axes are the usual convention of
// engineering plots (common practice). Clipping results are checked against hand-worked geometry.
import { test } from 'node:test';
import assert from 'node:assert/strict';
import {
  saneDomain, niceStep, niceDomain, linearTicks, logDomain, logTicks, makeScale,
  clipSegment, clipPolygon, linePath, areaPath, layoutChart, layoutStackedBars, BAR_FILLS,
} from '../../site/js/chart.js';

/** Is v = m × 10^n with m in {1, 2, 5} (to rounding)? */
function isNice(v) {
  if (v <= 0) return false;
  const n = Math.floor(Math.log10(v) + 1e-12);
  const m = v / Math.pow(10, n);
  return [1, 2, 5, 10].some((k) => Math.abs(m - k) < 1e-9);
}

const domains = [
  [0, 1], [0, 0.3], [4.85, 5.15], [3.1, 5.7], [0, 0.3125], [-40, 125], [1e-6, 3e-6],
  [0.001, 1000], [12.5, 12.7], [-1e-3, 1e-3], [0, 250e-3], [1234, 98765],
];

test('niceStep is always 1, 2 or 5 × 10^n', () => {
  for (const span of [1, 0.3, 0.0001, 7, 13, 99, 1e9, 3.3e-7, 0.42]) {
    for (const target of [3, 5, 8]) {
      const s = niceStep(span, target);
      assert.ok(isNice(s), `step ${s} for span ${span}, target ${target}`);
    }
  }
});

test('linear ticks on a niced domain cover it, are evenly spaced nice multiples', () => {
  for (const d of domains) {
    const nd = niceDomain(d);
    assert.ok(nd[0] <= d[0] && nd[1] >= d[1], `niceDomain ${nd} covers ${d}`);
    const ticks = linearTicks(nd);
    assert.ok(ticks.length >= 2 && ticks.length <= 12, `tick count ${ticks.length} for ${d}`);
    assert.equal(ticks[0], nd[0], `first tick at the niced lower end for ${d}`);
    assert.equal(ticks[ticks.length - 1], nd[1], `last tick at the niced upper end for ${d}`);
    const step = ticks[1] - ticks[0];
    assert.ok(isNice(Number(step.toPrecision(12))), `step ${step} nice for ${d}`);
    for (let i = 1; i < ticks.length; i++) {
      assert.ok(Math.abs(ticks[i] - ticks[i - 1] - step) <= Math.abs(step) * 1e-9, `even spacing ${ticks}`);
      // Each tick is an integer multiple of the step, printed without binary noise.
      const k = ticks[i] / step;
      assert.ok(Math.abs(k - Math.round(k)) < 1e-9, `tick ${ticks[i]} is a multiple of ${step}`);
      assert.ok(String(ticks[i]).length < 14, `tick ${ticks[i]} has no binary noise`);
    }
  }
});

test('worked example: the demo rail 4.85–5.15 V axis gets 4.8, 4.9, … 5.2', () => {
  // Worked by hand: span 0.3 / 5 ticks = 0.06; 0.06 = 6 × 10^-2 and 6 rounds up to 10, so the
  // step is 0.1 and the domain widens outward to 4.8 … 5.2.
  assert.equal(niceStep(0.3, 5), 0.1);
  assert.deepEqual(niceDomain([4.85, 5.15]), [4.8, 5.2]);
  assert.deepEqual(linearTicks([4.8, 5.2]), [4.8, 4.9, 5, 5.1, 5.2]);
});

test('a domain that is not widened still gets at least three nice ticks inside it', () => {
  // The operating-window plot keeps its own extents; worked by hand for the demo rail's axis
  // 3.234 … 5.9164 V: step 1 leaves only 4 and 5 inside, so the step drops to 0.5.
  assert.deepEqual(linearTicks([3.234, 5.9164]), [3.5, 4, 4.5, 5, 5.5]);
  for (const d of domains) {
    const ticks = linearTicks(d);
    assert.ok(ticks.length >= 3, `${ticks.length} ticks inside ${d}`);
    assert.ok(ticks.every((t) => t >= d[0] - 1e-12 && t <= d[1] + 1e-12), `ticks ${ticks} inside ${d}`);
    assert.ok(isNice(Number((ticks[1] - ticks[0]).toPrecision(12))), `nice step for ${d}`);
  }
});

test('log ticks fall on decades and cover the widened domain', () => {
  for (const d of [[1e-3, 1], [2e-4, 0.7], [0.05, 3], [1, 1e6], [3e-6, 4e-6]]) {
    const ld = logDomain(d);
    assert.ok(ld[0] <= d[0] && ld[1] >= d[1], `logDomain ${ld} covers ${d}`);
    const { major, minor } = logTicks(ld);
    assert.ok(major.length >= 2, `at least two decades for ${d}`);
    assert.equal(major[0], ld[0]);
    assert.equal(major[major.length - 1], ld[1]);
    for (const t of major) {
      const e = Math.log10(t);
      assert.ok(Math.abs(e - Math.round(e)) < 1e-12, `major tick ${t} is a decade`);
    }
    for (const t of minor) {
      const n = Math.floor(Math.log10(t) + 1e-12);
      const m = Math.round(t / Math.pow(10, n));
      assert.ok(m === 2 || m === 5, `minor tick ${t} is 2 or 5 × 10^n`);
      assert.ok(t > ld[0] && t < ld[1]);
    }
  }
  // Six decades: no minor ticks, so the axis stays legible.
  assert.equal(logTicks([1, 1e6]).minor.length, 0);
});

test('scale endpoints map to pixel extents (linear and log, y inverted)', () => {
  const x = makeScale('linear', [4.8, 5.2], [72, 622]);
  assert.equal(x(4.8), 72);
  assert.equal(x(5.2), 622);
  assert.ok(Math.abs(x(5.0) - 347) < 1e-9, 'midpoint maps to mid-pixel');
  const y = makeScale('linear', [0, 0.3], [350, 14]);
  assert.equal(y(0), 350);
  assert.ok(Math.abs(y(0.3) - 14) < 1e-9);
  const l = makeScale('log', [1e-3, 1], [0, 300]);
  assert.ok(Math.abs(l(1e-3) - 0) < 1e-9);
  assert.ok(Math.abs(l(1) - 300) < 1e-9);
  assert.ok(Math.abs(l(3.1622776601683795e-2) - 150) < 1e-6, 'geometric midpoint maps to the middle');
  assert.ok(Number.isNaN(l(0)) && Number.isNaN(l(-1)), 'log scale cannot place zero or negatives');
});

test('degenerate domains never give NaN', () => {
  const bad = [[0, 0], [5, 5], [NaN, NaN], [Infinity, -Infinity], [3, NaN], [2, 1], [], undefined];
  for (const d of bad) {
    for (const log of [false, true]) {
      const sd = saneDomain(d, log);
      assert.ok(sd.every(Number.isFinite) && sd[0] < sd[1], `saneDomain(${d}, ${log}) = ${sd}`);
    }
    const ticks = linearTicks(d);
    assert.ok(ticks.length > 0 && ticks.every(Number.isFinite), `linear ticks for ${d}: ${ticks}`);
    const lt = logTicks(d);
    assert.ok([...lt.major, ...lt.minor].every((v) => Number.isFinite(v) && v > 0), `log ticks for ${d}`);
    const s = makeScale('linear', d, [0, 100]);
    assert.ok(Number.isFinite(s(0)) && Number.isFinite(s(1)), `scale for ${d}`);
  }
  const L = layoutChart({
    x: { domain: [5, 5] }, y: { type: 'log', domain: [0, 0] },
    series: [{ kind: 'line', points: [[5, 0], [5, NaN], [Infinity, 1]] }, { kind: 'area', points: [] }],
  });
  const text = JSON.stringify(L, (k, v) => (typeof v === 'function' ? undefined : v));
  assert.ok(!text.includes('NaN') && !text.includes('null'), `layout has no NaN: ${text.slice(0, 200)}`);
});

const rect = { x0: 10, y0: 10, x1: 110, y1: 60 };

test('segment clipping (Liang–Barsky), hand-worked cases', () => {
  assert.deepEqual(clipSegment([20, 20], [50, 40], rect), [[20, 20], [50, 40]], 'inside stays');
  assert.equal(clipSegment([0, 0], [5, 100], rect), null, 'left of the box is dropped');
  // From (0, 35) to (120, 35): horizontal, cut at x = 10 and x = 110.
  assert.deepEqual(clipSegment([0, 35], [120, 35], rect), [[10, 35], [110, 35]]);
  // From (60, 0) to (60, 100): cut at y = 10 and 60.
  assert.deepEqual(clipSegment([60, 0], [60, 100], rect), [[60, 10], [60, 60]]);
});

test('polygon clipping (Sutherland–Hodgman) keeps the area inside', () => {
  // A square 0..200 × 0..200 clipped to the rect becomes the rect itself.
  const poly = clipPolygon([[0, 0], [200, 0], [200, 200], [0, 200]], rect);
  const xs = poly.map((p) => p[0]);
  const ys = poly.map((p) => p[1]);
  assert.equal(Math.min(...xs), 10);
  assert.equal(Math.max(...xs), 110);
  assert.equal(Math.min(...ys), 10);
  assert.equal(Math.max(...ys), 60);
  assert.equal(clipPolygon([[200, 200], [300, 200], [300, 300]], rect).length, 0, 'outside → empty');
});

test('path data is clipped, finite, and breaks at gaps', () => {
  const d = linePath([[0, 35], [60, 35], [NaN, 1], [60, 20], [200, 20]], rect);
  assert.equal(d, 'M10 35L60 35M60 20L110 20');
  assert.ok(!/NaN|Infinity/.test(d));
  for (const m of d.matchAll(/[ML](-?[\d.]+) (-?[\d.]+)/g)) {
    const [x, y] = [Number(m[1]), Number(m[2])];
    assert.ok(x >= rect.x0 && x <= rect.x1 && y >= rect.y0 && y <= rect.y1, `point ${x},${y} inside`);
  }
  assert.equal(linePath([[500, 500], [600, 600]], rect), '', 'fully outside draws nothing');
  const a = areaPath([[0, 0], [200, 0], [200, 200], [0, 200]], rect);
  assert.match(a, /^M[\d. LM]+Z$/);
  assert.ok(!/NaN/.test(a));
  assert.equal(areaPath([[1, 1], [2, 2]], rect), '', 'two points make no area');
});

test('layoutChart: series pass through the scales and stay in the plot area', () => {
  const L = layoutChart({
    width: 600, height: 400,
    x: { domain: [3, 6], format: (v) => `${v} V` },
    y: { domain: [0, 0.3] },
    series: [
      { kind: 'line', points: [[3.616, 0], [4.216, 0.6]], label: 'dropout', dash: 'dashed' },
      { kind: 'area', points: [[3, 0], [10, 0], [10, 10], [3, 10]], label: 'everything' },
      { kind: 'marker', points: [[4.85, 0.25], [100, 100]], label: 'worst corner' },
    ],
  });
  assert.equal(L.x.ticks[0].label, '3 V', 'labels come from the passed formatter');
  assert.equal(L.x.ticks[0].pos, L.rect.x0);
  assert.equal(L.y.ticks[0].pos, L.rect.y1, 'lowest y value at the bottom edge');
  assert.equal(L.series[0].dash, 'dashed');
  assert.equal(L.series[2].markers.length, 1, 'marker outside the plot is dropped');
  for (const s of L.series) {
    for (const m of s.d.matchAll(/[ML](-?[\d.]+) (-?[\d.]+)/g)) {
      const [x, y] = [Number(m[1]), Number(m[2])];
      assert.ok(x >= L.rect.x0 - 1e-9 && x <= L.rect.x1 + 1e-9 && y >= L.rect.y0 - 1e-9 && y <= L.rect.y1 + 1e-9);
    }
  }
});

test('layoutStackedBars: segments lie end to end from zero, totals add up, nothing non-finite', () => {
  // Three made-up loss parts over two bars; the second bar has a part that does not apply (NaN)
  // and one that is negative (drawn as nothing). Hand-worked: totals 0.5 and 0.3.
  const L = layoutStackedBars({
    width: 600,
    bars: [{ label: 'low' }, { label: 'high' }],
    parts: [
      { label: 'a', short: 'A', values: [0.2, 0.1] },
      { label: 'b', values: [0.25, NaN] },
      { label: 'c', tone: 3, fill: 'hatch', values: [0.05, 0.2] },
      { label: 'never', values: [0, -1] },
    ],
    x: { label: 'loss', format: (v) => `${v} W` },
  });
  assert.deepEqual(L.x.domain, [0, 0.5], 'value axis from zero to the nice total');
  assert.equal(L.x.ticks[0].pos, L.rect.x0);
  assert.equal(L.x.ticks.at(-1).label, '0.5 W');
  const [low, high] = L.bars;
  assert.ok(Math.abs(low.total - 0.5) < 1e-12 && Math.abs(high.total - 0.3) < 1e-12);
  assert.deepEqual(low.segments.map((s) => s.part), [0, 1, 2]);
  assert.deepEqual(high.segments.map((s) => s.part), [0, 2], 'the NaN and the negative part draw nothing');
  for (const bar of L.bars) {
    assert.equal(bar.segments[0].x0, L.rect.x0, 'the first segment starts at zero');
    for (let i = 1; i < bar.segments.length; i++) assert.equal(bar.segments[i].x0, bar.segments[i - 1].x1, 'end to end');
    const scale = (L.rect.x1 - L.rect.x0) / 0.5;
    assert.ok(Math.abs(bar.segments.at(-1).x1 - (L.rect.x0 + bar.total * scale)) < 1e-9, 'the last one ends at the total');
    assert.ok(bar.y >= L.rect.y0 && bar.y + bar.h <= L.rect.y1, 'inside the plot');
    for (const s of bar.segments) assert.ok([s.x0, s.x1, bar.y, bar.h].every(Number.isFinite));
  }
  assert.ok(high.y > low.y, 'bars top to bottom in order');
  assert.deepEqual(L.parts.map((p) => p.used), [true, true, true, false], 'an all-zero part is marked unused (left out of the legend)');
  assert.equal(L.parts[2].fill, 'hatch');
  assert.ok(L.parts.every((p) => BAR_FILLS.includes(p.fill) && p.tone >= 1 && p.tone <= 5));
});

test('layoutStackedBars: parts beyond five tones change fill, so no two of ten look alike', () => {
  const parts = Array.from({ length: 10 }, (_, i) => ({ label: `p${i}`, values: [1] }));
  const L = layoutStackedBars({ bars: [{ label: 'one' }], parts });
  const looks = new Set(L.parts.map((p) => `${p.tone}/${p.fill}`));
  assert.equal(looks.size, 10);
  // No bars and no values: still a usable, finite layout.
  const E = layoutStackedBars({ bars: [], parts: [] });
  assert.ok(E.x.domain.every(Number.isFinite) && E.height > 0);
});
