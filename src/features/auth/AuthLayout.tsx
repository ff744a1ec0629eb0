import type { ReactNode } from 'react';
import { Link } from 'react-router';
import { REVIEW_CAUTION } from '../../../shared/findings';
import { Logotype } from '../../components/Logo';
import { useDocumentTitle } from '../../lib/document-title';

/**
 * A restoring stage's transfer curve and its mirror image: the picture behind half of the
 * rule deck (a level is restored when the gain at the switching point exceeds one).
 * Decorative only; a logistic curve stands in for a real stage.
 */
function TransferMotif() {
  const size = 300;
  const gain = 9;
  const steps = 80;
  const pts: [number, number][] = [];
  for (let i = 0; i <= steps; i++) {
    const x = i / steps;
    const y = 1 / (1 + Math.exp(gain * (x - 0.5)));
    pts.push([x, y]);
  }
  const curve = pts.map(([x, y], i) => `${i ? 'L' : 'M'}${(x * size).toFixed(1)} ${((1 - y) * size).toFixed(1)}`).join(' ');
  const mirror = pts.map(([x, y], i) => `${i ? 'L' : 'M'}${(y * size).toFixed(1)} ${((1 - x) * size).toFixed(1)}`).join(' ');
  return (
    <svg viewBox={`-20 -20 ${size + 40} ${size + 40}`} className="h-auto w-full max-w-[340px]" aria-hidden="true">
      <defs>
        <pattern id="kw-grid" width="30" height="30" patternUnits="userSpaceOnUse">
          <path d="M30 0H0V30" fill="none" stroke="currentColor" strokeOpacity="0.08" strokeWidth="1" />
        </pattern>
      </defs>
      <rect x="0" y="0" width={size} height={size} fill="url(#kw-grid)" className="text-white" />
      <path d={`M0 ${size}H${size}M0 ${size}V0`} stroke="white" strokeOpacity="0.35" strokeWidth="1.5" fill="none" />
      <path d={`M0 ${size}L${size} 0`} stroke="white" strokeOpacity="0.18" strokeDasharray="4 6" fill="none" />
      <path d={mirror} stroke="#7dbdb6" strokeWidth="2" fill="none" strokeOpacity="0.7" />
      <path d={curve} stroke="#de9c69" strokeWidth="2.5" fill="none" />
      <circle cx={size / 2} cy={size / 2} r="4" fill="#de9c69" />
    </svg>
  );
}

export function AuthLayout({ title, intro, children, footer }: { title: string; intro?: ReactNode; children: ReactNode; footer?: ReactNode }) {
  useDocumentTitle(title);
  return (
    <div className="grid min-h-screen grid-cols-1 bg-ink-50 lg:grid-cols-[minmax(420px,5fr)_7fr]">
      <aside className="relative hidden flex-col justify-between overflow-hidden bg-well-900 px-12 py-10 text-well-50 lg:flex">
        <Logotype size={30} inverted />
        <div className="my-10 flex flex-col items-start gap-8">
          <TransferMotif />
          <div className="max-w-md">
            <p className="text-2xl font-semibold leading-snug tracking-tight text-white">Every dynamic node, every keeper, every restoring stage, checked before tape-out review.</p>
            <p className="mt-3 text-sm leading-6 text-well-100/85">
              Keepwell reads transistor-level netlists, recognises the structures in them and measures them against your team’s rule deck. Each
              finding points back to the netlist line that causes it.
            </p>
          </div>
        </div>
        <p className="max-w-md text-xs leading-5 text-well-100/70">{REVIEW_CAUTION}</p>
      </aside>
      <main className="flex flex-col px-6 py-10 sm:px-12">
        <div className="lg:hidden">
          <Logotype size={28} />
        </div>
        <div className="flex flex-1 items-center justify-center">
          <div className="w-full max-w-sm">
            <h1 className="text-2xl font-semibold tracking-tight text-ink-900">{title}</h1>
            {intro && <div className="mt-2 text-sm leading-6 text-ink-600">{intro}</div>}
            <div className="mt-8">{children}</div>
            {footer && <div className="mt-8 border-t border-ink-200 pt-5 text-sm text-ink-600">{footer}</div>}
          </div>
        </div>
      </main>
    </div>
  );
}

export function AuthLink({ to, children }: { to: string; children: ReactNode }) {
  return (
    <Link to={to} className="text-sm font-medium text-well-700 underline-offset-2 hover:text-well-800 hover:underline">
      {children}
    </Link>
  );
}
