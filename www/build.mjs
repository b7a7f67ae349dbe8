// Builds dist/halfrail.html: one self-contained file with the CSS, the wasm-bindgen
// glue, xz-decompress and the boot script inlined, and the payload — the app's
// scripts (with uPlot) and the wasm module, xz-packed together, then base64'd —
// that boot.js unpacks and runs.
// Usage: node www/build.mjs BINDGEN_DIR OUT_FILE   (run by `make dist`)
import fs from 'fs';
import path from 'path';
import { execFileSync } from 'child_process';
import { minify } from 'terser';
import { fileURLToPath } from 'url';

const here = path.dirname(fileURLToPath(import.meta.url));
const [bindgenDir = 'target/bindgen', outFile = 'dist/halfrail.html'] = process.argv.slice(2);

// App scripts in load order: shared pieces first, the shell (which mounts) last.
const SCRIPTS = [
  'js/core.js',
  'js/ui.js',
  'js/design.js',
  'js/fields.js',
  'js/worker.js',
  'js/plot.js',
  'js/plane.js',
  'js/compare.js',
  'js/schematic.js',
  'js/panels/brief.js',
  'js/health.js',
  'js/panels/part.js',
  'js/panels/stage.js',
  'js/panels/response.js',
  'js/panels/bench.js',
  'js/panels/loop-planes.js',
  'js/panels/loop.js',
  'js/panels/swing.js',
  'js/panels/spread.js',
  'js/panels/chain.js',
  'js/panels/crystal_design.js',
  'js/panels/crystal_spread.js',
  'js/panels/crystal.js',
  'js/embed.js',
  'js/documents.js',
  'js/sheet.js',
  'js/guide.js',
  'js/shell.js',
];
const STYLES = ['css/base.css', 'css/panels.css'];
// Third-party code: uPlot goes in the payload with the app; xz-decompress, which
// unpacks it, is inlined as is. Their licence travels with them.
const PAYLOAD_VENDOR = ['node_modules/uplot/dist/uPlot.iife.min.js'];
const INLINE_VENDOR = ['node_modules/xz-decompress/dist/package/xz-decompress.min.js'];
const VENDOR_STYLES = ['node_modules/uplot/dist/uPlot.min.css'];
const VENDOR_NOTICE = '/* uPlot © Leon Sorokin, MIT licence (https://opensource.org/license/mit); xz-decompress (HTTP Toolkit, after xzwasm © Steve Sanderson), MIT licence, with xz-embedded (public domain) */';
const read = (p) => fs.readFileSync(p, 'utf8');
// Inline scripts must not contain a closing script tag.
const scriptSafe = (text) => text.replace(/<\/script/gi, '<\\/script');

// The app's own scripts and the glue, minified (terser): a tenth of the page's
// gzip size, which the page has little of to spare. The vendor files come minified.
const squeeze = async (code) => (await minify(code, { compress: true, mangle: true, format: { comments: false } })).code;
const glue = read(path.join(bindgenDir, 'halfrail.js'));
const glueMin = await squeeze(glue);
const wasm = fs.readFileSync(path.join(bindgenDir, 'halfrail_bg.opt.wasm'));
const vendor = (files) => [VENDOR_NOTICE, ...files.map((s) => read(path.join(here, s)))].join('\n');
const app = Buffer.from([vendor(PAYLOAD_VENDOR), await squeeze(SCRIPTS.map((s) => read(path.join(here, s))).join('\n'))].join('\n'));
const boot = [vendor(INLINE_VENDOR), await squeeze(read(path.join(here, 'js/boot.js')))].join('\n');
// The payload: the scripts' length, the scripts, the module (boot.js reads it so).
const length = Buffer.alloc(4);
length.writeUInt32LE(app.length);
// xz (LZMA2) packs the module about a fifth smaller than gzip -9, and the scripts an
// eighth, which is what keeps the page's gzip size in budget (base64 of packed bytes
// does not compress again); the CRC32 check is one xz-embedded reads.
const packed = execFileSync('xz', ['--format=xz', '--check=crc32', '-9e', '--stdout'], { input: Buffer.concat([length, app, wasm]), maxBuffer: 1 << 26 });
const css = [...VENDOR_STYLES, ...STYLES].map((s) => read(path.join(here, s))).join('\n');
const version = (read(path.join(here, '..', 'Cargo.toml')).match(/^version = "([^"]+)"/m) || [])[1] || '0';

const html = read(path.join(here, 'index.html'))
  .replace('/*@STYLE@*/', () => css)
  .replace('/*@GLUE@*/', () => scriptSafe(glueMin))
  .replace('/*@BOOT@*/', () => scriptSafe(boot))
  .replace('@PAYLOAD@', () => packed.toString('base64'))
  .replace(/@VERSION@/g, () => version);

for (const marker of ['/*@STYLE@*/', '/*@GLUE@*/', '/*@BOOT@*/', '@PAYLOAD@', '@VERSION@']) {
  if (html.includes(marker)) throw new Error(`build: marker ${marker} left in the page`);
}
fs.mkdirSync(path.dirname(outFile), { recursive: true });
fs.writeFileSync(outFile, html);
console.log(`${outFile}: ${html.length} bytes (wasm ${wasm.length} bytes and scripts ${app.length} bytes, ${packed.length} xz)`);
