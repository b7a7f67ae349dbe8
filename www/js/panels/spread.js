'use strict';
// Spread: what the parts' tolerances do to the stage. The core's Monte Carlo runs in
// the background, its trials split between two workers (spreadTrials on two lanes, the
// second with the swings and corners, spreadBounds), the columns joined in trial order
// and summarised by spreadStatistics in a worker too: histograms of the figures, the
// yield against the target's limits, how far each part's tolerance moves each figure
// (which part to buy tighter), the worst-case corners, and the tolerances themselves
// (in the design, undoable).

(() => {
  const { el, card, choice, table, fillRows } = HR.ui;
  const fmt = HR.fmt;
  const { known, fixed } = HR;
  const css = (name) => HR.plot.css(name);

  // The figures of each trial: document key, name, unit ('°' for degrees).
  const FIGURES = [
    ['gain_db', 'Gain at f_design', 'dB'], ['f_low_hz', 'Low band edge', 'Hz'], ['f_high_hz', 'High band edge', 'Hz'],
    ['phase_margin_deg', 'Phase margin', '°'], ['iq_a', 'Supply current', 'A'], ['nf_db', 'Noise figure', 'dB'],
  ];
  const show = (v, unit) => (!known(v) ? '—' : unit === '°' ? `${fixed(v, 1)}°` : fmt(v, unit, 4));
  const signed = (v, unit) => `${v > 0 ? '+' : ''}${show(v, unit)}`;
  // A toleranced quantity, named by its key: a component of the stage or a value of
  // the part (the core's catalogue words, as named away from their forms).
  const partName = (key) => (HR.fieldAt(`stage.${key}`) || HR.fieldAt(`part.${key}`) || { name: key }).name;
  const TOLERANCES = ['resistor_pct', 'capacitor_pct', 'vdd_pct', 'k_pct', 'vt_mv', 'trials', 'seed'];
  // Runs the spread of `text` in the background → {promise, cancel()}, as HR.background.run.
  // Two lanes: the trials split between two workers, the second also computing the
  // bounds (the nominal figures, swings and corners, which the draws do not change)
  // with fewer trials, so that both finish together; then spreadStatistics of the
  // joined columns on the first. The summary is the statistics' keys and the bounds'.
  // One lane: spreadReport in one worker.
  const run = (text, onProgress = () => {}, lanes = 2) => {
    const go = (name, args, lane, progress = () => {}) => HR.background.run(name, args, { lane, onProgress: progress });
    if (lanes === 1) return go('spreadReport', [text], 'spread-1', onProgress);
    const begun = performance.now();
    const shares = HR.call('spreadShares', text);
    if (shares.error) return { promise: Promise.resolve({ error: shares.error }), cancel() {} };
    const { trials: n, bounds_work: boundsWork } = shares.ok;
    const split = Math.min(n, Math.ceil((n + boundsWork) / 2));
    const done = [0, 0];
    let stopped = false;
    const progress = (i, count) => (p) => {
      done[i] = p * count;
      onProgress((0.9 * (done[0] + done[1])) / n);
    };
    let runs = [
      go('spreadTrials', [text, 0, split], 'spread-0', progress(0, split)),
      HR.background.calls([['spreadTrials', [text, split, n]], ['spreadBounds', [text]]], { lane: 'spread-1', onProgress: progress(1, n - split) }),
    ];
    const promise = (async () => {
      const answers = await Promise.all(runs.map((r) => r.promise));
      const bad = answers.find((h) => h.error) || answers.find((h) => !h.ok);
      if (bad || stopped) return bad || { cancelled: true };
      const [first, [rest, bounds]] = answers.map((a) => a.ok);
      const trials = {};
      for (const key of Object.keys(first)) trials[key] = first[key].concat(rest[key]);
      runs = [go('spreadStatistics', [text, JSON.stringify(trials)], 'spread-0')];
      const r = await runs[0].promise;
      if (!r.ok) return r;
      onProgress(1);
      return { ok: { summary: { ...r.ok, ...bounds }, trials }, ms: performance.now() - begun };
    })();
    return { promise, cancel() { stopped = true; runs.forEach((r) => r.cancel()); } };
  };
  // Counts of the trials' values in bins from the smallest to the largest, with an
  // empty bin at each end so the outer bars show whole: [centres, counts].
  const bins = (values, { min, max, count }) => {
    const n = Math.max(1, Math.min(40, Math.round(Math.sqrt(count))));
    const w = (max - min) / n || Math.abs(max) * 1e-6 || 1;
    const counts = new Array(n + 2).fill(0);
    for (const x of values) if (known(x)) counts[1 + Math.min(n - 1, Math.floor((x - min) / w))] += 1;
    return [counts.map((_, i) => min + (i - 0.5) * w), counts];
  };
  // A spread's progress bar with Cancel, hidden while nothing runs: {node, progress(p)},
  // `progress` being what HR.background.follow calls (null: done).
  const progressBox = (label, cancel) => {
    const bar = el('progress', { max: 1, value: 0, 'aria-label': label });
    const text = el('span', { class: 'run-text', 'aria-live': 'polite' }, '');
    const node = el('div', { class: 'run', hidden: true }, bar, text, el('button', { type: 'button', class: 'cancel', onclick: cancel }, 'Cancel'));
    return {
      node,
      progress(p) {
        node.hidden = p === null;
        if (p === null) return;
        bar.value = p;
        text.textContent = `Computing… ${fixed(100 * p, 0)} %`;
      },
    };
  };
  HR.spread = { run, bins, progressBox };

  // The target's limits on each figure as [lowest, highest] (null: no bound).
  const limits = () => {
    const v = (key, unit) => HR.design.value('target', key, unit);
    const gain = v('gain_db', 'dB');
    const tol = v('gain_tol_db', 'dB');
    const at = (x, low) => (known(x) ? (low ? [x, null] : [null, x]) : null);
    return {
      gain_db: known(gain) && known(tol) ? [gain - tol, gain + tol] : null,
      f_low_hz: at(v('f_low_hz', 'Hz')), phase_margin_deg: at(v('pm_min_deg'), true),
      iq_a: at(v('iq_max_a', 'A')), nf_db: at(v('nf_max_db', 'dB')),
    };
  };
  const bound = ([lo, hi], unit) => (known(lo) && known(hi) ? `${show(lo, unit)} … ${show(hi, unit)}` : known(lo) ? `≥ ${show(lo, unit)}` : `≤ ${show(hi, unit)}`);


  HR.panel({
    id: 'spread',
    title: 'Spread',
    mount(container) {
      let last = null;
      let lim = {};

      // ---- Tolerances and the run ---------------------------------------------------
      // Trials and seed are whole numbers in the document, not values with units.
      const whole = (text) => (/^\d+$/.test(text.trim()) ? Number(text.trim()) : text.trim());
      const fields = TOLERANCES.map((key) => HR.bind('tolerance', key, { label: HR.field('tolerance', key).label, hint: HR.field('tolerance', key).hint,
        compact: true, origin: 'spread', read: /^(trials|seed)$/.test(key) ? whole : undefined }));

      const running = progressBox('Progress of the Monte Carlo run', () => follower.cancel());
      const now = el('button', { type: 'button', onclick: () => follower.start() }, 'Compute now');
      const timing = el('p', { class: 'run-note' }, 'The trials run in two background workers.');
      const problem = el('p', { class: 'error', 'aria-live': 'polite', hidden: true });
      const staleNote = el('p', { class: 'stale-note', hidden: true });
      const runCard = card('Tolerances', el('p', { class: 'intro' }, 'Each trial builds the stage with every part drawn at random, evenly and independently, within ± its tolerance: the stage’s resistors and capacitors, the supply, kn, kp, Vtn and Vtp. The source and the load stay as they are.'),
        el('div', { class: 'grid-fields' }, fields.map((f) => f.wrap)), running.node, timing,
        el('div', { class: 'actions' }, now), problem, staleNote);
      runCard.classList.add('wide');

      // ---- Yield, figures and corners ---------------------------------------------
      const yieldHead = el('p', { class: 'verdict-head', 'data-key': 'yield' });
      const yieldText = el('p', { class: 'intro' });
      const stats = table('Each figure at the nominal design, over the trials, and at the worst-case corners (every part at the edge of its tolerance that lowers, then raises, the figure)',
        ['Figure', 'Nominal', 'Mean', 'Std dev', '1 % … 99 % of trials', 'Worst-case corners']);
      const reference = HR.compare.slow('spreadReport', () => render.again());
      const figuresCard = card('Yield and figures', reference.node, yieldHead, yieldText, el('div', { class: 'scroll' }, stats.node));
      figuresCard.classList.add('wide');

      // ---- Which part to buy tighter -----------------------------------------------
      const pick = choice({ label: 'Figure', options: FIGURES.map(([k, name]) => [k, name]), value: 'gain_db', onChange: () => drawBars() });
      pick.wrap.classList.add('pick');
      const bars = el('div', { class: 'bars', role: 'list' });
      const barsNote = el('p', { class: 'plot-note' });
      const drawBars = () => {
        if (!last) return;
        const [k, name, unit] = FIGURES.find((f) => f[0] === pick.select.value);
        const rows = last.summary.swings.filter((s) => known(s.swing[k])).sort((a, b) => Math.abs(b.swing[k]) - Math.abs(a.swing[k]));
        const top = Math.max(...rows.map((s) => Math.abs(s.swing[k]))) || 1;
        bars.replaceChildren(...rows.map(({ quantity, swing }) => {
          const v = swing[k];
          return el('div', { class: 'bar-row', role: 'listitem', 'data-key': quantity }, el('span', {}, partName(quantity)),
            el('span', { class: 'bar-track' }, el('span', { class: v < 0 ? 'bar low' : 'bar', style: `width:${(50 * Math.abs(v)) / top}%` })),
            el('span', { class: 'bar-value' }, signed(v, unit)));
        }));
        barsNote.textContent = rows.length
          ? `How far the ${name.toLowerCase()} moves when one part alone goes to the top of its tolerance, all else nominal: bars to the right raise it, to the left lower it. The longest bar is the part worth buying tighter.`
          : `No trial has a ${name.toLowerCase()} to move.`;
      };
      const barsCard = card('Which part to buy tighter', el('div', { class: 'inputs' }, pick.wrap), bars, barsNote);
      barsCard.classList.add('wide');

      // ---- Histograms --------------------------------------------------------------
      const histCard = card('Histograms of the trials', el('p', { class: 'intro' }, 'Hover for values; drag to zoom, double-click to reset.'));
      histCard.classList.add('wide');
      const row = el('div', { class: 'plots' });
      histCard.append(row);
      const plots = FIGURES.map(([k, name, unit]) => {
        const c = row.appendChild(el('div', { class: 'plot-cell', 'data-key': k }));
        const decorate = (u, ctx) => {
          if (!last) return;
          HR.plot.vline(u, ctx, last.summary.nominal[k], css('--plot-2'), 'nominal');
          for (const x of lim[k] || []) HR.plot.vline(u, ctx, x, css('--bad'), 'limit', 1);
        };
        const plot = HR.plot.create(c, { title: name, file: `halfrail-spread-${k}`, decorate,
          x: unit === '°' ? { label: `${name} (°)` } : { label: name, unit }, y: { label: 'Trials', unit: '' },
          series: [{ label: 'trials', unit: '', opts: { paths: uPlot.paths.bars({ size: [1, Infinity] }), fill: css('--window') } }] });
        return { k, unit, plot, note: c.appendChild(el('p', { class: 'plot-note' })) };
      });

      // The reference's yield and each figure's mean (in the Mean column), when it is at hand.
      const yieldOf = (s) => (known(s.yield) ? `${fixed(100 * s.yield, 1)} %` : 'none');
      const compare = (r, text) => {
        reference.offer(text, r);
        const ref = reference.result();
        const means = Object.fromEntries(FIGURES.map(([k], i) => [k, stats.tbody.rows[i].cells[2]]));
        const mean = (k, unit) => (x) => [[x.summary[k] && x.summary[k].mean, unit === 'Hz' ? '×' : unit]];
        HR.compare.figures({ yield: yieldHead, ...means },
          (x) => ({ yield: yieldOf(x.summary), ...Object.fromEntries(FIGURES.map(([k, , unit]) => [k, x.summary[k] ? show(x.summary[k].mean, unit) : '—'])) }),
          { yield: (x) => [[x.summary.yield && 100 * x.summary.yield, '%']], ...Object.fromEntries(FIGURES.map(([k, , unit]) => [k, mean(k, unit)])) }, r, ref);
      };

      const render = HR.compare.rerender((r, { ms, text }) => {
        last = r;
        lim = limits();
        const s = r.summary;
        const named = FIGURES.filter(([k]) => lim[k]);
        const set = named.map(([k, name, unit]) => `${name.toLowerCase()} ${bound(lim[k], unit)}`);
        // Limits the nominal design itself misses: no tolerance will fix those.
        const misses = named.filter(([k]) => { const v = s.nominal[k]; const [lo, hi] = lim[k]; return known(v) && ((known(lo) && v < lo) || (known(hi) && v > hi)); });
        const unsolved = `${s.oscillating ? ` ${s.oscillating} of ${s.trials} trials oscillate (a closed-loop pole grows) and count as failing, whatever their figures.` : ''}${s.unsolved ? ` ${s.unsolved} trials could not be solved and count as failing.` : ''}${misses.length
          ? ` The nominal design itself misses the ${misses.map(([, name]) => name.toLowerCase()).join(' and the ')} limit: design the stage to the target first (Stage panel).` : ''}`;
        yieldHead.textContent = known(s.yield) ? `Yield ${yieldOf(s)}` : 'No yield: the target sets no limits';
        yieldText.textContent = known(s.yield)
          ? `${Math.round(s.yield * s.trials)} of ${s.trials} trials meet the target’s limits: ${set.join(', ')}.${unsolved}`
          : `Give the target a gain tolerance, a low corner or a limit on the supply current, noise figure or phase margin (Stage panel, Design to a target) to count the trials that meet them.${unsolved}`;
        fillRows(stats.tbody, FIGURES.map(([k, name, unit]) => {
          const st = s[k];
          const corner = s.corners.find((c) => c.figure === k) || {};
          return [name, show(s.nominal[k], unit), st ? show(st.mean, unit) : 'in no trial', st ? show(st.std, unit) : '—',
            st ? `${show(st.p1, unit)} … ${show(st.p99, unit)}` : '—', known(corner.low) ? `${show(corner.low, unit)} … ${show(corner.high, unit)}` : '—'];
        }));
        for (const { k, unit, plot, note } of plots) {
          const st = s[k];
          plot.node.hidden = !st;
          if (st) plot.setData(bins(r.trials[k], st));
          note.textContent = st
            ? `${st.count} trials: mean ${show(st.mean, unit)}, std dev ${show(st.std, unit)}. Dashed: the nominal design${lim[k] ? ` and the target’s limit (${bound(lim[k], unit)})` : ''}.`
            : k === 'phase_margin_deg' ? 'No trial has a loop-gain crossover in the sweep, so there is no phase margin to spread.' : 'No trial has this figure.';
        }
        drawBars();
        timing.textContent = `${s.trials} trials computed in ${fixed(ms / 1000, 2)} s in two background workers.`;
        compare(r, text);
      });

      container.append(el('h1', {}, 'Spread'),
        el('p', { class: 'lede' }, 'What the parts’ tolerances do to the stage: many random builds (Monte Carlo), how many meet the target, how far each figure spreads and which part moves it most.'),
        el('div', { class: 'cards' }, runCard, figuresCard, barsCard, histCard));

      const follower = HR.background.follow(container, {
        job: run,
        render,
        progress: running.progress,
        report: (error) => {
          problem.textContent = HR.words(error);
          problem.hidden = !error;
        },
        stale: HR.background.staleMarker(staleNote, [figuresCard, barsCard, row]),
      });
    },
  });
})();
