/**
 * Flux limiters psi(r) for flux-limited schemes that blend the first-order upwind flux with the
 * Lax-Wendroff flux. r is the ratio of consecutive differences on the upwind side,
 * r_i = (u_i - u_{i-1}) / (u_{i+1} - u_i) for a positive velocity. psi = 0 gives upwind,
 * psi = 1 gives Lax-Wendroff, psi = r gives Warming-Beam.
 *
 * Every limiter below returns 0 for r <= 0 (at an extremum the scheme falls back to upwind) and
 * satisfies psi(1) = 1 (second order on smooth data), and lies in the TVD region
 * 0 <= psi(r) <= min(2r, 2) of Sweby (1984).
 *
 * References: Sweby 1984, "High resolution schemes using flux limiters for hyperbolic
 * conservation laws" (SIAM J. Numer. Anal. 21(5)).
 */

export type LimiterName = 'minmod' | 'superbee' | 'van-leer' | 'monotonized-central' | 'van-albada' | 'koren';

export const LIMITER_NAMES: readonly LimiterName[] = [
  'minmod',
  'superbee',
  'van-leer',
  'monotonized-central',
  'van-albada',
  'koren',
];

/** Small integer codes so the scheme loops switch on a number instead of calling closures. */
export type LimiterCode = 0 | 1 | 2 | 3 | 4 | 5;
const MINMOD = 0;
const SUPERBEE = 1;
const VAN_LEER = 2;
const MONOTONIZED_CENTRAL = 3;
const VAN_ALBADA = 4;
const KOREN = 5;

/**
 * The small integer code of a limiter name; throws RangeError for an unknown name.
 *
 * References: Sweby 1984, "High resolution schemes using flux limiters for hyperbolic
 * conservation laws".
 */
export function limiterCode(name: LimiterName): LimiterCode {
  switch (name) {
    case 'minmod':
      return MINMOD;
    case 'superbee':
      return SUPERBEE;
    case 'van-leer':
      return VAN_LEER;
    case 'monotonized-central':
      return MONOTONIZED_CENTRAL;
    case 'van-albada':
      return VAN_ALBADA;
    case 'koren':
      return KOREN;
    default:
      throw new RangeError(`unknown limiter "${String(name)}"`);
  }
}

/**
 * psi(r) for a limiter code. Formulas (all zero for r <= 0 and for NaN r):
 * - minmod: psi = max(0, min(1, r))                      (Roe 1985)
 * - superbee: psi = max(0, min(2r, 1), min(r, 2))        (Roe 1985)
 * - van Leer: psi = (r + |r|) / (1 + |r|)                (van Leer 1974)
 * - monotonized central: psi = max(0, min(2r, (1 + r)/2, 2))   (van Leer 1977)
 * - van Albada: psi = (r^2 + r) / (r^2 + 1) for r > 0, else 0  (van Albada, van Leer & Roberts 1982)
 * - Koren: psi = max(0, min(2r, (1 + 2r)/3, 2))          (Koren 1993)
 *
 * References: Roe 1985, "Some contributions to the modelling of discontinuous flows"; van Leer
 * 1974, "Towards the ultimate conservative difference scheme II. Monotonicity and conservation
 * combined in a second-order scheme"; van Leer 1977, "Towards the ultimate conservative
 * difference scheme IV. A new approach to numerical convection"; van Albada, van Leer & Roberts
 * 1982, "A comparative study of computational methods in cosmic gas dynamics"; Koren 1993, "A
 * robust upwind discretization method for advection, diffusion and source terms".
 */
export function psi(code: LimiterCode, r: number): number {
  // `!(r > 0)` also catches NaN (0/0 differences on a plateau): fall back to upwind there.
  if (!(r > 0)) return 0;
  switch (code) {
    case MINMOD:
      return r < 1 ? r : 1;
    case SUPERBEE: {
      const a = 2 * r < 1 ? 2 * r : 1;
      const b = r < 2 ? r : 2;
      return a > b ? a : b;
    }
    case VAN_LEER:
      // (r + |r|) / (1 + |r|) = 2r / (1 + r) for r > 0. Divided through by r only where 2r could
      // overflow (the plain form is kept elsewhere so fixture files stay bit-identical).
      return r > 1e300 ? 2 / (1 + 1 / r) : (2 * r) / (1 + r);
    case MONOTONIZED_CENTRAL:
      return Math.min(2 * r, 0.5 * (1 + r), 2);
    case VAN_ALBADA:
      // Divide through by r^2 for large r so r^2 cannot overflow.
      return r > 1 ? (1 + 1 / r) / (1 + 1 / (r * r)) : (r * r + r) / (r * r + 1);
    case KOREN:
      return Math.min(2 * r, (1 + 2 * r) / 3, 2);
    default:
      return 0;
  }
}

/**
 * The limiter psi(r) as a plain function, for callers outside the scheme loops (plots, tests).
 * Formulas: see `psi`.
 *
 * References: Sweby 1984, "High resolution schemes using flux limiters for hyperbolic
 * conservation laws"; the individual limiters' sources are listed on `psi`.
 */
export function limiterFunction(name: LimiterName): (r: number) => number {
  const code = limiterCode(name);
  return (r: number) => psi(code, r);
}
