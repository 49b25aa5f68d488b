// The hostile-input corpus of hostile.test.mjs (not a test file itself): what a shared link or a
// careless paste can put into a field, per field kind.
//
// Each entry is { id, text(kind), class, name, … } (name: also typed into the tree's name cells,
// which take any text; the numbers are left out there):
// - class 'refused': the quantity parser (core/src/units.rs) refuses it; the field must show a
//   message matching `reason` (the parser's words: "enter …", "expected …", "that is a current",
//   "too long", "too large or too small", or a kind's own rule) and naming the field's kind.
// - class 'blank': only spaces (or nothing). An optional field treats it as left empty, a
//   required one says "enter …": either way it must behave exactly as the empty text does.
// - class 'same': in fact a valid spelling; the widget must behave exactly as it does for
//   `as(kind)`, its plain spelling (the same state, the same messages, the same result). Whether
//   that computes or is refused by the calculator's own range depends on the field: the test
//   reports which.
// - class 'number': a finite number far outside what any field takes, or at the edge of what an
//   f64 holds; the parser reads it, so the calculator must either compute a finite result or
//   refuse it with a message at that field.
//
// Decisions (consistent with core/src/units.rs and its tests): the micro sign U+00B5 and the Greek
// small mu U+03BC both mean micro, like "u"; the Cyrillic "м" (U+043C) is not a prefix ("m" is);
// the typographic minus U+2212 is a minus; a no-break space is a space (JavaScript's trim and
// Rust's trim agree that U+00A0 is white space); a zero-width space, a right-to-left override and a
// null byte are not, so a value holding one is refused. Digits other than ASCII are refused.

/** The unit symbol each kind prints and reads (units.rs `symbol`). */
export const SYMBOL = {
  voltage: 'V', current: 'A', resistance: 'Ω', power: 'W', temperature: '°C', temperatureDifference: 'K',
  thermalResistance: 'K/W', frequency: 'Hz', capacitance: 'F', inductance: 'H', time: 's', percent: '%',
  charge: 'C', tempco: 'ppm/K', count: '', batteryCharge: 'Ah', energy: 'Wh',
};

/** The words a message uses for a kind (units.rs `noun`): each refusal must name the kind. */
export const NOUN = {
  voltage: 'a voltage', current: 'a current', resistance: 'a resistance', power: 'a power',
  temperature: 'a temperature', temperatureDifference: 'a temperature difference',
  thermalResistance: 'a thermal resistance', frequency: 'a frequency', capacitance: 'a capacitance',
  inductance: 'an inductance', time: 'a time', percent: 'a percentage', charge: 'a charge',
  tempco: 'a temperature coefficient', count: 'a whole number', batteryCharge: 'a battery capacity',
  energy: 'an energy',
};

/** The kind's symbol ('' for a count or a text cell), and the same after a space. */
const u = (kind) => SYMBOL[kind] ?? '';
const sym = (kind) => (u(kind) ? ` ${u(kind)}` : '');
/** A unit of another kind than `kind`. */
const foreign = (kind) => (kind === 'voltage' ? '250 mA' : '3.3 V');
const TEN_KB = 10 * 1024;
const IMG = '<img src=x onerror=alert(1)>';

const NOT_A_NUMBER = /expected /;
const RANGE = /too large or too small/;

export const CORPUS = [
  { id: 'empty', name: true, text: () => '', class: 'blank' },
  { id: 'spaces', name: true, text: () => '    ', class: 'blank' },
  { id: 'no-break spaces', text: () => '\u00a0\u00a0', class: 'blank' },
  { id: 'NaN', name: true, text: () => 'NaN', class: 'refused', reason: NOT_A_NUMBER },
  { id: 'nan with unit', text: (k) => `nan${sym(k)}`, class: 'refused', reason: NOT_A_NUMBER },
  { id: 'Infinity', name: true, text: () => 'Infinity', class: 'refused', reason: NOT_A_NUMBER },
  { id: '-Infinity', text: () => '-Infinity', class: 'refused', reason: NOT_A_NUMBER },
  { id: 'inf', text: () => 'inf', class: 'refused', reason: NOT_A_NUMBER },
  { id: 'null', text: () => 'null', class: 'refused', reason: NOT_A_NUMBER },
  { id: '1e400 (overflows)', text: () => '1e400', class: 'refused', reason: RANGE },
  { id: '1e-400 (underflows)', text: () => '1e-400', class: 'refused', reason: RANGE },
  { id: 'huge exponent', text: () => '1e99999999999999999999', class: 'refused', reason: RANGE },
  { id: 'tiny exponent', text: () => '-1e-99999999999999999999', class: 'refused', reason: RANGE },
  { id: '1e309 (overflows)', text: (k) => `1e309${sym(k)}`, class: 'refused', reason: RANGE },
  { id: '-0', text: () => '-0', class: 'same', as: () => '0' },
  { id: 'typographic minus', text: (k) => `\u22122${sym(k)}`, class: 'same', as: (k) => `-2${sym(k)}` },
  { id: 'micro sign U+00B5', text: (k) => `47 \u00b5${u(k)}`, class: 'same', as: (k) => `47 u${u(k)}` },
  { id: 'Greek mu U+03BC', text: (k) => `47 \u03bc${u(k)}`, class: 'same', as: (k) => `47 u${u(k)}` },
  { id: 'no-break space before the unit', text: (k) => `3.3\u00a0${u(k)}`, class: 'same', as: (k) => `3.3 ${u(k)}` },
  { id: '1e308', text: () => '1e308', class: 'number' },
  { id: '-1e308', text: () => '-1e308', class: 'number' },
  { id: '1e-308 (subnormal)', text: () => '1e-308', class: 'number' },
  { id: '60 nines', text: () => '9'.repeat(60), class: 'number' },
  { id: 'tiny with 60 zeros', text: () => `0.${'0'.repeat(59)}1`, class: 'number' },
  { id: 'unit of another kind', text: foreign, class: 'refused', reason: /^that is (a current|a voltage);/ },
  { id: 'Arabic-Indic digits', name: true, text: () => '\u0663\u066b\u0663', class: 'refused', reason: NOT_A_NUMBER },
  { id: 'fullwidth digits', text: (k) => `\uff13\uff0e\uff13${sym(k)}`, class: 'refused', reason: NOT_A_NUMBER },
  { id: 'Cyrillic em as milli', text: (k) => `250 \u043c${u(k)}`, class: 'refused', reason: NOT_A_NUMBER },
  { id: '10 kB of digits', text: () => '1'.repeat(TEN_KB), class: 'refused', reason: /too long/ },
  { id: '10 kB of markup', name: true, text: () => IMG.repeat(Math.ceil(TEN_KB / IMG.length)), class: 'refused', reason: /too long/ },
  { id: 'img onerror', name: true, text: () => IMG, class: 'refused', reason: NOT_A_NUMBER },
  { id: 'script tag', name: true, text: () => '"><script>alert(1)</script>', class: 'refused', reason: NOT_A_NUMBER },
  { id: 'svg onload after a number', name: true, text: (k) => `3.3${sym(k)}</span><svg onload=alert(1)>`, class: 'refused', reason: NOT_A_NUMBER },
  { id: 'javascript: URL', name: true, text: () => 'javascript:alert(1)', class: 'refused', reason: NOT_A_NUMBER },
  { id: 'right-to-left override first', name: true, text: (k) => `\u202e3.3${sym(k)}`, class: 'refused', reason: NOT_A_NUMBER },
  { id: 'right-to-left override inside', name: true, text: (k) => `3.3\u202e${sym(k)}`, class: 'refused', reason: NOT_A_NUMBER },
  { id: 'zero-width space', name: true, text: (k) => `3.3\u200b${sym(k)}`, class: 'refused', reason: NOT_A_NUMBER },
  { id: 'null byte', name: true, text: (k) => `3.3\u0000${sym(k)}`, class: 'refused', reason: NOT_A_NUMBER },
  { id: 'null byte alone', name: true, text: () => '\u0000', class: 'refused', reason: NOT_A_NUMBER },
];

/** Kinds that take no SI prefix: a micro entry is refused there (the same way as with "u"). */
export const NO_PREFIX = new Set(['temperature', 'temperatureDifference', 'thermalResistance', 'percent', 'tempco']);

/**
 * The corpus written out for the given kinds, as plain data a page can take:
 * [{ id, class, reason (source), texts: {kind: text}, as: {kind: text} }].
 */
export function materialize(kinds) {
  return CORPUS.map((e) => ({
    id: e.id,
    name: Boolean(e.name),
    class: e.class,
    reason: e.reason ? e.reason.source : null,
    texts: Object.fromEntries(kinds.map((k) => [k, e.text(k)])),
    as: e.as ? Object.fromEntries(kinds.map((k) => [k, e.as(k)])) : null,
  }));
}
