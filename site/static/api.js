// window.sizebudget: the app's JavaScript API, for the page itself, for power users at the console
// and for the browser tests. See README.md in the site folder for the reference.
//
// The page compiles main.wasm once. One instance runs on the page (scenario documents, validation,
// sessions in IndexedDB); the Monte Carlo work runs in Web Workers, each with its own instance of the
// same compiled module: a coordinator that runs the plan and, when there are two cores or more,
// helpers that compute the chunks of each propagation.

/* global Go */

const MAX_WORKERS = 4;

function version() {
  return globalThis.SIZEBUDGET_VERSION || 'dev';
}

function toText(scenario) {
  if (typeof scenario === 'string') return scenario;
  if (scenario && typeof scenario === 'object') return JSON.stringify(scenario);
  throw new TypeError('sizebudget: a scenario is a document object or its JSON text');
}

function errorFrom(e) {
  const err = new Error(e && e.message ? e.message : String(e));
  if (e && e.field) err.field = e.field;
  return err;
}

function abortError() {
  return new DOMException('sizebudget: computation cancelled', 'AbortError');
}

// ---- the page's own instance -------------------------------------------------------------------

let core = null;
let compiled = null;

async function loadCore() {
  const response = fetch('main.wasm');
  compiled = await WebAssembly.compileStreaming(response);
  prewarm(); // the workers start while the page's own instance opens the sessions
  const go = new Go();
  const instance = await WebAssembly.instantiate(compiled, go.importObject);
  const installed = new Promise((resolve) => {
    globalThis.sizebudgetCoreReady = resolve;
  });
  go.run(instance).then(() => {
    console.error('sizebudget: the engine stopped; reload the page');
  });
  core = await installed;
  const opened = JSON.parse(await core.open());
  return opened;
}

function callSync(name, ...args) {
  const r = core[name](...args);
  if (r && typeof r === 'object' && r.error) throw errorFrom(r.error);
  return r;
}

// ---- workers ---------------------------------------------------------------------------------------

function defaultWorkers() {
  const n = Number(navigator.hardwareConcurrency) || 1;
  return Math.max(1, Math.min(MAX_WORKERS, n));
}

// A Team is one coordinator worker and its helpers. It runs one job at a time; cancelling a job
// terminates the team (worker.terminate() stops a WebAssembly loop at once) and a new team is made
// for the next job.
class Team {
  constructor(size) {
    this.size = size;
    this.workers = [];
    this.job = null;
    this.ready = this.start();
  }

  spawn(name) {
    const w = new Worker('worker.js', { name });
    this.workers.push(w);
    // A worker that dies (out of memory, say) fails the job in progress and the team.
    w.addEventListener('error', (e) => this.fail(new Error(`sizebudget: a worker failed: ${e.message || 'unknown error'}`)));
    w.addEventListener('message', (e) => {
      if (e.data && e.data.type === 'fatal') this.fail(new Error(`sizebudget: a worker failed: ${e.data.message}`));
    });
    return w;
  }

  fail(err) {
    this.broken = true;
    if (this.job) {
      const job = this.job;
      this.job = null;
      job.reject(err);
    }
    if (team === this) team = null;
  }

  async start() {
    const helpers = this.size > 1 ? this.size : 0;
    const ports = [];
    const waits = [];
    const started = (w) => new Promise((resolve, reject) => {
      w.addEventListener('message', function once(e) {
        if (e.data.type === 'ready') {
          w.removeEventListener('message', once);
          resolve();
        } else if (e.data.type === 'fatal') reject(new Error(e.data.message));
      });
      w.addEventListener('error', (e) => reject(new Error(e.message || 'worker failed to start')));
    });
    for (let i = 0; i < helpers; i++) {
      const w = this.spawn(`sizebudget helper ${i + 1}`);
      const ch = new MessageChannel();
      ports.push(ch.port1);
      waits.push(started(w));
      w.postMessage({ type: 'init', role: 'helper', module: compiled, port: ch.port2 }, [ch.port2]);
    }
    const c = this.spawn('sizebudget coordinator');
    this.coordinator = c;
    waits.push(started(c));
    c.postMessage({ type: 'init', role: 'coordinator', module: compiled, ports }, ports);
    c.addEventListener('message', (e) => this.onMessage(e.data));
    await Promise.all(waits);
  }

  onMessage(m) {
    const job = this.job;
    if (!job || m.id !== job.id) return;
    if (m.type === 'progress') {
      if (m.phase === 'read') {
        job.onProgress({ phase: 'read', bytes: m.bytes, total: m.total, fraction: m.total > 0 ? m.bytes / m.total : 1 });
      } else {
        const p = { done: m.done, planned: m.planned, fraction: m.planned > 0 ? m.done / m.planned : 0 };
        if (m.phase) p.phase = m.phase;
        job.onProgress(p);
      }
    } else if (m.type === 'result') {
      this.job = null;
      let result = JSON.parse(m.result);
      if (job.kind === 'analyze') result = analysisResult(result);
      Object.defineProperty(result, 'charts', { value: m.charts || {}, enumerable: false });
      job.resolve(result);
    } else if (m.type === 'error') {
      this.job = null;
      job.reject(errorFrom(m.error));
    }
  }

  run(kind, id, text, options, onProgress, file) {
    return new Promise((resolve, reject) => {
      this.job = { id, kind, resolve, reject, onProgress };
      this.coordinator.postMessage({ type: 'run', kind, id, scenario: text, options: JSON.stringify(options), file });
    });
  }

  terminate() {
    for (const w of this.workers) w.terminate();
    this.workers = [];
    if (this.job) {
      this.job.reject(abortError());
      this.job = null;
    }
  }
}

let team = null;
let teamSize = 0;
let jobs = 0;
let current = null; // {cancel}

function getTeam(size) {
  if (!team || team.broken || teamSize !== size) {
    if (team) team.terminate();
    team = new Team(size);
    teamSize = size;
  }
  return team;
}

// analysisResult turns the record a finished analysis returns ({file, settings, result, analysed})
// into the Analysis JSON, with the rest of the record as properties that JSON.stringify leaves out.
function analysisResult(rec) {
  const a = rec.result;
  for (const k of ['file', 'settings', 'analysed']) Object.defineProperty(a, k, { value: rec[k], enumerable: false });
  Object.defineProperty(a, 'record', { value: rec, enumerable: false });
  return a;
}

// record returns the stored form of an analysis ({file, settings, result, analysed}) from what
// analyze() returned or from a record itself, as JSON text; null and undefined pass through.
function recordText(analysis) {
  if (analysis === undefined || analysis === null) return analysis;
  if (typeof analysis === 'string') return analysis;
  const rec = analysis.record || analysis;
  if (!rec.file || !rec.settings || !rec.result || !rec.analysed) {
    throw new TypeError('sizebudget: an analysis to keep is what analyze() returned, or a record {file, settings, result, analysed}');
  }
  return JSON.stringify({ file: rec.file, settings: rec.settings, result: rec.result, analysed: rec.analysed });
}

// trackBlob returns a track file as a Blob: a File or Blob as it is, text as a File named name.
function trackBlob(fileOrText, name) {
  if (typeof Blob !== 'undefined' && fileOrText instanceof Blob) return fileOrText;
  if (typeof fileOrText === 'string') return new File([fileOrText], name || 'text', { type: 'text/csv' });
  throw new TypeError('sizebudget: a track file is a File, a Blob or its text');
}

// run starts a plan, a check or an analysis. Only one runs at a time: starting one cancels the one in
// progress.
async function run(kind, scenario, opts = {}, file = undefined) {
  await ready;
  const text = toText(scenario);
  const v = JSON.parse(callSync(kind === 'analyze' ? 'validateAnalysis' : 'validate', text));
  if (!v.ok) throw errorFrom(v);
  if (current) current.cancel();
  const size = opts.workers ? Math.max(1, Math.min(MAX_WORKERS, opts.workers | 0)) : defaultWorkers();
  const t = getTeam(size);
  let cancelled = false;
  const me = {
    cancel() {
      cancelled = true;
      if (team === t) {
        t.terminate();
        team = null;
      }
    },
  };
  current = me;
  const onAbort = () => me.cancel();
  if (opts.signal) {
    if (opts.signal.aborted) me.cancel();
    opts.signal.addEventListener('abort', onAbort, { once: true });
  }
  try {
    try {
      await t.ready;
    } catch (e) {
      t.fail(e);
      t.terminate();
      throw e;
    }
    if (cancelled) throw abortError();
    const started = performance.now();
    const onProgress = typeof opts.onProgress === 'function' ? opts.onProgress : () => {};
    const result = await t.run(kind, ++jobs, text, { engine: opts.engine || '' }, onProgress, file);
    Object.defineProperty(result, 'elapsed_ms', { value: performance.now() - started, enumerable: false });
    return result;
  } catch (e) {
    if (cancelled) throw abortError();
    throw e;
  } finally {
    if (opts.signal) opts.signal.removeEventListener('abort', onAbort);
    if (current === me) current = null;
    if (cancelled) prewarm();
  }
}

// prewarm makes a team ready for the next job in the background, so that a first result (or the
// next one after a cancel) does not wait for the workers to start.
function prewarm() {
  setTimeout(() => {
    if (!current) getTeam(defaultWorkers()).ready.catch((e) => console.warn('sizebudget: workers:', e.message));
  }, 0);
}

// ---- the API ---------------------------------------------------------------------------------------

const parse = async (p) => JSON.parse(await p);

const ready = (async () => {
  const opened = await loadCore();
  return { version: version(), storage: opened.storage, storageProblem: opened.problem || '', workers: defaultWorkers() };
})();

export const sizebudget = {
  ready,
  get version() {
    return version();
  },
  demo() {
    if (!core) throw new Error('sizebudget: not ready yet; await sizebudget.ready');
    return JSON.parse(callSync('demo'));
  },
  validate(scenario) {
    if (!core) throw new Error('sizebudget: not ready yet; await sizebudget.ready');
    return JSON.parse(callSync('validate', toText(scenario)));
  },
  plan: (scenario, opts) => run('plan', scenario, opts),
  check: (scenario, opts) => run('check', scenario, opts),
  analyze: async (fileOrText, settings, opts = {}) => run('analyze', settings, opts, trackBlob(fileOrText, opts.name)),
  validateAnalysis(settings) {
    if (!core) throw new Error('sizebudget: not ready yet; await sizebudget.ready');
    return JSON.parse(callSync('validateAnalysis', toText(settings)));
  },
  analysisCharts(result) {
    if (!core) throw new Error('sizebudget: not ready yet; await sizebudget.ready');
    return { ...callSync('analysisCharts', typeof result === 'string' ? result : JSON.stringify(result)) };
  },
  cancel() {
    if (current) current.cancel();
  },
  sessions: {
    save: async (scenario, name = '', note = '', analysis = undefined) => {
      await ready;
      return (await parse(core.save(toText(scenario), name, note, recordText(analysis)))).id;
    },
    update: async (id, scenario, analysis = undefined) => {
      await ready;
      return parse(core.update(id, toText(scenario), recordText(analysis)));
    },
    list: async (query = '') => {
      await ready;
      return parse(core.list(query));
    },
    get: async (id) => {
      await ready;
      return parse(core.get(id));
    },
    rename: async (id, name, note = '') => {
      await ready;
      return parse(core.rename(id, name, note));
    },
    duplicate: async (id) => {
      await ready;
      return (await parse(core.duplicate(id))).id;
    },
    remove: async (id) => {
      await ready;
      return parse(core.remove(id));
    },
    restore: async (session) => {
      await ready;
      await core.restore(JSON.stringify(session));
    },
  },
  exportAll: async () => {
    await ready;
    return core.exportSessions();
  },
  exportOne: async (id) => {
    await ready;
    return core.exportSessions(id);
  },
  importAll: async (text) => {
    await ready;
    return parse(core.importSessions(String(text)));
  },
  draft: {
    get: async () => {
      await ready;
      const d = await core.draft();
      return typeof d === 'string' ? d : null;
    },
    save: async (text) => {
      await ready;
      await core.saveDraft(String(text));
    },
  },
};

globalThis.sizebudget = sizebudget;
