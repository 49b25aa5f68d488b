// The rail tree's document: what the tree page keeps, saves, shares and sends to checkTree.
// Pure functions, no DOM: tested in Node (tests/node/tree-doc.test.mjs).
//
// Two shapes, on purpose:
// - The *document* (schema version 2) is exactly what checkTree reads: { version, taMax,
//   sources: [{…}], rails: [{…}], loads: [{…}] }, numbers in SI units (percent as percent, battery
//   capacity in Ah and Wh, the units batteries are rated in). Version 1 documents (capacity in
//   mAh, no per-rail linear details or switching parts) still open: migrate() brings them to 2. Exported files and share links hold the document and nothing else, so a
//   file written by one railnote is read by checkTree with no translation and any key checkTree
//   does not know is refused by name. Numbers go through JSON unchanged (JSON keeps every double
//   exactly), so export → import is lossless.
// - The *page state* keeps the text typed in each cell ("250 mA", "3V3", or something not yet
//   valid), because the page must show what was typed and a half-typed value must survive a
//   reload. The local draft (localStorage) stores the page state; the document is made from it by
//   parsing each cell with the engine's parseQuantity (passed in, so this module loads no wasm).
//   The typed text is not put into the document: a reviewer's copy holds numbers only.
//
// Share links: the document as JSON, compressed with the browser's own
// CompressionStream('deflate-raw'), in base64url, after `#doc=` in the page's URL. The fragment,
// not a query key: it never leaves the browser (no server log keeps a design), it has no server
// length limit (servers refuse long query strings near 8 KB), and it is still part of the link that
// is copied, bookmarked and opened. Readable query keys stay for the small calculators, whose
// state is a dozen numbers; a tree is a document.

/** The schema version this module writes. */
export const DOC_VERSION = 2;
/** Largest document text accepted (a paste, a file, an inflated link): 1 MB. */
export const MAX_DOC_CHARS = 1_000_000;
/** checkTree's own limits: refused here already so a huge paste never builds a huge table. */
export const MAX_RAILS = 500;
export const MAX_LOADS = 2000;

export const RAIL_KINDS = ['linear', 'switching', 'switch'];

// Every key of the v1 document, with the engine's quantity kind for number keys (null for text).
export const SOURCE_KEYS = {
  name: null, vMin: 'voltage', vNom: 'voltage', vMax: 'voltage',
  capacityAh: 'batteryCharge', capacityWh: 'energy', currentLimitA: 'current',
};
/** Choices of a rail's text keys that are picked from a list (the kind is checked as before). */
export const RAIL_CHOICES = {
  dropoutModel: ['constant', 'resistive', 'classic'],
  efficiencyFrom: ['fixed', 'estimate'],
  topology: ['buck', 'boost', 'inverting'],
  rectifier: ['synchronous', 'diode'],
  lightLoad: ['discontinuousAllowed', 'forcedContinuous'],
};
/**
 * A switching rail estimated from its parts carries the switching estimate's own keys (the
 * switching page's inputs, less the input voltages and the load, which the tree gives, and
 * the ripple ratio: the tree wants L itself).
 */
export const ESTIMATE_KEYS = {
  topology: null, rectifier: null, lightLoad: null, fsw: 'frequency', inductance: 'inductance',
  mainRdsOn: 'resistance', rectRdsOn: 'resistance', diodeVf: 'voltage', riseTime: 'time', fallTime: 'time',
  mainGateCharge: 'charge', rectGateCharge: 'charge', driveV: 'voltage', deadTime: 'time',
  bodyDiodeVf: 'voltage', cossCharge: 'charge', coss: 'capacitance', dcr: 'resistance', coreLoss: 'power',
  cout: 'capacitance', esr: 'resistance', minOnTime: 'time', maxDutyPct: 'percent', isat: 'current',
};
/** A linear rail's details beyond its dropout: the linear rail check's own inputs. */
export const LINEAR_KEYS = {
  dropoutModel: null, dropoutAtA: 'current', gndPct: 'percent', voutTolPct: 'percent',
  headroomMarginV: 'voltage', thermalMarginC: 'temperatureDifference',
};
export const RAIL_KEYS = {
  name: null, parent: null, kind: null, vout: 'voltage', efficiencyFrom: null, efficiencyPct: 'percent', iq: 'current',
  dropoutV: 'voltage', rOn: 'resistance', thetaJa: 'thermalResistance', tjMax: 'temperature',
  ratedA: 'current', ...LINEAR_KEYS, ...ESTIMATE_KEYS,
};
/** Version 1's keys, for reading old documents (migrate turns them into version 2's). */
const V1_SOURCE_KEYS = { ...SOURCE_KEYS, capacityMah: 'count' };
delete V1_SOURCE_KEYS.capacityAh;
export const LOAD_KEYS = {
  name: null, rail: null, typA: 'current', peakA: 'current', typW: 'power', peakW: 'power',
  activityPct: 'percent', sleepA: 'current',
};
const V1_RAIL_KEYS = {
  name: null, parent: null, kind: null, vout: 'voltage', efficiencyPct: 'percent', iq: 'current',
  dropoutV: 'voltage', rOn: 'resistance', thetaJa: 'thermalResistance', tjMax: 'temperature',
  ratedA: 'current',
};
const REQUIRED_TEXT = { sources: ['name'], rails: ['name', 'parent', 'kind'], loads: ['name', 'rail'] };
const LIST_KEYS = { sources: SOURCE_KEYS, rails: RAIL_KEYS, loads: LOAD_KEYS };

/** An error with the document path it concerns (`rails[2].vout`), like the engine's errors. */
export class DocError extends Error {
  constructor(field, message) {
    super(`${field}: ${message}`);
    this.field = field;
  }
}

/** The brief's logger board (invented demo data), as a document. */
export function demoDoc() {
  return {
    version: 2,
    taMax: 60,
    sources: [{ name: 'Battery', vMin: 10.8, vNom: 12, vMax: 14.4, capacityAh: 7 }],
    rails: [
      { name: '5V0 buck', parent: 'Battery', kind: 'switching', vout: 5, efficiencyPct: 88, ratedA: 0.8 },
      { name: '3V3 LDO', parent: '5V0 buck', kind: 'linear', vout: 3.3, dropoutV: 0.3, iq: 50e-6, thetaJa: 100, tjMax: 125, ratedA: 0.3 },
      { name: '1V8 LDO', parent: '3V3 LDO', kind: 'linear', vout: 1.8, dropoutV: 0.3, iq: 50e-6 },
    ],
    loads: [
      { name: 'Microcontroller and radio', rail: '3V3 LDO', typA: 0.03, peakA: 0.25, activityPct: 20, sleepA: 20e-6 },
      { name: 'Sensor front end', rail: '1V8 LDO', typA: 0.04, peakA: 0.04, activityPct: 5 },
    ],
  };
}

/**
 * The demo board as the page shows it: the same numbers as demoDoc, written the way a person
 * types them (units, prefixes). A test checks that it parses to demoDoc exactly.
 */
export function demoState() {
  const blank = (keys) => Object.fromEntries(Object.keys(keys).map((k) => [k, '']));
  const rail = (v) => ({ ...blank(RAIL_KEYS), ...v });
  const load = (v) => ({ ...blank(LOAD_KEYS), ...v });
  return {
    taMax: '60 °C',
    source: { ...blank(SOURCE_KEYS), name: 'Battery', vMin: '10.8 V', vNom: '12 V', vMax: '14.4 V', capacityAh: '7000 mAh' },
    rails: [
      rail({ name: '5V0 buck', parent: 'Battery', kind: 'switching', vout: '5 V', efficiencyPct: '88 %', ratedA: '800 mA' }),
      rail({ name: '3V3 LDO', parent: '5V0 buck', kind: 'linear', vout: '3.3 V', dropoutV: '300 mV', iq: '50 µA', thetaJa: '100 K/W', tjMax: '125 °C', ratedA: '300 mA' }),
      rail({ name: '1V8 LDO', parent: '3V3 LDO', kind: 'linear', vout: '1.8 V', dropoutV: '300 mV', iq: '50 µA' }),
    ],
    loads: [
      load({ name: 'Microcontroller and radio', rail: '3V3 LDO', typA: '30 mA', peakA: '250 mA', activityPct: '20 %', sleepA: '20 µA' }),
      load({ name: 'Sensor front end', rail: '1V8 LDO', typA: '40 mA', peakA: '40 mA', activityPct: '5 %' }),
    ],
  };
}

const isObject = (v) => v !== null && typeof v === 'object' && !Array.isArray(v);

/**
 * Bring a parsed document of any known version to the current one. Only version 1 exists; a
 * document without a version is taken as version 1 (as checkTree does). A later version (or a
 * version that is not a whole number) is refused with a message. When version 2 comes, its
 * reader gets a `from1to2(doc)` step here, applied in order, and the v1 fixture in the tests keeps
 * proving that old files and links still open.
 */
export function migrate(doc) {
  if (!isObject(doc)) throw new DocError('document', 'expected a JSON object { version, taMax, sources, rails, loads }');
  const v = doc.version === undefined ? 1 : doc.version;
  if (typeof v !== 'number' || !Number.isInteger(v) || v < 1) {
    throw new DocError('version', 'expected a whole number (this railnote writes version 1)');
  }
  if (v > DOC_VERSION) {
    throw new DocError('version', `this document is of schema version ${v}; this railnote reads version 1 and older`);
  }
  const steps = [from1to2];
  let out = { ...doc, version: v };
  for (let from = v; from < DOC_VERSION; from++) out = steps[from - 1](out);
  return out;
}

/**
 * Version 1 → 2: the charge capacity moves from `capacityMah` (mAh) to `capacityAh` (Ah), the
 * unit the new capacity cell reads ("7000 mAh" or "7 Ah"); everything else is unchanged
 * (version 2 only adds keys). The one arithmetic step in the page, a unit's decimal shift, done
 * exactly as checkTree does it for a version 1 document it reads itself (mAh / 1000).
 */
function from1to2(doc) {
  checkShape({ ...doc, version: 1 }, 1);
  const sources = Array.isArray(doc.sources) ? doc.sources.map((s) => {
    if (!isObject(s) || !('capacityMah' in s)) return s;
    const { capacityMah, ...rest } = s;
    return capacityMah === null ? rest : { ...rest, capacityAh: capacityMah / 1000 };
  }) : doc.sources;
  return { ...doc, version: 2, sources };
}

/**
 * Check the shape of a (migrated) document: known keys only, names as text, numbers as finite
 * numbers, lists within checkTree's limits. Links between rails (parents, cycles, duplicates)
 * are checkTree's job. Returns the document, copied to plain data; throws DocError.
 */
export function checkShape(doc, version = DOC_VERSION) {
  const out = { version: doc.version };
  for (const k of Object.keys(doc)) {
    if (!['version', 'taMax', 'sources', 'rails', 'loads'].includes(k)) {
      throw new DocError(k, `this key is not part of a version ${version} tree document (version, taMax, sources, rails, loads)`);
    }
  }
  const listKeys = version === 1
    ? { sources: V1_SOURCE_KEYS, rails: V1_RAIL_KEYS, loads: LOAD_KEYS }
    : LIST_KEYS;
  if (doc.taMax !== undefined) {
    if (typeof doc.taMax !== 'number' || !Number.isFinite(doc.taMax)) throw new DocError('taMax', 'expected a number (°C)');
    out.taMax = doc.taMax;
  }
  const limits = { sources: 1, rails: MAX_RAILS, loads: MAX_LOADS };
  for (const list of ['sources', 'rails', 'loads']) {
    const items = doc[list] === undefined ? [] : doc[list];
    if (!Array.isArray(items)) throw new DocError(list, 'expected a list');
    if (items.length > limits[list]) {
      throw new DocError(list, `${items.length} entries; a tree holds at most ${limits[list]}`);
    }
    out[list] = items.map((item, i) => {
      const at = `${list}[${i}]`;
      if (!isObject(item)) throw new DocError(at, 'expected an object');
      const keys = listKeys[list];
      const copy = {};
      for (const [k, v] of Object.entries(item)) {
        if (!Object.prototype.hasOwnProperty.call(keys, k)) {
          throw new DocError(`${at}.${k}`, `unknown key; expected one of ${Object.keys(keys).join(', ')}`);
        }
        if (v === null) continue;
        if (keys[k] === null) {
          if (typeof v !== 'string') throw new DocError(`${at}.${k}`, 'expected text');
          if (v.length > 200) throw new DocError(`${at}.${k}`, 'longer than 200 characters');
          if (list === 'rails' && RAIL_CHOICES[k] && !RAIL_CHOICES[k].includes(v)) {
            throw new DocError(`${at}.${k}`, `expected one of ${RAIL_CHOICES[k].join(', ')}`);
          }
        } else if (typeof v !== 'number' || !Number.isFinite(v)) {
          throw new DocError(`${at}.${k}`, 'expected a number');
        }
        copy[k] = v;
      }
      return copy;
    });
  }
  return out;
}

/**
 * Read a document from JSON text (a file or a paste). Refuses text over 1 MB before parsing it,
 * text that is not JSON, and documents of the wrong shape, each with a DocError naming the place.
 */
export function importJson(text) {
  if (typeof text !== 'string') throw new DocError('document', 'expected text');
  if (text.length > MAX_DOC_CHARS) {
    throw new DocError('document', `${text.length} characters is more than a tree document may hold (${MAX_DOC_CHARS})`);
  }
  if (text.trim() === '') throw new DocError('document', 'nothing to read: the text is empty');
  let parsed;
  try {
    parsed = JSON.parse(text);
  } catch (err) {
    throw new DocError('document', `not JSON (${String(err && err.message).slice(0, 120)})`);
  }
  return checkShape(migrate(parsed));
}

/** The document as JSON text for a file: the current version first, two-space indent. */
export function exportJson(doc) {
  return `${JSON.stringify({ ...doc, version: DOC_VERSION }, null, 2)}\n`;
}

// ---- page state ⇄ document ----

const numberText = (v) => (v === undefined || v === null ? '' : String(v));

/**
 * The page state of a document: every cell as text. Numbers are written in plain JavaScript
 * notation ("5e-5"), which parseQuantity reads back to the same double.
 */
export function stateFromDoc(doc) {
  const row = (item, keys) => Object.fromEntries(Object.keys(keys).map((k) => [k, numberText(item[k])]));
  return {
    taMax: numberText(doc.taMax),
    source: row((doc.sources && doc.sources[0]) || {}, SOURCE_KEYS),
    rails: (doc.rails || []).map((r) => row(r, RAIL_KEYS)),
    loads: (doc.loads || []).map((l) => row(l, LOAD_KEYS)),
  };
}

/**
 * Whether a rail of this kind (and efficiency source) uses a key: cells it does not use are
 * disabled on the page and left out of the document.
 */
export function railUses(rail, key) {
  const kind = rail.kind;
  const estimated = kind === 'switching' && rail.efficiencyFrom === 'estimate';
  if (key in LINEAR_KEYS || key === 'dropoutV') return kind === 'linear';
  if (key in ESTIMATE_KEYS) return estimated;
  if (key === 'efficiencyFrom') return kind === 'switching';
  if (key === 'efficiencyPct') return kind === 'switching' && !estimated;
  if (key === 'vout' || key === 'iq') return kind === 'linear' || kind === 'switching';
  if (key === 'rOn') return kind === 'switch';
  return true;
}

/** An empty row of a list ('rails' or 'loads'), all cells blank; a rail is linear by default. */
export function emptyRow(list) {
  const keys = list === 'rails' ? RAIL_KEYS : LOAD_KEYS;
  const r = Object.fromEntries(Object.keys(keys).map((k) => [k, '']));
  if (list === 'rails') r.kind = 'linear';
  return r;
}

/**
 * The document of a page state. parse(text, kind) → number (throws a sentence) is the engine's
 * parseQuantity. Blank cells are left out (checkTree says which of them it needs). Returns
 * { doc, errors: [{ field, message }] }; field is the document path (`rails[1].vout`, `taMax`),
 * the same names checkTree's errors use, so the page puts both at the same cell.
 */
export function docFromState(state, parse) {
  const errors = [];
  const cells = (item, keys, at) => {
    const out = {};
    for (const [k, kind] of Object.entries(keys)) {
      const text = typeof item[k] === 'string' ? item[k] : '';
      if (text.trim() === '') continue;
      if (kind === null) {
        out[k] = text.trim();
        continue;
      }
      try {
        out[k] = parse(text, kind);
      } catch (err) {
        errors.push({ field: `${at}.${k}`, message: err && err.message ? err.message : 'this value could not be read' });
      }
    }
    return out;
  };
  const doc = { version: DOC_VERSION };
  if ((state.taMax || '').trim() !== '') {
    try {
      doc.taMax = parse(state.taMax, 'temperature');
    } catch (err) {
      errors.push({ field: 'taMax', message: err && err.message ? err.message : 'this value could not be read' });
    }
  }
  doc.sources = [cells(state.source || {}, SOURCE_KEYS, 'sources[0]')];
  doc.rails = (state.rails || []).map((r, i) => cells(r, RAIL_KEYS, `rails[${i}]`));
  doc.loads = (state.loads || []).map((l, i) => cells(l, LOAD_KEYS, `loads[${i}]`));
  for (const list of ['rails', 'loads']) {
    doc[list].forEach((item, i) => {
      for (const k of REQUIRED_TEXT[list]) {
        if (item[k] === undefined && !errors.some((e) => e.field === `${list}[${i}].${k}`)) {
          errors.push({ field: `${list}[${i}].${k}`, message: k === 'kind' ? 'choose a kind' : 'a name is needed here' });
        }
      }
    });
  }
  return { doc, errors };
}

/**
 * A page state read back from storage: whatever was stored, only string cells survive, so a
 * damaged or hostile draft can not put anything but text into the page. Null if unusable.
 */
export function sanitizeState(value) {
  if (!isObject(value)) return null;
  const row = (item, keys) => Object.fromEntries(Object.keys(keys).map((k) => [k, isObject(item) && typeof item[k] === 'string' ? item[k].slice(0, 200) : '']));
  const list = (items, keys, max) => (Array.isArray(items) ? items.slice(0, max).map((it) => row(it, keys)) : []);
  return {
    taMax: typeof value.taMax === 'string' ? value.taMax.slice(0, 200) : '',
    source: row(value.source, SOURCE_KEYS),
    rails: list(value.rails, RAIL_KEYS, MAX_RAILS),
    loads: list(value.loads, LOAD_KEYS, MAX_LOADS),
  };
}

// ---- share links ----

function toBase64Url(bytes) {
  let bin = '';
  for (let i = 0; i < bytes.length; i += 0x8000) bin += String.fromCharCode(...bytes.subarray(i, i + 0x8000));
  return btoa(bin).replace(/\+/g, '-').replace(/\//g, '_').replace(/=+$/, '');
}

function fromBase64Url(text) {
  if (!/^[A-Za-z0-9_-]*$/.test(text)) throw new DocError('link', 'the link is damaged: it holds characters a railnote link never has');
  const b64 = text.replace(/-/g, '+').replace(/_/g, '/') + '='.repeat((4 - (text.length % 4)) % 4);
  let bin;
  try {
    bin = atob(b64);
  } catch {
    throw new DocError('link', 'the link is damaged: it is not base64url');
  }
  const bytes = new Uint8Array(bin.length);
  for (let i = 0; i < bin.length; i++) bytes[i] = bin.charCodeAt(i);
  return bytes;
}

/** The document, compressed (deflate-raw, the browser's own CompressionStream), as base64url. */
export async function encodeDoc(doc) {
  const json = JSON.stringify({ ...doc, version: DOC_VERSION });
  const stream = new Blob([new TextEncoder().encode(json)]).stream().pipeThrough(new CompressionStream('deflate-raw'));
  return toBase64Url(new Uint8Array(await new Response(stream).arrayBuffer()));
}

/**
 * The document a link's code holds. Inflates at most MAX_DOC_CHARS bytes (a small link can not
 * inflate into a page-freezing document), then reads it as importJson does. Throws DocError.
 */
export async function decodeDoc(code) {
  if (typeof code !== 'string' || code.length > MAX_DOC_CHARS) throw new DocError('link', 'the link is too long to be a tree');
  const bytes = fromBase64Url(code);
  const reader = new Blob([bytes]).stream().pipeThrough(new DecompressionStream('deflate-raw')).getReader();
  const chunks = [];
  let total = 0;
  try {
    for (;;) {
      const { done, value } = await reader.read();
      if (done) break;
      total += value.length;
      if (total > MAX_DOC_CHARS) {
        reader.cancel().catch(() => {});
        throw new DocError('link', 'the link inflates to more than a tree document may hold');
      }
      chunks.push(value);
    }
  } catch (err) {
    if (err instanceof DocError) throw err;
    throw new DocError('link', 'the link is damaged: its data does not inflate');
  }
  const all = new Uint8Array(total);
  let at = 0;
  for (const c of chunks) { all.set(c, at); at += c.length; }
  let text;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(all);
  } catch {
    throw new DocError('link', 'the link is damaged: its data is not text');
  }
  return importJson(text);
}

/** A share link: the page URL with `#doc=<code>` (any query and fragment replaced). */
export async function shareUrl(pageUrl, doc) {
  const u = new URL(pageUrl);
  u.hash = `doc=${await encodeDoc(doc)}`;
  return u.href;
}

/** The code of a `#doc=` fragment, or null when the fragment holds none. */
export function codeFromHash(hash) {
  const m = /^#?doc=([^&]*)/.exec(hash || '');
  return m ? m[1] : null;
}
