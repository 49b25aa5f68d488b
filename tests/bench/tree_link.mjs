// The share link of the demo rail tree, for `cargo xtask bench`: the demo document (site/js/
// tree-doc.js's demoDoc) as JSON, deflate-raw compressed by the platform's CompressionStream (the
// browser's, here Node's identical one) and base64url-encoded, as the page writes it. Prints one
// JSON line: {"jsonChars":…,"codeChars":…,"linkChars":…}, the link being tree.html#doc=… on a
// host of its own (its length excludes the host). A figure, not a pass/fail.
import { demoDoc, encodeDoc, exportJson } from '../../site/js/tree-doc.js';

const doc = demoDoc();
const code = await encodeDoc(doc);
const link = `tree.html#doc=${code}`;
console.log(JSON.stringify({ jsonChars: exportJson(doc).length, codeChars: code.length, linkChars: link.length }));
