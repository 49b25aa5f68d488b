// The iframe embed page: one calculator, compact, prefilled from the query (?calc=linear&vin-min=…,
// ?calc=thermal&power=…, ?calc=divider&vout-target=…, ?calc=switching&vin-min=…,
// ?calc=compare&vout=…, ?calc=tree#doc=… with the tree's share code in the fragment).
// Reports its height to the parent page so a host script can size the iframe; hosts that allow no
// script give the iframe a fixed height (see linear.html#embed).
import { h, reportEmbedHeight } from './common.js';

const CALCULATORS = {
  linear: { tag: 'railnote-linear', module: './linear-widget.js', title: 'Linear rail check' },
  thermal: { tag: 'railnote-thermal', module: './thermal-widget.js', title: 'Thermal path' },
  divider: { tag: 'railnote-divider', module: './divider-widget.js', title: 'Divider picker' },
  switching: { tag: 'railnote-switching', module: './switching-widget.js', title: 'Switching estimate' },
  compare: { tag: 'railnote-compare', module: './compare-widget.js', title: 'Linear or switching' },
  tree: { tag: 'railnote-tree', module: './tree-widget.js', title: 'Rail tree' },
};

const root = document.getElementById('embed-root');
const calc = new URLSearchParams(window.location.search).get('calc') || 'linear';
const entry = Object.prototype.hasOwnProperty.call(CALCULATORS, calc) ? CALCULATORS[calc] : null;

if (!entry) {
  root.append(h('p', { class: 'rn-error-box' },
    'This embed link names a calculator railnote does not have (“', calc.slice(0, 80), '”). ',
    `Use calc=${Object.keys(CALCULATORS).join(' or calc=')}.`));
  reportEmbedHeight(calc);
} else {
  document.title = `${entry.title} · railnote`;
  root.append(h('h1', { class: 'rn-visually-hidden' }, entry.title));
  const widget = document.createElement(entry.tag);
  widget.setAttribute('sync-url', '');
  widget.setAttribute('compact', '');
  root.append(widget);
  import(entry.module).then(
    () => reportEmbedHeight(calc),
    (err) => {
      root.append(h('p', { class: 'rn-error-box' }, `The calculator could not load: ${err && err.message ? err.message : err}`));
      reportEmbedHeight(calc);
    },
  );
}
