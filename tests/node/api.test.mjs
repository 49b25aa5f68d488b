// The WASM API as JavaScript sees it (contract: parseQuantity, formatQuantity, checkLinear, and
// errors as thrown Error objects with a `field` property). Loads the built package the way Node
// users do, with initSync; run after `cargo xtask build`.
import { test } from 'node:test';
import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import {
  initSync,
  version,
  parseQuantity,
  formatQuantity,
  checkLinear,
} from '../../site/pkg/railnote.js';

initSync({ module: readFileSync(new URL('../../site/pkg/railnote_bg.wasm', import.meta.url)) });

/** Relative closeness; the values below are a handful of float operations from exact. */
function near(actual, expected, what, rel = 1e-9) {
  assert.equal(typeof actual, 'number', `${what} is a number`);
  const scale = Math.max(Math.abs(expected), 1e-300);
  assert.ok(
    Math.abs(actual - expected) / scale <= rel,
    `${what}: got ${actual}, expected ${expected}`,
  );
}

/** Calls fn, asserts it throws a real Error whose `field` is `field` (or one of a list of
 * fields), and returns the error. */
function throwsAt(fn, field, what) {
  let caught;
  try {
    fn();
  } catch (e) {
    caught = e;
  }
  assert.ok(caught instanceof Error, `${what}: throws an Error (got ${caught})`);
  const allowed = Array.isArray(field) ? field : [field];
  assert.ok(allowed.includes(caught.field), `${what}: field ${caught.field}, expected ${allowed}`);
  assert.equal(typeof caught.message, 'string');
  assert.ok(caught.message.length > 10, `${what}: a sentence, got ${JSON.stringify(caught.message)}`);
  assert.doesNotMatch(caught.message, /panicked|unreachable|RuntimeError/, what);
  return caught;
}

test('version is the crate version', () => {
  assert.match(version(), /^\d+\.\d+\.\d+/);
});

test('parseQuantity reads SI prefixes, units and RKM codes', () => {
  const cases = [
    // Plain SI prefixes and unit symbols (SI Brochure, 9th edition: k = 1e3, µ = 1e-6, m = 1e-3).
    ['4.7k', 'resistance', 4.7e3],
    ['2.2 µF', 'capacitance', 2.2e-6],
    ['2.2uF', 'capacitance', 2.2e-6], // "u" for µ: common practice where µ cannot be typed
    ['500mA', 'current', 0.5],
    ['1e-3 A', 'current', 1e-3],
    // IEC 60062 letter-and-digit ("RKM") code: the multiplier letter stands in the place of the
    // decimal point, R meaning ×1 (examples from memory: 4K7 = 4.7 kΩ, 2M2 = 2.2 MΩ, 0R1 = 0.1 Ω;
    // lower-case k is common practice).
    ['4k7', 'resistance', 4.7e3],
    ['0R1', 'resistance', 0.1],
    ['2M2', 'resistance', 2.2e6],
    // The same habit for voltages on schematics and rail names (common practice: "3V3" rail).
    ['3V3', 'voltage', 3.3],
    // Percent stays a number of percent; temperatures are degrees Celsius (contract).
    ['2', 'percent', 2],
    ['2 %', 'percent', 2],
    ['-40 °C', 'temperature', -40],
    ['85C', 'temperature', 85],
  ];
  for (const [text, kind, want] of cases) {
    near(parseQuantity(text, kind), want, `parseQuantity(${JSON.stringify(text)}, ${kind})`, 1e-12);
  }
});

test('parseQuantity rejects empty, non-numbers, overflow and the wrong kind of unit', () => {
  for (const text of ['', 'abc', 'NaN', 'Infinity', '1e400']) {
    const e = throwsAt(() => parseQuantity(text, 'voltage'), 'text', JSON.stringify(text));
    // The message says what was expected (contract: "expected a voltage such as …").
    assert.match(e.message, /voltage/i, JSON.stringify(text));
  }
  const e = throwsAt(() => parseQuantity('500 mA', 'voltage'), 'text', '"500 mA" as a voltage');
  assert.match(e.message, /current/i, 'names what the text is');
  assert.match(e.message, /voltage/i, 'names what was expected');
});

test('formatQuantity writes engineering notation with SI prefix and unit', () => {
  const cases = [
    // Examples from the contract.
    [0.0123, 'current', 3, '12.3 mA'],
    [109.21325, 'temperature', 3, '109 °C'],
    [66.0, 'percent', 3, '66.0 %'],
    [100, 'thermalResistance', 3, '100 K/W'],
    // SI prefixes (SI Brochure): 4700 Ω = 4.70 kΩ; 2.2e-6 F = 2.2 µF (micro sign U+00B5).
    [4700, 'resistance', 3, '4.70 kΩ'],
    [2.2e-6, 'capacitance', 2, '2.2 µF'],
    [3.3, 'voltage', 2, '3.3 V'],
    [NaN, 'voltage', 3, '—'],
    [Infinity, 'current', 3, '—'],
  ];
  for (const [value, kind, digits, want] of cases) {
    assert.equal(formatQuantity(value, kind, digits), want, `formatQuantity(${value}, ${kind}, ${digits})`);
  }
});

// The demo rail of the contract (invented scenario: soil-moisture logger, 3.3 V LDO from the
// 5.0 V buck rail, enclosure up to 60 °C).
const demo = Object.freeze({
  vinMin: 4.85,
  vinNom: 5.0,
  vinMax: 5.15,
  vout: 3.3,
  voutTolPct: 2,
  ioutMax: 0.25,
  ioutTyp: 0.03,
  iq: 50e-6,
  gndPct: 1,
  dropoutModel: 'resistive',
  dropoutV: 0.3,
  dropoutAtA: 0.3,
  ratedA: 0.3,
  thetaJa: 100,
  taMax: 60,
  tjMax: 125,
  headroomMarginV: 0.3,
  thermalMarginC: 15,
});

test('checkLinear on the demo rail: numbers worked out by hand', () => {
  const r = checkLinear({ ...demo });
  // Relations (product brief): I_gnd = I_q + gndPct/100·I_out; P_pass = (V_in − V_out)·I_out;
  // P_gnd = V_in·I_gnd; efficiency = V_out·I_out / (V_in·(I_out + I_gnd));
  // T_j = T_a + θJA·P (JEDEC JESD51-2A definition of θJA). Resistive dropout:
  // V_do(I) = 0.3 V · I / 0.3 A, i.e. 1 Ω.
  //
  // V_out,max = 3.3 · 1.02 = 3.366 V, V_out,min = 3.3 · 0.98 = 3.234 V
  // V_do(250 mA) = 0.3 · 0.25 / 0.3 = 0.25 V
  // headroom = 4.85 − 3.366 − 0.25 = 1.234 V (wanted 0.3 V: pass)
  // I_gnd(250 mA) = 50 µA + 0.01 · 0.25 = 2.55 mA
  // worst heat at V_in,max and V_out,min: P_pass = (5.15 − 3.234) · 0.25 = 0.479 W,
  //   P_gnd = 5.15 · 0.00255 = 0.0131325 W, P = 0.4921325 W
  // T_j = 60 + 100 · 0.4921325 = 109.21325 °C; margin 125 − 109.21325 = 15.78675 K (wanted 15)
  // I_in = 0.25 + 0.00255 = 0.25255 A
  assert.equal(r.verdict, 'pass');
  assert.equal(typeof r.summary, 'string');
  assert.ok(r.summary.length > 10);
  near(r.worst.voutMax, 3.366, 'worst.voutMax');
  near(r.worst.voutMin, 3.234, 'worst.voutMin');
  near(r.worst.dropoutV, 0.25, 'worst.dropoutV');
  near(r.worst.headroomV, 1.234, 'worst.headroomV');
  near(r.worst.powerW, 0.4921325, 'worst.powerW');
  near(r.worst.tjC, 109.21325, 'worst.tjC');
  near(r.worst.thermalMarginC, 15.78675, 'worst.thermalMarginC');
  near(r.worst.inputCurrentA, 0.25255, 'worst.inputCurrentA');

  const byId = Object.fromEntries(r.checks.map((c) => [c.id, c]));
  for (const id of ['headroom', 'thermal', 'rating']) {
    assert.ok(byId[id], `check ${id} is present`);
    assert.equal(byId[id].status, 'pass', `check ${id}`);
    assert.ok(byId[id].title.length > 0 && byId[id].text.length > 0, `check ${id} has words`);
  }
  for (const c of r.checks) assert.ok(['pass', 'marginal', 'fail'].includes(c.status));
  assert.ok(Array.isArray(r.warnings));
  assert.equal(r.suggestSwitching, false, 'neither heat nor efficiency fails');

  // Corners at nominal V_out = 3.3 V, full load 250 mA, T_a = 60 °C.
  assert.deepEqual(r.corners.map((c) => c.label), ['min', 'nom', 'max']);
  const nom = r.corners[1];
  near(nom.vin, 5.0, 'nom.vin');
  // headroom at 5.0 V: 5.0 − 3.366 − 0.25 = 1.384 V; at 5.15 V: 1.534 V
  near(nom.headroomV, 1.384, 'nom.headroomV');
  near(r.corners[2].headroomV, 1.534, 'max.headroomV');
  // P_pass = (5.0 − 3.3) · 0.25 = 0.425 W; P_gnd = 5.0 · 0.00255 = 0.01275 W; P = 0.43775 W
  near(nom.full.passW, 0.425, 'nom.full.passW');
  near(nom.full.groundW, 0.01275, 'nom.full.groundW');
  near(nom.full.totalW, 0.43775, 'nom.full.totalW');
  near(nom.full.groundA, 0.00255, 'nom.full.groundA');
  near(nom.full.inputA, 0.25255, 'nom.full.inputA');
  // P_in = 5.0 · 0.25255 = 1.26275 W; P_out = 3.3 · 0.25 = 0.825 W; η = 0.825 / 1.26275
  near(nom.full.inputW, 1.26275, 'nom.full.inputW');
  near(nom.full.outputW, 0.825, 'nom.full.outputW');
  near(nom.full.efficiencyPct, (100 * 0.825) / 1.26275, 'nom.full.efficiencyPct'); // 65.33 %
  // T_j = 60 + 100 · 0.43775 = 103.775 °C
  near(nom.full.tjC, 103.775, 'nom.full.tjC');
  near(nom.full.thermalMarginC, 21.225, 'nom.full.thermalMarginC');
  // Typical load 30 mA: I_gnd = 50 µA + 0.3 mA = 0.35 mA; η = 3.3·0.03 / (5.0·0.03035) = 65.24 %
  near(nom.typ.groundA, 0.00035, 'nom.typ.groundA');
  near(nom.typ.efficiencyPct, (100 * 3.3 * 0.03) / (5.0 * 0.03035), 'nom.typ.efficiencyPct');
  // Energy balance at every corner: P_in = P_out + P_pass + P_gnd.
  for (const c of r.corners) {
    for (const p of [c.full, c.typ]) {
      near(p.inputW, p.outputW + p.passW + p.groundW, `${c.label} energy balance`);
    }
  }

  // Solved-back limits.
  // Allowed dissipation with the margin: (125 − 15 − 60) / 100 = 0.5 W.
  // P(I) at 5.15 V, 3.234 V: (5.15 − 3.234)·I + 5.15·(50 µA + 0.01·I) = 1.9675·I + 0.0002575
  //   => I_thermal = (0.5 − 0.0002575) / 1.9675 = 0.25399873 A
  // I_headroom: 1 Ω · I ≤ 4.85 − 3.366 − 0.3 = 1.184 V => 1.184 A; rating 0.3 A
  // => the thermal limit binds first.
  const L = r.limits;
  near(L.maxLoadThermalA, (0.5 - 5.15 * 50e-6) / (5.15 - 3.234 + 5.15 * 0.01), 'maxLoadThermalA');
  near(L.maxLoadHeadroomA, 1.184, 'maxLoadHeadroomA');
  near(L.maxLoadA, L.maxLoadThermalA, 'maxLoadA');
  assert.equal(L.maxLoadBy, 'thermal');
  // Hottest ambient: 125 − 15 − 100 · 0.4921325 = 60.78675 °C
  near(L.hottestAmbientC, 60.78675, 'hottestAmbientC');
  // V_in,min to regulate: 3.366 + 0.25 = 3.616 V; with 0.3 V margin 3.916 V
  near(L.vinMinRegulating, 3.616, 'vinMinRegulating');
  near(L.vinMinWithMargin, 3.916, 'vinMinWithMargin');
  // Highest V_in at 250 mA: (V − 3.234)·0.25 + V·0.00255 = 0.5 => V = (0.5 + 0.8085) / 0.25255
  near(L.vinMaxThermal, 1.3085 / 0.25255, 'vinMaxThermal'); // 5.1812 V

  // Operating window: every thermal boundary point below the top of the plot sits at
  // T_j = T_j,max = 125 °C (zero margin) at T_a = 60 °C and V_out,min; every dropout boundary
  // point at zero headroom: V_in = V_out,max + 1 Ω · I.
  const w = r.window;
  near(w.ratedA, 0.3, 'window.ratedA');
  assert.deepEqual([w.vinMin, w.vinMax, w.ioutTyp, w.ioutMax], [4.85, 5.15, 0.03, 0.25]);
  assert.ok(w.vinFrom < w.vinMin && w.vinTo > w.vinMax && w.ioutTo > w.ratedA, 'axes hold the box');
  assert.ok(w.thermal.length >= 2 && w.dropout.length >= 2);
  for (const [v, i] of w.thermal) {
    if (i > 0 && i < w.ioutTo) {
      near(60 + 100 * ((v - 3.234) * i + v * (50e-6 + 0.01 * i)), 125, `thermal point ${v} V`, 1e-6);
    }
  }
  for (const [v, i] of w.dropout) near(v, 3.366 + i, `dropout point ${i} A`, 1e-9);
});

test('checkLinear verdict follows the margins', () => {
  // θJA 115 K/W: P = 0.4921325 W gives T_j = 60 + 56.595 = 116.6 °C: below 125 °C but inside
  // the wanted 15 K margin => marginal. θJA 150 K/W: T_j = 133.8 °C > 125 °C => fail.
  const marginal = checkLinear({ ...demo, thetaJa: 115 });
  near(marginal.worst.tjC, 60 + 115 * 0.4921325, 'tj at 115 K/W');
  assert.equal(marginal.verdict, 'marginal');
  assert.equal(marginal.checks.find((c) => c.id === 'thermal').status, 'marginal');
  const fail = checkLinear({ ...demo, thetaJa: 150 });
  assert.equal(fail.verdict, 'fail');
  assert.equal(fail.checks.find((c) => c.id === 'thermal').status, 'fail');
  assert.equal(fail.suggestSwitching, true, 'heat is the problem: offer a switcher');
  // Below dropout: V_in,min 3.5 V < 3.366 + 0.25 => negative headroom => fail.
  const low = checkLinear({ ...demo, vinMin: 3.5 });
  near(low.worst.headroomV, 3.5 - 3.366 - 0.25, 'headroom at 3.5 V');
  assert.equal(low.checks.find((c) => c.id === 'headroom').status, 'fail');
  assert.equal(low.verdict, 'fail');
});

test('checkLinear optional inputs: efficiency wanted and input budget', () => {
  // η at V_in,nom and typical load = 65.24 % (above); wanting 70 % fails that check.
  const r = checkLinear({ ...demo, effMinPct: 70, inputBudgetA: 0.2 });
  assert.equal(r.checks.find((c) => c.id === 'efficiency').status, 'fail');
  // I_in,max = 0.25255 A is over a 0.2 A budget.
  assert.equal(r.checks.find((c) => c.id === 'budget').status, 'fail');
  assert.equal(r.verdict, 'fail');
  const ok = checkLinear({ ...demo, effMinPct: 60, inputBudgetA: 0.5 });
  assert.equal(ok.checks.find((c) => c.id === 'efficiency').status, 'pass');
  assert.equal(ok.checks.find((c) => c.id === 'budget').status, 'pass');
});

test('checkLinear bad inputs throw an Error naming the key', () => {
  // V_in,min above V_in,max: the ordering V_in,min ≤ V_in,nom ≤ V_in,max is broken; the error
  // belongs to one of the three V_in fields.
  const e = throwsAt(
    () => checkLinear({ ...demo, vinMin: 5.3 }),
    ['vinMin', 'vinNom', 'vinMax'],
    'vinMin above vinMax',
  );
  assert.match(e.message, /V_in/);
  throwsAt(() => checkLinear({ ...demo, thetaJa: -5 }), 'thetaJa', 'negative θJA');
  // Only V_in,min can be wrong here: it is below V_out (a linear regulator cannot step up).
  throwsAt(() => checkLinear({ ...demo, vinMin: 3.0 }), 'vinMin', 'V_in,min below V_out');
  throwsAt(() => checkLinear({ ...demo, ioutTyp: 0.5 }), 'ioutTyp', 'typical above max');
  throwsAt(() => checkLinear({ ...demo, iq: NaN }), 'iq', 'NaN quiescent current');
  throwsAt(() => checkLinear({ ...demo, dropoutModel: 'tube' }), 'dropoutModel', 'unknown model');
  throwsAt(() => checkLinear({ ...demo, ratedA: '0.3' }), 'ratedA', 'a string for a number');
  const { tjMax, ...missing } = demo;
  assert.equal(tjMax, 125);
  throwsAt(() => checkLinear(missing), 'tjMax', 'missing key');
});

test('fuzz findings: a nameless key and sub-femto values are refused at a field', () => {
  // Found by the fuzz targets (fuzz/, see DEVELOPERS.md "Fuzzing"). A key named "" threw an
  // Error whose field was "" (nowhere to show it); it is now named by where it sits.
  throwsAt(() => checkLinear({ ...demo, '': 1 }), 'input', 'a key without a name');
  throwsAt(() => checkLinear({ ...demo, ' ': 1 }), 'input', 'a key of one space');
  // A dropout of 3.1e-322 V made the headroom bound Infinity; inputs below 1e-15 in size are
  // now refused with a message (core/tests/fuzz_regressions.rs has the others).
  const e = throwsAt(() => checkLinear({ ...demo, dropoutV: 3.1e-322 }), 'dropoutV', 'a subnormal dropout');
  assert.match(e.message, /0 or at least 1 fV/);
});
