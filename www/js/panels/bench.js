'use strict';
// Bench: the everyday conversions and standard-value look-ups, live as you type.
// Every figure is computed by the core; this file only lays out and routes errors.

(() => {
  const { el, card, table, fillRows } = HR.ui;

  const DEFAULTS = {
    level: '-30 dBm', at: '50 Ω',
    mismatchForm: 'vswr', mismatch: '1.5',
    value: '5k',
    ratio: '4.7', ratioSeries: 'E24',
  };

  // A card whose output follows its inputs. `inputs` lists the controls:
  // {key, label, hint, options?, errorField}, each the page's field widget
  // (HR.bind.widget) over `state`, kept as typed; `errorField` is the name the core's
  // errors give it. `compute(state)` calls the core and returns {ok} or {error};
  // `render(ok)` fills `output`. On an error the reason goes beside the input it names
  // (else beside the first) and the last good output stays, marked stale.
  const liveCard = ({ title, intro, inputs, output, compute, render, state, save, wide = false }) => {
    const controls = inputs.map((spec) => HR.bind.widget(spec.errorField || spec.key, {
      label: spec.label, hint: spec.hint, options: spec.options, read: (t) => t,
      value: () => state[spec.key],
      commit: (v) => { state[spec.key] = v; save(); update(); },
    }));
    const staleNote = el('p', { class: 'stale-note', hidden: true }, 'Showing the last valid result.');
    // The inputs that last gave a result, kept across reloads so a bad edit never
    // leaves the card empty.
    const keys = inputs.map((i) => i.key);
    state.good = state.good || {};
    let rendered = false;
    const update = () => {
      const result = compute(state);
      const at = HR.bind.route(node, result.error || null);
      if (result.error) {
        if (!at) controls.find((c) => c.errors).show(HR.reasonWords(result.error));
        const good = state.good[title];
        if (!rendered && good) {
          const last = compute({ ...state, ...good });
          if (last.ok !== undefined) { render(last.ok); rendered = true; }
        }
        output.classList.add('stale');
        staleNote.hidden = !rendered;
      } else {
        render(result.ok);
        rendered = true;
        state.good[title] = Object.fromEntries(keys.map((k) => [k, state[k]]));
        save();
        output.classList.remove('stale');
        staleNote.hidden = true;
      }
    };
    const node = card(title, intro ? el('p', { class: 'intro' }, intro) : null,
      el('div', { class: 'inputs' }, controls.map((c) => c.wrap)), staleNote, output);
    if (wide) node.classList.add('wide');
    return { node, update };
  };

  // Two columns of label/value pairs whose values are filled by `render`.
  const readout = (labels) => {
    const cells = {};
    const node = el('dl', { class: 'readout' }, labels.map(([key, label]) => {
      cells[key] = el('dd', { 'data-key': key }, '—');
      return el('div', {}, el('dt', {}, label), cells[key]);
    }));
    return { node, cells };
  };

  const levelCard = (state, save) => {
    const LEVELS = [['w', 'W', 'Power'], ['dbm', 'dBm', 'Power'], ['dbw', 'dBW', 'Power'],
      ['vrms', 'Vrms', 'RMS voltage'], ['vpk', 'Vpk', 'Peak voltage'], ['vpp', 'Vpp', 'Peak-to-peak'],
      ['dbv', 'dBV', 'Voltage'], ['dbuv', 'dBuV', 'Voltage']];
    const out = readout(LEVELS.map(([key, unit, what]) => [key, `${what} (${unit === 'dBuV' ? 'dBµV' : unit})`]));
    return liveCard({
      title: 'Signal level',
      intro: 'Type a level in any unit; every equivalent for a sine across the resistance follows.',
      state, save, output: out.node,
      inputs: [
        { key: 'level', label: 'Level', hint: 'e.g. -45 dBm, 3.5 mVpp, 2 uW', errorField: 'level' },
        { key: 'at', label: 'Across', hint: 'resistance, e.g. 50, 75 Ω, 1k', errorField: 'impedance' },
      ],
      compute: (s) => HR.call('levelsOf', s.level, s.at),
      render: (levels) => {
        for (const [key, unit] of LEVELS) out.cells[key].textContent = HR.fmt(levels[key], unit, 4);
      },
    });
  };

  const mismatchCard = (state, save) => {
    const out = readout([['gamma', '|Γ|'], ['return_loss_db', 'Return loss'], ['vswr', 'VSWR'],
      ['mismatch_loss_db', 'Mismatch loss']]);
    return liveCard({
      title: 'Mismatch',
      intro: 'Return loss, reflection coefficient, VSWR and mismatch loss from any one of them.',
      state, save, output: out.node,
      inputs: [
        { key: 'mismatchForm', label: 'Given as', options: [['vswr', 'VSWR'], ['rl', 'Return loss (dB)'],
          ['gamma', '|Γ|'], ['ml', 'Mismatch loss (dB)']] },
        { key: 'mismatch', label: 'Figure', hint: 'a plain number', errorField: 'mismatch' },
      ],
      compute: (s) => HR.call('mismatchOf', s.mismatch, s.mismatchForm),
      render: (m) => {
        out.cells.gamma.textContent = HR.fixed(m.gamma, 4);
        out.cells.return_loss_db.textContent = m.return_loss_db === null ? '∞ dB (perfect match)' : HR.fmt(m.return_loss_db, 'dB');
        out.cells.vswr.textContent = `${HR.fmt(m.vswr, '', 4)} : 1`;
        out.cells.mismatch_loss_db.textContent = HR.fmt(m.mismatch_loss_db, 'dB');
      },
    });
  };

  const seriesCard = (state, save, facts) => {
    const summary = el('p', { class: 'summary' });
    const t = table('Nearest standard value in each series (nearest by ratio)',
      ['Series', 'Tolerance', 'Nearest', 'Error', 'Below', 'Above', 'RKM code']);
    const out = el('div', {}, summary, el('div', { class: 'scroll' }, t.node));
    return liveCard({
      title: 'Standard values', wide: true,
      intro: 'The IEC 60063 E-series value nearest yours, those either side, and the series your value belongs to.',
      state, save, output: out,
      inputs: [{ key: 'value', label: 'Value', hint: 'e.g. 5k, 4.7 uF, 8k2, R47', errorField: 'value' }],
      compute: (s) => HR.call('lookUp', s.value),
      render: (r) => {
        const unit = r.unit || '';
        const rkmKind = unit === 'F' ? 'C' : (unit === '' || unit === 'Ω') ? 'R' : null;
        const show = (v) => HR.fmt(v, unit, 3);
        summary.textContent = r.member_of.length
          ? `${show(r.value)} is a standard value of ${r.member_of.join(', ')}.`
          : `${show(r.value)} is in no E-series.`;
        fillRows(t.tbody, r.rows.map((row) => [
          row.series,
          `±${facts[row.series].tolerances_pct.join(' / ±')} %`,
          show(row.nearest),
          `${row.error_pct >= 0 ? '+' : ''}${HR.fmt(row.error_pct, '%')}`,
          show(row.below),
          show(row.above),
          rkmKind ? HR.rkm(row.nearest, rkmKind) || '—' : '—',
        ]));
      },
    });
  };

  const ratioCard = (state, save, facts) => {
    const t = table('Pairs closest to the ratio, best first (scale both by the same power of ten)',
      ['Rank', 'Upper', 'Lower', 'Ratio', 'Error']);
    const out = el('div', { class: 'scroll' }, t.node);
    return liveCard({
      title: 'Ratio finder',
      intro: 'Two standard values whose ratio is closest to the one you want — a divider or a gain-setting pair.',
      state, save, output: out,
      inputs: [
        { key: 'ratio', label: 'Ratio wanted', hint: 'e.g. 4.7, or 20 dB as a voltage ratio', errorField: 'ratio' },
        { key: 'ratioSeries', label: 'Series', options: Object.keys(facts).map((n) => [n, n]) },
      ],
      compute: (s) => HR.call('ratioPairs', s.ratio, s.ratioSeries, 8),
      render: (pairs) => fillRows(t.tbody, pairs.map((p, i) => [
        String(i + 1), HR.fmt(p.numerator, '', 3), HR.fmt(p.denominator, '', 3), HR.fmt(p.ratio, '', 5),
        `${p.error_pct >= 0 ? '+' : ''}${HR.fmt(p.error_pct, '%')}`,
      ])),
    });
  };

  HR.panel({
    id: 'bench',
    title: 'Bench',
    mount(container) {
      const state = { ...DEFAULTS, ...HR.store.get('bench', {}) };
      const save = () => HR.store.set('bench', state);
      const facts = Object.fromEntries(HR.seriesFacts().map((f) => [f.name, f]));
      const cards = [levelCard(state, save), mismatchCard(state, save), seriesCard(state, save, facts),
        ratioCard(state, save, facts)];
      container.append(
        el('h1', {}, 'Bench'),
        el('p', { class: 'lede' }, 'Conversions and standard values for the bench. Every input is kept as you type it, across reloads.'),
        el('div', { class: 'cards' }, cards.map((c) => c.node)));
      cards.forEach((c) => c.update());
    },
  });
})();
