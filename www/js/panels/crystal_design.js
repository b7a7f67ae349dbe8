'use strict';
// The Crystal panel's design helper: the core's crystalDesign (C1 and C2 from the
// target's E-series, else E12; Rs and Rf) run in a worker on lane `crystal-design`
// when asked, and again a pause after each change of what it depends on; its ranked
// choices in words, each with Use, which writes C1, C2, Rf and Rs into the circuit
// as one step of undo. When no choice meets the limits, the core's words on what
// would. The card says its state in `data-state` (idle, running, done, error,
// cancelled) and counts its results in `data-designed`, which the tests wait on.

HR.crystalDesign = (() => {
  const { el, card, table, fillRows } = HR.ui;
  const fmt = HR.fmt;
  const { known, fixed } = HR;

  const ppm = (v) => (known(v) ? `${v > 0 ? '+' : ''}${fixed(v, 2)} ppm` : '—');
  const cap = (v) => HR.rkm(v, 'C') || fmt(v, 'F', 3);
  const res = (v) => (known(v) && v > 0 ? HR.rkm(v, 'R') || fmt(v, 'Ω', 3) : 'none');
  // The text to put in the design: the RKM code when it reads back as exactly the value.
  const asText = (v, kind, unit) => {
    const code = HR.rkm(v, kind);
    const back = code ? HR.call('parseValue', code, unit, '') : {};
    return back.ok && back.ok.value === v ? code : v;
  };
  const DRIVE = { met: 'within', over: 'over', no_limit: 'no rating', unknown: 'not solved' };

  // The design without the values Use writes: a change of only those needs no new run.
  const inputsOf = (text) => {
    const d = JSON.parse(text);
    if (d.oscillator) for (const k of ['c1_f', 'c2_f', 'rf_ohm', 'rs_ohm']) delete d.oscillator[k];
    return JSON.stringify(d);
  };

  // What a row says beyond its figures.
  const notes = (c, limits) => {
    const out = [];
    if (!c.pull_ok) out.push(`frequency error beyond ±${fixed(limits.pull_max_ppm, 1)} ppm`);
    if (!c.margin_ok) out.push(`margin below ${fixed(limits.margin_min, 1)}`);
    if (c.drive === 'over') out.push('drives the crystal over its rating');
    if (c.drive === 'unknown') out.push('no steady state solved: drive unknown');
    if (c.rings) out.push('rings without the crystal');
    if (known(c.steady_pull_ppm)) out.push(`${ppm(c.steady_pull_ppm)} at the steady amplitude`);
    if (c.c2_f < c.c1_f) out.push('C2 below C1');
    return out.join('; ');
  };

  const limitWords = (l) => `a frequency error within ±${fixed(l.pull_max_ppm, 1)} ppm, a start-up margin of ${fixed(l.margin_min, 1)} or more${
    known(l.drive_max_w) ? ` and a drive level of at most ${fmt(l.drive_max_w, 'W', 3)}` : ' (the crystal names no drive rating)'}`;

  const create = (container) => {
    const limitField = (() => {
      const { label, hint } = HR.field('oscillator', 'pull_max_ppm');
      return HR.bind('oscillator', 'pull_max_ppm', { label, hint, compact: true, origin: 'crystal' }).wrap;
    })();
    const problem = el('p', { class: 'error', 'aria-live': 'polite' });
    const verdict = el('p', { class: 'design-best', 'data-key': 'verdict' });
    const advice = el('ul', { class: 'design-advice' });
    const list = table('', ['#', 'C1', 'C2', 'Rs', 'Rf', 'Frequency error', 'Start-up margin', 'Drive level', 'Meets the limits', 'Notes', '']);
    list.node.classList.add('candidates');
    const out = el('div', { class: 'design-out', hidden: true }, verdict, advice, el('div', { class: 'scroll' }, list.node));

    const bar = el('progress', { max: 1, 'aria-label': 'Progress of the design helper' });
    const cancel = el('button', { type: 'button', class: 'cancel', onclick: () => running && running.cancel() }, 'Cancel');
    const busy = el('div', { class: 'run', hidden: true }, bar, el('span', { class: 'run-text', 'aria-live': 'polite' }, 'Designing in the background…'), cancel);
    const go = el('button', { type: 'button', class: 'primary' }, 'Design');

    const node = card('Design helper: choose C1, C2, Rs and Rf',
      el('p', { class: 'intro' }, 'Design tries standard capacitor pairs (the target’s E-series, else E12) for C1 and C2, a series resistor where the crystal would be driven too hard, and the bias resistor, for this part and this crystal; it ranks the choices, those meeting every limit first, then C2 at least C1, then the most room under the tightest limit. Use puts a choice in the circuit above (one step to undo).'),
      el('div', { class: 'inputs' }, limitField),
      el('div', { class: 'actions' }, go), busy, problem, out);
    node.classList.add('wide', 'crystal-design');
    node.dataset.state = 'idle';

    // Writes a choice into the circuit as one step of undo: only the values that differ
    // from the design's (a value typed `1M` stays so), and no step when none does.
    const use = (c) => {
      const values = {};
      const said = [];
      for (const [key, v, kind, unit, name, words] of [['c1_f', c.c1_f, 'C', 'F', 'C1', cap], ['c2_f', c.c2_f, 'C', 'F', 'C2', cap],
        ['rs_ohm', known(c.rs_ohm) ? c.rs_ohm : null, 'R', 'Ω', 'Rs', res], ['rf_ohm', c.rf_ohm, 'R', 'Ω', 'Rf', res]]) {
        const now = HR.design.value('oscillator', key, unit);
        const absent = (x) => !known(x) || (key === 'rs_ohm' && x === 0);
        if (now === v || (absent(now) && absent(v))) continue;
        values[key] = absent(v) ? '' : asText(v, kind, unit);
        said.push(`${name} ${words(v)}`);
      }
      if (!said.length) { HR.setStatus('That choice is already in the circuit.'); return; }
      HR.design.setMany('oscillator', values, `use ${said.join(', ')}`, 'crystal');
    };

    const render = (d) => {
      const l = d.limits;
      const top = d.candidates[0];
      verdict.textContent = d.met
        ? `The best choice meets ${limitWords(l)}: C1 ${cap(top.c1_f)}, C2 ${cap(top.c2_f)}, Rs ${res(top.rs_ohm)}, Rf ${res(top.rf_ohm)}.`
        : `No choice meets ${limitWords(l)}.${d.candidates.length ? ' The nearest are ranked below.' : ''}`;
      verdict.classList.toggle('bad', !d.met);
      advice.hidden = d.met;
      advice.replaceChildren(...(d.met ? [] : d.advice.length ? d.advice.map((a) => el('li', {}, `What would: ${HR.textWords(a)}.`))
        : [el('li', {}, 'The helper found no change that would meet them: loosen a limit.')]));
      list.node.querySelector('caption').textContent = `${d.candidates.length} choices from ${d.series}, best first, of ${d.screened} capacitor pairs screened (frequency error: from the nominal, small signal; margin: −R/ESR; drive level: in the crystal at the steady amplitude)`;
      list.node.hidden = !top;
      fillRows(list.tbody, d.candidates.map((c, i) => [String(i + 1), cap(c.c1_f), cap(c.c2_f), res(c.rs_ohm), res(c.rf_ohm), ppm(c.pull_ppm), fixed(c.margin, 2),
        known(c.drive_w) ? `${fmt(c.drive_w, 'W', 3)} (${DRIVE[c.drive]})` : DRIVE[c.drive], c.meets ? 'yes' : 'no', notes(c, l),
        el('button', { type: 'button', class: 'apply', 'aria-label': `Use C1 ${cap(c.c1_f)}, C2 ${cap(c.c2_f)}, Rs ${res(c.rs_ohm)}, Rf ${res(c.rf_ohm)}`, onclick: () => use(c) }, 'Use')]));
      // What each row is, unrounded, for a test to compare with the command's.
      for (const [i, row] of [...list.tbody.rows].entries()) Object.assign(row.dataset, { meets: String(d.candidates[i].meets), pull: String(d.candidates[i].pull_ppm) });
    };

    // Design once asked, then again a pause after each change of what it depends on.
    let asked = false;
    let timer = null;
    let running = null;
    let designedFor = null;
    let runningFor = null;
    const state = (s) => { node.dataset.state = s; };
    const design = () => {
      clearTimeout(timer);
      asked = true;
      const text = HR.design.text();
      busy.hidden = false;
      state('running');
      runningFor = inputsOf(text);
      running = HR.background.run('crystalDesign', [text], { lane: 'crystal-design' });
      const mine = running;
      mine.promise.then((r) => {
        if (running !== mine) return;
        running = null;
        busy.hidden = true;
        if (r.cancelled) { state('cancelled'); problem.textContent = 'Design cancelled: press Design to run it again.'; return; }
        const atField = HR.bind.route(container, r.error || null);
        problem.textContent = r.error && !atField ? HR.words(r.error) : '';
        out.classList.toggle('stale', Boolean(r.error));
        if (r.error) { state('error'); return; }
        designedFor = inputsOf(text);
        render(r.ok);
        out.hidden = false;
        state('done');
        node.dataset.designed = String(Number(node.dataset.designed || 0) + 1);
      });
    };
    go.addEventListener('click', design);
    HR.design.onChange(() => {
      if (!asked) return;
      const key = inputsOf(HR.design.text());
      if (running && runningFor === key) return;
      clearTimeout(timer);
      if (!running && designedFor === key) {
        out.classList.remove('stale');
        state('done');
        return;
      }
      out.classList.add('stale');
      if (running) { running.cancel(); running = null; busy.hidden = true; }
      state('waiting');
      timer = setTimeout(design, 300);
    });
    return node;
  };

  return { create };
})();
