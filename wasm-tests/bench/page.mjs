// `make bench`, page figures: size of dist/halfrail.html (bytes and gzip), and in
// headless Chromium from file:// the time from navigation to the first computed
// result and the wasm start-up time (median of 5 fresh loads each).
// Targets (issue 2): page ≤ 600 KB (≤ 250 KB gzip), first result ≤ 300 ms.
import fs from 'fs';
import zlib from 'zlib';
import { launch, PAGE_PATH, PAGE_URL } from '../e2e/browser.mjs';

const RUNS = 5;
const median = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

const html = fs.readFileSync(PAGE_PATH);
const gzip = zlib.gzipSync(html, { level: 9 }).length;

const browser = await launch();
const first = [];
const wasm = [];
for (let i = 0; i < RUNS; i++) {
  const page = await browser.context.newPage();
  await page.goto(PAGE_URL + '#bench');
  await page.waitForSelector('html[data-ready="true"]');
  const t = await page.evaluate(() => ({
    first: performance.getEntriesByName('hr-first-result')[0].startTime,
    wasm: performance.getEntriesByName('hr-wasm-instantiate')[0].duration,
  }));
  first.push(t.first);
  wasm.push(t.wasm);
  await page.close();
}
await browser.close();

const rows = [
  ['page size', `${html.length} B`, '≤ 600000 B', html.length <= 600_000],
  ['page size, gzip', `${gzip} B`, '≤ 250000 B', gzip <= 250_000],
  ['first computed result (median of 5)', `${median(first).toFixed(1)} ms`, '≤ 300 ms', median(first) <= 300],
  ['wasm inflate + compile + instantiate (median of 5)', `${median(wasm).toFixed(1)} ms`, '', true],
];
for (const [what, figure, target, met] of rows) {
  console.log(`${what.padEnd(52)} ${figure.padStart(12)}  ${target.padEnd(11)} ${target ? (met ? 'met' : 'MISSED') : ''}`);
}
console.log(`all runs, first result (ms): ${first.map((x) => x.toFixed(1)).join(' ')}`);
