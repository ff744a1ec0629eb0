// Entry of the preview's worker thread when the server runs from TypeScript sources
// (tsx, vitest): a worker does not inherit its parent's loader, so it registers tsx
// and then loads the real entry, decks-preview-worker.ts, named in workerData.
import { workerData } from 'node:worker_threads';
import { tsImport } from 'tsx/esm/api';

await tsImport(workerData.entry, import.meta.url);
