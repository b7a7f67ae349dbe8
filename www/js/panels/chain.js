'use strict';
// Chain: the stage inside a cascade of pads, filters, amplifiers with typed-in
// figures and this document's own stage, each matched to the next. The blocks are
// edited in place (each add, remove, move and edit one undoable step of the design's
// `chain` section); the core's chainReport gives the budget on every change, on the
// main thread (well under a millisecond). The stage block's own figures come from
// the large-signal analysis, too slow for that: stageBlock runs in a background
// worker, once per version of the part, stage and analysis sections, and its result
// is kept (by those sections' text) and handed back to chainReport.

(() => {
  const { el, card, table, fillRows } = HR.ui;
  const { known, fixed } = HR;
  const css = (name) => HR.plot.css(name);

  const KINDS = { pad: 'Pad (attenuator)', filter: 'Filter', amp: 'Figures typed in', stage: 'This stage' };
  const ADDED = { pad: 'add a pad', filter: 'add a filter', amp: 'add an amplifier', stage: 'add this stage' };
  // The block fields each kind takes, in the table's column order: [key, column, unit].
  const COLUMNS = [
    ['loss_db', 'Loss', 'dB'], ['gain_db', 'Gain', 'dB'], ['nf_db', 'NF', 'dB'],
    ['oip3_dbm', 'OIP3', 'dBm'], ['op1db_dbm', 'OP1dB', 'dBm'], ['dc_w', 'DC power', 'W'],
  ];
  const TAKES = { pad: ['loss_db'], filter: ['loss_db'], amp: ['gain_db', 'nf_db', 'oip3_dbm', 'op1db_dbm', 'dc_w'], stage: [] };
  // What a new block starts with (the user's to change).
  const NEW = {
    pad: { kind: 'pad', loss_db: 3 },
    filter: { kind: 'filter', loss_db: 2 },
    amp: { kind: 'amp', gain_db: 10, nf_db: 5 },
    stage: { kind: 'stage' },
  };
  // A chain started from nothing: the document has no `chain` section yet.
  const FIRST_CHAIN = { input_dbm: -60, bandwidth_hz: '100 kHz', blocks: [] };
  // The chain's own values in its form (labels and hints from HR.field).
  const INPUTS = ['input_dbm', 'bandwidth_hz', 'snr_wanted_db'];
  // Shown once the core reads it (it arrived with the chain's warnings).
  const WARN_INPUT = 'headroom_warn_db';
  // The cumulative figures after each block in the table: [key, heading, how shown]
  // (the noise temperature, in the totals, is in the CSV too).
  const pct = (v) => (known(v) ? `${fixed(100 * v, 1)} %` : '—');
  const kelvin = (v) => (known(v) ? `${fixed(v, 0)} K` : '—');
  const d2 = (v) => fixed(v, 2);
  const CUMULATIVE = [
    ['gain_db', 'Gain (dB)', d2], ['nf_db', 'NF (dB)', d2],
    ['iip3_dbm', 'IIP3 (dBm)', d2], ['oip3_dbm', 'OIP3 (dBm)', d2], ['ip1db_dbm', 'IP1dB (dBm)', d2],
    ['signal_dbm', 'Signal (dBm)', d2], ['noise_dbm', 'Noise (dBm)', d2], ['snr_db', 'SNR (dB)', d2],
    ['headroom_db', 'Headroom (dB)', d2], ['noise_share', 'Noise share', pct], ['distortion_share', 'Distortion share', pct],
  ];
  const db = (v) => (known(v) ? HR.fmt(v, 'dB') : '—');
  const dbm = (v) => (known(v) ? HR.fmt(v, 'dBm') : '—');
  const watts = (v) => (known(v) ? HR.fmt(v, 'W', 3) : '—');
  const TOTALS = [
    ['gain_db', 'Gain', db], ['nf_db', 'Noise figure', db], ['noise_temp_k', 'Noise temperature', kelvin],
    ['noise_floor_in_dbm', 'Noise floor at the input (kT₀BF)', dbm], ['mds_dbm', 'Minimum detectable signal', dbm],
    ['output_dbm', 'Output level', dbm], ['snr_db', 'SNR at the output', db], ['iip3_dbm', 'IIP3', dbm],
    ['oip3_dbm', 'OIP3', dbm], ['ip1db_dbm', 'Input 1 dB compression (IP1dB)', dbm], ['sfdr_db', 'SFDR', db],
    ['dc_w', 'DC power', watts],
  ];
  const clone = (v) => JSON.parse(JSON.stringify(v));
  const fieldOf = (i, key) => `chain.blocks[${i}].${key}`;
  // The sections the stage block depends on, as a document of their own: the key of
  // its figures, and what stageBlock is given (so a bad chain value cannot stop it).
  const stageDocOf = (doc) => JSON.stringify({ halfrail: doc.halfrail, part: doc.part, stage: doc.stage, analysis: doc.analysis });

  // A row's blocks as the user reads them (1-based): "3", or "2–3" for a run of
  // stages budgeted as one circuit.
  const spanOf = (s, i) => (Array.isArray(s.blocks) ? s.blocks : [i, i]);
  const spanText = ([a, b]) => (a === b ? String(a + 1) : `${a + 1}–${b + 1}`);

  // The level diagram: the levels at each node on HR.plot's category x axis, the nodes
  // named by the blocks they follow.
  const SERIES = [
    ['Signal', '--plot-1', {}], ['Noise', '--plot-2', {}],
    ['Output 1 dB compression', '--plot-3', { dash: [6, 4] }], ['Output intercept (OIP3)', '--plot-4', { dash: [2, 4] }],
  ];
  const levelPlot = (container) => {
    const plot = HR.plot.create(container, {
      title: 'Levels along the chain', file: 'halfrail-chain-levels', height: 320,
      x: { label: 'Node (after each block)', legend: 'Node', categories: true },
      y: { label: 'Level', unit: 'dBm', values: (ticks, incr) => ticks.map((v) => fixed(v, incr < 1 ? 1 : 0)) },
      series: SERIES.map(([label, colour, extra]) => ({ label, unit: 'dBm',
        opts: { stroke: css(colour), points: { show: true, size: 7, fill: css(colour) }, ...extra } })),
    });
    plot.node.classList.add('chain-levels');
    return {
      node: plot.node,
      // `data`: [the nodes' names, ...the series' values]; `ref`: the reference's, or null.
      setData(data, ref = null) {
        plot.node.dataset.series = SERIES.map(([label]) => label).join('|');
        plot.node.dataset.nodes = String(data[0].length);
        plot.setData(data, ref);
      },
    };
  };

  HR.panel({
    id: 'chain',
    title: 'Chain',
    mount(container) {
      let last = null;          // the report on show
      let lastArgs = null;      // what the core was given for it: [text, stage block JSON]
      const stageCache = new Map(); // stage document text → {ok} | {error}
      const runs = {};          // lane → {key, handle} of the stageBlock run in flight there
      // A read-only view (an embedded one) shows the chain without its editing buttons.
      const readOnly = () => Boolean(HR.design.readOnly && HR.design.readOnly());
      const blocks = () => { const c = HR.design.section('chain'); return c && Array.isArray(c.blocks) ? c.blocks : []; };
      const chainNow = () => clone(HR.design.section('chain') || FIRST_CHAIN);
      const change = (label, edit) => {
        const c = chainNow();
        if (!Array.isArray(c.blocks)) c.blocks = [];
        edit(c);
        HR.design.replace('chain', c, label);
      };
      const nameOf = (i) => {
        const b = blocks()[i];
        if (b && b.name) return b.name;
        const s = last && last.stages.find((r, j) => spanOf(r, j)[0] === i);
        return s && spanOf(s, i)[1] === i ? s.name : `block ${i + 1}`;
      };

      // ---- The chain's drive ------------------------------------------------------
      const inputs = [...INPUTS, WARN_INPUT].map((key) => HR.bind('chain', key, { label: HR.field('chain', key).label, hint: HR.field('chain', key).hint, compact: true }));
      const warnInput = inputs[inputs.length - 1];
      warnInput.wrap.hidden = true;
      const inputCard = card('Drive and bandwidth',
        el('p', { class: 'intro' }, 'The level into the chain and the bandwidth its noise is counted over.'),
        el('div', { class: 'grid-fields' }, inputs.map((f) => f.wrap)));

      // ---- The blocks -------------------------------------------------------------
      const blockTable = table('The blocks from input to output, each matched to the next. Values take dB, dBm and engineering notation (60 mW); Enter or leaving a field applies it, Escape undoes the typing.',
        ['#', 'Name', 'Kind', ...COLUMNS.map(([, h, u]) => `${h} (${u})`), 'Order', '']);
      blockTable.node.classList.add('chain-blocks');
      const noChain = el('p', { class: 'intro', hidden: true }, 'This design has no chain yet. Add a block to start one, driven at −60 dBm over 100 kHz (change both under Drive and bandwidth).');
      const ownName = el('input', { type: 'text', class: 'own-name', spellcheck: 'false', autocomplete: 'off', placeholder: 'e.g. Mixer, Cable, Diplexer', 'aria-label': 'Name of a block of your own' });
      const add = (kind, extra = {}) => {
        const at = blocks().length;
        focusAfter = { row: at, key: 'name' };
        change(extra.name ? `add ${extra.name}` : ADDED[kind], (c) => c.blocks.push({ ...clone(NEW[kind]), ...extra }));
      };
      const addOwn = () => {
        const name = ownName.value.trim();
        add('amp', name ? { name, gain_db: 0, nf_db: 0 } : { gain_db: 0, nf_db: 0 });
        ownName.value = '';
      };
      ownName.addEventListener('keydown', (e) => { if (e.key === 'Enter') addOwn(); });
      const adders = el('div', { class: 'actions chain-add' },
        el('button', { type: 'button', onclick: () => add('pad') }, 'Add a pad'),
        el('button', { type: 'button', onclick: () => add('filter') }, 'Add a filter'),
        el('button', { type: 'button', onclick: () => add('amp') }, 'Add an amplifier'),
        el('button', { type: 'button', onclick: () => add('stage') }, 'Add this stage'),
        el('span', { class: 'own' }, ownName, el('button', { type: 'button', onclick: addOwn }, 'Add a block of your own')));
      const problem = el('p', { class: 'error chain-problem', 'aria-live': 'polite', hidden: true });
      const staleNote = el('p', { class: 'stale-note', hidden: true });
      const blocksCard = card('Blocks', noChain, el('div', { class: 'scroll' }, blockTable.node), adders, problem, staleNote);
      blocksCard.classList.add('wide');

      // The rows as built: per row its inputs by key, its stage cells and its buttons.
      let rows = [];
      let shape = null;         // the kinds in order, when the rows were built
      let focusAfter = null;    // {row, key}: what to focus once the rows are rebuilt
      // A block's value, typed in its cell: applied on Enter or on leaving it, each
      // time one step of undo named by the block.
      const cellInput = (i, key, label) => HR.bind('chain', `blocks[${i}].${key}`, {
        aria: `Block ${i + 1} ${label}`, attrs: { 'data-row': i, 'data-key': key }, on: 'change',
        commit: (text) => {
          if (!blocks()[i]) return;
          const words = (v) => HR.valueWords('chain.blocks[]', key, v);
          const { name } = HR.field('chain.blocks[]', key);
          change(`${nameOf(i)}: ${name} ${words(blocks()[i][key])} → ${words(text)}`, (c) => {
            if (text === '') delete c.blocks[i][key];
            else c.blocks[i][key] = text;
          });
        },
      });
      const build = () => {
        const list = blocks();
        shape = list.map((b) => b && b.kind).join(',');
        rows = list.map((b, i) => {
          const fields = {};
          const name = cellInput(i, 'name', 'name');
          fields.name = name;
          const stage = {};
          const kindError = el('span', { class: 'error' });
          const cells = COLUMNS.map(([key, heading, unit]) => {
            if (b.kind === 'stage') {
              stage[key] = el('span', { class: 'computed', 'data-key': key }, key === 'loss_db' ? '—' : '…');
              return stage[key];
            }
            if (!TAKES[b.kind] || !TAKES[b.kind].includes(key)) return '—';
            fields[key] = cellInput(i, key, `${heading} (${unit})`);
            return fields[key].wrap;
          });
          const name1 = () => nameOf(i);
          const move = (to) => {
            focusAfter = { row: to, key: to < i ? 'up' : 'down' };
            change(`move ${name1()} ${to < i ? 'up' : 'down'}`, (c) => { const [x] = c.blocks.splice(i, 1); c.blocks.splice(to, 0, x); });
          };
          const up = el('button', { type: 'button', class: 'small', 'data-key': 'up', 'aria-label': `Move block ${i + 1} (${name1()}) up`, disabled: i === 0, onclick: () => move(i - 1) }, '↑');
          const down = el('button', { type: 'button', class: 'small', 'data-key': 'down', 'aria-label': `Move block ${i + 1} (${name1()}) down`, disabled: i === list.length - 1, onclick: () => move(i + 1) }, '↓');
          const remove = el('button', { type: 'button', class: 'small', 'data-key': 'remove', 'aria-label': `Remove block ${i + 1} (${name1()})`, onclick: () => {
            focusAfter = { row: Math.min(i, list.length - 2), key: 'remove' };
            change(`remove ${name1()}`, (c) => c.blocks.splice(i, 1));
          } }, 'Remove');
          // The stage block is this design: it carries the design's title (kept in step by syncRows).
          const title = b.kind === 'stage' ? el('span', { class: 'stage-title' }) : null;
          const tr = el('tr', { 'data-row': i, 'data-kind': b.kind },
            el('th', { scope: 'row' }, String(i + 1)), el('td', {}, name.wrap),
            el('td', { class: 'kind' }, KINDS[b.kind] || String(b.kind), title, kindError),
            cells.map((c) => el('td', {}, c)), el('td', { class: 'order' }, readOnly() ? null : [up, down]), el('td', {}, readOnly() ? null : remove));
          return { tr, fields, stage, title, kindError, buttons: { up, down, remove } };
        });
        blockTable.tbody.replaceChildren(...rows.map((r) => r.tr));
        if (focusAfter) {
          const r = rows[focusAfter.row];
          const target = r && (r.fields[focusAfter.key] ? r.fields[focusAfter.key].input : r.buttons[focusAfter.key]);
          // A move button at the end of the table is disabled: its partner takes the focus.
          const other = r && { up: r.buttons.down, down: r.buttons.up }[focusAfter.key];
          const to = target && !target.disabled ? target : other || (r ? r.buttons.remove : ownName);
          to.focus();
          if (focusAfter.key === 'name' && to.select) to.select();
          focusAfter = null;
        } else if (!rows.length && blockTable.node.contains(document.activeElement)) ownName.focus();
      };
      // The rows as the design has them: rebuilt when blocks come, go or move
      // between kinds (their values, bound to the design, keep in step themselves).
      const syncRows = () => {
        const list = blocks();
        if (list.map((b) => b && b.kind).join(',') !== shape || list.length !== rows.length || focusAfter) build();
        noChain.hidden = Boolean(HR.design.section('chain')) || readOnly();
        adders.hidden = readOnly();
        blockTable.node.hidden = !list.length;
        const title = String(HR.design.section('title') || '').trim();
        rows.forEach((r, i) => {
          const placeholder = last && last.stages.find((s, j) => spanOf(s, j)[0] === i && spanOf(s, j)[1] === i);
          r.fields.name.input.placeholder = placeholder ? placeholder.name : '';
          if (r.title) {
            r.title.textContent = title || 'Untitled design';
            r.title.title = title;
            r.title.classList.toggle('untitled', !title);
          }
        });
        showStage();
      };
      // The stage rows: the stage's own figures, or that they are computing.
      const showStage = () => {
        const key = stageDocOf(JSON.parse(HR.design.text()));
        const got = stageCache.get(key);
        const running = (runs['chain-stage'] || {}).key === key;
        rows.forEach((r) => {
          if (!Object.keys(r.stage).length) return;
          const f = got && got.ok;
          r.stage.gain_db.textContent = f ? fixed(f.gain_db, 2) : running ? 'computing…' : '—';
          r.stage.nf_db.textContent = f ? fixed(f.nf_db, 2) : running ? '…' : '—';
          r.stage.oip3_dbm.textContent = f ? fixed(f.oip3_dbm, 2) : running ? '…' : '—';
          r.stage.op1db_dbm.textContent = f ? fixed(f.op1db_dbm, 2) : running ? '…' : '—';
          r.stage.dc_w.textContent = f ? watts(f.dc_w) : running ? '…' : '—';
          r.tr.dataset.stage = f ? 'ready' : running ? 'computing' : got ? 'error' : 'due';
          r.kindError.textContent = got && got.error ? HR.reasonWords(got.error) : '';
        });
        container.dataset.stage = running ? 'computing' : got ? (got.ok ? 'ready' : 'error') : 'due';
      };

      // ---- Totals -------------------------------------------------------------------
      const totals = {};
      const readout = el('dl', { class: 'readout' }, TOTALS.map(([k, text]) => {
        totals[k] = el('dd', { 'data-key': k }, '—');
        return el('div', {}, el('dt', {}, text), totals[k]);
      }));
      const sets = el('p', { class: 'chain-sets' });
      const totalsCard = card('The chain as a whole', readout, sets,
        el('p', { class: 'plot-note' }, 'Every block is taken as matched to the next at both ends. The noise figure cascades by Friis’s formula and IIP3 by 1/IIP3 = Σ G_before/IIP3 of each block (in linear units); the 1 dB compression point is summed the same way, a common approximation: compression does not strictly add like that, so take IP1dB as an estimate. SFDR = ⅔ (IIP3 − noise floor).'));
      totalsCard.classList.add('wide');

      // ---- Warnings -------------------------------------------------------------------
      const warnings = el('ul', { class: 'warnings chain-warnings', 'aria-live': 'polite' });
      const warningsCard = card('Warnings', warnings);
      warningsCard.hidden = true;

      // ---- Runs of directly coupled stages ----------------------------------------
      const runsChoice = HR.bind('chain', 'stage_runs', { label: HR.field('chain', 'stage_runs').label, fallback: 'matched',
        options: [['matched', 'Each a matched block'], ['one-circuit', 'One circuit, each stage loading the one before']],
        read: (v) => (v === 'matched' ? '' : v) });
      runsChoice.wrap.classList.add('pick');
      const runsTable = table('Stages in a row, budgeted both ways: as matched blocks, and as the one circuit they make when coupled directly', ['Stages', 'Figure', 'As matched blocks', 'As one circuit', 'Difference']);
      const runsNote = el('p', { class: 'plot-note' });
      const runsCard = card('Stages coupled directly', el('div', { class: 'inputs' }, runsChoice.wrap), el('div', { class: 'scroll' }, runsTable.node), runsNote);
      runsCard.hidden = true;
      runsCard.classList.add('wide');

      // ---- Levels and figures after each block ---------------------------------
      const plotCard = card('Level diagram', el('p', { class: 'intro' }, 'The signal, the noise in the bandwidth, and the output 1 dB compression and intercept levels after each block; hover for values.'));
      plotCard.classList.add('wide');
      const plot = levelPlot(plotCard);
      const plotNote = plotCard.appendChild(el('p', { class: 'plot-note' }));
      const after = table('The chain from its input up to and including each block', ['After', 'Block', ...CUMULATIVE.map(([, h]) => h)]);
      after.node.classList.add('chain-after');
      const csv = el('button', { type: 'button', disabled: true, onclick: () => {
        // The core's CSV of the budget on show (the same as `halfrail chain --csv`).
        const r = lastArgs && HR.call('chainCsv', ...lastArgs);
        if (r && r.ok !== undefined) HR.ui.download(HR.documents.named('chain', 'csv'), new Blob([r.ok], { type: 'text/csv' }));
      } }, 'Save as CSV');
      const afterCard = card('After each block', el('div', { class: 'scroll' }, after.node), el('div', { class: 'actions' }, csv),
        el('p', { class: 'plot-note' }, 'Headroom: the output 1 dB compression level less the signal there. Noise share: the block’s part of the chain’s excess noise (F − 1); distortion share: its part of 1/IIP3.'));
      afterCard.classList.add('wide');

      // A budget on show: the core's report, what it was given (for the CSV) and the text.
      const render = ({ report: r, args }, { text }) => {
        last = r;
        lastArgs = args;
        csv.disabled = !r.stages.length;
        for (const [k, , show] of TOTALS) totals[k].textContent = show(r[k]);
        // The reference's budget (its stage figures computed in their own lane).
        const refText = HR.compare.text();
        const ref = refText && budget(refText, 'chain-reference').ok;
        HR.compare.figures(totals, (x) => Object.fromEntries(TOTALS.map(([k, , show]) => [k, show(x[k])])),
          Object.fromEntries(TOTALS.map(([k]) => [k, (x) => [[x[k], { noise_temp_k: 'K', dc_w: 'W' }[k] || 'dB']]])), r, ref);
        // Which block sets the noise and which the distortion: the largest shares.
        const top = (key) => r.stages.reduce((best, s) => (known(s[key]) && s[key] > 0 && (!best || s[key] > best[key]) ? s : best), null);
        const [noisy, distorting] = [top('noise_share'), top('distortion_share')];
        sets.textContent = [noisy ? `Most of the noise comes from ${noisy.name} (${pct(noisy.noise_share)} of the excess noise).` : '',
          distorting ? `Most of the distortion comes from ${distorting.name} (${pct(distorting.distortion_share)} of 1/IIP3).` : 'No block has an intercept given, so the chain has no IIP3 or SFDR.'].join(' ');

        fillRows(after.tbody, r.stages.map((s, i) => [spanText(spanOf(s, i)), s.name, ...CUMULATIVE.map(([k, , show]) => show(s[k]))]));
        after.tbody.querySelectorAll('tr').forEach((tr, i) => { tr.dataset.row = String(i); });

        if (Array.isArray(r.warnings)) {
          warningsCard.hidden = false;
          warnInput.wrap.hidden = false;
          warnings.replaceChildren(...(r.warnings.length
            ? r.warnings.map((w) => el('li', { class: 'warning', 'data-block': w.block === null ? '' : w.block }, w.text))
            : [el('li', { class: 'ok' }, 'No warnings for this chain.')]));
        }
        if (Array.isArray(r.runs)) {
          const wanted = HR.design.get('chain', 'stage_runs');
          runsCard.hidden = !r.runs.length && !wanted;
          const list = JSON.parse(text).chain.blocks;
          const names = (run) => list.slice(run.first, run.last + 1).map((b) => b.name).filter(Boolean);
          const signed = (v) => (known(v) ? `${v > 0 && fixed(v, 2) !== '0.00' ? '+' : ''}${fixed(v, 2)} dB` : '—');
          fillRows(runsTable.tbody, r.runs.flatMap((run) => {
            const label = `Blocks ${run.first + 1}–${run.last + 1}${names(run).length ? ` (${names(run).join(', ')})` : ''}`;
            return [['gain_db', 'Gain'], ['nf_db', 'Noise figure']].map(([k, what]) => [label, what,
              db(run.matched[k]), db(run.circuit[k]), signed(run.circuit[k] - run.matched[k])]);
          }));
          runsTable.node.hidden = !r.runs.length;
          runsNote.textContent = r.runs.length
            ? `The budget above takes ${r.stage_runs === 'one-circuit' ? 'each run as one circuit (its intercept and 1 dB point still those of its stages as matched blocks)' : 'each stage as a matched block'}. Difference: the one circuit less the matched blocks.`
            : 'No two stage blocks sit next to each other, so there is nothing to compare.';
        }

        // Node 0 is the chain's input (the signal and kT0·B); node n is after block n.
        const levels = (x) => [['input', ...x.stages.map((s) => s.name)],
          [x.input_dbm, ...x.stages.map((s) => s.signal_dbm)],
          [x.input_noise_dbm, ...x.stages.map((s) => s.noise_dbm)],
          [null, ...x.stages.map((s) => s.op1db_dbm)],
          [null, ...x.stages.map((s) => s.oip3_dbm)]];
        plot.setData(levels(r), ref && levels(ref));
        plotNote.textContent = 'Node 0 is the chain’s input, where the noise is kT₀B. The compression and intercept levels start at the first block that has them (pads and filters distort nothing); where the signal comes within a few dB of the compression level, that node has little headroom.';
        syncRows();
      };

      // ---- Computing -------------------------------------------------------------
      // An error: beside its field (`at`, HR.bind) and, named by its block, under the table.
      const report = (error, at) => {
        problem.hidden = !error;
        if (!error) { problem.textContent = ''; return; }
        const m = /^chain\.blocks\[(\d+)\]\.(\w+)$/.exec(error.field || '');
        const where = m ? `Block ${Number(m[1]) + 1} (${nameOf(Number(m[1]))})` : null;
        problem.textContent = at ? `${where ? `${where}: ` : ''}${HR.reasonWords(error)}` : HR.words(error);
      };
      const NOTES = {
        stage: 'Computing the stage’s own figures in the background; the budget shown is for the design before the last change.',
        error: 'Showing the last valid budget.',
      };
      const stale = (why, rendered) => {
        const on = Boolean(why) && rendered;
        staleNote.hidden = !on;
        staleNote.textContent = why ? NOTES[why] : '';
        staleNote.dataset.why = why || '';
        for (const node of [readout, after.node, plot.node, warnings, runsTable.node]) node.classList.toggle('stale', on);
      };

      // The stage block's figures for the stage document `key`, in the background.
      // In lane 'chain-stage', or 'chain-reference' for the reference's.
      const startStage = (key, lane = 'chain-stage') => {
        if (Object.values(runs).some((x) => x && x.key === key)) return;
        const handle = HR.background.run('stageBlock', [key], { lane });
        const mine = { key, handle };
        runs[lane] = mine;
        handle.promise.then((r) => {
          if (runs[lane] !== mine) return;
          runs[lane] = null;
          if (r.cancelled) return;
          stageCache.set(key, r.error ? { error: r.error } : { ok: r.ok });
          if (stageCache.size > 16) stageCache.delete(stageCache.keys().next().value);
          follower.again();
        });
      };

      // The budget of the document `text`: {ok, args}, {error}, or {pending: 'stage'}
      // while the stage's own figures compute.
      const budget = (text, lane) => {
        const check = HR.check(text);
        if (check.error) return check;
        const doc = JSON.parse(text);
        const list = doc.chain && Array.isArray(doc.chain.blocks) ? doc.chain.blocks : [];
        let stageJson = '';
        if (list.some((b) => b && b.kind === 'stage')) {
          const key = stageDocOf(doc);
          const got = stageCache.get(key);
          if (!got) { startStage(key, lane); return { pending: 'stage' }; }
          if (got.error) return { error: got.error };
          stageJson = JSON.stringify(got.ok);
        }
        return { ...HR.call('chainReport', text, stageJson), args: [text, stageJson] };
      };

      container.append(el('h1', {}, 'Chain'),
        el('p', { class: 'lede' }, 'The stage inside a cascade: pads, filters, amplifiers you give the figures of, and this design’s own stage. Gain, noise figure, intercept and compression are summed block by block, with the signal and the noise at every node.'),
        el('div', { class: 'cards' }, blocksCard, inputCard, warningsCard, runsCard, totalsCard, plotCard, afterCard));
      build();
      // Its budget follows the design on the main thread (well under a millisecond),
      // pending while the stage block's figures compute: follower.again() when they come.
      const follower = HR.design.follow(container, {
        compute: (text) => {
          const r = budget(text);
          syncRows();
          return r.ok ? { ok: { report: r.ok, args: r.args } } : r;
        },
        render,
        report,
        stale,
      });
      // The reference's budget is drawn beside this one's.
      HR.compare.onChange(() => follower.again());
    },
  });
})();
