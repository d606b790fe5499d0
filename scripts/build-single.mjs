// Writes target/single/doublespar.html: the page (www/) as one self-contained file that works
// when opened from disk (file://), with no server and no network. Called by build-single.sh.
//
// What it holds, all inline:
// - www/style.css in a <style>, the favicon as a data: URL;
// - one <script type="module">: the wasm-bindgen glue of the design build (www/pkg-design, a
//   superset of the page's exports, so one wasm serves the page and the design worker) with its
//   `export`s removed and wrapped in a function, then a copy of www/app.js with its two loads
//   rewritten (the bindings import, and the design worker's script);
// - the wasm, gzipped and base64-encoded, inflated in the browser with DecompressionStream;
// - the design worker's source (the same glue + www/design-worker.js, its import and init
//   rewritten), started from a Blob URL; the page posts it the wasm bytes.
//
// Every rewrite must match exactly once, or the build fails (so a change to app.js or the glue
// cannot silently leave a file:// load behind).
//
// The page's content security policy allows 'self', which a file:// page does not have; the
// single file gets its own, stricter policy instead (see singlePolicy below): nothing but the one
// inline script and the one inline style, known by their hashes, the worker from a blob: URL,
// and the favicon as a data: URL.

import fs from 'node:fs';
import path from 'node:path';
import zlib from 'node:zlib';
import crypto from 'node:crypto';
import { fileURLToPath } from 'node:url';

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const WWW = path.join(ROOT, 'www');
const OUT_DIR = path.join(ROOT, 'target', 'single');
const OUT = path.join(OUT_DIR, 'doublespar.html');
const BUDGET = 600 * 1024;

const read = (rel) => fs.readFileSync(path.join(WWW, rel), 'utf8');

function replaceOnce(text, from, to, what) {
  const n = text.split(from).length - 1;
  if (n !== 1) throw new Error(`build-single: expected exactly one ${JSON.stringify(from)} in ${what}, found ${n}`);
  return text.replace(from, () => to);
}

/** The wasm-bindgen glue as a function `__dsMakeCore()` that returns its exports. */
function wrapGlue(glue) {
  const names = [];
  let body = glue.replace(/^export (class|function|const|let) ([A-Za-z_$][\w$]*)/gm, (_, kw, name) => {
    names.push(name);
    return `${kw} ${name}`;
  });
  body = replaceOnce(body, 'export { initSync, __wbg_init as default };', '', 'the glue');
  // Only reached when init() gets no module; the single page always passes the bytes.
  body = replaceOnce(body, "new URL('doublespar_bg.wasm', import.meta.url)",
    "(() => { throw new Error('the single page has no wasm file; pass the bytes'); })()", 'the glue');
  if (/^\s*(import|export)\b/m.test(body) || body.includes('import.meta')) {
    throw new Error('build-single: the glue has an import or export left');
  }
  const exportsList = ['default: __wbg_init', 'initSync', ...names].join(', ');
  return `function __dsMakeCore() {\n${body}\nreturn { ${exportsList} };\n}\n`;
}

const glue = wrapGlue(read('pkg-design/doublespar.js'));

// The design worker: the glue, then design-worker.js getting its bindings from it and its wasm
// bytes from the page's first message.
let worker = read('design-worker.js');
worker = replaceOnce(worker,
  "import init, { designJson, displacerChunk, summarize } from './pkg-design/doublespar.js';",
  [
    'const { default: init, designJson, displacerChunk, summarize } = __dsMakeCore();',
    'let __dsGotBytes;',
    'const __dsBytes = new Promise((resolve) => { __dsGotBytes = resolve; });',
    "self.addEventListener('message', (ev) => { if (ev.data && ev.data.type === 'doublespar-wasm') __dsGotBytes(ev.data.bytes); });",
  ].join('\n'),
  'design-worker.js');
worker = replaceOnce(worker, 'init()\n  .then(', '__dsBytes\n  .then((bytes) => init({ module_or_path: bytes }))\n  .then(', 'design-worker.js');
const workerSource = glue + worker;

// The page's script.
let app = read('app.js');
app = replaceOnce(app,
  "core = await import('./pkg/doublespar.js');\n    await core.default();",
  'core = __dsMakeCore();\n    await core.default({ module_or_path: await __dsWasmBytes() });',
  'app.js');
app = replaceOnce(app, "new Worker('design-worker.js', { type: 'module' })", '__dsStartWorker()', 'app.js');

const wasm = fs.readFileSync(path.join(WWW, 'pkg-design', 'doublespar_bg.wasm'));
const wasmB64 = zlib.gzipSync(wasm, { level: 9 }).toString('base64');

// Text inside a <script> must not contain "</script" (or "<!--"); in JS source, "<\/" is the same
// string, and in JSON text every "<" can be written as \u003c.
const scriptSafe = (js) => js.replace(/<\/(script)/gi, '<\\/$1').replace(/<!--/g, '<\\!--');
const jsonSafe = (value) => JSON.stringify(value).replace(/</g, '\\u003c');

const loader = `// Doublespar, single-file edition: everything is inline; nothing is fetched.
const __DS_WASM_GZ_B64 = ${jsonSafe(wasmB64)};
const __DS_WORKER_SOURCE = ${jsonSafe(workerSource)};
let __dsWasmPromise = null;
/** The wasm bytes (an ArrayBuffer), inflated once from the inline gzip. */
function __dsWasmBytes() {
  if (!__dsWasmPromise) {
    __dsWasmPromise = (async () => {
      const bin = atob(__DS_WASM_GZ_B64);
      const gz = new Uint8Array(bin.length);
      for (let i = 0; i < bin.length; i += 1) gz[i] = bin.charCodeAt(i);
      const stream = new Blob([gz]).stream().pipeThrough(new DecompressionStream('gzip'));
      return new Response(stream).arrayBuffer();
    })();
  }
  return __dsWasmPromise;
}
let __dsWorkerUrl = null;
/** The design worker, from a Blob URL of its inline source; it gets a copy of the wasm bytes. */
function __dsStartWorker() {
  if (!__dsWorkerUrl) {
    __dsWorkerUrl = URL.createObjectURL(new Blob([__DS_WORKER_SOURCE], { type: 'text/javascript' }));
  }
  // A classic worker (its source has no import or export left): in Chromium, a module worker
  // from a blob: URL failed to start in a page opened from file://.
  const w = new Worker(__dsWorkerUrl);
  __dsWasmBytes().then((bytes) => w.postMessage({ type: 'doublespar-wasm', bytes: bytes.slice(0) }));
  return w;
}
`;

const script = scriptSafe(loader + glue + app);

/** A CSP source for exactly this inline text (what the browser hashes: the element's content). */
const hashSource = (text) => `'sha256-${crypto.createHash('sha256').update(text, 'utf8').digest('base64')}'`;

/**
 * The single file's policy. The module script and the style are allowed by hash only; the wasm is
 * compiled from bytes ('wasm-unsafe-eval'). The design worker is a classic worker from a blob:
 * URL: worker-src governs that load, and the worker inherits this policy (so its own wasm needs
 * 'wasm-unsafe-eval' too, and it can fetch nothing). Nothing is fetched: no connect-src.
 */
function singlePolicy(scriptText, styleText) {
  return [
    "default-src 'none'",
    `script-src ${hashSource(scriptText)} 'wasm-unsafe-eval'`,
    `style-src ${hashSource(styleText)}`,
    'worker-src blob:',
    'img-src data:',
    "base-uri 'none'",
    "form-action 'none'",
  ].join('; ');
}

const PAGE_POLICY = `<meta http-equiv="Content-Security-Policy" content="default-src 'self'; script-src 'self' 'wasm-unsafe-eval'">`;

let html = read('index.html');
const favicon = 'data:image/svg+xml;base64,' + Buffer.from(read('favicon.svg')).toString('base64');
html = replaceOnce(html, '<link rel="icon" href="favicon.svg" type="image/svg+xml">',
  `<link rel="icon" href="${favicon}" type="image/svg+xml">`, 'index.html');
const styleText = `\n${read('style.css').replace(/<\/(style)/gi, '<\\/$1')}\n`;
const scriptText = `\n${script}\n`;
html = replaceOnce(html, PAGE_POLICY,
  `<meta http-equiv="Content-Security-Policy" content="${singlePolicy(scriptText, styleText)}">`, 'index.html');
html = replaceOnce(html, '<link rel="stylesheet" href="style.css">', `<style>${styleText}</style>`, 'index.html');
html = replaceOnce(html, '<script type="module" src="app.js"></script>',
  `<script type="module">${scriptText}</script>`, 'index.html');
if (/\b(src|href)="(?!#|data:)[^"]*"/.test(html.replace(/<script type="module">[\s\S]*<\/script>/, ''))) {
  const m = /\b(src|href)="(?!#|data:)[^"]*"/.exec(html.replace(/<script type="module">[\s\S]*<\/script>/, ''));
  console.warn(`build-single: note: the page still links ${m[0]}`);
}

fs.mkdirSync(OUT_DIR, { recursive: true });
fs.writeFileSync(OUT, html);
const size = Buffer.byteLength(html);
console.log(`${path.relative(ROOT, OUT)}: ${size} bytes (${(size / 1024).toFixed(1)} KiB; budget ${BUDGET / 1024} KiB)`);
if (size > BUDGET) {
  console.error('build-single: the single page is over its size budget');
  process.exit(1);
}
