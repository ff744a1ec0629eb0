// The picture of a finding, chosen by its plot payload (shared/findings.ts).

import type { FindingPlot as FindingPlotData } from '../../../shared/findings';
import { BudgetPlot } from './BudgetPlot';
import { ChainPlot } from './ChainPlot';
import { TransferPlot } from './TransferPlot';

export { BudgetPlot, ChainPlot, TransferPlot };

export const PLOT_TITLES: Record<FindingPlotData['kind'], string> = {
  transfer: 'Transfer curve',
  chain: 'Level through the chain',
  budget: 'Budget against limits',
};

export function FindingPlot({ plot }: { plot: FindingPlotData }) {
  switch (plot.kind) {
    case 'transfer':
      return <TransferPlot plot={plot} />;
    case 'chain':
      return <ChainPlot plot={plot} />;
    case 'budget':
      return <BudgetPlot plot={plot} />;
  }
}
