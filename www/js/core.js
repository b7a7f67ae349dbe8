'use strict';
// Shared ground of the page: the namespace, starting the wasm core, calling it
// with errors turned into {field, reason}, and storage that never throws.
// The page computes no physics: every figure comes from the core.

const HR = { panels: [] };

// Registers a panel: {id, title, summary, mount(container)}. The shell lays them out.
HR.panel = (spec) => { HR.panels.push(spec); };

// Starts the wasm module from the bytes boot.js unpacked: compiles once and keeps
// the compiled module (a worker can be handed it later).
HR.start = async () => {
  HR.module = new WebAssembly.Module(self.halfrailWasm);
  delete self.halfrailWasm;
  wasm_bindgen.initSync({ module: HR.module });
  performance.mark('hr-wasm-ready');
  performance.measure('hr-wasm-instantiate', 'hr-wasm-start', 'hr-wasm-ready');
  HR.version = wasm_bindgen.buildVersion();
};

// A fresh instance of the compiled module, in place of one that trapped (its memory
// may be half-updated). The glue declares a global `let wasm_bindgen`, which cannot be
// declared twice, so its text runs again inside a function and the new binding is
// put in the old one's place. The design lives in the page, so nothing is lost.
HR.restart = () => {
  const script = document.createElement('script');
  script.textContent = `(() => {${document.getElementById('hr-glue').textContent}\n;HR.fresh = wasm_bindgen;})();`;
  document.head.append(script);
  script.remove();
  HR.fresh.initSync({ module: HR.module });
  wasm_bindgen = HR.fresh;
  delete HR.fresh;
  HR.restarts = (HR.restarts || 0) + 1;
};

// Calls the core. Returns {ok: value} or {error: {field, reason, message}}; a trap
// (a bug in the core) is reported in the status line, returned as an error, and the
// module restarted for the next call.
HR.call = (name, ...args) => {
  try {
    return { ok: wasm_bindgen[name](...args) };
  } catch (e) {
    if (e && typeof e === 'object' && 'reason' in e) return { error: e };
    let message = `The calculation engine failed (${e && e.message ? e.message : e}). Your inputs are kept`;
    try {
      HR.restart();
      message += '; the engine was restarted.';
    } catch (again) {
      message += `, but the engine could not be restarted (${again && again.message ? again.message : again}): reload the page.`;
    }
    HR.setStatus(message, true);
    return { error: { field: '', reason: message, message } };
  }
};

// The core's check of a document text (checkDocument), a pass remembered for the last
// text: every panel that follows the design checks the draft after each edit, and the
// same text passes again (a refusal is asked afresh: it may be a trap, restarted).
HR.check = (() => {
  let passed = null; // {text, r}
  return (text) => {
    if (passed && passed.text === text) return passed.r;
    const r = HR.call('checkDocument', text);
    if (!r.error) passed = { text, r };
    return r;
  };
})();

HR.setStatus = (text, isProblem = false) => {
  const el = document.getElementById('engine-status');
  el.textContent = text;
  el.classList.toggle('problem', isProblem);
};

// localStorage that never throws: a sandboxed frame or a full disk only loses persistence.
HR.store = {
  prefix: 'halfrail.v1.',
  get(key, fallback) {
    try {
      const text = window.localStorage.getItem(this.prefix + key);
      return text === null ? fallback : JSON.parse(text);
    } catch (e) {
      return fallback;
    }
  },
  set(key, value) {
    try {
      window.localStorage.setItem(this.prefix + key, JSON.stringify(value));
      return true;
    } catch (e) {
      return false;
    }
  },
};

// Formats through the core so numbers read the same everywhere (SPEC §3.4).
HR.fmt = (value, unit = '', digits = 3) => {
  const r = HR.call('formatValue', value, unit, digits);
  return r.ok === undefined ? '—' : r.ok;
};

// Whether a figure from the core is there to show (the core sends null where a
// figure does not exist), and a figure to a fixed number of decimals, or a dash.
HR.known = (v) => v !== null && v !== undefined && Number.isFinite(v);
HR.fixed = (v, decimals) => (HR.known(v) ? HR.value('formatFixed', '—', v, decimals) : '—');

// A core call whose failure has a harmless stand-in (a format, a fixed list): made
// through HR.call, so a trap restarts the engine like any other call.
HR.value = (name, fallback, ...args) => {
  const r = HR.call(name, ...args);
  return r.error ? fallback : r.ok;
};
// A value in RKM code (`2k2`), or '' when it has none; the fixed lists of the core.
HR.rkm = (v, kind) => HR.value('formatRkm', '', v, kind);
// The coarsest E-series a value belongs to ('' for none), remembered by value: the
// schematic and the loop helper label every component on each redraw, and the core's
// lookup goes through every series (some 70 µs: 2 ms an edit before it was kept).
HR.seriesOf = (() => {
  const seen = new Map();
  return (v) => {
    if (!seen.has(v)) {
      if (seen.size >= 512) seen.clear();
      const look = HR.call('lookUp', String(v));
      if (look.error) return '';
      seen.set(v, look.ok.member_of.length ? look.ok.member_of[0] : '');
    }
    return seen.get(v);
  };
})();
HR.seriesFacts = () => HR.value('seriesFacts', []);
HR.presets = () => HR.value('presets', []);
// The document's fields (the core's catalogue, asked for once): HR.field(section, key)
// is {label, name, unit, hint}, the words a form shows for it (`name`: how another
// panel names it); `section` may be a list's items, `chain.blocks[]`.
HR.fieldAt = (path) => {
  if (!HR.fieldsKnown) HR.fieldsKnown = HR.value('documentFields', null);
  return (HR.fieldsKnown && HR.fieldsKnown[path]) || null;
};
HR.field = (section, key) => HR.fieldAt(`${section}.${key}`) || { label: key, name: key, unit: '', hint: '' };

// Words, not keys: the page names a field as a person reads it (the catalogue's name,
// `R fb`), while saved files and the CLI, which scripts read, keep the keys.
// HR.fieldWords(path) is that name for a document path, with the entry of a list
// (`Loss (Blocks, entry 3)` for `chain.blocks[2].loss_db`); '' for no field of the
// document (`document`, `value`, an unknown key).
HR.fieldWords = (path) => {
  const text = String(path || '');
  const general = text.replace(/\[\d+\]/g, '[]');
  const entry = /^(.*?)\[(\d+)\]/.exec(text);
  const list = entry && HR.fieldAt(entry[1]);
  const where = list ? `${list.name}, entry ${Number(entry[2]) + 1}` : '';
  const f = HR.fieldAt(general);
  if (f) return where ? `${f.name} (${where})` : f.name;
  return general === `${entry && entry[1]}[]` ? where : '';
};
// The field a key of another section names, found in the whole catalogue: the key
// (`f_design_hz`), else a key's stem without its unit (`f_design`, `r_fb`), when it
// names exactly one field; null otherwise.
HR.fieldOfKey = (word) => {
  HR.fieldAt('');
  const keys = Object.keys(HR.fieldsKnown || {}).map((p) => [p, p.slice(p.lastIndexOf('.') + 1)]);
  const only = (list) => (list.length === 1 ? HR.fieldAt(list[0][0]) : null);
  const exact = keys.filter(([, k]) => k === word);
  return exact.length ? only(exact) : only(keys.filter(([, k]) => k.startsWith(`${word}_`) && !k.slice(word.length + 1).includes('_')));
};
// An error's reason with the keys it quotes put in words: a path of the document
// (`must be below part.vdd_v`), and a key of the field it names or of what holds that
// field (`missing field \`vdd_v\`` of `part`, `takes no loss_db` of a block), by
// their names; with `elsewhere` (errors: the default), also a key or stem naming one
// field of another section (`not well below f_design`, `its f_design_hz`).
HR.reasonWords = (e, { elsewhere = true } = {}) => {
  if (!e) return '';
  const field = String(e.field || '').replace(/\[\d+\]/g, '[]');
  // The field and what holds it, nearest first: `chain.blocks[].loss_db`, `chain.blocks[]`, `chain`, ''.
  const holders = [];
  for (let p = field, n = 0; n < 8; n += 1) {
    holders.push(p);
    if (!p) break;
    p = p.endsWith('[]') ? p.slice(0, -2) : p.includes('.') ? p.slice(0, p.lastIndexOf('.')) : '';
  }
  const keyed = (key) => holders.map((h) => HR.fieldAt(h ? `${h}.${key}` : key)).find(Boolean);
  return String(e.reason)
    .replace(/\b[a-z]+(?:\.[a-z0-9_]+|\[\d*\])+/g, (p) => HR.fieldWords(p) || p)
    .replace(/`([a-z0-9_]+)`/g, (all, key) => { const f = keyed(key); return f ? `“${f.name}”` : all; })
    .replace(/\b[a-z0-9]+(?:_[a-z0-9]+)+\b/g, (key) => { const f = keyed(key) || (elsewhere && HR.fieldOfKey(key)); return f ? f.name : key; });
};
// A text of the core (a warning, a finding) with the stage's keys it names in words:
// `Coupling capacitors (c_in_f, c_out_f)` as `(C in, C out)`.
HR.textWords = (text) => HR.reasonWords({ field: 'stage', reason: text }, { elsewhere: false });
// A core error as the page says it: `R fb: must be > 0, got -3300`; an error that
// names no field of the document keeps the core's message (`value: …`, a trap's).
HR.words = (e) => {
  if (!e) return '';
  const where = HR.fieldWords(e.field);
  if (where) return `${where}: ${HR.reasonWords(e)}`;
  return e.message || (e.field ? `${e.field}: ${e.reason}` : String(e.reason));
};

// A field's value as engineers write it, for words such as Undo's (`2k2`, `100 nF`,
// `3.30 V`): a resistor of the stage in RKM code, a value with a unit through the
// core's formatter, anything else (a bad value, a whole number, a choice) as typed;
// `not fitted` or `empty` for none (`off` where the value on the other side of the
// change, `other`, is a tick's), a tick `on`, a list by its entries; `section` null
// for the document's own text (the title, the notes), quoted and cut short.
HR.valueWords = (section, key, value, other) => {
  const { unit } = section ? HR.field(section, key) : { unit: '' };
  const none = value === undefined || value === null || value === '' || value === false;
  if (value === true) return 'on';
  if (none) return other === true ? 'off' : section === 'stage' ? 'not fitted' : 'empty';
  if (Array.isArray(value)) return value.every((v) => typeof v !== 'object') ? value.join(', ') : `${value.length} ${value.length === 1 ? 'entry' : 'entries'}`;
  if (typeof value === 'object') return 'set';
  const text = String(value);
  if (!section) {
    const line = text.split('\n')[0];
    return `“${line.length > 32 ? `${line.slice(0, 31)}…` : line}${line === text ? '' : ' …'}”`;
  }
  const parsed = unit ? HR.call('parseValue', text, unit, '') : {};
  if (!parsed.ok) return /^\s*[-+]?[\d.]+(e[-+]?\d+)?\s*$/i.test(text) && unit ? `${text.trim()} ${unit}` : text.trim();
  const v = parsed.ok.value;
  if (unit === 'Ω') return v === 0 ? '0 (short)' : v < 0 ? text.trim() : HR.rkm(v, 'R') || HR.fmt(v, 'Ω', 3);
  return HR.fmt(v, unit, 3);
};
HR.demoText = () => HR.value('demoDocument', '{"halfrail": 1}');
