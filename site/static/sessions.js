// The Sessions panel: save (name and note; with the analysis the Tracks panel shows), list newest
// first with a search, open, rename, duplicate, delete with undo, compare two side by side, export
// all or one, import a file.

import { sizebudget } from './api.js';
import { el } from './results.js';
import { fields, fmt } from './fields.js';

const $ = (id) => document.getElementById(id);

function when(iso) {
  const d = new Date(iso);
  return Number.isNaN(d.getTime()) ? iso : d.toLocaleString(undefined, { dateStyle: 'medium', timeStyle: 'short' });
}

function fileName(base) {
  const day = new Date().toISOString().slice(0, 10);
  const safe = base.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '').slice(0, 40) || 'session';
  return `sizebudget-${safe}-${day}.json`;
}

export function download(text, name) {
  const url = URL.createObjectURL(new Blob([text], { type: 'application/json' }));
  const a = el('a', { href: url, download: name });
  document.body.append(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10000);
}

// initSessions wires the panel. app supplies:
//   scenarioText() → {text} or {error}; open(session) fills the form (and the Tracks panel);
//   analysis() → the analysis shown in the Tracks panel (kept with a saved session) or null;
//   toast(text, action, fn);
//   openId() / setOpen(session|null): the session the form came from.
export function initSessions(app) {
  const list = $('session-list');
  const message = $('sessions-message');
  const picked = new Set();
  let searchTimer = 0;

  const say = (text, kind = '') => {
    message.textContent = text;
    message.className = `message ${kind}`.trim();
  };

  async function refresh() {
    let items;
    try {
      items = await sizebudget.sessions.list($('search').value);
    } catch (e) {
      say(e.message, 'bad');
      return;
    }
    for (const id of [...picked]) if (!items.some((s) => s.id === id)) picked.delete(id);
    list.replaceChildren(...items.map(item));
    if (!items.length) {
      list.append(el('li', { class: 'hint' }, $('search').value ? 'No session matches.' : 'No saved sessions yet.'));
    }
    $('compare').disabled = picked.size !== 2;
    const all = $('search').value ? null : items.length;
    app.count(all);
  }

  function item(s) {
    const li = el('li', { class: `session${s.id === app.openId() ? ' open' : ''}`, 'data-id': s.id });
    const box = el('input', { type: 'checkbox', id: `pick-${s.id}`, 'aria-label': `Pick “${s.name}” to compare` });
    box.checked = picked.has(s.id);
    box.addEventListener('change', () => {
      if (box.checked) picked.add(s.id);
      else picked.delete(s.id);
      $('compare').disabled = picked.size !== 2;
    });
    const button = (label, fn, cls = 'secondary', extra = {}) => {
      const b = el('button', { type: 'button', class: cls, ...extra }, label);
      b.addEventListener('click', fn);
      return b;
    };
    const actions = el('div', { class: 'actions' },
      button('Open', () => open(s.id), 'primary', { 'aria-label': `Open “${s.name}”` }),
      button('Rename', () => rename(li, s), 'secondary', { 'aria-label': `Rename “${s.name}”` }),
      button('Duplicate', () => duplicate(s.id), 'secondary', { 'aria-label': `Duplicate “${s.name}”` }),
      button('Export', () => exportOne(s), 'secondary', { 'aria-label': `Export “${s.name}”` }),
      button('Delete', () => remove(s.id), 'danger', { 'aria-label': `Delete “${s.name}”` }),
    );
    li.append(...[
      el('div', { class: 'top' },
        el('label', { class: 'pick', for: `pick-${s.id}` }, box),
        el('div', {},
          el('div', { class: 'name' }, s.name),
          el('div', { class: 'meta' }, `changed ${when(s.modified)}${s.created !== s.modified ? ` · created ${when(s.created)}` : ''}`),
          s.analysis_file ? el('div', { class: 'meta' }, `with the analysis of ${s.analysis_file}`) : null)),
      s.note ? el('p', { class: 'note' }, s.note) : null,
      actions,
    ].filter(Boolean));
    return li;
  }

  async function open(id) {
    try {
      const s = await sizebudget.sessions.get(id);
      app.open(s);
      say(`Opened “${s.name}”.`, 'good');
      refresh();
    } catch (e) {
      say(e.message, 'bad');
    }
  }

  function rename(li, s) {
    const name = el('input', { type: 'text', id: `rn-${s.id}`, maxlength: 200 });
    name.value = s.name;
    const note = el('textarea', { id: `rt-${s.id}`, rows: 2, maxlength: 4000 });
    note.value = s.note || '';
    const form = el('form', { class: 'rename', novalidate: true },
      el('div', { class: 'field' }, el('label', { for: `rn-${s.id}` }, 'New name'), name),
      el('div', { class: 'field' }, el('label', { for: `rt-${s.id}` }, 'Note'), note),
      el('div', { class: 'button-row' },
        el('button', { type: 'submit', class: 'primary' }, 'Save name'),
        el('button', { type: 'button', class: 'secondary', 'data-cancel': '' }, 'Cancel')));
    form.addEventListener('submit', async (e) => {
      e.preventDefault();
      try {
        const r = await sizebudget.sessions.rename(s.id, name.value, note.value);
        say(`Renamed to “${r.name}”.`, 'good');
        if (app.openId() === s.id) app.setOpen(r);
        refresh();
      } catch (err) {
        say(err.message, 'bad');
      }
    });
    form.querySelector('[data-cancel]').addEventListener('click', () => refresh());
    li.querySelector('.actions').replaceWith(form);
    name.focus();
  }

  async function duplicate(id) {
    try {
      const newId = await sizebudget.sessions.duplicate(id);
      const s = await sizebudget.sessions.get(newId);
      say(`Saved a copy: “${s.name}”.`, 'good');
      refresh();
    } catch (e) {
      say(e.message, 'bad');
    }
  }

  async function remove(id) {
    try {
      const gone = await sizebudget.sessions.remove(id);
      if (app.openId() === id) app.setOpen(null);
      say('');
      await refresh();
      app.toast(`Deleted “${gone.name}”.`, 'Undo', async () => {
        try {
          await sizebudget.sessions.restore(gone);
          say(`Restored “${gone.name}”.`, 'good');
          refresh();
        } catch (e) {
          say(e.message, 'bad');
        }
      });
    } catch (e) {
      say(e.message, 'bad');
    }
  }

  async function exportOne(s) {
    try {
      download(await sizebudget.exportOne(s.id), fileName(s.name));
      say(`Exported “${s.name}”.`, 'good');
    } catch (e) {
      say(e.message, 'bad');
    }
  }

  $('export-all').addEventListener('click', async () => {
    try {
      const text = await sizebudget.exportAll();
      const n = JSON.parse(text).sessions.length;
      download(text, fileName('sessions'));
      say(`Exported ${n} session${n === 1 ? '' : 's'}.`, 'good');
    } catch (e) {
      say(e.message, 'bad');
    }
  });

  $('import-file').addEventListener('change', async (e) => {
    const file = e.target.files && e.target.files[0];
    e.target.value = '';
    if (!file) return;
    try {
      const rep = await sizebudget.importAll(await file.text());
      const parts = [`Imported ${rep.added} session${rep.added === 1 ? '' : 's'} from ${file.name}`];
      if (rep.unchanged) parts.push(`${rep.unchanged} already here`);
      if (rep.renamed && rep.renamed.length) parts.push(`${rep.renamed.length} under a new id`);
      say(`${parts.join('; ')}.`, 'good');
      refresh();
    } catch (err) {
      say(`Nothing was imported. ${err.message}`, 'bad');
    }
  });

  $('search').addEventListener('input', () => {
    clearTimeout(searchTimer);
    searchTimer = setTimeout(refresh, 150);
  });

  $('save-form').addEventListener('submit', async (e) => {
    e.preventDefault();
    const st = app.scenarioText();
    if (st.error) {
      say(`Fix the settings first: ${st.error.message}`, 'bad');
      return;
    }
    try {
      const id = await sizebudget.sessions.save(st.text, $('save-name').value, $('save-note').value, app.analysis());
      const s = await sizebudget.sessions.get(id);
      app.setOpen(s);
      $('save-name').value = '';
      $('save-note').value = '';
      say(`Saved “${s.name}”${s.analysis ? ` with the analysis of ${s.analysis.file.name}` : ''}.`, 'good');
      refresh();
    } catch (err) {
      say(`Not saved: ${err.message}`, 'bad');
    }
  });

  $('save-update').addEventListener('click', async () => {
    const id = app.openId();
    const st = app.scenarioText();
    if (!id) return;
    if (st.error) {
      say(`Fix the settings first: ${st.error.message}`, 'bad');
      return;
    }
    try {
      const s = await sizebudget.sessions.update(id, st.text, app.analysis());
      app.setOpen(s);
      say(`Updated “${s.name}”${s.analysis ? ` with the analysis of ${s.analysis.file.name}` : ''}.`, 'good');
      refresh();
    } catch (err) {
      say(`Not updated: ${err.message}`, 'bad');
    }
  });

  $('compare').addEventListener('click', () => compare([...picked]));

  async function compare(ids) {
    const box = $('comparison');
    let a;
    let b;
    try {
      [a, b] = await Promise.all(ids.map((id) => sizebudget.sessions.get(id)));
    } catch (e) {
      say(e.message, 'bad');
      return;
    }
    const value = (s, key) => {
      const v = s.scenario[key];
      return v === undefined || v === null || v === '' ? '—' : String(v);
    };
    const rows = fields.filter((f) => !f.local).map((f) => {
      const va = value(a, f.key);
      const vb = value(b, f.key);
      if (va === '—' && vb === '—') return null;
      return el('tr', { class: va !== vb ? 'differs' : null },
        el('th', { scope: 'row' }, f.label, f.unit ? ` (${f.unit})` : ''), el('td', {}, va), el('td', {}, vb));
    });
    const resultRow = el('tbody', {});
    const runBoth = el('button', { type: 'button', class: 'secondary' }, 'Compute both');
    runBoth.addEventListener('click', async () => {
      runBoth.disabled = true;
      resultRow.replaceChildren(el('tr', {}, el('td', { colspan: 3 }, 'Computing…')));
      try {
        const ra = await sizebudget.plan(a.scenario);
        const rb = await sizebudget.plan(b.scenario);
        const line = (label, f) => el('tr', {}, el('th', { scope: 'row' }, label), el('td', {}, f(ra)), el('td', {}, f(rb)));
        resultRow.replaceChildren(
          line('U/r', (r) => `${fmt(100 * r.relative_expanded_uncertainty)} %`),
          line('Coverage interval', (r) => `${fmt(r.interval_nm[0], 4)} – ${fmt(r.interval_nm[1], 4)} nm`),
          line('Frames needed', (r) => (r.recommended_min_frames === null ? 'unreachable' : String(r.recommended_min_frames))),
          line('Largest source', (r) => r.dominant_source || '—'));
      } catch (e) {
        resultRow.replaceChildren(el('tr', {}, el('td', { colspan: 3 }, e.message)));
      } finally {
        runBoth.disabled = false;
      }
    });
    box.replaceChildren(
      el('h3', {}, 'Side by side'),
      el('p', { class: 'hint' }, 'Highlighted rows differ.'),
      el('div', { class: 'table-wrap' }, el('table', {},
        el('thead', {}, el('tr', {}, el('th', {}, 'Setting'), el('th', {}, a.name), el('th', {}, b.name))),
        el('tbody', {}, rows), resultRow)),
      el('div', { class: 'button-row' }, runBoth));
    box.hidden = false;
    box.scrollIntoView({ block: 'nearest' });
  }

  return { refresh };
}
