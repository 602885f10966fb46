/**
 * Hard caps on what a preset, file or share link may ask for. They exist so a
 * stranger's link cannot freeze a browser tab or exhaust memory; each one is
 * listed in README.md ("Limits and bad input").
 */
import { GRAPH_FILE_LIMITS } from '../graphs/files/caps.ts';

export const LIMITS = {
  trainNodes: { min: 3, max: 128 },
  testNodes: { min: 3, max: 512 },
  trainGraphs: { min: 8, max: 4096 },
  testGraphsPerRung: { min: 1, max: 256 },
  validationGraphs: { min: 4, max: 512 },
  ladderRungs: { max: 32 },
  weightScale: { min: 1e-3, max: 1e3 },
  weightBound: { min: 1e-6, max: 1e6 },
  seeds: { min: 1, max: 64 },
  arms: { min: 2, max: 32 },
  totalRuns: { max: 512 },
  trainingSteps: { min: 1, max: 100_000 },
  batchGraphs: { min: 1, max: 256 },
  hidden: { min: 1, max: 256 },
  messageSteps: { max: 1024 },
  stepJitter: { max: 256 },
  learningRate: { min: 1e-6, max: 10 },
  temperature: { min: 1e-4, max: 100 },
  sparsity: { max: 1 },
  /** The fit gate is a relative error. */
  fitGate: { min: 1e-4, max: 10 },
  textLength: { max: 2000 },
  /** Share links: characters after '#', and bytes after decompression. */
  linkChars: { max: 16_384 },
  decompressedBytes: { max: 65_536 },
  /** Preset files read from disk. */
  fileBytes: { max: 262_144 },
  /** Graph files scored as test rungs: their caps live with the readers (src/graphs/files/caps.ts). */
  ...GRAPH_FILE_LIMITS,
} as const;
