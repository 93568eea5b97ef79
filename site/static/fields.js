// The settings form: every field of the scenario document with its label, unit and one-line
// explanation, grouped the way the work goes. The JSON key of each field is the one the engine uses
// (its unit is in the key), so the engine's messages, which name the key, map to the field.

export const groups = [
  { id: 'particle', title: 'Particle & medium' },
  { id: 'optics', title: 'Optics & camera' },
  { id: 'tracks', title: 'Tracks' },
  { id: 'analysis', title: 'Analysis & target' },
  { id: 'review', title: 'Reported result' },
];

// kind: number (decimal), int, seed (unsigned integer kept as typed), select, check.
// optional: a blank field is left out of the document (the engine's default applies).
// when(state): the field belongs to the document only when this holds.
export const fields = [
  {
    key: 'size_by', group: 'particle', kind: 'select', local: true, label: 'Particle given by',
    options: [['radius', 'its radius'], ['diffusion', 'its diffusion coefficient']],
    help: 'Enter the expected size, or the diffusion coefficient if that is what you know.',
  },
  {
    key: 'radius_nm', group: 'particle', kind: 'number', label: 'Hydrodynamic radius', unit: 'nm',
    help: 'Radius you expect to measure; the plan is made around it.', when: (s) => s.size_by !== 'diffusion',
  },
  {
    key: 'diffusion_um2_per_s', group: 'particle', kind: 'number', label: 'Diffusion coefficient', unit: 'µm²/s',
    help: 'Nominal D; the radius follows from it by Stokes–Einstein.', when: (s) => s.size_by === 'diffusion',
  },
  {
    key: 'medium', group: 'particle', kind: 'select', label: 'Liquid',
    options: [['water', 'water'], ['glycerol', 'glycerol–water mixture'], ['custom', 'my own liquid']],
    help: 'Water and glycerol–water have built-in viscosity models; give your own for anything else.',
  },
  {
    key: 'glycerol_mass_fraction', group: 'particle', kind: 'number', label: 'Glycerol mass fraction', unit: '0–1',
    help: 'Mass of glycerol per mass of mixture (0.4 for 40 % w/w).', when: (s) => s.medium === 'glycerol',
  },
  {
    key: 'viscosity_mPa_s', group: 'particle', kind: 'number', label: 'Viscosity', unit: 'mPa·s',
    help: 'Viscosity of your liquid at its reference temperature.', when: (s) => s.medium === 'custom',
  },
  {
    key: 'viscosity_reference_C', group: 'particle', kind: 'number', optional: true, keepZero: true, label: 'Viscosity reference temperature', unit: '°C',
    help: 'Temperature at which that viscosity holds; blank means 25 °C.', when: (s) => s.medium === 'custom',
  },
  {
    key: 'viscosity_temp_coeff_per_K', group: 'particle', kind: 'number', optional: true, label: 'Viscosity temperature coefficient', unit: '1/K',
    help: 'Relative change of viscosity per kelvin, d ln η/dT (negative for most liquids); blank means 0.', when: (s) => s.medium === 'custom',
  },
  {
    key: 'viscosity_relative_u', group: 'particle', kind: 'number', optional: true, keepZero: true, label: 'Viscosity uncertainty', unit: 'relative',
    help: 'Relative standard uncertainty of the viscosity. Blank: the model’s own; 0: leave it out.',
  },
  {
    key: 'pressure_MPa', group: 'particle', kind: 'number', optional: true, label: 'Pressure', unit: 'MPa',
    help: 'Only for water; blank means one atmosphere (0.101325 MPa).', when: (s) => s.medium === 'water',
  },
  {
    key: 'temperature_C', group: 'particle', kind: 'number', label: 'Temperature', unit: '°C',
    help: 'Nominal temperature of the sample during recording.',
  },
  {
    key: 'temperature_u_K', group: 'particle', kind: 'number', label: 'Temperature uncertainty', unit: 'K',
    help: 'Half-width ±a for a rectangular spread, standard uncertainty for a normal one.',
  },
  {
    key: 'temperature_distribution', group: 'particle', kind: 'select', label: 'Temperature spread',
    options: [['rect', 'rectangular (±a)'], ['normal', 'normal (u)']],
    help: 'Shape of what you know about the temperature.',
  },
  {
    key: 'particle_density_kg_per_m3', group: 'particle', kind: 'number', optional: true, label: 'Particle density', unit: 'kg/m³',
    help: 'Used only to check that inertia is negligible; blank means 1050.',
  },

  {
    key: 'dims', group: 'optics', kind: 'select', label: 'Axes tracked',
    options: [['1', '1 (one coordinate)'], ['2', '2 (camera image)'], ['3', '3 (with depth)']],
    help: 'Coordinates measured per position.',
  },
  {
    key: 'frame_interval_s', group: 'optics', kind: 'number', label: 'Frame interval', unit: 's',
    help: 'Time from one frame to the next (one over the frame rate).', readout: (v) => (v > 0 ? `${fmt(1 / v, 4)} frames/s` : ''),
  },
  {
    key: 'exposure_s', group: 'optics', kind: 'number', label: 'Exposure time', unit: 's',
    help: 'Shutter time of each frame; the particle moves meanwhile (motion blur). 0 for a flash.',
  },
  {
    key: 'localisation_nm', group: 'optics', kind: 'number', label: 'Localisation precision', unit: 'nm',
    help: 'Standard deviation of one position along one axis.',
  },
  {
    key: 'pixel_relative_u', group: 'optics', kind: 'number', optional: true, label: 'Pixel size uncertainty', unit: 'relative',
    help: 'Relative standard uncertainty of the pixel calibration (0.005 for 0.5 %); it counts twice in D.',
  },
  {
    key: 'focus_depth_um', group: 'optics', kind: 'number', optional: true, label: 'Depth of focus', unit: 'µm',
    help: 'Thickness of the slab in which a particle stays tracked; blank for no limit.',
  },

  {
    key: 'frames', group: 'tracks', kind: 'int', label: 'Frames per track', unit: 'positions',
    help: 'Positions recorded per track; a track has one displacement fewer.',
  },
  {
    key: 'tracks', group: 'tracks', kind: 'int', label: 'Tracks', unit: 'count',
    help: 'Number of particles followed and pooled into one estimate.',
  },
  {
    key: 'drift_um_per_s', group: 'tracks', kind: 'number', optional: true, label: 'Residual drift', unit: 'µm/s',
    help: 'Largest drift speed left in the data after correction; blank or 0 for none.',
  },
  {
    key: 'drift_removed', group: 'tracks', kind: 'check', label: 'Drift subtracted per track',
    help: 'The mean displacement of each track is removed before D is estimated.',
  },

  {
    key: 'estimator', group: 'analysis', kind: 'select', label: 'Estimator of D',
    options: [['cve', 'covariance-based (cve)'], ['known-noise', 'known localisation noise'], ['msd', 'MSD straight-line fit']],
    help: 'How each track’s diffusion coefficient is estimated.',
  },
  {
    key: 'coverage', group: 'analysis', kind: 'number', label: 'Coverage probability', unit: '0–1',
    help: 'Probability that the interval holds the true radius (0.95 for 95 %).',
  },
  {
    key: 'target_relative_expanded_uncertainty', group: 'analysis', kind: 'number', label: 'Target U/r', unit: 'relative',
    help: 'Expanded uncertainty you want on the radius (0.05 for ±5 %); 0 for no target.',
  },
  {
    key: 'trials', group: 'analysis', kind: 'int', optional: true, label: 'Monte Carlo trials', unit: 'count',
    help: 'Blank or 0: as many as the adaptive rule of JCGM 101 needs.',
  },
  {
    key: 'seed', group: 'analysis', kind: 'seed', label: 'Random seed', unit: 'integer',
    help: 'The same seed gives the same numbers, here and on the command line.',
  },

  {
    key: 'reported_radius_nm', group: 'review', kind: 'number', optional: true, label: 'Reported radius', unit: 'nm',
    help: 'The radius stated in the report under review.',
  },
  {
    key: 'reported_u_nm', group: 'review', kind: 'number', optional: true, label: 'Reported expanded uncertainty', unit: 'nm',
    help: 'The ± stated with it.',
  },
  {
    key: 'reported_k', group: 'review', kind: 'number', optional: true, label: 'Its coverage factor k', unit: '',
    help: 'The k stated with it (often 2); leave blank if a coverage probability is stated instead.',
  },
  {
    key: 'reported_coverage', group: 'review', kind: 'number', optional: true, label: 'Or its coverage probability', unit: '0–1',
    help: 'For example 0.95; blank if k is given. With neither, 0.95 is assumed.',
  },
];

export const byKey = new Map(fields.map((f) => [f.key, f]));

// Fields of the medium models whose errors name another key than the form's.
export const aliases = {
  temperature_K: 'temperature_C',
  reference_temperature_K: 'viscosity_reference_C',
  viscosity_relative_uncertainty: 'viscosity_relative_u',
  viscosity_temperature_coefficient_per_K: 'viscosity_temp_coeff_per_K',
};

// Keys of the scenario document that the form does not show but keeps (name, note, format).
const passThrough = ['format', 'name', 'note'];

export function fmt(x, digits = 3) {
  if (!Number.isFinite(x)) return String(x);
  return Number(x.toPrecision(digits)).toString();
}

const jsonNumber = /^-?(0|[1-9]\d*)(\.\d+)?([eE][+-]?\d+)?$/;

// numberText returns the JSON text of a typed number, or null if it is not one.
export function numberText(s) {
  s = s.trim().replace(',', '.');
  if (jsonNumber.test(s)) return s;
  const x = Number(s);
  if (s !== '' && Number.isFinite(x)) return String(x);
  return null;
}

// formState turns a scenario document into the form's state: strings per key, booleans for checks.
export function stateFromScenario(doc) {
  const st = { size_by: doc.diffusion_um2_per_s && !doc.radius_nm ? 'diffusion' : 'radius' };
  for (const f of fields) {
    if (f.local) continue;
    const v = doc[f.key];
    if (f.kind === 'check') st[f.key] = !!v;
    else if (v === undefined || v === null || (f.optional && !f.keepZero && v === 0)) st[f.key] = '';
    else st[f.key] = String(v);
  }
  for (const k of passThrough) if (doc[k] !== undefined) st[k] = doc[k];
  return st;
}

// scenarioText builds the scenario document (JSON text) from the form's state. Numbers go in as typed
// (so a 64-bit seed keeps every digit). It returns {text} or {error: {field, message}} for a value
// that is not a number at all; range checks are the engine's.
export function scenarioText(st) {
  const parts = [];
  const put = (k, raw) => parts.push(`${JSON.stringify(k)}:${raw}`);
  put('format', JSON.stringify(st.format || 'sizebudget/scenario/1'));
  if (st.name) put('name', JSON.stringify(st.name));
  if (st.note) put('note', JSON.stringify(st.note));
  for (const f of fields) {
    if (f.local || (f.when && !f.when(st))) continue;
    const v = st[f.key];
    if (f.kind === 'check') {
      if (v) put(f.key, 'true');
      continue;
    }
    if (f.kind === 'select') {
      put(f.key, f.key === 'dims' ? String(Number(v)) : JSON.stringify(v));
      continue;
    }
    const s = (v ?? '').trim();
    if (s === '') {
      if (!f.optional) put(f.key, '0');
      continue;
    }
    const t = f.kind === 'seed' ? (/^\d+$/.test(s) ? s : null) : numberText(s);
    if (t === null || ((f.kind === 'int') && !/^-?\d+$/.test(t))) {
      const what = f.kind === 'number' ? 'a number' : 'a whole number';
      return { error: { field: f.key, message: `${f.key} = “${s}” is not ${what}` } };
    }
    put(f.key, t);
  }
  return { text: `{${parts.join(',')}}` };
}
