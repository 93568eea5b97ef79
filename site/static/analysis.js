// The Tracks panel: open a recorded track file (file picker or drop zone), analyse it in the
// coordinator worker with the settings of this panel (checked as you type with the engine's
// messages), show its progress, the results and the charts, and hand the analysis to the session.
// What a session keeps: the file's summary (name, size, rows, tracks, SHA-256), the settings and the
// results. The file itself is not stored; reopening it recomputes.

import { sizebudget } from './api.js';
import { byKey, aliases, numberText, fmt } from './fields.js';
import { el, svgNode, figure, budgetTable } from './results.js';

const $ = (id) => document.getElementById(id);

export const NOT_STORED = 'The file itself is not stored; reopen it to recompute.';

// Settings of the panel. Keys are those of the analysis settings (the scenario document's for the
// conditions), so the engine's messages map to the field; local fields stay on the page.
const shared = (key, over = {}) => ({ ...byKey.get(key), ...over });

export const groups = [
  { id: 'reading', title: 'Reading the file' },
  { id: 'recording', title: 'Recording' },
  { id: 'conditions', title: 'Sample & liquid' },
  { id: 'interval', title: 'Coverage interval' },
];

export const fields = [
  {
    key: 'unit', group: 'reading', kind: 'select', label: 'Length unit of the positions',
    options: [['', 'from the header (x_nm, x_um, x_px)'], ['nm', 'nm'], ['um', 'µm'], ['mm', 'mm'], ['m', 'm'], ['px', 'pixels (px)']],
    help: 'For position columns named without a unit (x, y, z); the header’s suffix wins otherwise.',
  },
  {
    key: 'pixel_size_nm', group: 'reading', kind: 'number', optional: true, label: 'Pixel size', unit: 'nm',
    help: 'Length of one pixel, for positions given in px.', when: (s) => s.unit === '' || s.unit === 'px', placeholder: 'blank: not given',
  },
  {
    key: 'min_positions', group: 'reading', kind: 'int', optional: true, label: 'Fewest positions per track', unit: 'positions',
    help: 'Shorter tracks are dropped and counted. Blank means 5; at least 3.',
  },
  {
    key: 'order', group: 'reading', kind: 'select', label: 'Rows arranged',
    options: [['track', 'the rows of each track together'], ['frame', 'sorted by frame, tracks interleaved'], ['any', 'in any order (holds the whole file)']],
    help: 'How the file is sorted; it decides what the reader holds in memory.',
  },

  {
    key: 'timing_by', group: 'recording', kind: 'select', local: true, label: 'Timing given as',
    options: [['interval', 'the frame interval'], ['rate', 'the frame rate']],
    help: 'Enter the time from one frame to the next, or the frames per second.',
  },
  shared('frame_interval_s', { group: 'recording', when: (s) => s.timing_by !== 'rate' }),
  {
    key: 'frame_rate_per_s', group: 'recording', kind: 'number', local: true, label: 'Frame rate', unit: 'frames/s',
    help: 'Frames recorded per second; the frame interval is its inverse.', when: (s) => s.timing_by === 'rate',
    readout: (v) => (v > 0 ? `frame interval ${fmt(1 / v, 6)} s` : ''),
  },
  shared('exposure_s', { group: 'recording' }),
  shared('pixel_relative_u', { group: 'recording', label: 'Length calibration uncertainty' }),

  shared('temperature_C', { group: 'conditions' }),
  shared('temperature_u_K', { group: 'conditions' }),
  shared('temperature_distribution', { group: 'conditions' }),
  shared('medium', { group: 'conditions' }),
  shared('glycerol_mass_fraction', { group: 'conditions' }),
  shared('viscosity_mPa_s', { group: 'conditions' }),
  shared('viscosity_reference_C', { group: 'conditions' }),
  shared('viscosity_temp_coeff_per_K', { group: 'conditions' }),
  shared('viscosity_relative_u', { group: 'conditions' }),
  shared('pressure_MPa', { group: 'conditions' }),

  shared('coverage', { group: 'interval' }),
  shared('trials', { group: 'interval' }),
  shared('seed', { group: 'interval' }),
];

const fieldByKey = new Map(fields.map((f) => [f.key, f]));

// stateFromSettings turns analysis settings (or a scenario document, whose conditions it takes) into
// the panel's state: strings per key.
export function stateFromSettings(doc) {
  const st = { timing_by: 'interval', frame_rate_per_s: '', order: 'track', unit: '' };
  for (const f of fields) {
    if (f.local) continue;
    const v = doc[f.key];
    if (v === undefined || v === null || (f.optional && !f.keepZero && v === 0)) st[f.key] = f.kind === 'select' ? (st[f.key] ?? f.options[0][0]) : '';
    else st[f.key] = String(v);
  }
  return st;
}

// settingsText builds the JSON text of the analysis settings from the panel's state. It returns
// {text} or {error: {field, message}} for a value that is not a number at all; range checks are the
// engine's.
export function settingsText(st) {
  const parts = [];
  const put = (k, raw) => parts.push(`${JSON.stringify(k)}:${raw}`);
  for (const f of fields) {
    if (f.local || (f.when && !f.when(st))) continue;
    const v = st[f.key];
    if (f.kind === 'select') {
      if (v !== '' && v !== undefined) put(f.key, JSON.stringify(v));
      continue;
    }
    const s = (v ?? '').trim();
    if (s === '') {
      if (!f.optional) put(f.key, '0');
      continue;
    }
    const t = f.kind === 'seed' ? (/^\d+$/.test(s) ? s : null) : numberText(s);
    if (t === null || (f.kind === 'int' && !/^-?\d+$/.test(t))) {
      const what = f.kind === 'number' ? 'a number' : 'a whole number';
      return { error: { field: f.key, message: `${f.key} = “${s}” is not ${what}` } };
    }
    put(f.key, t);
  }
  if (st.timing_by === 'rate') {
    const s = (st.frame_rate_per_s ?? '').trim();
    const t = numberText(s);
    const x = t === null ? NaN : Number(t);
    if (!(x > 0) || !Number.isFinite(1 / x)) {
      return { error: { field: 'frame_rate_per_s', message: `frame_rate_per_s = “${s}” is not allowed; allowed: a positive number of frames per second` } };
    }
    put('frame_interval_s', String(1 / x));
  }
  return { text: `{${parts.join(',')}}` };
}

const bytes = (n) => (n >= 1e6 ? `${fmt(n / 1e6, 3)} MB` : n >= 1e3 ? `${fmt(n / 1e3, 3)} kB` : `${n} bytes`);
const count = (n) => Number(n).toLocaleString('en');
const nm = (x, d = 4) => `${fmt(x, d)} nm`;
const interval = (iv, d = 4) => `${fmt(iv[0], d)} – ${fmt(iv[1], d)} nm`;
const pc = (x, d = 3) => `${fmt(100 * x, d)} %`;

function when(iso) {
  const d = new Date(iso);
  return Number.isNaN(d.getTime()) ? String(iso) : d.toLocaleString(undefined, { dateStyle: 'medium', timeStyle: 'short' });
}

function chart(charts, name, label, cls = 'chart') {
  if (!charts || !charts[name]) return null;
  return el('figure', { class: cls }, svgNode(charts[name], label));
}

// renderAnalysis shows an analysis record ({file, settings, result, analysed}) with its charts.
export function renderAnalysis(box, rec, charts) {
  const a = rec.result;
  const f = rec.file;
  const s = rec.settings;
  const pr = a.plan || {};
  const sc = pr.scenario || {};
  const p = `${fmt(100 * a.coverage, 4)} %`;
  const dr = a.drift || {};
  const row = (what, ...value) => [el('dt', {}, what), el('dd', {}, ...value)];
  const delim = f.delimiter === '\t' ? 'tab' : 'comma';
  const minPos = s.min_positions || 5;

  const summary = el('div', { class: 'file-summary' },
    el('h3', {}, `Track file: ${f.name}`),
    el('dl', { class: 'summary' },
      row('Size', bytes(f.size_bytes), f.modified ? `, modified ${when(f.modified)}` : ''),
      row('Rows', `${count(f.rows)} rows on ${count(f.lines)} lines, ${count(f.names)} track names`),
      row('Tracks', `${count(f.tracks)} kept; ${count(f.dropped)} dropped (fewer than ${minPos} positions); ${count(f.gaps)} split at a gap`),
      row('Positions', `${f.dims} axes in ${f.unit === 'um' ? 'µm' : f.unit}, ${delim}-separated`,
        f.ignored_columns && f.ignored_columns.length ? `; columns not used: ${f.ignored_columns.join(', ')}` : ''),
      row('SHA-256', f.sha256 ? el('code', { class: 'digest' }, f.sha256) : 'not available (the page is not on a secure origin)'),
      row('Analysed', when(rec.analysed))),
    el('p', { class: 'hint stored-note' }, `Saved with the session: this summary, the settings and the results. ${NOT_STORED}`));

  const how = a.drift && a.drift.corrected ? `corrected for drift (uncorrected ${fmt(a.diffusion_uncorrected_um2_per_s, 4)})` : 'pooled covariance-based estimate';
  const head = el('div', { class: 'headline' },
    figure('Radius', nm(a.radius_nm), `Stokes–Einstein of D̂ in ${sc.medium || s.medium} at ${fmt(pr.temperature_K, 6)} K, ${fmt(pr.viscosity_mPa_s, 4)} mPa·s`),
    figure(`${p} coverage interval`, interval(a.interval_nm), 'probabilistically symmetric (Monte Carlo)'),
    figure(`Shortest ${p} interval`, interval(a.shortest_interval_nm), 'Monte Carlo'),
    figure('Expanded uncertainty U/r', pc(a.relative_expanded_uncertainty), `±${nm(a.relative_expanded_uncertainty * a.radius_nm, 3)}`),
    figure('Diffusion coefficient D̂', `${fmt(a.diffusion_um2_per_s, 4)} µm²/s`, how),
    figure('Localisation precision σ̂', nm(a.localisation_nm, 3),
      `per axis; σ̂² = ${fmt(a.localisation_variance_nm2, 4)} ± ${fmt(a.localisation_variance_standard_error_nm2, 2)} nm²`),
    figure('Tracks used', count(a.tracks_used),
      `${a.dims}-D; ${a.positions_per_track.min} to ${a.positions_per_track.max} positions, mean ${fmt(a.positions_per_track.mean, 4)}`),
    figure('Tracks dropped', count(a.tracks_dropped), `fewer than ${minPos} positions`, a.tracks_dropped > 0 ? 'bad' : ''),
    figure('Displacements', count(a.displacements), 'per axis, all tracks'),
    figure('Drift', `${fmt(a.drift_um_per_s, 3)} µm/s`, dr.matters ? 'matters: D̂ corrected' : 'does not matter', dr.matters ? 'bad' : 'good'),
  );

  const vel = (dr.velocity_um_per_s || []).map((v, i) => `${fmt(v, 3)} ± ${fmt(dr.standard_error_um_per_s[i], 2)}`).join(', ');
  const drift = el('p', { class: dr.matters ? 'callout bad' : 'callout' }, el('strong', {}, 'Drift. '),
    `Mean velocity ${vel} µm/s (per axis), χ² = ${fmt(dr.chi_square, 3)}, p = ${fmt(dr.p_value, 2)}; ` +
    `its bias of D̂ is ${pc(dr.relative_bias, 2)} against a track-statistics uncertainty of ${pc(dr.track_relative_u, 2)}: ` +
    (dr.matters ? 'it matters, and D̂ and the per-track values are corrected for it.' : 'it does not matter.'));

  const free = el('div', { class: 'table-wrap' }, el('table', { class: 'free-diffusion' },
    el('caption', { class: 'visually-hidden' }, 'Free-diffusion checks'),
    el('thead', {}, el('tr', {}, el('th', {}, 'Lag (frames)'), el('th', { class: 'num' }, 'Pairs'),
      el('th', { class: 'num' }, 'Correlation ρ'), el('th', { class: 'num' }, 'z'), el('th', {}, 'Verdict'))),
    el('tbody', {}, (a.free_diffusion || []).map((c) => {
      const ok = Math.abs(c.z) <= 4;
      return el('tr', { class: ok ? null : 'differs' }, el('td', {}, String(c.lag)), el('td', { class: 'num' }, count(c.pairs)),
        el('td', { class: 'num' }, `${fmt(c.correlation, 3)} ± ${fmt(c.standard_error, 2)}`), el('td', { class: 'num' }, fmt(c.z, 3)),
        el('td', {}, ok ? 'consistent with free diffusion' : 'NOT consistent with free diffusion'));
    }))));

  const warnings = (a.warnings || []).length
    ? el('div', {}, el('h3', {}, 'Warnings'), el('ul', { class: 'warnings' }, a.warnings.map((w) => el('li', {}, w))))
    : null;

  const mc = pr.monte_carlo || {};
  box.replaceChildren(...[
    summary,
    el('h3', {}, 'Radius from the tracks'),
    head,
    warnings,
    drift,
    el('h3', {}, 'Free diffusion'),
    el('p', { class: 'hint' }, 'Free diffusion with white localisation noise leaves displacements 2 and 3 frames apart uncorrelated; beyond 4 standard errors (|z| > 4) the data say otherwise.'),
    free,
    el('h3', {}, 'Radii of single tracks'),
    el('p', { class: 'hint' }, 'Bars: the radius of each track. Line: the spread a perfectly monodisperse sample of the pooled radius would show with the same track lengths and noise — a histogram much wider than the line points to real polydispersity.'),
    chart(charts, 'radii', 'radius histogram'),
    el('h3', {}, 'Uncertainty budget'),
    chart(charts, 'budget', 'budget bars', 'chart bars'),
    budgetTable(pr.budget || []),
    el('p', { class: 'hint' },
      `Monte Carlo: ${mc.trials} trials${mc.adaptive ? ` in ${mc.runs} runs (adaptive)` : ''}, seed ${mc.seed}, ${mc.engine} engine; ` +
      `largest source: ${pr.dominant_source || '—'}. The same file, settings and seed give the same numbers with sizebudget analyze.`),
  ].filter(Boolean));
}

// initAnalysis builds the panel and wires it. app supplies toast(text), changed() (something worth
// keeping in the draft changed) and selectTab(id).
export function initAnalysis(app) {
  let state = {};
  let record = null; // the analysis shown: {file, settings, result, analysed}
  let lastFile = null; // the File last opened, to analyse again with new settings
  let running = false;
  let controller = null;
  let validateTimer = 0;

  const say = (text, kind = '') => {
    const m = $('analysis-message');
    m.textContent = text;
    m.className = `message ${kind}`.trim();
  };

  function control(f) {
    const id = `a-f-${f.key}`;
    const help = el('p', { class: 'help', id: `a-h-${f.key}` }, f.help);
    const error = el('p', { class: 'error', id: `a-e-${f.key}`, hidden: true });
    const readout = f.readout ? el('p', { class: 'readout', id: `a-r-${f.key}`, 'aria-live': 'polite' }) : null;
    const described = [`a-h-${f.key}`, `a-e-${f.key}`, readout ? `a-r-${f.key}` : ''].filter(Boolean).join(' ');
    let input;
    if (f.kind === 'select') {
      input = el('select', { id, name: f.key, 'aria-describedby': described }, f.options.map(([v, text]) => el('option', { value: v }, text)));
    } else {
      input = el('input', {
        type: 'text', id, name: f.key, 'aria-describedby': described, spellcheck: 'false', autocapitalize: 'off',
        inputmode: f.kind === 'number' ? 'decimal' : 'numeric', placeholder: f.placeholder ?? (f.optional ? 'blank: default' : ''),
      });
    }
    const label = el('label', { for: id }, f.label, f.unit ? el('span', { class: 'unit' }, f.unit) : null,
      f.local ? null : el('code', { class: 'key', 'aria-hidden': 'true' }, f.key));
    return el('div', { class: 'field', 'data-akey': f.key }, label, input, help, readout, error);
  }

  function build() {
    const form = $('analysis-form');
    for (const g of groups) {
      form.append(el('fieldset', { class: 'group', id: `agroup-${g.id}` }, el('legend', {}, g.title),
        el('div', { class: 'field-grid' }, fields.filter((f) => f.group === g.id).map(control))));
    }
    const onChange = () => {
      read();
      refresh();
      clearTimeout(validateTimer);
      validateTimer = setTimeout(check, 120);
      app.changed();
    };
    for (const f of fields) {
      const input = $(`a-f-${f.key}`);
      input.addEventListener('input', onChange);
      input.addEventListener('change', onChange);
    }
    form.addEventListener('submit', (e) => e.preventDefault());

    const input = $('track-file');
    input.addEventListener('click', () => {
      input.value = ''; // choosing the same file again is a change
    });
    input.addEventListener('change', () => {
      const file = input.files && input.files[0];
      if (file) open(file);
    });
    const zone = $('drop-zone');
    const hasFiles = (e) => e.dataTransfer && [...(e.dataTransfer.types || [])].includes('Files');
    zone.addEventListener('dragenter', (e) => {
      if (!hasFiles(e)) return;
      e.preventDefault();
      zone.classList.add('over');
    });
    zone.addEventListener('dragover', (e) => {
      if (!hasFiles(e)) return;
      e.preventDefault();
      e.dataTransfer.dropEffect = 'copy';
      zone.classList.add('over');
    });
    zone.addEventListener('dragleave', (e) => {
      if (!zone.contains(e.relatedTarget)) zone.classList.remove('over');
    });
    zone.addEventListener('drop', (e) => {
      e.preventDefault();
      e.stopPropagation();
      zone.classList.remove('over');
      const files = e.dataTransfer ? [...e.dataTransfer.files] : [];
      if (files.length > 1) say(`${files.length} files dropped; opening the first, ${files[0].name}.`);
      if (files.length) open(files[0]);
    });
    // A file dropped beside the zone must not replace the app with the file.
    document.addEventListener('dragover', (e) => {
      if (hasFiles(e)) e.preventDefault();
    });
    document.addEventListener('drop', (e) => {
      if (!hasFiles(e)) return;
      e.preventDefault();
      app.toast('Drop track files on the drop zone of the Tracks tab.');
    });
    $('analysis-rerun').addEventListener('click', () => {
      if (lastFile) open(lastFile);
    });
    $('analysis-stop').addEventListener('click', () => {
      if (controller) controller.abort();
    });
  }

  function read() {
    for (const f of fields) state[f.key] = $(`a-f-${f.key}`).value;
  }

  function write(st) {
    state = { ...st };
    for (const f of fields) {
      const input = $(`a-f-${f.key}`);
      const v = st[f.key];
      input.value = f.kind === 'select' ? v ?? f.options[0][0] : v ?? '';
      if (f.kind === 'select' && input.selectedIndex < 0) input.value = f.options[0][0];
    }
    read();
    refresh();
  }

  function refresh() {
    for (const f of fields) {
      document.querySelector(`.field[data-akey="${f.key}"]`).hidden = !!(f.when && !f.when(state));
      if (f.readout) {
        const x = Number(numberText(state[f.key] || '') ?? NaN);
        $(`a-r-${f.key}`).textContent = Number.isFinite(x) ? f.readout(x) : '';
      }
    }
  }

  function clearErrors() {
    for (const f of fields) {
      $(`a-e-${f.key}`).hidden = true;
      $(`a-f-${f.key}`).removeAttribute('aria-invalid');
    }
    $('analysis-problem').hidden = true;
  }

  // showError puts an engine message beside its setting (or above the settings) and returns the
  // element to focus.
  function showError(e) {
    clearErrors();
    let key = aliases[e.field] || e.field;
    if (key === 'frame_interval_s' && state.timing_by === 'rate') key = 'frame_rate_per_s';
    const box = key && fieldByKey.has(key) && document.querySelector(`.field[data-akey="${key}"]`);
    if (box && !box.hidden) {
      const err = $(`a-e-${key}`);
      err.textContent = e.message;
      err.hidden = false;
      $(`a-f-${key}`).setAttribute('aria-invalid', 'true');
      return $(`a-f-${key}`);
    }
    const p = $('analysis-problem');
    p.textContent = e.message;
    p.hidden = false;
    return p;
  }

  // check validates the settings as the engine will; it returns {text} or shows the problem and
  // returns {error, focus}.
  function check() {
    const st = settingsText(state);
    if (st.error) return { error: st.error, focus: showError(st.error) };
    const v = sizebudget.validateAnalysis(st.text);
    if (!v.ok) return { error: v, focus: showError(v) };
    clearErrors();
    return { text: st.text };
  }

  function progress(p) {
    const bar = $('analysis-progress-bar');
    bar.value = p.fraction;
    $('analysis-progress-text').textContent = p.phase === 'read'
      ? `Reading: ${bytes(p.bytes)} of ${bytes(p.total)}`
      : `Monte Carlo: ${count(p.done)} of ${count(p.planned)} trials`;
  }

  function setRunning(on) {
    running = on;
    $('analysis-stop').disabled = !on;
    $('analysis-rerun').disabled = on || !lastFile;
    $('analysis-progress').hidden = !on;
    if (on) {
      $('analysis-progress-bar').value = 0;
      $('analysis-progress-text').textContent = 'Starting…';
    }
  }

  async function open(file) {
    const c = check();
    if (c.error) {
      say(`Not analysed: fix the settings first. ${c.error.message}`, 'bad');
      c.focus.focus();
      return;
    }
    lastFile = file;
    if (controller) controller.abort();
    const me = new AbortController();
    controller = me;
    setRunning(true);
    say(`Reading ${file.name}…`);
    const t0 = performance.now();
    try {
      const r = await sizebudget.analyze(file, c.text, { onProgress: progress, signal: me.signal });
      record = r.record;
      show(record, r.charts);
      say(`Analysed ${record.file.name}: ${count(record.file.rows)} rows, ${count(r.tracks_used)} tracks, in ${fmt((performance.now() - t0) / 1000, 2)} s.`, 'good');
      app.changed();
    } catch (e) {
      if (e.name === 'AbortError') {
        say(record ? 'Stopped; the analysis shown is unchanged.' : 'Stopped.');
      } else {
        say(`Nothing changed. ${e.message}`, 'bad');
        if (e.field && fieldByKey.has(aliases[e.field] || e.field)) showError(e);
      }
    } finally {
      if (controller === me) {
        controller = null;
        setRunning(false);
      }
    }
  }

  // show displays an analysis record, or clears the results for null. The charts are drawn again by
  // the engine when not given.
  function show(rec, charts) {
    record = rec;
    const box = $('analysis');
    if (!rec) {
      box.replaceChildren();
      box.hidden = true;
      $('analysis-empty').hidden = false;
      return;
    }
    let drawn = charts;
    if (!drawn) {
      try {
        drawn = sizebudget.analysisCharts(rec.result);
      } catch (e) {
        console.warn('sizebudget: analysis charts:', e.message);
        drawn = {};
      }
    }
    renderAnalysis(box, rec, drawn);
    box.hidden = false;
    $('analysis-empty').hidden = true;
  }

  build();
  return {
    // reset puts settings (or a scenario document's conditions) into the form.
    reset(doc) {
      write(stateFromSettings(doc));
      check();
    },
    // restore shows a session's analysis (or none) and takes its settings into the form.
    restore(rec, from = '') {
      if (controller) controller.abort();
      show(rec || null);
      if (rec) {
        write(stateFromSettings(rec.settings));
        check();
        say(`The analysis of ${rec.file.name}${from ? ` saved with “${from}”` : ''}. ${NOT_STORED}`);
      } else {
        say('');
      }
    },
    record: () => record,
    draft: () => ({ state, record }),
    restoreDraft(d) {
      if (d && d.state) write(d.state);
      if (d && d.record) show(d.record);
      check();
    },
    busy: () => running,
  };
}
