// A Web Worker with its own instance of the sizebudget engine (main.wasm, compiled once by the page
// and sent here). Its role comes with the first message:
//   coordinator — runs plans, checks and analyses of track files for the page (and hands Monte
//                 Carlo chunks to the helpers whose MessagePorts it is given);
//   helper      — computes the chunks it is sent on its MessagePort.
// Messages: page → worker {type: 'init', role, module, ports | port}, {type: 'run', kind, id,
// scenario, options, file} (file: the track file of an analysis, a Blob, read here in chunks);
// worker → page {type: 'ready'}, {type: 'fatal', message}, and from the coordinator
// {type: 'progress' | 'result' | 'error', id, ...} (see wasm/coordinator.go and wasm/analysis.go).
'use strict';

/* global Go */
importScripts('wasm_exec.js');

let engine = null;

self.onmessage = async (e) => {
  const m = e.data;
  try {
    if (m.type === 'init') {
      self.sizebudgetRole = m.role;
      const go = new Go();
      // The Monte Carlo allocates fast on a small live heap: a higher GC target halves the time of
      // a first plan and costs a few megabytes per worker.
      go.env = { GOGC: '400' };
      const instance = await WebAssembly.instantiate(m.module, go.importObject);
      go.run(instance);
      engine = self.sizebudgetWorker;
      if (m.role === 'helper') {
        m.port.onmessage = (ev) => engine.chunks(ev.data, m.port);
      } else {
        const r = engine.attach(m.ports || []);
        if (r && r.error) throw r.error;
      }
      self.postMessage({ type: 'ready' });
    } else if (m.type === 'run') {
      const r = engine.run(m.kind, m.id, m.scenario, m.options || '', m.file);
      if (r && r.error) {
        self.postMessage({ type: 'error', id: m.id, error: { message: r.error.message, field: r.error.field || '' } });
      }
    }
  } catch (err) {
    self.postMessage({ type: 'fatal', message: String((err && err.message) || err) });
  }
};
