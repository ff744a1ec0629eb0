// Entry of the preview's worker thread when the server runs from TypeScript sources
// (tsx, vitest): a worker does not inherit its parent's loader, so it registers tsx
// and then loads the real entry, decks-preview-worker.ts, named in workerData.
import { workerData } from 'node:worker_threads';
import { tsImport } from 'tsx/esm/api';

// A thread whose event loop looks empty exits (code 0); while the loader works on another
// thread nothing here is pending, so a timer holds the thread open until the entry listens.
const hold = setInterval(() => {}, 60_000);
try {
  await tsImport(workerData.entry, import.meta.url);
} finally {
  clearInterval(hold);
}
