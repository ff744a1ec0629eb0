// A check keeps nothing of the design alive once it returns. The worker's check threads
// and the deck preview outlive many checks; a module-level buffer that still pointed at
// the last design would hold a big flat netlist (about 1 GB for a million devices) while
// the process idles. Collection is forced through V8's own gc function, exposed at run time.

import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { setFlagsFromString } from 'node:v8';
import { runInNewContext } from 'node:vm';
import { describe, expect, it } from 'vitest';
import { defaultDeck } from '../../rules/default-deck';
import { checkDesign } from '../../rules/engine';
import { read } from '../recognition/support';

setFlagsFromString('--expose-gc');
const gc = runInNewContext('gc') as () => void;

const dir = join(import.meta.dirname, 'library');
const files = Object.fromEntries(
  readdirSync(dir)
    .filter((f) => f.endsWith('.sp'))
    .map((f) => [f, readFileSync(join(dir, f), 'utf8')]),
);

/** Checks a freshly read design and returns only weak references to it and to one of its cells. */
function checkAndForget(): { design: WeakRef<object>; cell: WeakRef<object> } {
  const deck = defaultDeck();
  const design = read(files, deck);
  checkDesign(design, deck);
  const cell = [...design.cells.values()].find((c) => c.mosfets.length > 0)!;
  return { design: new WeakRef(design), cell: new WeakRef(cell) };
}

describe('memory after a check', () => {
  it('lets the design be collected once the check has returned', async () => {
    const refs = checkAndForget();
    // A WeakRef target stays alive until the current job ends; collect after it.
    await new Promise((r) => setTimeout(r, 0));
    gc();
    expect(refs.cell.deref(), 'a cell of the checked design is still reachable').toBeUndefined();
    expect(refs.design.deref(), 'the checked design is still reachable').toBeUndefined();
  });
});
