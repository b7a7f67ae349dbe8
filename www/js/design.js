'use strict';
// The design the panels share: the document as the user has typed it (the draft,
// which may hold a bad value), and the last draft the core accepted. Both are kept
// in storage, so a reload loses nothing and still has a good design to show.
// Every change can be undone and redone; typing into one field is one step.

HR.design = (() => {
  const KEY = 'design';
  const listeners = new Set();
  const past = [];
  const future = [];
  let lastField = null;
  let draft;
  let good;
  const HISTORY = 200;

  // Remembers the draft before a change; consecutive edits of one field are one step.
  const remember = (label, field) => {
    if (field && field === lastField) return;
    past.push({ draft: JSON.stringify(draft), label });
    if (past.length > HISTORY) past.shift();
    future.length = 0;
    lastField = field;
  };

  const save = () => HR.store.set(KEY, { draft, good });

  const load = () => {
    const saved = HR.store.get(KEY, null);
    if (saved && saved.draft && typeof saved.draft === 'object') {
      draft = saved.draft;
      good = typeof saved.good === 'string' ? saved.good : null;
    } else {
      good = wasm_bindgen.demoDocument();
      draft = JSON.parse(good);
    }
  };

  const notify = (origin) => listeners.forEach((fn) => fn(origin));

  // Writes fields of a section (an empty value removes the field), then tells the views.
  const put = (section, values, origin) => {
    draft[section] = draft[section] || {};
    for (const [key, value] of Object.entries(values)) {
      if (value === '' || value === null || value === undefined) delete draft[section][key];
      else draft[section][key] = value;
    }
    save();
    notify(origin);
  };

  // Moves one step from one history to the other: undo (past → future) or redo.
  const travel = (from, to, origin) => {
    const step = from.pop();
    if (!step) return;
    to.push({ draft: JSON.stringify(draft), label: step.label });
    draft = JSON.parse(step.draft);
    lastField = null;
    save();
    notify(origin);
  };

  return {
    start() { load(); },
    // The draft as text, for the core.
    text: () => JSON.stringify(draft),
    // The last text the core accepted, or null.
    lastGood: () => good,
    accept(text) { if (text !== good) { good = text; save(); } },
    get(section, key) { return draft[section] ? draft[section][key] : undefined; },
    section(name) { return draft[name]; },
    // Sets one field as typed; an empty text removes it (not fitted / default).
    set(section, key, value, origin) {
      remember(`edit ${section}.${key}`, `${section}.${key}`);
      put(section, { [key]: value }, origin);
    },
    // Sets several fields of one section as one step: one undo takes them all back.
    setMany(section, values, label, origin) {
      remember(label, null);
      put(section, values, origin);
    },
    // A field's value in SI base units as the core reads it, or null when empty or bad.
    value(section, key, unit = '') {
      const v = this.get(section, key);
      const r = v === undefined || v === null || v === '' ? {} : HR.call('parseValue', String(v), unit, `${section}.${key}`);
      return r.ok ? r.ok.value : null;
    },
    // Replaces a whole section as one step.
    replace(name, value, label) {
      remember(label, null);
      lastField = null;
      draft[name] = value;
      save();
      notify('replace');
    },
    canUndo: () => past.length > 0,
    canRedo: () => future.length > 0,
    undoLabel: () => (past.length ? past[past.length - 1].label : ''),
    redoLabel: () => (future.length ? future[future.length - 1].label : ''),
    undo() { travel(past, future, 'undo'); },
    redo() { travel(future, past, 'redo'); },
    onChange(fn) { listeners.add(fn); },
    // Keeps a view in step with the design. After each burst of edits (and once now)
    // `compute(text)` runs on the draft: a result is rendered and the draft accepted;
    // an error goes to `report` (null clears it) and the last good design's result is
    // shown instead if nothing was yet, marked by `stale(true, rendered)`. `when()`
    // can hold updates back (while a value is being typed in place).
    // `panel.dataset.computed` counts the results rendered.
    follow(panel, { compute, render, report, stale, when = () => true }) {
      let rendered = false;
      const update = () => {
        const text = JSON.stringify(draft);
        const result = compute(text);
        report(result.error || null);
        if (result.error) {
          if (!rendered && good) {
            const last = compute(good);
            if (last.ok !== undefined) { render(last.ok); rendered = true; }
          }
          stale(true, rendered);
          return;
        }
        this.accept(text);
        render(result.ok);
        rendered = true;
        stale(false, true);
        panel.dataset.computed = String(Number(panel.dataset.computed || 0) + 1);
      };
      const schedule = HR.ui.coalesce(update);
      listeners.add(() => { if (when()) schedule(); });
      update();
    },
  };
})();
