'use strict';
// Background runs: long calls into the core made in a Web Worker, so the page keeps
// answering while they compute.
//
// The worker is a classic one, made from a Blob of the wasm-bindgen glue (the
// no-modules text of <script id="hr-glue">) followed by the small loop below, and it is
// handed the module the page already compiled (HR.module), so it fetches nothing: this
// works from file://, inside an iframe and over http, under the page's CSP (worker-src
// blob:). Module workers made from a Blob fail on file://, hence classic.
//
//   HR.background.run(name, args, {lane, onProgress}) → {promise, cancel()}
//
// calls wasm_bindgen[name](...args, progress) in the lane's worker; `progress(fraction)`
// reaches `onProgress`. The promise never rejects: it settles to {ok, ms} (ms: the run's
// wall time), {error: {field, reason, message}} (bad input, or a trap, which is also
// reported in the status line as HR.call does) or {cancelled: true}. Each lane (by
// default the entry's name) has one worker and runs one call at a time: a new run in a
// lane cancels the one before it. Cancelling terminates the lane's worker (the next run
// starts a fresh one), except a run made with `keep` (see submit); `end()` always
// does. Lanes run in parallel, one worker each.
//
//   HR.background.follow(panel, spec)
//
// is HR.design.follow for a long run: see below.

HR.background = (() => {
  // The worker's side, run in the worker's own global scope after the glue (this
  // function is sent as its source text, so it may use nothing from this file).
  const inWorker = () => {
    self.onmessage = ({ data }) => {
      if (data.module) {
        wasm_bindgen.initSync({ module: data.module });
        return;
      }
      const { id, name, args, calls } = data;
      const progress = (fraction) => self.postMessage({ id, progress: fraction });
      try {
        self.postMessage({ id, ok: calls ? calls.map(([n, a]) => wasm_bindgen[n](...a)) : wasm_bindgen[name](...args, progress) });
      } catch (e) {
        if (e && typeof e === 'object' && 'reason' in e) self.postMessage({ id, error: { field: e.field, reason: e.reason, message: e.message, label: e.label } });
        else self.postMessage({ id, trap: String(e && e.message ? e.message : e) });
      }
    };
  };

  let source = null;
  const sourceUrl = () => {
    if (!source) {
      const glue = document.getElementById('hr-glue').textContent;
      source = URL.createObjectURL(new Blob([glue, `\n;(${inWorker})();\n`], { type: 'text/javascript' }));
    }
    return source;
  };

  const lanes = new Map();
  let nextId = 0;

  const stop = (lane) => {
    if (lane.worker) lane.worker.terminate();
    lane.worker = null;
    lane.unanswered.clear();
    lane.waiting = null;
  };

  // How long a run waits behind a superseded kept run still computing in its lane's
  // worker before that worker is ended and the run starts in a fresh one: a kept run
  // is usually done within a frame, so only a runaway is ended (longer than the
  // e2e tests' one-second kept run, which must finish).
  const GRACE_MS = 2500;

  // The lane's worker, started (and handed the module) when it has none.
  const workerOf = (lane) => {
    if (lane.worker) return lane.worker;
    const worker = new Worker(sourceUrl(), { name: `halfrail-${lane.key}` });
    worker.onmessage = ({ data }) => {
      if (!('progress' in data)) {
        lane.unanswered.delete(data.id);
        // The superseded run is done: the run waiting behind it goes in.
        if (lane.unanswered.size === 0 && lane.waiting) lane.waiting();
      }
      const job = lane.job;
      if (!job || data.id !== job.id) return;
      if ('progress' in data) job.onProgress(data.progress);
      else job.finish(data);
    };
    // The worker itself failed (it could not start, or the module would not load).
    worker.onerror = (e) => {
      e.preventDefault();
      // A run waiting behind a superseded one was not posted here: it starts afresh.
      const waiting = lane.waiting;
      if (lane.job && !waiting) lane.job.finish({ trap: e.message || 'the background worker stopped' });
      stop(lane);
      if (waiting) waiting();
    };
    worker.postMessage({ module: HR.module });
    lane.worker = worker;
    HR.background.started += 1;
    HR.background.startedIn[lane.key] = (HR.background.startedIn[lane.key] || 0) + 1;
    return worker;
  };

  // A run on the main thread, answered as a worker's run is (HR.call turns errors and
  // traps into answers): `here`, for a design whose calls the core says are quick.
  // Nothing can cancel it, as it is over before anything could.
  const runHere = (message) => {
    const begun = performance.now();
    const list = message.calls || [[message.name, message.args]];
    const ok = [];
    for (const [name, args] of list) {
      const r = HR.call(name, ...args);
      if (r.error) return settled({ error: r.error });
      ok.push(r.ok);
    }
    return settled({ ok: message.calls ? ok : ok[0], ms: performance.now() - begun });
  };
  const settled = (answer) => ({ promise: Promise.resolve(answer), cancel() {}, end() {} });

  // Whether a design's small-signal figures may be computed here: the core's check
  // says the document is quick (a bound on the work its calls do, not a timing of
  // earlier ones), and no test holds the workers (`halfrailWorkersOnly`, set by the
  // e2e helper that makes worker runs spin, keeps every run in a worker).
  const quick = (text) => {
    const r = HR.check(text);
    return Boolean(r.ok && r.ok.quick) && !self.halfrailWorkersOnly;
  };

  const trapped = (what) => {
    const message = `The calculation engine failed in the background (${what}). Your inputs are kept; the next run starts afresh.`;
    HR.setStatus(message, true);
    return { error: { field: '', reason: message, message } };
  };

  // What the lane's worker is posted: one entry and its arguments, or (`calls`) several
  // entries one after another, answered together as a list.
  const run = (name, args, options) => submit({ name, args }, name, options);
  const calls = (list, options) => submit({ calls: list }, list[0][0], options);

  // `keep`: a new run supersedes the lane's running one without ending its worker,
  // which finishes the old call (its answer is dropped) and then takes the new one —
  // for a lane that runs after every edit and is usually done within a frame, where
  // starting a worker per edit would cost more than the call. It is the job's own:
  // a later run of the lane, kept or not, does not change how an earlier one ends.
  // A kept run's worker is ended all the same when the run that supersedes it has
  // waited GRACE_MS behind it (a runaway), and by `end()` (the user's Cancel).
  // `here`: computed on the main thread at once (runHere), no worker involved.
  const submit = (message, entry, { lane: key = entry, onProgress = () => {}, keep = false, here = false } = {}) => {
    if (here) return runHere(message);
    if (!lanes.has(key)) lanes.set(key, { key, worker: null, job: null, unanswered: new Set(), waiting: null });
    const lane = lanes.get(key);
    if (lane.job) lane.job.cancel();
    let settle;
    const promise = new Promise((resolve) => { settle = resolve; });
    const begun = performance.now();
    const job = {
      id: ++nextId,
      onProgress,
      finish(data) {
        if (lane.job !== job) return;
        lane.job = null;
        if ('ok' in data) settle({ ok: data.ok, ms: performance.now() - begun });
        else if (data.error) settle({ error: data.error });
        else { stop(lane); settle(trapped(data.trap)); }
      },
      cancel(end = false) {
        if (lane.job !== job) return;
        lane.job = null;
        if (end || !keep) stop(lane);
        settle({ cancelled: true });
      },
    };
    lane.job = job;
    const post = () => {
      lane.waiting = null;
      if (lane.job !== job) return;
      try {
        workerOf(lane).postMessage({ id: job.id, ...message });
        lane.unanswered.add(job.id);
      } catch (e) {
        job.finish({ trap: `no background worker: ${e && e.message ? e.message : e}` });
      }
    };
    if (lane.worker && lane.unanswered.size > 0) {
      // Behind a superseded kept run still computing: posted when it answers (only
      // the latest run waits, so a drag leaves no queue of stale calls), or after
      // GRACE_MS in a fresh worker.
      lane.waiting = post;
      setTimeout(() => { if (lane.waiting === post) { stop(lane); post(); } }, GRACE_MS);
    } else {
      post();
    }
    return { promise, cancel: () => job.cancel(), end: () => job.cancel(true) };
  };

  // Keeps a panel's figures in step with the design, like HR.design.follow, with the
  // core's calls made in a worker. A run starts `delay` ms after the last edit (0: at
  // the end of the burst of edits, as HR.design.follow), and only while the panel is
  // shown; an edit made while it is hidden is remembered and computed when it is next
  // shown. An edit during a run cancels it (its result would be out of date). The
  // draft is checked first (checkDocument, well under a millisecond), so a bad value
  // is reported at once, without a run. The last result stays on show, marked stale,
  // while a new one computes, after an error and after a cancel.
  //   spec: {name, args(text) → [...], lane, keep, delay, quiet, when(),
  //          render(result, {ms, text}), report(error | null, field),
  //          stale(why | null, rendered), progress(fraction | null)}
  //   or, for a run of several calls (in several lanes), `job(text, onProgress)` in
  //   place of name and args, returning what run() returns: {promise, cancel()}.
  //   `keep`: an edit supersedes a run without ending its worker (submit's `keep`).
  //   `quiet`: ms a run may take before it is shown as running (stale 'running',
  //   progress(0)); a panel whose runs are usually over within a frame sets it, so
  //   that an ordinary edit redraws without a flash of the stale marker.
  //   `when()`: false holds edits back (a value being typed in place); the next
  //   edit made while it is true computes.
  //   `field`: the bound input the error went beside, or null (HR.design.watch).
  //   `why`: 'running', 'error', 'cancelled' or 'due' (changed while hidden or held).
  // Returns {start() (run now), cancel()}. `panel.dataset.computed` counts results, and
  // `panel.dataset.follow` says what the panel waits for, so a test can wait for a state
  // rather than a time: 'waiting' (an edit, before its run), 'running', 'due' (changed
  // while hidden), 'held' (cancelled), or 'settled' (the last result or error is final:
  // nothing more will land until the next edit).
  const follow = (panel, spec) => {
    const { name, args, lane = name, keep = false, delay = 300, quiet = 0, when = () => true, render, stale, progress,
      job: begin = (text, onProgress) => run(name, args(text), { lane, onProgress, keep }) } = spec;
    const seen = HR.design.watch(panel, spec.report);
    const { report } = seen;
    let shownText = null;   // the design text of the result on show
    let job = null;
    let timer = null;
    let held = false;       // cancelled by the user: wait for an edit or start()
    let showing = null;     // the timer that shows a quiet run as running
    let missed = false;     // changed while hidden (see changed())
    const visible = seen.shown;
    const mark = (state) => { panel.dataset.follow = state; };

    const finish = (text, r) => {
      mark('settled');
      if (r.error) {
        report(r.error);
        // Nothing on show yet: show the last design the core accepted, marked stale.
        const good = seen.fallback(text, shownText !== null);
        if (good) { launch(good, true); return; }
        stale('error', shownText !== null);
        return;
      }
      shownText = text;
      if (text === HR.design.text()) {
        HR.design.accept(text);
        report(null);
        stale(null, true);
      } else {
        stale('error', true);
      }
      render(r.ok, { ms: r.ms, text });
      seen.counted();
    };

    const launch = (text, fallback = false) => {
      const mine = begin(text, (p) => progress(p));
      job = mine;
      mark('running');
      const running = () => {
        showing = null;
        progress(0);
        if (!fallback) stale('running', shownText !== null);
      };
      clearTimeout(showing);
      if (quiet > 0) showing = setTimeout(running, quiet);
      else running();
      mine.promise.then((r) => {
        if (job !== mine) return;
        job = null;
        clearTimeout(showing);
        showing = null;
        progress(null);
        if (!r.cancelled) finish(text, r);
      });
    };

    const start = () => {
      missed = false;
      clearTimeout(timer);
      timer = null;
      held = false;
      const text = HR.design.text();
      const check = HR.check(text);
      if (check.error) {
        if (job) cancelJob();
        finish(text, check);
        return;
      }
      launch(text);
    };

    // `end`: the user's Cancel, which ends the run's worker even in a lane that keeps it.
    const cancelJob = (end = false) => {
      const mine = job;
      job = null;
      clearTimeout(showing);
      showing = null;
      if (mine) (end && mine.end ? mine.end() : mine.cancel());
      progress(null);
    };

    // After an edit, an undo or a redo.
    const changed = () => {
      if (!when()) return;
      // An immediate panel (delay 0) computes again when shown after any change made
      // while it was hidden, as HR.design.follow does, even one undone since.
      if (delay === 0 && !visible()) missed = true;
      if (job) cancelJob();
      clearTimeout(timer);
      timer = null;
      held = false;
      if (HR.design.text() === shownText) {
        mark('settled');
        report(null);
        stale(null, true);
        return;
      }
      if (!visible()) { stale('due', shownText !== null); mark('due'); return; }
      // A quiet panel says nothing until its run has gone on for `quiet` ms.
      if (!quiet) stale('due', shownText !== null);
      mark('waiting');
      if (delay === 0) {
        // At the end of this burst of edits, as HR.design.follow computes.
        timer = true;
        queueMicrotask(() => {
          if (timer !== true) return;
          timer = null;
          if (visible()) start(); else mark('due');
        });
        return;
      }
      // Hidden before the delay ran out: the run waits until the panel is shown.
      timer = setTimeout(() => { timer = null; if (visible()) start(); else mark('due'); }, delay);
    };

    HR.design.onChange(changed);
    // Shown again: compute what changed while it was hidden.
    seen.onShown(() => {
      if (!job && !timer && !held && (missed || HR.design.text() !== shownText)) start();
    });
    start();
    return {
      start,
      cancel() {
        if (!job) return;
        cancelJob(true);
        held = true;
        mark('held');
        stale('cancelled', shownText !== null);
      },
    };
  };

  // What a panel that follows the design in the background says over a result
  // that is not for the design as it is now, by why (follow()'s `stale` reason).
  const staleNotes = {
    running: 'Computing for the design as it is now; the figures shown are for the design before the last change.',
    due: 'The design has changed; these figures are for the design before the change.',
    error: 'Showing the last valid result.',
    cancelled: 'Run cancelled: these figures are for an earlier design. Press Compute now to bring them up to date.',
  };

  // follow()'s `stale` callback for a panel that shows `note` over a result that is
  // not for the design as it is now and dims `nodes` while it says so.
  const staleMarker = (note, nodes) => (why, rendered) => {
    note.hidden = !(why && rendered);
    note.textContent = why ? staleNotes[why] : '';
    note.dataset.why = why || '';
    for (const node of nodes) node.classList.toggle('stale', Boolean(why) && rendered);
  };

  // The box a panel that follows the design with a `quiet` time shows once a run has
  // gone on past it: a progress bar (indeterminate: the small-signal entries report no
  // progress), what it is doing, and Cancel; after a cancel, Compute now brings the
  // figures up to date. `what` names the run for the bar's label.
  //   const box = runBox('loop analysis');
  //   box.attach(follow(panel, {..., progress: box.progress, stale: box.stale(marker)}));
  const runBox = (what) => {
    const { el } = HR.ui;
    let follower = null;
    const bar = el('progress', { max: 1, 'aria-label': `Progress of the ${what}` });
    const text = el('span', { class: 'run-text', 'aria-live': 'polite' }, `Computing the ${what} in the background…`);
    const cancel = el('button', { type: 'button', class: 'cancel', onclick: () => follower && follower.cancel() }, 'Cancel');
    const now = el('button', { type: 'button', hidden: true, onclick: () => follower && follower.start() }, 'Compute now');
    const node = el('div', { class: 'run-wrap' }, el('div', { class: 'run', hidden: true }, bar, text, cancel), now);
    return {
      node,
      attach(f) { follower = f; },
      progress(p) {
        node.firstChild.hidden = p === null;
        if (p > 0) bar.value = p;
        else bar.removeAttribute('value');
      },
      stale: (inner) => (why, rendered) => {
        now.hidden = why !== 'cancelled';
        inner(why, rendered);
      },
    };
  };

  // Why a panel's figures of the design come from a worker, even the few-ms ones: a
  // call on the main thread cannot be interrupted, so no timing of earlier calls can
  // keep the first slow one (one edit can take the loop helper from 2 ms to a second)
  // or a runaway from freezing the page. The price is a hop to the worker and back,
  // 1–3 ms on the demo. Only where the core bounds a call's work a priori (`quick`)
  // may a panel compute here instead. QUIET is how long a run may take before it is
  // shown as running: ordinary designs answer well within it, so an edit redraws
  // with no flash of the stale marker.
  const QUIET = 120;

  // `started`: workers started so far, and `startedIn` by lane (the tests count them).
  return { run, calls, quick, follow, staleNotes, staleMarker, runBox, QUIET, started: 0, startedIn: {} };
})();
