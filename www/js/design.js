'use strict';
// The design the panels share: the document as the user has typed it (the draft,
// which may hold a bad value), and the last draft the core accepted. Both are kept
// in storage, so a reload loses nothing and still has a good design to show.
// Replacing a whole section (a preset, a fitted part) can be undone.

HR.design = (() => {
  const KEY = 'design';
  const listeners = new Set();
  const undoStack = [];
  let draft;
  let good;

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
      draft[section] = draft[section] || {};
      if (value === '' || value === null || value === undefined) delete draft[section][key];
      else draft[section][key] = value;
      save();
      notify(origin);
    },
    // Replaces a whole section, keeping the old one for `undo`.
    replace(name, value, label) {
      undoStack.push({ name, value: draft[name] === undefined ? undefined : JSON.parse(JSON.stringify(draft[name])), label });
      draft[name] = value;
      save();
      notify('replace');
    },
    canUndo: () => undoStack.length > 0,
    undoLabel: () => (undoStack.length ? undoStack[undoStack.length - 1].label : ''),
    undo() {
      const last = undoStack.pop();
      if (!last) return;
      if (last.value === undefined) delete draft[last.name];
      else draft[last.name] = last.value;
      save();
      notify('undo');
    },
    onChange(fn) { listeners.add(fn); },
  };
})();
