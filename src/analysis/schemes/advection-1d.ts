/**
 * Reference schemes for linear advection u_t + a u_x = 0 on a periodic grid, written in flux
 * form u_i^{n+1} = u_i^n - c (F_{i+1/2} - F_{i-1/2}) with the Courant number c = a dt / dx.
 * They make the fixture files and the reference tests: what a correct (TVD) scheme and an
 * oscillating (linear second-order) scheme look like to the analyser.
 */
import { limiterCode, psi, type LimiterCode, type LimiterName } from './limiters';

export type SchemeName = 'upwind' | 'lax-wendroff' | 'warming-beam' | 'limited';

export const SCHEME_NAMES: readonly SchemeName[] = ['upwind', 'lax-wendroff', 'warming-beam', 'limited'];

/** Numeric scheme codes so the line loop switches on a number. */
export type SchemeCode = 0 | 1 | 2 | 3;
const UPWIND = 0;
const LAX_WENDROFF = 1;
const WARMING_BEAM = 2;
const LIMITED = 3;

export interface SchemeChoice {
  scheme: SchemeCode;
  limiter: LimiterCode;
}

/**
 * Checks a scheme name (and limiter, required for 'limited') and turns them into codes.
 *
 * References: Sweby 1984, "High resolution schemes using flux limiters for hyperbolic
 * conservation laws".
 */
export function schemeChoice(scheme: SchemeName, limiter?: LimiterName): SchemeChoice {
  switch (scheme) {
    case 'upwind':
      return { scheme: UPWIND, limiter: 0 };
    case 'lax-wendroff':
      return { scheme: LAX_WENDROFF, limiter: 0 };
    case 'warming-beam':
      return { scheme: WARMING_BEAM, limiter: 0 };
    case 'limited':
      if (limiter === undefined) throw new RangeError("scheme 'limited' needs a limiter");
      return { scheme: LIMITED, limiter: limiterCode(limiter) };
    default:
      throw new RangeError(`unknown scheme "${String(scheme)}"`);
  }
}

/**
 * psi(r) * dPlus, the second-order correction of the flux, without dividing when dPlus is 0:
 * upwind 0, Lax-Wendroff dPlus, Warming-Beam dMinus, limited psi(dMinus/dPlus) * dPlus.
 */
function correction(choice: SchemeChoice, dMinus: number, dPlus: number): number {
  switch (choice.scheme) {
    case LAX_WENDROFF:
      return dPlus;
    case WARMING_BEAM:
      return dMinus;
    case LIMITED:
      // Every limiter is bounded (psi <= 2), so the correction vanishes with dPlus.
      return dPlus === 0 ? 0 : psi(choice.limiter, dMinus / dPlus) * dPlus;
    default:
      return 0;
  }
}

/**
 * One time step of the flux-form scheme along a periodic line of `n` values read from `src` at
 * `offset + k * stride` and written to `dst` at the same places. `flux` (length >= n) is scratch:
 * flux[i] holds F_{i+1/2} / a.
 *
 * Flux for c >= 0 (upwind cell i):   F_{i+1/2} = u_i + (1 - c)/2 * psi(r_i) (u_{i+1} - u_i),
 *   r_i = (u_i - u_{i-1}) / (u_{i+1} - u_i);
 * for c < 0 (upwind cell i+1):       F_{i+1/2} = u_{i+1} - (1 - |c|)/2 * psi(r) (u_{i+1} - u_i),
 *   r = (u_{i+2} - u_{i+1}) / (u_{i+1} - u_i).
 * psi = 0 is first-order upwind, psi = 1 Lax-Wendroff, psi = r Warming-Beam. With a limiter in
 * Sweby's region the scheme is TVD for |c| <= 1.
 *
 * References: Lax & Wendroff 1960, "Systems of conservation laws"; Warming & Beam 1976,
 * "Upwind second-order difference schemes and applications in aerodynamic flows"; Sweby 1984,
 * "High resolution schemes using flux limiters for hyperbolic conservation laws"; LeVeque 2002,
 * "Finite Volume Methods for Hyperbolic Problems" (chapter 6).
 */
export function advectLine(
  n: number,
  src: Float64Array,
  dst: Float64Array,
  offset: number,
  stride: number,
  courant: number,
  choice: SchemeChoice,
  flux: Float64Array,
): void {
  if (n === 0) return;
  const half = 0.5 * (1 - Math.abs(courant));
  for (let i = 0; i < n; i++) {
    // Periodic neighbours i-1, i+1, i+2 (n may be as small as 1).
    const im1 = (i - 1 + n) % n;
    const ip1 = (i + 1) % n;
    const ip2 = (i + 2) % n;
    const u0 = src[offset + i * stride]!;
    const u1 = src[offset + ip1 * stride]!;
    if (courant >= 0) {
      flux[i] = u0 + half * correction(choice, u0 - src[offset + im1 * stride]!, u1 - u0);
    } else {
      flux[i] = u1 - half * correction(choice, src[offset + ip2 * stride]! - u1, u1 - u0);
    }
  }
  for (let i = 0; i < n; i++) {
    const left = i === 0 ? flux[n - 1]! : flux[i - 1]!;
    dst[offset + i * stride] = src[offset + i * stride]! - courant * (flux[i]! - left);
  }
}

export interface Advection1dOptions {
  /** Initial cell values; not modified. */
  initial: Float64Array;
  /** Courant number c = a dt / dx; the schemes are stable (and the limited ones TVD) for |c| <= 1. */
  courant: number;
  /** Number of time steps. */
  steps: number;
  scheme: SchemeName;
  /** Required when scheme is 'limited'. */
  limiter?: LimiterName;
  /** Keep a snapshot every `every` steps (default 1). */
  every?: number;
}

/**
 * Advances `initial` by `steps` steps of the chosen scheme on a periodic grid and returns the
 * snapshots at steps 0, every, 2*every, ... (<= steps), each a fresh Float64Array. Step 0 is a copy
 * of `initial`. Formulas: see `advectLine`.
 *
 * References: LeVeque 2002, "Finite Volume Methods for Hyperbolic Problems"; Sweby 1984, "High
 * resolution schemes using flux limiters for hyperbolic conservation laws".
 */
export function runAdvection1d(options: Advection1dOptions): Float64Array[] {
  const { initial, courant, steps } = options;
  const every = options.every ?? 1;
  checkRun(courant, steps, every);
  const choice = schemeChoice(options.scheme, options.limiter);
  const n = initial.length;
  let current = Float64Array.from(initial);
  let next = new Float64Array(n);
  const flux = new Float64Array(n);
  const snapshots = [Float64Array.from(current)];
  for (let s = 1; s <= steps; s++) {
    advectLine(n, current, next, 0, 1, courant, choice, flux);
    [current, next] = [next, current];
    if (s % every === 0) snapshots.push(Float64Array.from(current));
  }
  return snapshots;
}

/**
 * Shared argument checks of the 1D and 2D runners: finite Courant number, integer steps >= 0,
 * integer every >= 1.
 *
 * References: none (argument validation).
 */
export function checkRun(courant: number, steps: number, every: number): void {
  if (!Number.isFinite(courant)) throw new RangeError('courant must be a finite number');
  if (!Number.isInteger(steps) || steps < 0) throw new RangeError('steps must be an integer >= 0');
  if (!Number.isInteger(every) || every < 1) throw new RangeError('every must be an integer >= 1');
}
