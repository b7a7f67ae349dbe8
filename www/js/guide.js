'use strict';
// First use: a short "start here" path over the demo — the part, the target, the
// design, then the loop and the swing — each step linking to the panel that holds it.
// It shows until it is closed, and being closed is remembered (HR.store: where storage
// is refused it only shows again on the next visit). "Start here" at the foot of the
// page brings it back. It sits in the page's flow above the panels, so it covers no
// control; an embedded page does not show it by itself.

HR.guide = (() => {
  const { el } = HR.ui;
  const KEY = 'guide'; // {closed, step} in HR.store

  // The control a step's link leads to, within its panel (found by its words, as a
  // person would): the target gain's field and the Design button.
  const labelled = (words) => (panel) => {
    const label = [...panel.querySelectorAll('label')].find((l) => l.textContent.trim() === words());
    return label ? label.control : null;
  };
  const button = (words) => (panel) => [...panel.querySelectorAll('button')].find((b) => b.textContent.trim() === words) || null;

  // Each step: its name in the list of steps, what it says, and its links
  // [panel, link text, the control to focus there (or none)].
  const STEPS = [
    { name: 'Part',
      text: 'The page opens on the demo: an inverter run as an amplifier at 10.7 MHz (Load the demo, in the Design bar, brings it back). Start with the part: its model and supply, where it biases itself, and how much gain it has there.',
      links: [['part', 'Open the Part panel']] },
    { name: 'Target',
      text: 'Say what the stage must do. Under Design to a target, on the Stage panel: the gain you want at the design frequency, how far it may stray, and the resistor series to choose from.',
      links: [['stage', 'Go to the target gain', labelled(() => HR.field('target', 'gain_db').label)]] },
    { name: 'Design',
      text: 'Press Design: it lists standard resistor pairs that give the target with this part’s real, finite gain, best first. Use puts a pair into the schematic as one step that Undo takes back.',
      links: [['stage', 'Go to the Design button', button('Design')]] },
    { name: 'Loop and swing',
      text: 'Then check what you built. Loop says whether the feedback loop is stable and with what margin; Swing drives the stage with a tone at the input level and shows its distortion and where it compresses.',
      links: [['loop', 'Open the Loop panel'], ['swing', 'Open the Swing panel']] },
  ];

  let box = null;
  let step = 0;
  const saved = () => HR.store.get(KEY, {});
  const remember = (closed) => HR.store.set(KEY, { closed, step });

  // Shows panel `id` (the address follows, so Back returns) and gives the focus to the
  // control `find` picks in it, if any.
  const go = (id, find) => {
    HR.goTo(id);
    const target = find && find(document.getElementById(`panel-${id}`));
    if (target) {
      target.focus({ preventScroll: true });
      target.scrollIntoView({ block: 'center' });
    }
  };

  const render = () => {
    const s = STEPS[step];
    const last = step === STEPS.length - 1;
    box.replaceChildren(
      el('div', { class: 'guide-top' },
        el('p', { class: 'guide-head', id: 'guide-head' }, el('strong', {}, 'Start here'), ' ',
          el('span', { class: 'guide-count' }, `step ${step + 1} of ${STEPS.length}`)),
        el('ol', { class: 'guide-steps', 'aria-label': 'Steps' }, STEPS.map((x, i) => el('li', { 'aria-current': i === step ? 'step' : null }, x.name))),
        el('button', { type: 'button', class: 'small guide-close', 'aria-label': 'Close the guide', onclick: close }, 'Close')),
      el('p', { class: 'guide-text' }, s.text),
      el('div', { class: 'guide-nav' },
        s.links.map(([id, words, find]) => el('a', { href: `#${id}${HR.documents.tail}`, 'data-panel': id,
          onclick: (e) => { e.preventDefault(); go(id, find); } }, words)),
        el('span', { class: 'guide-moves' },
          el('button', { type: 'button', class: 'small', disabled: step === 0, onclick: () => move(-1) }, 'Back'),
          el('button', { type: 'button', class: 'small next', onclick: () => (last ? close() : move(1)) }, last ? 'Done' : 'Next'))));
    box.dataset.step = String(step + 1);
  };

  // The next or previous step, and its panel on show; the focus stays on the button
  // pressed (on Next when Back reaches the first step).
  const move = (by) => {
    step = Math.max(0, Math.min(STEPS.length - 1, step + by));
    remember(false);
    render();
    HR.goTo(STEPS[step].links[0][0]);
    const [back, next] = box.querySelectorAll('.guide-moves button');
    (by < 0 && !back.disabled ? back : next).focus();
  };

  const close = () => {
    const inside = box.contains(document.activeElement);
    box.hidden = true;
    remember(true);
    if (inside) document.getElementById('main').focus({ preventScroll: true });
  };

  // Opens it again at the first step, on show and with the focus.
  const open = () => {
    step = 0;
    remember(false);
    render();
    box.hidden = false;
    box.scrollIntoView({ block: 'nearest' });
    box.focus({ preventScroll: true });
  };

  return {
    // Puts the guide above the panels (after HR.health.start, so above its line too),
    // shown unless it was closed or the page is embedded; and "Start here" in the foot.
    start() {
      const was = saved();
      step = Number.isInteger(was.step) && was.step >= 0 && was.step < STEPS.length ? was.step : 0;
      box = el('aside', { class: 'guide', id: 'guide', 'aria-labelledby': 'guide-head', tabindex: '-1' });
      box.hidden = Boolean(was.closed) || document.documentElement.classList.contains('embed');
      render();
      document.getElementById('main').prepend(box);
      const foot = document.querySelector('.cautions .build');
      if (foot) foot.append(' · ', el('button', { type: 'button', class: 'small guide-open', onclick: open }, 'Start here: a short guide'));
    },
    open,
  };
})();
