// Point markers told apart by shape, not only colour: a filled disc, an open square, an open
// diamond, an open triangle. Drawn centred on the origin (place them with a translate).

import { copper, ink } from '../../design/palette';

export type MarkerShape = 'disc' | 'square' | 'diamond' | 'triangle';

export function MarkerGlyph({ shape, size = 5 }: { shape: MarkerShape; size?: number }) {
  const s = size;
  switch (shape) {
    case 'disc':
      return <circle r={s} fill={ink[900]} stroke="white" strokeWidth="1.5" />;
    case 'square':
      return <rect x={-s + 0.5} y={-s + 0.5} width={2 * s - 1} height={2 * s - 1} fill="white" stroke={copper[700]} strokeWidth="2" />;
    case 'diamond':
      return <path d={`M0 ${-s - 1}L${s + 1} 0L0 ${s + 1}L${-s - 1} 0Z`} fill="white" stroke={copper[700]} strokeWidth="2" />;
    case 'triangle':
      return <path d={`M0 ${-s - 1}L${s + 1} ${s}L${-s - 1} ${s}Z`} fill="white" stroke={ink[800]} strokeWidth="1.8" />;
  }
}
