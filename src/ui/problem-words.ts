/**
 * Problems in the reader's words. Validation names spec paths
 * ("arms[0].model.hidden: got 0, allowed at least 1"); the sheet shows the
 * label the reader sees on screen and, for an arm, its letter and name:
 * "Arm A (max) › Hidden width: got 0, allowed at least 1". The labels are the
 * sheet's own (ff-setup.ts, ff-question.ts and ff-arm-card.ts;
 * test/ui/problem-words.test.ts checks that each one is still on screen).
 */
import { armLetter } from './palette.ts';

/** Setup fields, by spec path (list entries name the whole list). */
export const SETUP_LABELS: Readonly<Record<string, string>> = {
  question: 'Question',
  expectation: 'Expected, and held equal',
  task: 'Task',
  'train.family': 'Training graph family',
  'train.sizes[0]': 'Smallest training graph (nodes)',
  'train.sizes[1]': 'Largest training graph (nodes)',
  'train.graphs': 'Training graphs per seed',
  'train.weightRange[0]': 'Smallest edge weight',
  'train.weightRange[1]': 'Largest edge weight',
  'test.family': 'Test graph family',
  'test.sizes': 'Test sizes (nodes, comma-separated)',
  'test.graphsPerRung': 'Test graphs per size',
  'test.weightScales': 'Weight scales (comma-separated; 1 = as in training)',
  'test.validationGraphs': 'Validation graphs',
  'seeds.count': 'Seeds per arm',
  'seeds.base': 'First seed',
  'budget.steps': 'Training steps',
  'budget.batchGraphs': 'Graphs per batch',
  'budget.learningRate': 'Learning rate',
  'budget.clipNorm': 'Gradient clip norm',
  'budget.loss': 'Loss',
  'budget.validateEvery': 'Validate every k steps (0: keep the last weights)',
  'budget.schedule.warmup': 'Warm-up steps',
  'budget.schedule.floor': 'Final rate as a fraction of the rate',
  'budget.fitGate': 'Fit gate, in percent',
  metric: 'Metric',
};

/** Arm card fields, by path inside the arm's model (or the arm itself). */
export const ARM_LABELS: Readonly<Record<string, string>> = {
  name: 'Name',
  note: 'Note',
  learningRate: "Learning rate (empty: the budget's)",
  aggregator: 'Aggregator',
  aggregatorTemperature: 'Aggregator temperature',
  message: 'Message function',
  messageTemperature: 'Message temperature',
  update: 'Update function',
  activation: 'Activation',
  bias: 'Bias in every layer',
  hidden: 'Hidden width',
  nodeTransform: 'Node input',
  edgeTransform: 'Edge input',
  'steps.rule': 'Message-passing step rule',
  'steps.count': 'Fixed step count',
  'steps.factor': 'Steps per node',
  'steps.tolerance': 'Stability tolerance',
  'steps.cap': 'Most message-passing steps',
  'steps.trainJitter': 'Training step jitter',
};

const PROBLEM = /^([A-Za-z_$][\w$]*(?:\.[A-Za-z_$][\w$]*|\[\d+\])*): ([\s\S]*)$/;

function setupLabel(path: string): string | null {
  if (SETUP_LABELS[path]) return SETUP_LABELS[path]!;
  // "test.sizes[1]" → the list's label, and which entry.
  const entry = /^(.*)\[(\d+)\]$/.exec(path);
  if (entry && SETUP_LABELS[entry[1]!]) return `${SETUP_LABELS[entry[1]!]}, entry ${Number(entry[2]) + 1}`;
  return null;
}

function armLabel(rest: string): string | null {
  const inner = rest.replace(/^model\./, '').replace(/\[\d+\]$/, '');
  return ARM_LABELS[inner] ?? null;
}

/**
 * One problem in the reader's words; a problem naming no known field is
 * returned unchanged. `armNames` are the arms' names in order (for the letter
 * and the name in "Arm A (max) ›").
 */
export function problemInWords(problem: string, armNames: readonly string[]): string {
  const m = PROBLEM.exec(problem);
  if (!m) return problem;
  const [, path, detail] = m as unknown as [string, string, string];
  const arm = /^arms\[(\d+)\]\.(.+)$/.exec(path);
  if (arm) {
    const index = Number(arm[1]);
    const label = armLabel(arm[2]!);
    const name = armNames[index];
    const who = `Arm ${armLetter(index)}${name ? ` (${name})` : ''}`;
    return label ? `${who} › ${label}: ${detail}` : `${who} › ${arm[2]}: ${detail}`;
  }
  if (path.startsWith('model.')) {
    const label = armLabel(path);
    if (label) return `Every arm › ${label}: ${detail}`;
  }
  const label = setupLabel(path);
  return label ? `Setup › ${label}: ${detail}` : problem;
}

/** Every problem once, in the reader's words, in the order given. */
export function problemsInWords(problems: readonly string[], armNames: readonly string[]): string[] {
  return [...new Set(problems.map((p) => problemInWords(p, armNames)))];
}

/** Arm names from a file's text, as far as it can be read (for messages about a file that did not load). */
export function armNamesOf(text: string): string[] {
  try {
    const raw = JSON.parse(text) as { arms?: unknown };
    return Array.isArray(raw.arms) ? raw.arms.map((a: unknown) => (a && typeof a === 'object' && typeof (a as { name?: unknown }).name === 'string' ? (a as { name: string }).name : '')) : [];
  } catch {
    return [];
  }
}
