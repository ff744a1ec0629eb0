// The checker, run over one netlist with several decks, inside a worker thread so
// that the API stays responsive and a preview can be stopped at its time limit.
// `checkWithDecks` is plain computation; the bottom of the file is the thread's entry,
// which answers each job posted to it with { id, ok, outcomes | error }.

import { parentPort, workerData } from 'node:worker_threads';
import { readDesign, type Design } from '../../grammar/index';
import { checkDesign } from '../../rules/engine';
import type { Deck } from '../../shared/deck';
import type { Finding } from '../../shared/findings';

export interface PreviewJob {
  id: number;
  /** Stored path (forward slashes) and text of each netlist file. */
  files: [string, string][];
  decks: Deck[];
}

export interface PreviewOutcome {
  findings: Finding[];
  parseErrors: number;
}

/** Check the same files against each deck. The design is read once per distinct reading setting (scale, device map, supplies). */
export function checkWithDecks(files: [string, string][], decks: Deck[]): PreviewOutcome[] {
  const designs = new Map<string, Design>();
  return decks.map((deck) => {
    const reading = { defaultScale: deck.scale, deviceMap: deck.deviceMap, supplies: deck.supplies };
    const key = JSON.stringify(reading);
    let design = designs.get(key);
    if (!design) designs.set(key, (design = readDesign(new Map(files), reading)));
    const { findings } = checkDesign(design, deck);
    // Plots are for the run page; the preview lists what appears and disappears.
    return { findings: findings.map((f) => ({ ...f, plot: null })), parseErrors: design.diagnostics.filter((d) => d.severity === 'error').length };
  });
}

const port = parentPort;
if (port && (workerData as { kind?: string } | undefined)?.kind === 'keepwell-deck-preview-thread') {
  port.on('message', (job: PreviewJob) => {
    try {
      port.postMessage({ id: job.id, ok: true, outcomes: checkWithDecks(job.files, job.decks) });
    } catch (err) {
      port.postMessage({ id: job.id, ok: false, error: err instanceof Error ? err.message : String(err) });
    }
  });
}
