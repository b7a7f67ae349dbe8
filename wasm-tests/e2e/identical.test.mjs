// The same document gives the same figures, bit for bit, in the page (the wasm core)
// and from the native `halfrail` command (SPEC §2): every number both print is
// compared at full precision, for the demo and for a three-stage part on the smooth
// (EKV) model, whose exponentials and logarithms the demo's square law never calls.
import { test, before, after } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'fs';
import { launch, watch, ready, PAGE_URL, cli } from './browser.mjs';

const demo = fs.readFileSync(new URL('../../src/doc/demo.halfrail.json', import.meta.url), 'utf8');
const smooth = (() => {
  const d = JSON.parse(demo);
  Object.assign(d.part, { model: 'ekv', stages: 3 });
  // Less loop gain, so the three-stage loop is worth a spread.
  Object.assign(d.stage, { r_fb_ohm: '100k', c_fb_f: '2p2' });
  d.tolerance.trials = 300;
  return JSON.stringify(d);
})();

// Every number in `value`, by its path.
const numbers = (value, path = '', out = new Map()) => {
  if (typeof value === 'number') out.set(path, value);
  else if (value && typeof value === 'object') for (const [k, v] of Object.entries(value)) numbers(v, `${path}.${k}`, out);
  return out;
};

// The page's answer for a CLI verb: the entry point and how its result maps to the CLI's.
const ENTRIES = {
  design: ['designReport', (r) => r],
  spread: ['spreadReport', (r) => r.summary],
  chain: ['chainReport', (r) => r],
};

let browser;
let page;
let seen;
before(async () => {
  browser = await launch();
  page = await browser.context.newPage();
  seen = watch(page);
  await page.goto(`${PAGE_URL}#bench`);
  await ready(page);
});
after(async () => { await browser.close(); });

for (const [name, text] of [['demo', demo], ['three-stage EKV part', smooth]]) {
  for (const [verb, [entry, pick]] of Object.entries(ENTRIES)) {
    test(`${verb} of the ${name}: the page and the CLI agree bit for bit`, async () => {
      const web = await page.evaluate(([entry, text]) => {
        const args = entry === 'chainReport' ? [text, ''] : [text, () => {}];
        return wasm_bindgen[entry](...args);
      }, [entry, text]);
      const native = numbers(cli(verb, text));
      const mine = numbers(pick(web));
      const shared = [...native.keys()].filter((k) => mine.has(k));
      assert.ok(shared.length >= 40, `only ${shared.length} numbers in common`);
      const differ = shared.filter((k) => !Object.is(native.get(k), mine.get(k)));
      assert.deepEqual(differ.map((k) => `${k}: ${native.get(k)} vs ${mine.get(k)}`), []);
      assert.deepEqual(seen.requests, []);
      assert.deepEqual(seen.errors, []);
    });
  }
}
