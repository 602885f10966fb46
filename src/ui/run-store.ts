/**
 * Finished runs kept in IndexedDB, keyed by spec hash and run index, so a
 * reload (or a crash of the tab) loses nothing: the sheet shows them and runs
 * only the missing ones. Only deterministic outcomes are kept ('ok' and
 * 'diverged'); a failed or cancelled run is run again next time.
 *
 * Where IndexedDB is unavailable (a private window that refuses it), the store
 * degrades to memory and says so through `persistent`.
 */
import type { RunResult } from '../experiment/run.ts';
import { ENGINE_VERSION } from '../experiment/results.ts';

/**
 * Kept runs belong to a spec AND an engine: an engine that computes different numbers for the
 * same spec (new task inputs, a new scoring set) must not be shown an older engine's runs.
 */
export function keptRunsKey(specHash: string): string {
  return `${ENGINE_VERSION}:${specHash}`;
}

export interface RunStore {
  readonly persistent: boolean;
  load(specHash: string): Promise<RunResult[]>;
  save(specHash: string, result: RunResult): Promise<void>;
  forget(specHash: string): Promise<void>;
}

interface StoredRun {
  /** keptRunsKey(spec hash): engine version and spec hash. */
  specHash: string;
  index: number;
  savedAt: string;
  result: RunResult;
}

const DB_NAME = 'farfield';
const DB_VERSION = 1;
const RUNS = 'runs';

export function keepable(result: RunResult): boolean {
  return result.status === 'ok' || result.status === 'diverged';
}

function request<T>(req: IDBRequest<T>): Promise<T> {
  return new Promise((resolve, reject) => {
    req.onsuccess = () => resolve(req.result);
    req.onerror = () => reject(req.error ?? new Error('IndexedDB request failed'));
  });
}

function openDb(): Promise<IDBDatabase> {
  return new Promise((resolve, reject) => {
    const req = indexedDB.open(DB_NAME, DB_VERSION);
    req.onupgradeneeded = () => {
      const db = req.result;
      if (!db.objectStoreNames.contains(RUNS)) {
        const store = db.createObjectStore(RUNS, { keyPath: ['specHash', 'index'] });
        store.createIndex('bySpec', 'specHash');
      }
    };
    req.onsuccess = () => resolve(req.result);
    req.onerror = () => reject(req.error ?? new Error('IndexedDB could not open'));
    req.onblocked = () => reject(new Error('IndexedDB is blocked by another tab'));
  });
}

export function memoryRunStore(): RunStore {
  const runs = new Map<string, Map<number, RunResult>>();
  return {
    persistent: false,
    load: async (hash) => [...(runs.get(hash)?.values() ?? [])].sort((a, b) => a.index - b.index),
    save: async (hash, result) => {
      if (!keepable(result)) return;
      if (!runs.has(hash)) runs.set(hash, new Map());
      runs.get(hash)!.set(result.index, result);
    },
    forget: async (hash) => {
      runs.delete(hash);
    },
  };
}

/** Open the IndexedDB store, or a memory store if IndexedDB refuses. */
export async function openRunStore(): Promise<RunStore> {
  let db: IDBDatabase;
  try {
    if (typeof indexedDB === 'undefined') throw new Error('no IndexedDB');
    db = await openDb();
  } catch {
    return memoryRunStore();
  }
  return {
    persistent: true,
    async load(hash) {
      const tx = db.transaction(RUNS, 'readonly');
      const rows = (await request(tx.objectStore(RUNS).index('bySpec').getAll(IDBKeyRange.only(keptRunsKey(hash))))) as StoredRun[];
      return rows.map((row) => row.result).sort((a, b) => a.index - b.index);
    },
    async save(hash, result) {
      if (!keepable(result)) return;
      const tx = db.transaction(RUNS, 'readwrite');
      const row: StoredRun = { specHash: keptRunsKey(hash), index: result.index, savedAt: new Date().toISOString(), result };
      await request(tx.objectStore(RUNS).put(row));
    },
    async forget(hash) {
      const tx = db.transaction(RUNS, 'readwrite');
      const store = tx.objectStore(RUNS);
      const keys = await request(store.index('bySpec').getAllKeys(IDBKeyRange.only(keptRunsKey(hash))));
      await Promise.all(keys.map((key) => request(store.delete(key))));
    },
  };
}
