'use strict';
// The app shell: the rail of panels, routing by the URL fragment (`#bench`), and
// start-up. Panels mount once, on first visit, and keep their state after.

(() => {
  const { el } = HR.ui;
  const ORDER = ['brief', 'part', 'stage', 'response', 'loop', 'swing', 'spread', 'chain', 'crystal', 'bench'];
  const DEFAULT_PANEL = 'part';
  const mounted = new Map();

  const panelById = (id) => HR.panels.find((p) => p.id === id);
  const requested = () => {
    const id = decodeURIComponent(location.hash.slice(1)).split('&')[0];
    return panelById(id) ? id : null;
  };

  const show = (id, { focus = false } = {}) => {
    const main = document.getElementById('main');
    for (const [pid, node] of mounted) {
      const was = node.hidden;
      node.hidden = pid !== id;
      // A panel shown again computes what changed while it was hidden.
      if (was && !node.hidden) node.dispatchEvent(new CustomEvent('hr-shown'));
    }
    if (!mounted.has(id)) {
      const node = el('div', { class: 'panel', id: `panel-${id}`, 'data-panel': id });
      main.append(node);
      mounted.set(id, node);
      panelById(id).mount(node);
      HR.ui.scrollCues(node);
    }
    for (const a of document.querySelectorAll('#rail a')) {
      if (a.dataset.panel === id) a.setAttribute('aria-current', 'page');
      else a.removeAttribute('aria-current');
    }
    // The health line's link to the panel on show is hidden (panels.css): it would lead nowhere.
    main.dataset.shown = id;
    document.title = `${panelById(id).title} — Halfrail`;
    HR.store.set('ui', { panel: id });
    if (focus) main.focus({ preventScroll: true });
  };

  // Shows panel `id` and gives the focus to its element `selector` (a message on one
  // panel that sends the user to a field on another); the address follows, so Back
  // returns.
  HR.goTo = (id, selector) => {
    if (!panelById(id)) return;
    history.pushState(null, '', `#${id}${HR.documents.tail}`);
    show(id);
    const target = selector && document.querySelector(`#panel-${id} ${selector}`);
    if (target) {
      target.focus({ preventScroll: true });
      target.scrollIntoView({ block: 'center' });
    }
  };

  const buildRail = () => {
    const rail = document.getElementById('rail');
    rail.replaceChildren(el('ul', {}, ORDER.map((id) => {
      const p = panelById(id);
      return el('li', {}, el('a', { href: `#${id}${HR.documents.tail}`, 'data-panel': id, class: p.planned ? 'planned' : null },
        p.title, p.planned ? el('span', { class: 'soon' }, ' · soon') : null));
    })));
  };

  const boot = async () => {
    buildRail();
    try {
      await HR.start();
    } catch (e) {
      HR.setStatus(`The calculation engine could not start in this browser (${e.message || e}).`, true);
      return;
    }
    HR.setStatus(`Engine ready · v${HR.version}`);
    await HR.documents.start();
    HR.health.start();
    HR.guide.start();
    const saved = HR.store.get('ui', {});
    const first = requested() || (panelById(saved.panel) ? saved.panel : DEFAULT_PANEL);
    show(first);
    performance.mark('hr-first-result');
    document.documentElement.dataset.ready = 'true';
    window.addEventListener('hashchange', () => { const id = requested(); if (id) show(id, { focus: true }); });
  };

  boot();
})();
