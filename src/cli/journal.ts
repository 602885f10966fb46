/**
 * Durable record of finished runs: one JSON line per run, appended and flushed
 * (fsync) as each run completes, so an interrupted experiment loses at most the
 * runs in flight. The first line names the spec hash so a journal is never
 * resumed against a different experiment.
 */
import { closeSync, existsSync, fsyncSync, openSync, readFileSync, writeSync } from 'node:fs';
import type { RunResult } from '../experiment/run.ts';
import { ENGINE_VERSION } from '../experiment/results.ts';

export interface JournalHeader {
  kind: 'farfield-journal';
  specHash: string;
  /** Absent in journals written before it was recorded (engine 0.1.0). */
  engineVersion?: string;
}

export function readJournal(path: string, specHash: string): RunResult[] {
  if (!existsSync(path)) return [];
  const lines = readFileSync(path, 'utf8').split('\n');
  const header = JSON.parse(lines[0] || '{}') as Partial<JournalHeader>;
  if (header.kind !== 'farfield-journal') throw new Error(`cli/journal: ${path} is not a farfield run journal`);
  if (header.specHash !== specHash) {
    throw new Error(`cli/journal: ${path} belongs to spec ${header.specHash}, not ${specHash}; remove it or pass a different --out`);
  }
  const written = header.engineVersion ?? '0.1.0';
  if (written !== ENGINE_VERSION) {
    throw new Error(`cli/journal: ${path} was written by engine ${written}, which computes different numbers than this engine (${ENGINE_VERSION}); remove it or pass a different --out`);
  }
  const runs: RunResult[] = [];
  for (const line of lines.slice(1)) {
    if (!line.trim()) continue;
    try {
      runs.push(JSON.parse(line) as RunResult);
    } catch {
      // A line cut short by a kill mid-write: that run counts as not finished.
    }
  }
  return runs;
}

export class Journal {
  private readonly fd: number;

  constructor(readonly path: string, specHash: string, append: boolean) {
    const fresh = !append || !existsSync(path);
    this.fd = openSync(path, fresh ? 'w' : 'a');
    if (fresh) this.write({ kind: 'farfield-journal', specHash, engineVersion: ENGINE_VERSION } satisfies JournalHeader);
  }

  private write(value: unknown): void {
    writeSync(this.fd, JSON.stringify(value) + '\n');
    fsyncSync(this.fd);
  }

  append(run: RunResult): void {
    this.write(run);
  }

  close(): void {
    closeSync(this.fd);
  }
}
