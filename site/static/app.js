// The page: builds the settings form from fields.js, validates as you type with the engine's own
// messages, autosaves the draft, runs plans and checks in the workers, and wires the tabs and the
// Tracks panel (analysis.js).

import { sizebudget } from './api.js';
import { groups, fields, byKey, aliases, scenarioText, stateFromScenario, fmt } from './fields.js';
import { el, renderPlan, renderCheck } from './results.js';
import { initSessions } from './sessions.js';
import { initAnalysis } from './analysis.js';

const $ = (id) => document.getElementById(id);
const DRAFT_FORMAT = 'sizebudget/draft/1';

let state = {};
let openSession = null; // {id, name} of the session the form came from
let sessions = null;
let restoring = false;
let readyText = ''; // the status once the engine is ready
let analysis = null; // the Tracks panel

// ---- status and toast ---------------------------------------------------------------------------

function status(text, kind = '') {
  const s = $('status');
  s.textContent = text;
  s.className = `status ${kind}`.trim();
}

let toastTimer = 0;
function toast(text, action, fn) {
  const t = $('toast');
  $('toast-text').textContent = text;
  const b = $('toast-action');
  b.hidden = !action;
  b.textContent = action || '';
  b.onclick = () => {
    t.hidden = true;
    if (fn) fn();
  };
  const back = document.activeElement;
  t.hidden = false;
  // The control that caused the toast may be gone (a deleted session): offer the action to the keyboard.
  if (action && (!back || back === document.body || !back.isConnected)) b.focus();
  clearTimeout(toastTimer);
  toastTimer = setTimeout(() => {
    t.hidden = true;
  }, 10000);
}

// ---- tabs -----------------------------------------------------------------------------------------

const wide = window.matchMedia('(min-width: 960px)');
const tabs = () => [...document.querySelectorAll('[role="tab"]')].filter((t) => getComputedStyle(t).display !== 'none');

function selectTab(id, focus = false) {
  if (wide.matches && id === 'tab-settings') id = 'tab-results';
  for (const t of document.querySelectorAll('[role="tab"]')) {
    const on = t.id === id;
    t.setAttribute('aria-selected', String(on));
    t.tabIndex = on ? 0 : -1;
    $(t.getAttribute('aria-controls')).hidden = !on;
    if (on && focus) t.focus();
  }
}

function initTabs() {
  for (const t of document.querySelectorAll('[role="tab"]')) {
    t.addEventListener('click', () => selectTab(t.id));
    t.addEventListener('keydown', (e) => {
      const list = tabs();
      const i = list.indexOf(t);
      let j = -1;
      if (e.key === 'ArrowRight') j = (i + 1) % list.length;
      else if (e.key === 'ArrowLeft') j = (i - 1 + list.length) % list.length;
      else if (e.key === 'Home') j = 0;
      else if (e.key === 'End') j = list.length - 1;
      if (j >= 0) {
        e.preventDefault();
        selectTab(list[j].id, true);
      }
    });
  }
  wide.addEventListener('change', () => {
    const sel = document.querySelector('[role="tab"][aria-selected="true"]');
    selectTab(sel ? sel.id : 'tab-results');
  });
  selectTab(wide.matches ? 'tab-results' : 'tab-settings');
}

// ---- the form -------------------------------------------------------------------------------------

function control(f) {
  const id = `f-${f.key}`;
  const help = el('p', { class: 'help', id: `h-${f.key}` }, f.help);
  const error = el('p', { class: 'error', id: `e-${f.key}`, hidden: true });
  const readout = f.readout ? el('p', { class: 'readout', id: `r-${f.key}`, 'aria-live': 'polite' }) : null;
  const described = [`h-${f.key}`, `e-${f.key}`, readout ? `r-${f.key}` : ''].filter(Boolean).join(' ');
  let input;
  if (f.kind === 'check') {
    input = el('input', { type: 'checkbox', id, name: f.key, 'aria-describedby': described });
    return el('div', { class: 'field', 'data-key': f.key },
      el('label', { class: 'check', for: id }, input, f.label, el('code', { class: 'key', 'aria-hidden': 'true' }, f.key)), help, error);
  }
  if (f.kind === 'select') {
    input = el('select', { id, name: f.key, 'aria-describedby': described },
      f.options.map(([v, text]) => el('option', { value: v }, text)));
  } else {
    input = el('input', {
      type: 'text', id, name: f.key, 'aria-describedby': described, spellcheck: 'false', autocapitalize: 'off',
      inputmode: f.kind === 'number' ? 'decimal' : 'numeric', placeholder: f.optional ? 'blank: default' : '',
    });
  }
  const label = el('label', { for: id }, f.label, f.unit ? el('span', { class: 'unit' }, f.unit) : null,
    f.local ? null : el('code', { class: 'key', 'aria-hidden': 'true' }, f.key));
  return el('div', { class: 'field', 'data-key': f.key }, label, input, help, readout, error);
}

function buildForm() {
  const form = $('scenario-form');
  for (const g of groups) {
    const grid = el('div', { class: 'field-grid' }, fields.filter((f) => f.group === g.id).map(control));
    if (g.id === 'review') $('review-fields').append(...grid.children);
    else form.append(el('fieldset', { class: 'group', id: `group-${g.id}` }, el('legend', {}, g.title), grid));
  }
  const onChange = () => {
    readForm();
    refreshVisibility();
    scheduleValidate();
    scheduleDraft();
  };
  for (const f of fields) {
    const input = $(`f-${f.key}`);
    input.addEventListener('input', onChange);
    input.addEventListener('change', onChange);
  }
  form.addEventListener('submit', (e) => e.preventDefault());
}

function readForm() {
  for (const f of fields) {
    const input = $(`f-${f.key}`);
    state[f.key] = f.kind === 'check' ? input.checked : input.value;
  }
}

function writeForm(st) {
  state = { ...st };
  for (const f of fields) {
    const input = $(`f-${f.key}`);
    const v = st[f.key];
    if (f.kind === 'check') input.checked = !!v;
    else if (f.kind === 'select') input.value = v ?? f.options[0][0];
    else input.value = v ?? '';
  }
  readForm();
  refreshVisibility();
}

function refreshVisibility() {
  for (const f of fields) {
    const box = document.querySelector(`.field[data-key="${f.key}"]`);
    box.hidden = !!(f.when && !f.when(state));
    if (f.readout) {
      const x = Number(state[f.key]);
      $(`r-${f.key}`).textContent = Number.isFinite(x) ? f.readout(x) : '';
    }
  }
}

function clearErrors() {
  for (const f of fields) {
    $(`e-${f.key}`).hidden = true;
    $(`f-${f.key}`).removeAttribute('aria-invalid');
  }
  $('form-problem').hidden = true;
}

// showError puts an engine message beside its field (or above the form when it names no field of the
// form) and returns the element to focus.
function showError(e) {
  clearErrors();
  const key = aliases[e.field] || e.field;
  const f = key && byKey.get(key);
  const box = f && document.querySelector(`.field[data-key="${key}"]`);
  if (f && box && !box.hidden) {
    const err = $(`e-${key}`);
    err.textContent = e.message;
    err.hidden = false;
    $(`f-${key}`).setAttribute('aria-invalid', 'true');
    return $(`f-${key}`);
  }
  const p = $('form-problem');
  p.textContent = e.message;
  p.hidden = false;
  return p;
}

// check returns {text} for a valid document, or shows the problem and returns {error}.
function check() {
  const st = scenarioText(state);
  if (st.error) return { error: st.error, focus: showError(st.error) };
  const v = sizebudget.validate(st.text);
  if (!v.ok) return { error: v, focus: showError(v) };
  clearErrors();
  return { text: st.text, scenario: v.scenario };
}

let validateTimer = 0;
function scheduleValidate() {
  clearTimeout(validateTimer);
  validateTimer = setTimeout(check, 120);
}

// ---- draft ------------------------------------------------------------------------------------------

let draftTimer = 0;
function scheduleDraft() {
  if (restoring) return;
  clearTimeout(draftTimer);
  draftTimer = setTimeout(saveDraft, 300);
}

function saveDraft() {
  clearTimeout(draftTimer);
  const draft = { format: DRAFT_FORMAT, state, open: openSession, analysis: analysis ? analysis.draft() : null, saved: new Date().toISOString() };
  return sizebudget.draft.save(JSON.stringify(draft)).catch((e) => console.warn('sizebudget: draft not saved:', e.message));
}

async function loadDraft() {
  try {
    const text = await sizebudget.draft.get();
    if (!text) return false;
    const d = JSON.parse(text);
    if (d.format !== DRAFT_FORMAT || !d.state) return false;
    writeForm(d.state);
    setOpen(d.open || null);
    if (d.analysis) analysis.restoreDraft(d.analysis);
    else analysis.reset(sizebudget.demo());
    return true;
  } catch (e) {
    console.warn('sizebudget: draft not read:', e.message);
    return false;
  }
}

// ---- sessions glue ----------------------------------------------------------------------------------

function setOpen(s) {
  openSession = s ? { id: s.id, name: s.name } : null;
  const p = $('current-session');
  p.hidden = !openSession;
  p.textContent = openSession ? `Session: ${openSession.name}` : '';
  $('save-update').hidden = !openSession;
  if (openSession) $('save-update').textContent = `Update “${openSession.name}”`;
  scheduleDraft();
}

function openInForm(s) {
  writeForm(stateFromScenario(s.scenario));
  analysis.restore(s.analysis || null, s.name);
  setOpen(s);
  check();
  scheduleDraft();
  selectTab('tab-settings');
}

function count(n) {
  const tab = $('tab-sessions');
  let badge = tab.querySelector('.badge');
  if (n === null) return;
  if (!badge) {
    badge = el('span', { class: 'badge' });
    tab.append(badge);
  }
  badge.textContent = String(n);
  badge.setAttribute('aria-label', `${n} saved`);
}

// ---- running ----------------------------------------------------------------------------------------

let running = false;

function setRunning(on, text = '') {
  running = on;
  $('run-plan').disabled = on;
  $('run-check').disabled = on;
  $('stop').disabled = !on;
  $('progress').hidden = !on && !text;
  if (on) $('progress-bar').value = 0;
  $('progress-text').textContent = text;
}

function onProgress(p) {
  $('progress-bar').value = p.fraction;
  $('progress-text').textContent = `${p.done.toLocaleString()} of ${p.planned.toLocaleString()} trials`;
}

async function compute(kind) {
  const c = check();
  if (c.error) {
    if (kind === 'check' && ['reported_radius_nm', 'reported_u_nm', 'reported_k', 'reported_coverage'].includes(c.error.field)) selectTab('tab-review');
    else selectTab('tab-settings');
    c.focus.focus();
    return;
  }
  setRunning(true, 'Starting…');
  const t0 = performance.now();
  try {
    if (kind === 'plan') {
      const r = await sizebudget.plan(c.text, { onProgress });
      renderPlan($('results'), r);
      $('results').hidden = false;
      $('results-empty').hidden = true;
      selectTab('tab-results');
      setRunning(false, `Done in ${fmt((performance.now() - t0) / 1000, 2)} s`);
    } else {
      const r = await sizebudget.check(c.text, { onProgress });
      renderCheck($('verdict'), r);
      setRunning(false, `Checked in ${fmt((performance.now() - t0) / 1000, 2)} s`);
    }
  } catch (e) {
    if (e.name === 'AbortError') {
      setRunning(false, 'Stopped.');
      return;
    }
    setRunning(false, '');
    const focus = showError(e);
    if (kind === 'check' && e.field && e.field.startsWith('reported_')) selectTab('tab-review');
    else if (!e.field) toast(e.message);
    if (focus && focus.focus && e.field) focus.focus();
  }
}

// ---- start --------------------------------------------------------------------------------------------

function registerServiceWorker() {
  if (!('serviceWorker' in navigator)) return;
  const hadController = !!navigator.serviceWorker.controller;
  navigator.serviceWorker.register('sw.js', { updateViaCache: 'none' }).catch((e) => {
    console.warn('sizebudget: offline use not available:', e.message);
  });
  navigator.serviceWorker.addEventListener('controllerchange', () => {
    if (hadController) toast('A new version is ready.', 'Reload', () => window.location.reload());
    else if (readyText) status(`${readyText} · works offline`, 'ok');
  });
}

async function start() {
  initTabs();
  buildForm();
  analysis = initAnalysis({ toast, changed: () => scheduleDraft(), selectTab });
  $('build').textContent = `Version ${sizebudget.version}.`;
  let info;
  try {
    info = await sizebudget.ready;
  } catch (e) {
    status(`The engine did not start: ${e.message}`, 'bad');
    registerServiceWorker();
    throw e;
  }
  registerServiceWorker(); // after the engine, so that filling the offline cache does not delay it
  restoring = true;
  if (!(await loadDraft())) {
    writeForm(stateFromScenario(sizebudget.demo()));
    analysis.reset(sizebudget.demo());
  }
  restoring = false;
  check();
  sessions = initSessions({
    scenarioText: () => {
      const c = check();
      return c.error ? { error: c.error } : { text: c.text };
    },
    open: openInForm,
    analysis: () => analysis.record(),
    toast,
    openId: () => (openSession ? openSession.id : null),
    setOpen,
    count,
  });
  sessions.refresh();
  if (info.storage !== 'indexeddb') $('storage-note').textContent = `Not saved on this device: ${info.storageProblem}`;
  $('run-plan').addEventListener('click', () => compute('plan'));
  $('run-check').addEventListener('click', () => compute('check'));
  $('stop').addEventListener('click', () => sizebudget.cancel());
  $('load-demo').addEventListener('click', () => {
    writeForm(stateFromScenario(sizebudget.demo()));
    setOpen(null);
    check();
    scheduleDraft();
  });
  $('print').addEventListener('click', () => window.print());
  document.addEventListener('visibilitychange', () => {
    if (document.visibilityState === 'hidden') saveDraft();
  });
  readyText = `Ready · ${info.workers} worker${info.workers === 1 ? '' : 's'}`;
  const offline = navigator.serviceWorker && navigator.serviceWorker.controller ? ' · works offline' : '';
  status(readyText + offline, 'ok');
  document.documentElement.dataset.ready = 'true';
}

start();

// For tests and power users: whether a computation is running, and the analysis the Tracks panel
// shows (its record {file, settings, result, analysed}, or null).
Object.defineProperty(sizebudget, 'busy', { get: () => running || (analysis !== null && analysis.busy()) });
Object.defineProperty(sizebudget, 'shownAnalysis', { get: () => (analysis ? analysis.record() : null) });
