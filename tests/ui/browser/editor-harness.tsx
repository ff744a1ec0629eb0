// A page with nothing but the netlist editor, built like the app (same Vite config, Monaco
// bundled, worker from Vite) so a real browser can show that it renders, colours and marks.

import '@fontsource/ibm-plex-sans/400.css';
import '@fontsource/ibm-plex-sans/600.css';
import '@fontsource/ibm-plex-mono/400.css';
import '../../../src/styles.css';

import { useState } from 'react';
import { createRoot } from 'react-dom/client';
import { NetlistEditor, type GutterMark } from '../../../src/features/editor';
import { DOMINO_AND2 } from '../fixtures';

// The instance's last node is spelt with a Cyrillic dze (U+0455) instead of a Latin s: a second
// net in all but appearance. The editor's look-alike marking (computed in Monaco's worker) shows it.
const NETLIST = DOMINO_AND2.replace('Xtag0 clk a0 b0 hit0 vdd vss', 'Xtag0 clk a0 b0 hit0 vdd vs\u0455');

const marks: GutterMark[] = [
  { line: 12, tone: 'error', label: 'Keeper too weak for the leakage of the evaluate stack at the slow corner (example mark).' },
  { line: 9, tone: 'warning', label: 'Charge sharing from node mid may pull dyn below the inverter’s switching threshold (example mark).' },
  { line: 15, tone: 'info', label: 'Output inverter skewed high: noted (example mark).' },
  { line: 6, tone: 'waived', label: 'Precharge size accepted by review (example mark).' },
];

function Harness() {
  const [clicked, setClicked] = useState<string>('none');
  return (
    <div className="flex h-screen flex-col gap-3 bg-ink-50 p-6">
      <p className="text-sm text-ink-600">
        Netlist editor check. Last mark clicked: <span data-testid="clicked">{clicked}</span>
      </p>
      <div className="min-h-0 flex-1 overflow-hidden rounded-lg border border-ink-200 bg-white shadow-xs">
        <NetlistEditor
          value={NETLIST}
          fileName="lk_dom_and2.sp"
          marks={marks}
          highlights={[
            { startLine: 12, endLine: 13, tone: 'error' },
            { startLine: 9, endLine: 10, tone: 'warning' },
            { startLine: 15, endLine: 15, tone: 'info' },
            { startLine: 6, endLine: 6, tone: 'waived' },
          ]}
          onMarkClick={(m) => setClicked(`${m.tone}@${m.line}`)}
        />
      </div>
    </div>
  );
}

createRoot(document.getElementById('root')!).render(<Harness />);
