// Bracketed one-dimensional solvers: Brent's method for roots (R. P. Brent,
// "Algorithms for Minimization without Derivatives", 1973, ch. 4 — inverse quadratic
// interpolation with a bisection safeguard, so it converges on any bracket of a sign
// change, even for kinked or discontinuous functions), and golden-section search for
// a maximum.

const EPS = Number.EPSILON;

/**
 * A root of `f` in [a, b], where f(a) and f(b) do not share a sign.
 * Returns the end with the smaller |f| when the signs do not bracket a root.
 * `tol` is the absolute tolerance on x.
 */
export function brent(f: (x: number) => number, a: number, b: number, tol: number, maxIter = 200, fa0?: number, fb0?: number): number {
  let fa = fa0 ?? f(a);
  let fb = fb0 ?? f(b);
  if (fa === 0) return a;
  if (fb === 0) return b;
  if ((fa > 0) === (fb > 0)) return Math.abs(fa) < Math.abs(fb) ? a : b;
  let c = a;
  let fc = fa;
  let d = b - a;
  let e = d;
  for (let i = 0; i < maxIter; i++) {
    if ((fb > 0) === (fc > 0)) {
      c = a;
      fc = fa;
      d = b - a;
      e = d;
    }
    if (Math.abs(fc) < Math.abs(fb)) {
      a = b;
      b = c;
      c = a;
      fa = fb;
      fb = fc;
      fc = fa;
    }
    const tol1 = 2 * EPS * Math.abs(b) + 0.5 * tol;
    const xm = 0.5 * (c - b);
    if (Math.abs(xm) <= tol1 || fb === 0) return b;
    if (Math.abs(e) >= tol1 && Math.abs(fa) > Math.abs(fb)) {
      const s = fb / fa;
      let p: number;
      let q: number;
      if (a === c) {
        p = 2 * xm * s;
        q = 1 - s;
      } else {
        const qq = fa / fc;
        const r = fb / fc;
        p = s * (2 * xm * qq * (qq - r) - (b - a) * (r - 1));
        q = (qq - 1) * (r - 1) * (s - 1);
      }
      if (p > 0) q = -q;
      else p = -p;
      if (2 * p < Math.min(3 * xm * q - Math.abs(tol1 * q), Math.abs(e * q))) {
        e = d;
        d = p / q;
      } else {
        d = xm;
        e = d;
      }
    } else {
      d = xm;
      e = d;
    }
    a = b;
    fa = fb;
    b += Math.abs(d) > tol1 ? d : xm > 0 ? tol1 : -tol1;
    fb = f(b);
  }
  return b;
}

/**
 * A root of a monotone `f` on [lo, hi], searched first near `guess`: the bracket grows
 * from `step` by a factor of four each time until the sign changes (or the interval
 * ends), then Brent's method finishes. Successive solves of slowly moving problems
 * (a swept curve, the nodes of a stack inside an outer solve) start next to their
 * previous answer and need a handful of evaluations instead of a full-interval search.
 */
export function brentNear(
  f: (x: number) => number,
  lo: number,
  hi: number,
  guess: number,
  step: number,
  tol: number,
  decreasing: boolean,
): number {
  if (!(hi > lo)) return lo;
  let g = guess >= lo && guess <= hi ? guess : 0.5 * (lo + hi);
  let fg = f(g);
  if (fg === 0) return g;
  // The root lies above g when f is still on its starting side.
  const up = (fg > 0) === decreasing;
  let d = step;
  for (;;) {
    const x = up ? Math.min(g + d, hi) : Math.max(g - d, lo);
    const fx = f(x);
    if (fx === 0) return x;
    if ((fx > 0) !== (fg > 0)) return up ? brent(f, g, x, tol, 200, fg, fx) : brent(f, x, g, tol, 200, fx, fg);
    if (x === (up ? hi : lo)) return x;
    g = x;
    fg = fx;
    d *= 4;
  }
}

/** The x in [a, b] where `f` is largest, assuming one peak in the interval (golden-section search). */
export function goldenMax(f: (x: number) => number, a: number, b: number, tol: number): { x: number; value: number } {
  const g = (Math.sqrt(5) - 1) / 2;
  let x1 = b - g * (b - a);
  let x2 = a + g * (b - a);
  let f1 = f(x1);
  let f2 = f(x2);
  while (b - a > tol) {
    if (f1 < f2) {
      a = x1;
      x1 = x2;
      f1 = f2;
      x2 = a + g * (b - a);
      f2 = f(x2);
    } else {
      b = x2;
      x2 = x1;
      f2 = f1;
      x1 = b - g * (b - a);
      f1 = f(x1);
    }
  }
  return f1 > f2 ? { x: x1, value: f1 } : { x: x2, value: f2 };
}
