'use strict';
// The Crystal panel's spread: the core's crystalSpread (the frequency error, the
// start-up margin and the drive level over the `tolerance` section's draws, the first
// trials with their steady state) run in a worker on lane `crystal-spread` when asked,
// then following the design as the Spread panel does (HR.background.follow on this
// card: its `data-follow` and `data-computed` are the card's own, apart from the
// panel's). The yield against the limits, each figure's statistics and histograms.

HR.crystalSpread = (() => {
  const { el, card, table, fillRows } = HR.ui;
  const fmt = HR.fmt;
  const { known, fixed } = HR;
  const css = (name) => HR.plot.css(name);

  // Each figure of a trial: its key in the core's columns, its name, its unit.
  const FIGURES = [['pull_ppm', 'Frequency error', 'ppm'], ['margin', 'Start-up margin', ''], ['drive_w', 'Drive level', 'W']];
  const show = (v, unit) => (!known(v) ? '—' : unit === 'ppm' ? `${v > 0 ? '+' : ''}${fixed(v, 2)} ppm` : unit ? fmt(v, unit, 3) : fixed(v, 2));
  const pct = (v) => `${fixed(100 * v, 1)} %`;
  // The limits on each figure as [lowest, highest] (null: no bound; absent: no limit).
  const bounds = (l) => ({ pull_ppm: [-l.pull_max_ppm, l.pull_max_ppm], margin: [l.margin_min, null], ...(known(l.drive_max_w) ? { drive_w: [null, l.drive_max_w] } : {}) });
  const limitText = ([lo, hi], unit) => (known(lo) && known(hi) ? `${show(lo, unit)} … ${show(hi, unit)}` : known(lo) ? `≥ ${show(lo, unit)}` : `≤ ${show(hi, unit)}`);
  const nameOf = (key) => (HR.fieldAt(`oscillator.${key}`) || HR.fieldAt(`part.${key}`) || { name: key }).name;

  const create = (container) => {
    const running = HR.spread.progressBox('Progress of the oscillator’s spread', () => follower && follower.cancel());
    const go = el('button', { type: 'button', class: 'primary', onclick: () => start() }, 'Run the spread');
    const toSpread = el('a', { href: `#spread${HR.documents ? HR.documents.tail : ''}`, onclick: (e) => { e.preventDefault(); HR.goTo('spread', 'input'); } }, 'Spread panel');
    const problem = el('p', { class: 'error', 'aria-live': 'polite', hidden: true });
    const staleNote = el('p', { class: 'stale-note', hidden: true });
    const timing = el('p', { class: 'run-note' });

    const yieldHead = el('p', { class: 'verdict-head', 'data-key': 'yield' });
    const yieldText = el('p', { class: 'intro' });
    const drawn = el('p', { class: 'plot-note' });
    const stats = table('Each figure at the nominal design and over the trials (the drive level only over the trials whose steady state was solved), against its limit',
      ['Figure', 'Nominal', 'Mean', 'Std dev', '1 % … 99 % of trials', 'Limit', 'Trials']);
    const row = el('div', { class: 'plots' });
    const reference = HR.compare.slow('crystalSpread', () => render.again());
    const results = el('div', { class: 'spread-out', hidden: true }, reference.node, yieldHead, yieldText, el('div', { class: 'scroll' }, stats.node), drawn, row);

    const node = card('Spread over the tolerances',
      el('p', { class: 'intro' }, 'Each trial draws C1, C2, the strays, Rf and Rs within the capacitors’ and resistors’ tolerances, and the supply and the part’s k and thresholds, from the tolerances of the ', toSpread,
        '; the first trials also solve the steady state, for the drive level. The yield counts the trials that meet the frequency error, margin and drive limits.'),
      el('div', { class: 'actions' }, go), running.node, timing, problem, staleNote, results);
    node.classList.add('wide', 'crystal-spread');

    let last = null;
    let lim = {};
    // The histograms, made with the first result (no empty figures before a run).
    let plots = null;
    const histograms = () => FIGURES.map(([k, name, unit]) => {
      const c = row.appendChild(el('div', { class: 'plot-cell', 'data-key': k }));
      const decorate = (u, ctx) => {
        if (!last) return;
        HR.plot.vline(u, ctx, last.summary.nominal[k], css('--plot-2'), 'nominal');
        for (const x of lim[k] || []) if (known(x)) HR.plot.vline(u, ctx, x, css('--bad'), 'limit', 1);
      };
      const plot = HR.plot.create(c, { title: name, file: `halfrail-crystal-spread-${k}`, decorate,
        x: unit ? { label: name, unit } : { label: name }, y: { label: 'Trials', unit: '' },
        series: [{ label: 'trials', unit: '', opts: { paths: uPlot.paths.bars({ size: [1, Infinity] }), fill: css('--window') } }] });
      return { k, unit, plot, note: c.appendChild(el('p', { class: 'plot-note' })) };
    });

    const yieldOf = (s) => (known(s.yield) ? pct(s.yield) : 'none');
    const render = HR.compare.rerender((r, { ms, text }) => {
      last = r;
      const s = r.summary;
      lim = bounds(s.limits);
      const words = `a frequency error within ±${fixed(s.limits.pull_max_ppm, 1)} ppm, a margin of ${fixed(s.limits.margin_min, 1)} or more${known(s.limits.drive_max_w) ? ` and a drive level of at most ${fmt(s.limits.drive_max_w, 'W', 3)}` : ''}`;
      const more = `${s.ringing ? ` ${s.ringing} trials ring without the crystal and count as failing.` : ''}${s.unsolved ? ` ${s.unsolved} trials could not be solved and count as failing.` : ''}`;
      yieldHead.textContent = known(s.yield) ? `Yield ${yieldOf(s)}` : 'No yield: no trial whose drive level was solved meets the frequency and margin limits';
      if (known(s.yield)) yieldHead.dataset.value = String(s.yield); else delete yieldHead.dataset.value;
      const small = known(s.yield_small_signal) ? `${pct(s.yield_small_signal)} of all ${s.trials} trials meet the frequency and margin limits` : '';
      yieldText.textContent = known(s.limits.drive_max_w)
        ? `The share of all trials that meet ${words}. ${small}; the drive level is solved for the first ${s.drive_trials}, and of the ${s.drive_judged} of those that meet them, ${known(s.drive_pass) ? pct(s.drive_pass) : 'none'} are within the drive limit: the yield is the product.${more}`
        : `${small}.${more}`;
      fillRows(stats.tbody, FIGURES.map(([k, name, unit]) => {
        const st = s[k];
        return [name, show(s.nominal[k], unit), st ? show(st.mean, unit) : 'in no trial', st ? show(st.std, unit) : '—',
          st ? `${show(st.p1, unit)} … ${show(st.p99, unit)}` : '—', lim[k] ? limitText(lim[k], unit) : 'none', st ? String(st.count) : '0'];
      }));
      drawn.textContent = `Drawn in each trial: ${s.varied.map(nameOf).join(', ')}. Seed ${s.seed}.`;
      plots = plots || histograms();
      for (const { k, unit, plot, note } of plots) {
        const st = s[k];
        plot.node.hidden = !st;
        if (st) plot.setData(HR.spread.bins(r.trials[k], st));
        note.textContent = st ? `${st.count} trials: mean ${show(st.mean, unit)}, std dev ${show(st.std, unit)}. Dashed: the nominal design${lim[k] ? ' and the limit' : ''}.` : 'No trial has this figure.';
      }
      results.hidden = false;
      timing.textContent = `${s.trials} trials, the first ${s.drive_trials} with their steady state, computed in ${fixed(ms / 1000, 2)} s in a background worker.`;
      reference.offer(text, r);
      HR.compare.figures({ yield: yieldHead }, (x) => ({ yield: yieldOf(x.summary) }), { yield: (x) => [[known(x.summary.yield) ? 100 * x.summary.yield : null, '%']] }, r, reference.result());
    });

    // The follower starts at the first request, then follows the design while shown.
    let follower = null;
    const start = () => {
      if (follower) { follower.start(); return; }
      follower = HR.background.follow(node, {
        name: 'crystalSpread', args: (text) => [text], lane: 'crystal-spread',
        render,
        progress: running.progress,
        report: (error) => {
          problem.textContent = error ? HR.words(error) : '';
          problem.hidden = !error;
        },
        stale: HR.background.staleMarker(staleNote, [results]),
      });
    };
    // The follower hears the panel's being shown on this card.
    HR.ui.onShown(container, () => node.dispatchEvent(new CustomEvent('hr-shown')));
    return node;
  };

  return { create };
})();
