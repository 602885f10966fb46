/**
 * Memory probe for `farfield bench`: preloaded with `node -r` into the
 * `farfield run` child processes it times (Node runs `-r` preloads in every
 * worker thread too). Does nothing unless FARFIELD_BENCH_MEMORY_DIR is set.
 *
 * What it records, and why:
 * - Worker threads share one process, so resident memory (RSS) cannot be split
 *   per worker. Per worker it records the memory its own V8 isolate accounts
 *   for: heapTotal (the JS heap) + external (the tfjs WASM heap, which only
 *   grows, and ArrayBuffers), as reported by process.memoryUsage() inside the
 *   worker. A worker's event loop is blocked while it trains, so a timer alone
 *   would miss the busy stretches: it also samples every time the worker posts
 *   a message (progress at least every 250 ms, and each result).
 * - For the whole process (main thread and all workers) it records the peak
 *   RSS from getrusage (process.resourceUsage().maxRSS) at exit.
 * Each thread writes its own file <pid>-<threadId>.json in that directory.
 */
'use strict';
const dir = process.env.FARFIELD_BENCH_MEMORY_DIR;
if (dir) {
  const fs = require('node:fs');
  const path = require('node:path');
  const { isMainThread, threadId, parentPort } = require('node:worker_threads');
  const file = path.join(dir, `${process.pid}-${threadId}.json`);
  const write = (record) => {
    try {
      fs.writeFileSync(file, JSON.stringify(record));
    } catch {
      // Never disturb the run being measured.
    }
  };
  if (isMainThread) {
    process.on('exit', () => write({ thread: 'main', maxRssBytes: process.resourceUsage().maxRSS * 1024 }));
  } else {
    // Node also runs preloads in internal threads (tsx's module-loader hooks):
    // only a thread that posts the pool protocol's 'ready' counts as a pool worker.
    let pool = false;
    let peak = { bytes: 0, heapTotal: 0, external: 0 };
    let written = 0;
    const sample = (force) => {
      const m = process.memoryUsage();
      const value = m.heapTotal + m.external;
      if (value > peak.bytes) peak = { bytes: value, heapTotal: m.heapTotal, external: m.external };
      if (pool && (force || peak.bytes - written >= 1 << 20)) {
        written = peak.bytes;
        write({ thread: 'worker', threadId, peakBytes: peak.bytes, heapTotalBytes: peak.heapTotal, externalBytes: peak.external });
      }
    };
    if (parentPort) {
      const post = parentPort.postMessage;
      parentPort.postMessage = function postAndSample(message, transfer) {
        const type = message != null && typeof message === 'object' ? message.type : undefined;
        if (type === 'ready') pool = true;
        sample(type === 'ready' || type === 'done');
        return post.call(this, message, transfer);
      };
    }
    setInterval(() => sample(false), 100).unref();
  }
}
