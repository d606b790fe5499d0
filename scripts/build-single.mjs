// Writes target/single/doublespar.html: the page (www/) as one self-contained file that works
// when opened from disk (file://), with no server and no network. Called by build-single.sh.
//
// What it holds, all inline:
// - www/index.html and www/style.css (in a <style>), both without blank lines or indentation
//   (and the style sheet without comments, and without line breaks after a declaration, a brace
//   or a comma), the favicon as a data: URL;
// - the page's script: the wasm-bindgen glue of the design build (www/pkg-design, a superset of
//   the page's exports, so one wasm serves the page and the design worker) with its `export`s
//   removed and wrapped in a function, then the page's modules (www/app.js and the modules it
//   imports, see PAGE_MODULES), each in a function scope of its own by bundlePage below, with
//   their two loads rewritten (the bindings import, and the design worker's script);
// - that script and the wasm, each gzipped and written in base 85 (see BASE85 below), in one
//   <script type="module"> (the bootstrap) that inflates both with DecompressionStream and runs
//   the page's script as an inline module script (allowed by its hash, see singlePolicy);
// - the design worker's own code (www/design-worker.js, its import and init rewritten), started
//   from a Blob URL of the glue's function as the page's script holds it (its source text,
//   `${__dsMakeCore}`) followed by that code, so the glue is stored once; the page posts the
//   worker the wasm bytes.
//
// The glue, the modules and the worker's code are compacted (compactLines: no comment or blank
// lines, no indentation outside template literals) and must then parse (checkSyntax).
//
// Every rewrite must match exactly once, or the build fails (so a change to the page's modules or
// the glue cannot silently leave a file:// load behind).
//
// The page's content security policy allows 'self', which a file:// page does not have; the
// single file gets its own, stricter policy instead (see singlePolicy below): nothing but the two
// inline scripts and the one inline style, known by their hashes, the worker from a blob: URL,
// and the favicon as a data: URL.

import fs from 'node:fs';
import path from 'node:path';
import zlib from 'node:zlib';
import crypto from 'node:crypto';
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const WWW = path.join(ROOT, 'www');
const OUT_DIR = path.join(ROOT, 'target', 'single');
const OUT = path.join(OUT_DIR, 'doublespar.html');
const BUDGET = 800 * 1024;

const read = (rel) => fs.readFileSync(path.join(WWW, rel), 'utf8');

function replaceOnce(text, from, to, what) {
  const n = text.split(from).length - 1;
  if (n !== 1) throw new Error(`build-single: expected exactly one ${JSON.stringify(from)} in ${what}, found ${n}`);
  return text.replace(from, () => to);
}

/** The glue's exports that the single file leaves out (see wrapGlue). */
const UNUSED_EXPORTS = ['benchSplitter', 'benchWalkoffSweep', 'designJson'];

/** The wasm-bindgen glue as a function `__dsMakeCore()` that returns its exports. */
function wrapGlue(glue) {
  const names = [];
  // Exports neither the page nor the worker calls (the benchmark hooks, which scripts/bench
  // calls under Node, and the one-shot designJson) are left out, each found exactly once.
  for (const name of UNUSED_EXPORTS) {
    const at = new RegExp(`^export function ${name}\\([^\\n]*\\n(?:(?!\\}\\n)[^\\n]*\\n)*?\\}\\n`, 'm');
    const found = glue.match(new RegExp(at.source, 'gm')) || [];
    if (found.length !== 1) throw new Error(`build-single: expected exactly one export function ${name} in the glue, found ${found.length}`);
    glue = glue.replace(at, '');
  }
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
  body = compactLines(body, 'the glue');
  const exportsList = ['default: __wbg_init', 'initSync', ...names].join(', ');
  return `function __dsMakeCore() {\n${body}\nreturn { ${exportsList} };\n}\n`;
}

// The page's ES modules, in www/ beside app.js. A module that app.js (or one of these) imports
// must be listed here, and every one listed must be reached from app.js: the build fails
// otherwise, so that adding a module is a deliberate change to the single file too.
const PAGE_MODULES = ['app.js', 'dom.js', 'format.js', 'field-error.js', 'geometry.js', 'formula.js', 'state.js', 'history.js', 'results.js', 'views.js', 'design-panel.js', 'design-results.js', 'export.js', 'core-worker.js', 'convergent.js'];

const IDENT = '[A-Za-z_$][\\w$]*';
// A top-level declaration starts its line (the page's style): `[export ][async ]function[*] name`,
// `[export ]class name`, `[export ]const|let|var name`.
const DECLARATION = new RegExp(`^(export\\s+)?(?:(?:async\\s+)?function(?:\\s*\\*\\s*|\\s+)|class\\s+|(?:const|let|var)\\s+)(${IDENT})`, 'gm');

/** The names that a script's top level declares (see DECLARATION); `what` names it in errors. */
function topLevelNames(text, what) {
  if (/^(?:export\s+)?(?:const|let|var)\s*[[{]/m.test(text)) {
    throw new Error(`build-single: ${what} has a destructuring declaration at its top level; declare one name at a time`);
  }
  return [...text.matchAll(DECLARATION)].map((m) => m[2]);
}

/** The name under which the single file holds a module's exports: `dom.js` -> `__module_dom_js`. */
const moduleObject = (file) => `__module_${file.replace(/\W/g, '_')}`;

/**
 * The page's modules as one script, in the order the browser evaluates them (each after the
 * modules it imports, in the order of its import lines, from app.js). Each module keeps a scope
 * of its own: its body runs in a function that returns its exports as an object, bound to
 * moduleObject(file), and its imports become destructurings of the objects of the modules they
 * name, so that two modules may declare the same name. Strict, because nothing checks the result
 * but the browser: an import must be `import { a, b } from './x.js';` of a module in PAGE_MODULES
 * (no default, namespace or renamed import; the bindings are loaded with import(), which the
 * caller rewrites), each name one that module exports; an export must be `export
 * function|class|const name` (an exported `let` could change after the copy was taken); no cycle.
 * Returns {text, order, declared: Map name -> module} (every module's top-level names, which must
 * not hide a name of the wrapper or the loader).
 */
/**
 * `source` (the text of `what`) as compact as its meaning allows, line by line: lines that hold
 * only a `//` comment, block comments that start their line with `/*` (doc comments) and end a
 * line with `*\/`, and blank lines are left out, and every other line loses its leading
 * whitespace (outside a string or template literal, whitespace at the start of a line means
 * nothing in JavaScript; a line keeps its newline, so automatic semicolons stay where they were).
 * Lines inside a template literal are kept as they are (a line's backticks, escaped ones aside,
 * toggle that state), and so is a line after one that ends with `\` (a string continued on the
 * next line). With `keepIndent`, only the comment and blank lines go (topLevelNames reads a
 * declaration's level from its indentation). The build fails if a file ends inside a template
 * literal or a block comment (the count went wrong, and stripping could have changed a string),
 * or if code follows a block comment that starts its line. The page's modules and the glue are
 * read by people in www/; the single file only has to run, and its budget is tight.
 */
function compactLines(source, what, keepIndent = false) {
  const out = [];
  let inTemplate = false;
  let inBlock = false;
  let continued = false;
  for (const line of source.split('\n')) {
    const trimmed = line.trim();
    if (!inTemplate && !continued) {
      if (inBlock) {
        if (trimmed.endsWith('*/')) inBlock = false;
        continue;
      }
      if (trimmed === '' || trimmed.startsWith('//')) continue;
      if (trimmed.startsWith('/*')) {
        const end = trimmed.indexOf('*/', 2);
        if (end !== -1 && end !== trimmed.length - 2) throw new Error(`build-single: ${what}: code after a block comment on its line: ${trimmed}`);
        if (end === -1) inBlock = true;
        continue;
      }
    }
    out.push(inTemplate || continued || keepIndent ? line : line.trimStart());
    const ticks = (line.replace(/\\`/g, '').match(/`/g) || []).length;
    if (ticks % 2 === 1) inTemplate = !inTemplate;
    continued = !inTemplate && line.endsWith('\\');
  }
  if (inTemplate || inBlock) {
    throw new Error(`build-single: ${what} ends inside a ${inTemplate ? 'template literal' : 'block comment'} as compactLines counts; it cannot be compacted safely`);
  }
  return out.join('\n');
}

/**
 * The style sheet without its comments, blank lines and indentation. A comment must start its
 * line (the page's style); a `/*` anywhere else (inside a string, or code before a comment) fails
 * the build rather than be guessed at.
 */
function compactCss(source) {
  const out = [];
  let inBlock = false;
  for (const line of source.split('\n')) {
    const trimmed = line.trim();
    if (inBlock) {
      if (trimmed.includes('*/')) {
        if (!trimmed.endsWith('*/')) throw new Error(`build-single: style.css: code after a comment on its line: ${trimmed}`);
        inBlock = false;
      }
      continue;
    }
    if (trimmed.startsWith('/*')) {
      const end = trimmed.indexOf('*/', 2);
      if (end !== -1 && end !== trimmed.length - 2) throw new Error(`build-single: style.css: code after a comment on its line: ${trimmed}`);
      inBlock = end === -1;
      continue;
    }
    if (trimmed.includes('/*')) throw new Error(`build-single: style.css: a comment that does not start its line: ${trimmed}`);
    if (trimmed !== '') out.push(trimmed);
  }
  if (inBlock) throw new Error('build-single: style.css ends inside a comment');
  // A line break after a declaration, a brace or a selector's comma separates nothing: dropped.
  return out.reduce((text, line) => text + (text === '' || /[;{},]$/.test(text) ? '' : '\n') + line, '');
}

function bundlePage() {
  const modules = new Map(); // file -> {imports: [{from, names}], body, exported: [name]}
  const parse = (file) => {
    let source = read(file);
    const imports = [];
    source = source.replace(/^import\b[^\n]*\n/gm, (line) => {
      const m = new RegExp(`^import \\{ (${IDENT}(?:, ${IDENT})*) \\} from '\\./([\\w-]+\\.js)';\\n$`).exec(line);
      if (!m) throw new Error(`build-single: ${file}: an import the single file cannot inline (only \`import { a, b } from './x.js';\`): ${line.trim()}`);
      if (!PAGE_MODULES.includes(m[2])) throw new Error(`build-single: ${file} imports ./${m[2]}, which is not one of the page's modules (PAGE_MODULES: ${PAGE_MODULES.join(', ')})`);
      imports.push({ from: m[2], names: m[1].split(', ') });
      return '';
    });
    if (/^\s*import\b(?!\s*\()/m.test(source)) throw new Error(`build-single: ${file}: an import that does not start its line`);
    if (/^export\s+let\b/m.test(source)) throw new Error(`build-single: ${file}: an exported let, which the single file would copy once; export a const or a function`);
    const exported = [];
    for (const m of source.matchAll(DECLARATION)) if (m[1]) exported.push(m[2]);
    const unexported = source.replace(/^export (?=(?:async\s+)?function\b|class\b|const\b)/gm, '');
    const body = compactLines(unexported, file);
    const topLevel = topLevelNames(compactLines(unexported, file, true), file);
    if (/^\s*export\b/m.test(body)) throw new Error(`build-single: ${file}: an export the single file cannot inline (only \`export function|class|const name\`)`);
    return { imports, body, exported, topLevel };
  };
  const order = [];
  const visiting = new Set();
  const visit = (file, chain) => {
    if (order.includes(file)) return;
    if (visiting.has(file)) throw new Error(`build-single: the page's modules import each other in a cycle: ${[...chain, file].join(' -> ')}`);
    visiting.add(file);
    const mod = parse(file);
    modules.set(file, mod);
    for (const imp of mod.imports) visit(imp.from, [...chain, file]);
    visiting.delete(file);
    order.push(file);
  };
  visit('app.js', []);
  const unused = PAGE_MODULES.filter((f) => !order.includes(f));
  if (unused.length) throw new Error(`build-single: PAGE_MODULES lists ${unused.join(', ')}, which app.js does not reach; update the list`);
  const declared = new Map();
  const parts = [];
  for (const file of order) {
    const mod = modules.get(file);
    for (const imp of mod.imports) {
      for (const name of imp.names) {
        if (!modules.get(imp.from).exported.includes(name)) throw new Error(`build-single: ${file} imports ${name} from ./${imp.from}, which does not export it`);
      }
    }
    for (const name of mod.topLevel) declared.set(name, file);
    const imports = mod.imports.map((imp) => `const { ${imp.names.join(', ')} } = ${moduleObject(imp.from)};\n`).join('');
    parts.push(`const ${moduleObject(file)} = (() => {\n${imports}${mod.body}\nreturn { ${mod.exported.join(', ')} };\n})();\n`);
  }
  return { text: parts.join('\n'), order, declared };
}

const glue = wrapGlue(read('pkg-design/doublespar.js'));

// The design worker: the glue, then design-worker.js getting its bindings from it and its wasm
// bytes from the page's first message.
let worker = read('design-worker.js');
// Its one import of the glue, whatever bindings it names, becomes a destructuring of the glue.
const workerImport = /^import init, \{ ([^}]+) \} from '\.\/pkg-design\/doublespar\.js';$/m;
const imported = worker.match(workerImport);
if (!imported || worker.match(new RegExp(workerImport.source, 'gm')).length !== 1) {
  throw new Error('build-single: expected exactly one "import init, { … } from \'./pkg-design/doublespar.js\';" in design-worker.js');
}
worker = worker.replace(workerImport, () => [
  `const { default: init, ${imported[1]} } = __dsMakeCore();`,
  'let __dsGotBytes;',
  'const __dsBytes = new Promise((resolve) => { __dsGotBytes = resolve; });',
  "self.addEventListener('message', (ev) => { if (ev.data && ev.data.type === 'doublespar-wasm') __dsGotBytes(ev.data.bytes); });",
].join('\n'));
worker = replaceOnce(worker, 'init()\n  .then(', '__dsBytes\n  .then((bytes) => init({ module_or_path: bytes }))\n  .then(', 'design-worker.js');
// The worker's source is the glue + `worker`; the glue is not stored a second time for it: the
// page takes its text from the page's own copy, `${__dsMakeCore}` (Function.prototype.toString
// gives a function's source text exactly), when it starts the worker.
const workerTail = compactLines(worker, 'design-worker.js');

// The page's script: its modules as one, then the two loads rewritten, each exactly once in the
// whole (whichever module holds it).
const page = bundlePage();
let app = page.text;
app = replaceOnce(app,
  "state.core = await import('./pkg/doublespar.js');\nawait state.core.default();",
  'state.core = __dsMakeCore();\nawait state.core.default({ module_or_path: await __dsWasmBytes() });',
  `the page's modules (${page.order.join(', ')})`);
app = replaceOnce(app, "new Worker('design-worker.js', { type: 'module' })", '__dsStartWorker()',
  `the page's modules (${page.order.join(', ')})`);
if (/\bimport\s*\(/.test(app) || app.includes('import.meta')) {
  throw new Error("build-single: the page's modules still load something at run time (import() or import.meta)");
}

const wasm = fs.readFileSync(path.join(WWW, 'pkg-design', 'doublespar_bg.wasm'));
const wasmGz = zlib.gzipSync(wasm, { level: 9 });

// The gzipped wasm as text in base 85: every 4 bytes (big-endian, the last group padded with
// zeros) as 5 digits, most significant first, from an alphabet of the printable ASCII characters
// without the nine that a JavaScript string or a <script> element would have to escape or could
// be ended by (" ' \ ` $ { < > &). 5 characters carry 4 bytes where base 64 needs 5⅓: the single
// file is about 6 % smaller. The decoder below is checked against the bytes at build time.
const BASE85 = Array.from({ length: 94 }, (_, i) => String.fromCharCode(33 + i))
  .filter((c) => !'"\'\\`${<>&'.includes(c)).join('');
if (BASE85.length !== 85) throw new Error(`build-single: the base-85 alphabet has ${BASE85.length} characters`);
function base85(bytes) {
  const padded = new Uint8Array(Math.ceil(bytes.length / 4) * 4);
  padded.set(bytes);
  const view = new DataView(padded.buffer);
  let out = '';
  for (let i = 0; i < padded.length; i += 4) {
    let v = view.getUint32(i);
    const digits = new Array(5);
    for (let k = 4; k >= 0; k -= 1) {
      digits[k] = BASE85[v % 85];
      v = Math.floor(v / 85);
    }
    out += digits.join('');
  }
  return out;
}
/** The page's decoder (its source is inlined below): text in base 85 back to `length` bytes. */
function __dsFromBase85(text, length, alphabet) {
  const value = new Uint8Array(128);
  for (let i = 0; i < alphabet.length; i += 1) value[alphabet.charCodeAt(i)] = i;
  const out = new Uint8Array(text.length / 5 * 4);
  for (let i = 0, o = 0; i < text.length; i += 5, o += 4) {
    let v = 0;
    for (let k = 0; k < 5; k += 1) v = v * 85 + value[text.charCodeAt(i + k)];
    out[o] = v >>> 24;
    out[o + 1] = (v >>> 16) & 255;
    out[o + 2] = (v >>> 8) & 255;
    out[o + 3] = v & 255;
  }
  return out.subarray(0, length);
}
const wasmText = base85(wasmGz);
if (!Buffer.from(__dsFromBase85(wasmText, wasmGz.length, BASE85)).equals(wasmGz)) {
  throw new Error('build-single: the base-85 text does not decode to the gzipped wasm');
}

// Text inside a <script> must not contain "</script" (or "<!--"); in JS source, "<\/" is the same
// string, and in JSON text every "<" can be written as \u003c.
const scriptSafe = (js) => js.replace(/<\/(script)/gi, '<\\/$1').replace(/<!--/g, '<\\!--');
const jsonSafe = (value) => JSON.stringify(value).replace(/</g, '\\u003c');

// The module that the browser runs: the loader (the wasm's bytes and the design worker), the
// glue's function and the page's modules. It is stored gzipped in base 85 as the wasm is, and the
// inline bootstrap below inflates it and runs it as an inline module script whose hash the
// policy names: text in a script compresses about four to one, and it was about half the file.
const loader = `const __DS_WORKER_TAIL = ${jsonSafe(workerTail)};
/** The wasm bytes (an ArrayBuffer), inflated once by the bootstrap from the inline gzip. */
function __dsWasmBytes() {
  return globalThis.__dsWasm;
}
let __dsWorkerUrl = null;
/**
 * The design worker, from a Blob URL of its source: the glue's function, as this script holds it,
 * then the worker's own code. It gets a copy of the wasm bytes.
 */
function __dsStartWorker() {
  if (!__dsWorkerUrl) {
    __dsWorkerUrl = URL.createObjectURL(new Blob([\`\${__dsMakeCore}\\n\`, __DS_WORKER_TAIL], { type: 'text/javascript' }));
  }
  // A classic worker (its source has no import or export left): in Chromium, a module worker
  // from a blob: URL failed to start in a page opened from file://.
  const w = new Worker(__dsWorkerUrl);
  __dsWasmBytes().then((bytes) => w.postMessage({ type: 'doublespar-wasm', bytes: bytes.slice(0) }));
  return w;
}
`;

// A module's own top-level names would hide the loader's, the glue's wrapper's and the modules'
// objects from the code inside it: none may declare one of them.
for (const name of [...topLevelNames(loader, 'the loader'), '__dsMakeCore', ...page.order.map(moduleObject)]) {
  if (page.declared.has(name)) {
    throw new Error(`build-single: ${page.declared.get(name)} declares ${name}, which the single file's wrapper uses`);
  }
}
const script = scriptSafe(loader + glue + app);
const scriptGz = zlib.gzipSync(Buffer.from(script, 'utf8'), { level: 9 });
const scriptText85 = base85(scriptGz);
if (!Buffer.from(__dsFromBase85(scriptText85, scriptGz.length, BASE85)).equals(scriptGz)) {
  throw new Error("build-single: the base-85 text does not decode to the gzipped script");
}

// The one script in the markup: it inflates the wasm (kept as a promise that the loader hands
// out) and the page's script, and runs that as an inline module script. The browser checks the
// inflated text against its hash in the policy, as it would the markup's own script.
const bootstrap = `// Doublespar, single-file edition: everything is inline; nothing is fetched. The wasm and
// the page's script are stored gzipped in base 85; this inflates both and runs the script.
const __DS_BASE85 = ${jsonSafe(BASE85)};
${__dsFromBase85}
/** The bytes (an ArrayBuffer) of \`length\` gzipped bytes written in base 85 as \`text\`. */
function __dsInflate(text, length) {
  const gz = __dsFromBase85(text, length, __DS_BASE85);
  return new Response(new Blob([gz]).stream().pipeThrough(new DecompressionStream('gzip'))).arrayBuffer();
}
/** Says in the page's alarm banner why nothing can run (the page's own script never started). */
function __dsCannotRun(why) {
  const banner = document.getElementById('panic');
  if (!banner) return;
  banner.textContent = why;
  banner.hidden = false;
}
if (typeof DecompressionStream !== 'function') {
  __dsCannotRun('This single-file Doublespar cannot start here: the browser cannot unpack its gzipped parts (it has no DecompressionStream). Open it in a current Chromium, Firefox or Safari, or use the served page.');
} else {
  try {
    globalThis.__dsWasm = __dsInflate(${jsonSafe(wasmText)}, ${wasmGz.length});
    const __dsScript = document.createElement('script');
    __dsScript.type = 'module';
    __dsScript.textContent = new TextDecoder().decode(await __dsInflate(${jsonSafe(scriptText85)}, ${scriptGz.length}));
    document.body.append(__dsScript);
  } catch (e) {
    __dsCannotRun(\`This single-file Doublespar cannot start: its page script could not be unpacked (\${e && e.message ? e.message : e}). The file may be damaged; download it again.\`);
  }
}
`;

/**
 * Node's parser reads `text` as the browser will (a module, or a classic script for the worker),
 * without running it: the compacting above must leave both parseable.
 */
function checkSyntax(text, ext, what) {
  fs.mkdirSync(OUT_DIR, { recursive: true });
  const file = path.join(OUT_DIR, `check-${process.pid}.${ext}`);
  fs.writeFileSync(file, text);
  const r = spawnSync(process.execPath, ['--check', file], { encoding: 'utf8' });
  fs.rmSync(file, { force: true });
  if (r.status !== 0) throw new Error(`build-single: ${what} does not parse: ${r.stderr}`);
}
checkSyntax(script, 'mjs', "the single file's script");
checkSyntax(bootstrap, 'mjs', "the single file's bootstrap");
// What the worker's Blob holds: the glue's function as the page's script holds it, then its code.
checkSyntax(`${scriptSafe(glue).trimEnd()}\n${workerTail}`, 'cjs', "the design worker's source");

/** A CSP source for exactly this inline text (what the browser hashes: the element's content). */
const hashSource = (text) => `'sha256-${crypto.createHash('sha256').update(text, 'utf8').digest('base64')}'`;

/**
 * The single file's policy. The two module scripts (the bootstrap in the markup and the page's
 * script it inflates and inserts) and the style are allowed by hash only; the wasm is
 * compiled from bytes ('wasm-unsafe-eval'). The design worker is a classic worker from a blob:
 * URL: worker-src governs that load, and the worker inherits this policy (so its own wasm needs
 * 'wasm-unsafe-eval' too, and it can fetch nothing). Nothing is fetched: no connect-src.
 */
function singlePolicy(scriptTexts, styleText) {
  return [
    "default-src 'none'",
    `script-src ${scriptTexts.map(hashSource).join(' ')} 'wasm-unsafe-eval'`,
    `style-src ${hashSource(styleText)}`,
    'worker-src blob:',
    'img-src data:',
    "base-uri 'none'",
    "form-action 'none'",
  ].join('; ');
}

const PAGE_POLICY = `<meta http-equiv="Content-Security-Policy" content="default-src 'self'; script-src 'self' 'wasm-unsafe-eval'">`;

// The page's markup without indentation or blank lines: it has no <pre> or <textarea>, so the
// whitespace at a line's ends only ever separates tags or words, and a line break still does.
const rawHtml = read('index.html');
if (/<(pre|textarea)\b/i.test(rawHtml)) throw new Error('build-single: index.html has a <pre> or <textarea>, whose whitespace the compaction would change');
let html = rawHtml.split('\n').map((line) => line.trim()).filter((line) => line !== '').join('\n');
const favicon = 'data:image/svg+xml;base64,' + Buffer.from(read('favicon.svg')).toString('base64');
html = replaceOnce(html, '<link rel="icon" href="favicon.svg" type="image/svg+xml">',
  `<link rel="icon" href="${favicon}" type="image/svg+xml">`, 'index.html');
const styleText = `\n${compactCss(read('style.css')).replace(/<\/(style)/gi, '<\\/$1')}\n`;
const bootstrapText = `\n${scriptSafe(bootstrap)}\n`;
html = replaceOnce(html, PAGE_POLICY,
  `<meta http-equiv="Content-Security-Policy" content="${singlePolicy([bootstrapText, script], styleText)}">`, 'index.html');
html = replaceOnce(html, '<link rel="stylesheet" href="style.css">', `<style>${styleText}</style>`, 'index.html');
html = replaceOnce(html, '<script type="module" src="app.js"></script>',
  `<script type="module">${bootstrapText}</script>`, 'index.html');
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
