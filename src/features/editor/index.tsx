// The editor is loaded on demand: Monaco is large, and pages that never show a netlist
// (sign-in above all) must not carry it.

import { lazy, Suspense } from 'react';
import { Loading } from '../../components/LoadState';
import type { NetlistEditorProps } from './types';

export type { GutterMark, HighlightRange, MarkTone, NetlistEditorProps, NetlistFileText } from './types';

const LazyEditor = lazy(() => import('./NetlistEditor'));

export function NetlistEditor(props: NetlistEditorProps) {
  return (
    <Suspense fallback={<Loading label="Loading the editor…" />}>
      <LazyEditor {...props} />
    </Suspense>
  );
}
