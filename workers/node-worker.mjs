// Entry point for worker_threads: enable TypeScript loading, then start the adapter.
import { register } from 'tsx/esm/api';
register();
await import('./node-worker.ts');
