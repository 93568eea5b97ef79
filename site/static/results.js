// Rendering of plan and check results into the page, and the pieces the Tracks panel shares. Charts
// arrive as SVG documents drawn by the engine (package chart); they use presentation attributes
// only, so they pass the strict CSP.

import { fmt } from './fields.js';

// el builds an element: el('p', {class: 'x'}, 'text', child, ...). Attributes are set with
// setAttribute (never a style attribute), text is added as text nodes.
export function el(tag, attrs = {}, ...children) {
  const e = document.createElement(tag);
  for (const [k, v] of Object.entries(attrs || {})) {
    if (v === false || v === null || v === undefined) continue;
    if (k === 'text') e.textContent = v;
    else e.setAttribute(k, v === true ? '' : String(v));
  }
  for (const c of children.flat()) {
    if (c === null || c === undefined || c === false) continue;
    e.append(c instanceof Node ? c : document.createTextNode(String(c)));
  }
  return e;
}

export function svgNode(text, label) {
  const doc = new DOMParser().parseFromString(text, 'image/svg+xml');
  const root = doc.documentElement;
  if (!root || root.nodeName !== 'svg' || doc.getElementsByTagName('parsererror').length) {
    return el('p', { class: 'hint' }, `(${label}: the chart could not be drawn)`);
  }
  return document.importNode(root, true);
}

const pc = (x, d = 3) => `${fmt(100 * x, d)} %`;
const nm = (x, d = 4) => `${fmt(x, d)} nm`;
const interval = (iv, d = 4) => `${fmt(iv[0], d)} – ${fmt(iv[1], d)} nm`;
const dof = (v) => (typeof v === 'number' ? fmt(v, 3) : String(v ?? '—'));

export function figure(what, value, sub, cls = '') {
  return el('div', { class: `figure ${cls}`.trim() },
    el('p', { class: 'what' }, what), el('p', { class: 'value' }, value), sub ? el('p', { class: 'sub' }, sub) : null);
}

function chartBox(charts, name, label, cls = 'chart') {
  if (!charts || !charts[name]) return null;
  return el('figure', { class: cls }, svgNode(charts[name], label));
}

// budgetTable is the table of an uncertainty budget (the budget of a plan result).
export function budgetTable(budget) {
  return el('div', { class: 'table-wrap' }, el('table', {},
    el('caption', { class: 'visually-hidden' }, 'Uncertainty budget'),
    el('thead', {}, el('tr', {},
      el('th', {}, 'Source'), el('th', {}, 'Input'), el('th', { class: 'num' }, 'u(input)'),
      el('th', { class: 'num' }, 'Sensitivity'), el('th', { class: 'num' }, 'u(r)/r'), el('th', { class: 'num' }, 'Share'),
      el('th', { class: 'num' }, 'ν'))),
    el('tbody', {}, budget.map((b) => el('tr', {},
      el('td', {}, b.source), el('td', {}, b.input || ''), el('td', { class: 'num' }, fmt(b.input_standard_uncertainty, 3)),
      el('td', { class: 'num' }, fmt(b.sensitivity, 3)), el('td', { class: 'num' }, pc(b.relative_standard_uncertainty)),
      el('td', { class: 'num' }, pc(b.share)), el('td', { class: 'num' }, b.dof === null ? '∞' : dof(b.dof)))))));
}

// recommendation describes the planner's answer in words.
export function recommendation(r) {
  const sc = r.scenario || {};
  if (r.target_reachable === null || r.target_reachable === undefined || !(r.target_relative_expanded_uncertainty > 0)) {
    return { ok: null, text: 'No target set: enter a target U/r to get the number of frames you need.' };
  }
  const target = pc(r.target_relative_expanded_uncertainty, 3);
  if (!r.target_reachable) {
    return { ok: false, text: `The target of ${target} is out of reach. ${r.unreachable_reason || ''}`.trim() };
  }
  const n = r.recommended_min_frames;
  let more = '';
  if (n > sc.frames) more = ` You have set ${sc.frames}: record ${n - sc.frames} more per track.`;
  else if (n <= sc.frames) more = ` Your ${sc.frames} frames are enough.`;
  return { ok: true, text: `Record at least ${n} frames per track (${sc.tracks} tracks) to reach ${target}.${more}` };
}

export function renderPlan(box, r) {
  const sc = r.scenario || {};
  const p = `${fmt(100 * r.coverage, 4)} %`;
  const target = r.target_relative_expanded_uncertainty;
  const meets = target > 0 ? r.relative_expanded_uncertainty <= target : null;
  const rec = recommendation(r);
  const charts = r.charts || {};

  const head = el('div', { class: 'headline' },
    figure('Radius', nm(r.radius_nm), `D = ${fmt(r.diffusion_um2_per_s, 4)} µm²/s · η = ${fmt(r.viscosity_mPa_s, 4)} mPa·s`),
    figure(`${p} coverage interval`, interval(r.interval_nm), 'probabilistically symmetric (Monte Carlo)'),
    figure(`Shortest ${p} interval`, interval(r.shortest_interval_nm), 'Monte Carlo'),
    figure('Expanded uncertainty U/r', pc(r.relative_expanded_uncertainty),
      `±${nm(r.relative_expanded_uncertainty * r.radius_nm, 3)}${target > 0 ? ` · target ${pc(target)}` : ''}`,
      meets === null ? '' : meets ? 'good' : 'bad'),
  );

  const warnings = (r.warnings || []).length
    ? el('div', {}, el('h3', {}, 'Warnings'), el('ul', { class: 'warnings' }, r.warnings.map((w) => el('li', {}, w))))
    : null;

  let focus = null;
  if (r.focus) {
    const f = r.focus;
    focus = el('p', {},
      `In a ${fmt(f.depth_um)} µm deep focal slab a particle stays about ${fmt(f.mean_residence_s)} s, ` +
      `${fmt(f.expected_frames)} frames on average; about ${f.reachable_frames} frames per track are realistic.` +
      (f.recommended_tracks_at_reachable_frames ? ` At that length, ${f.recommended_tracks_at_reachable_frames} tracks reach the target.` : ''));
  }

  const budget = budgetTable(r.budget || []);

  const g = r.gum || {};
  const mc = r.monte_carlo || {};
  const validation = el('div', {},
    el('p', { class: g.validated ? 'callout' : 'callout bad' }, g.validated
      ? `The GUM interval agrees with the Monte Carlo one within δ = ${nm(g.tolerance_nm, 2)} (JCGM 101 clause 8): either may be reported.`
      : `The GUM interval differs from the Monte Carlo one by more than δ = ${nm(g.tolerance_nm, 2)} (JCGM 101 clause 8): report the Monte Carlo interval.`),
    el('div', { class: 'table-wrap' }, el('table', {},
      el('thead', {}, el('tr', {}, el('th', {}, ''), el('th', {}, 'GUM (law of propagation)'), el('th', {}, 'Monte Carlo (JCGM 101)'))),
      el('tbody', {},
        el('tr', {}, el('td', {}, `${p} interval`), el('td', {}, interval(g.interval_nm || [0, 0])), el('td', {}, interval(r.interval_nm))),
        el('tr', {}, el('td', {}, 'U/r'), el('td', {}, pc(g.relative_expanded_uncertainty)), el('td', {}, pc(r.relative_expanded_uncertainty))),
        el('tr', {}, el('td', {}, 'Standard uncertainty u(r)/r'), el('td', {}, pc(g.relative_standard_uncertainty)),
          el('td', {}, pc(mc.standard_uncertainty_nm / r.radius_nm))),
        el('tr', {}, el('td', {}, 'Coverage factor, degrees of freedom'), el('td', {}, `k = ${fmt(g.coverage_factor, 4)}, ν_eff = ${dof(g.effective_dof)}`),
          el('td', {}, '—')),
        el('tr', {}, el('td', {}, 'Differences of the ends'), el('td', { colspan: 2 }, `low ${nm(g.d_low_nm, 2)}, high ${nm(g.d_high_nm, 2)}`)),
      ))));

  const mcInfo = el('p', { class: 'hint' },
    `Monte Carlo: ${mc.trials} trials${mc.adaptive ? ` in ${mc.runs} runs (adaptive, ${mc.converged ? 'converged' : 'stopped at the cap'})` : ''}, ` +
    `seed ${mc.seed}, ${mc.engine} engine. The same seed gives the same numbers on the command line.`);

  box.replaceChildren(...[
    head,
    el('p', { class: rec.ok === false ? 'callout bad' : 'callout' }, el('strong', {}, 'Frames needed. '), rec.text),
    focus,
    warnings,
    el('div', { class: 'charts' },
      chartBox(charts, 'histogram', 'histogram'),
      chartBox(charts, 'curve', 'frames curve')),
    el('h3', {}, 'Uncertainty budget'),
    chartBox(charts, 'budget', 'budget bars', 'chart bars'),
    budget,
    el('h3', {}, 'GUM against Monte Carlo'),
    validation,
    mcInfo,
    el('p', { class: 'hint' }, `Computed for “${sc.name || 'this scenario'}”.`),
  ].filter(Boolean));
}

const verdictWords = {
  'below-bound': 'Below the bound',
  optimistic: 'Optimistic',
  consistent: 'Consistent',
  conservative: 'Conservative',
};

export function renderCheck(box, c) {
  const p = `${fmt(100 * c.coverage, 4)} %`;
  box.replaceChildren(el('div', { class: `verdict ${c.verdict}` },
    el('p', { class: 'word' }, verdictWords[c.verdict] || c.verdict),
    el('p', {}, c.explanation),
    el('div', { class: 'table-wrap' }, el('table', {},
      el('thead', {}, el('tr', {}, el('th', {}, `At ${p} coverage`), el('th', { class: 'num' }, 'U/r'))),
      el('tbody', {},
        el('tr', {}, el('td', {}, `Reported: ${nm(c.reported_radius_nm)} ± ${nm(c.reported_u_nm, 3)} (k = ${fmt(c.reported_k, 3)})`),
          el('td', { class: 'num' }, pc(c.reported_relative_expanded_uncertainty))),
        el('tr', {}, el('td', {}, 'Achievable with the stated estimator (Monte Carlo)'), el('td', { class: 'num' }, pc(c.achievable_relative_expanded_uncertainty))),
        el('tr', {}, el('td', {}, 'Bound: best any estimator can do, plus the fixed sources'), el('td', { class: 'num' }, pc(c.bound_relative_expanded_uncertainty))),
        el('tr', {}, el('td', {}, 'Fixed sources alone (temperature, viscosity, calibration, drift)'), el('td', { class: 'num' }, pc(c.fixed_relative_expanded_uncertainty))),
      )))));
}
