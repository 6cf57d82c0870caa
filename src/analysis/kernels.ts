/**
 * The per-step passes of the analyser: one sweep over the cells computes every metric of the step
 * (total variation, extrema, min/max, bound violations, mass, noise-floor weights, smooth-profile
 * allowance). No allocation and no closures inside the loops; the caller owns every buffer and
 * reuses it between steps. Where TV grew is worked out separately, and only for steps whose TV
 * grew beyond the noise floor (growth.ts).
 *
 * `pass1d` is the fast path for 1D grids with at least two cells; `passNd` handles any grid
 * (including 1D and axes of size 1) and is the reference the fast path is tested against.
 */
import { extremaOfPlateau, PLATEAU_BITS } from './extrema';
import type { CellSizes } from './grid';
import type { FieldArray } from './types';

/** Everything one pass measures. Reused between steps; `resetStats` clears it. */
export interface StepStats {
  tv: number;
  extrema: number;
  /** Sum over extrema of the two neighbouring significant differences, times 1/2. */
  allowance: number;
  min: number;
  max: number;
  argMin: number;
  argMax: number;
  /** Cells above `upperLimit` / below `lowerLimit`. */
  above: number;
  below: number;
  mass: number;
  /** sum |phi| * cell size */
  l1: number;
  /** W and A of the TV noise bound (noise-floor.ts). */
  weight: number;
  weightedMagnitude: number;
}

/**
 * A zeroed `StepStats`, allocated once per analyser.
 *
 * References: none (buffer management).
 */
export function createStats(): StepStats {
  return {
    tv: 0,
    extrema: 0,
    allowance: 0,
    min: 0,
    max: 0,
    argMin: 0,
    argMax: 0,
    above: 0,
    below: 0,
    mass: 0,
    l1: 0,
    weight: 0,
    weightedMagnitude: 0,
  };
}

/** Limits of one pass: noise floor and the bounds widened by it. */
export interface PassLimits {
  floor: number;
  upperLimit: number;
  lowerLimit: number;
}

/**
 * One sweep over a 1D line of n >= 2 cells. Per cell: min/max, bounds, mass (Neumaier), L1; per
 * edge (i, i+1), wrap-around included when periodic: |difference| into TV (Neumaier), its sign
 * with the noise floor (extrema by sign changes, plateaus once) and the TV noise weights. See
 * total-variation.ts, extrema.ts and noise-floor.ts for the rules.
 *
 * References: Neumaier 1974, "Rundungsfehleranalyse einiger Verfahren zur Summation endlicher
 * Summen"; Harten 1983, "High resolution schemes for hyperbolic conservation laws"; Higham 2002,
 * "Accuracy and Stability of Numerical Algorithms".
 */
export function pass1d(
  x: FieldArray,
  n: number,
  periodic: boolean,
  limits: PassLimits,
  widths: Float64Array | null,
  out: StepStats,
): void {
  const floor = limits.floor;
  const negFloor = -floor;
  const upperLimit = limits.upperLimit;
  const lowerLimit = limits.lowerLimit;
  const edges = periodic ? n : n - 1;
  let tvSum = 0;
  let tvCarry = 0;
  let massSum = 0;
  let massCarry = 0;
  let l1 = 0;
  let weight = 0;
  let weighted = 0;
  let min = Infinity;
  let max = -Infinity;
  let argMin = 0;
  let argMax = 0;
  let above = 0;
  let below = 0;
  let extrema = 0;
  let allowance = 0;
  let firstSign = 0;
  let firstSize = 0;
  let lastSign = 0;
  let lastSize = 0;
  let v = x[0]!;
  let inSign = 0;
  if (periodic) {
    const d = v - x[n - 1]!;
    inSign = d > floor ? 1 : d < negFloor ? -1 : 0;
  }
  for (let i = 0; i < n; i++) {
    if (v < min) {
      min = v;
      argMin = i;
    }
    if (v > max) {
      max = v;
      argMax = i;
    }
    if (v > upperLimit) above++;
    else if (v < lowerLimit) below++;
    const size = widths === null ? 1 : widths[i]!;
    const term = v * size;
    const ms = massSum + term;
    if (Math.abs(massSum) >= Math.abs(term)) massCarry += massSum - ms + term;
    else massCarry += term - ms + massSum;
    massSum = ms;
    const av = v < 0 ? -v : v;
    l1 += av * size;
    let outSign = 0;
    if (i < edges) {
      const j = i + 1 < n ? i + 1 : 0;
      const vn = x[j]!;
      const d = vn - v;
      const ad = d < 0 ? -d : d;
      const t = tvSum + ad;
      if (tvSum >= ad) tvCarry += tvSum - t + ad;
      else tvCarry += ad - t + tvSum;
      tvSum = t;
      outSign = d > floor ? 1 : d < negFloor ? -1 : 0;
      if (outSign === 0) {
        // An edge below the floor may err by the errors of both its cells.
        weight += 2;
        weighted += av + (vn < 0 ? -vn : vn);
      } else {
        if (outSign !== lastSign) {
          if (lastSign !== 0) {
            extrema++;
            allowance += lastSize + ad;
          } else {
            firstSign = outSign;
            firstSize = ad;
          }
          lastSign = outSign;
        }
        lastSize = ad;
      }
      v = vn;
    }
    // Run ends and sign changes are where rounding errors do not telescope away.
    const jump = inSign - outSign;
    if (jump !== 0) {
      const aj = jump < 0 ? -jump : jump;
      weight += aj;
      weighted += aj * av;
    }
    inSign = outSign;
  }
  if (periodic && firstSign !== 0 && lastSign !== firstSign) {
    extrema++;
    allowance += lastSize + firstSize;
  }
  out.tv = tvSum + tvCarry;
  out.mass = massSum + massCarry;
  out.l1 = l1;
  out.weight = weight;
  out.weightedMagnitude = weighted;
  out.min = min;
  out.max = max;
  out.argMin = argMin;
  out.argMax = argMax;
  out.above = above;
  out.below = below;
  out.extrema = extrema;
  out.allowance = 0.5 * allowance;
}

/** Scratch buffers of `passNd`, allocated once per variable. */
export interface NdBuffers {
  /** Union-find parent of plateau cells (only entries of registered cells are meaningful). */
  parent: Int32Array;
  /** MEMBER mark of plateau cells, and HIGHER/LOWER/TOUCHES bits of plateau roots. */
  bits: Uint8Array;
  /** The plateau cells of the current step, `plateauCount` of them. */
  plateau: Int32Array;
  /** Current multi-index. */
  coord: Int32Array;
}

/**
 * Union-find and plateau buffers for `passNd`: 9 bytes per cell, allocated once per analyser.
 *
 * References: Hoshen & Kopelman 1976, "Percolation and cluster distribution. I. Cluster multiple
 * labeling technique and critical concentration algorithm".
 */
export function createNdBuffers(shape: readonly number[], cells: number): NdBuffers {
  return {
    parent: new Int32Array(cells),
    bits: new Uint8Array(cells),
    plateau: new Int32Array(cells),
    coord: new Int32Array(shape.length),
  };
}

function findRoot(parent: Int32Array, c: number): number {
  let r = c;
  while (parent[r] !== r) {
    const grand = parent[parent[r]!]!;
    parent[r] = grand; // path halving
    r = grand;
  }
  return r;
}

const { HIGHER, LOWER, TOUCHES, MEMBER } = PLATEAU_BITS;

/**
 * One sweep over a grid of any dimension (row-major, last axis fastest). Per cell, for every axis
 * of size >= 2: the forward difference (wrap-around on periodic axes) into TV and the local
 * variation, the backward difference for the extremum test and the noise weights. Cells without a
 * neighbour within the floor are judged on the spot; plateau cells (a neighbour within the floor)
 * are joined by union-find in the same sweep (Hoshen-Kopelman) and judged afterwards, plateau by
 * plateau, from the differences that leave the plateau (extrema.ts). The smooth-profile
 * allowance counts, per axis, cells where the two neighbouring differences change sign.
 *
 * References: Neumaier 1974, "Rundungsfehleranalyse einiger Verfahren zur Summation endlicher
 * Summen"; Hoshen & Kopelman 1976, "Percolation and cluster distribution. I. Cluster multiple
 * labeling technique and critical concentration algorithm"; Goodman & LeVeque 1985, "On the
 * accuracy of stable schemes for 2D scalar conservation laws".
 */
export function passNd(
  x: FieldArray,
  shape: readonly number[],
  strides: readonly number[],
  periodic: readonly boolean[],
  limits: PassLimits,
  sizes: CellSizes,
  buffers: NdBuffers,
  out: StepStats,
): void {
  const floor = limits.floor;
  const negFloor = -floor;
  const dims = shape.length;
  const cells = x.length;
  const { parent, bits, plateau, coord } = buffers;
  let plateauCount = 0;
  const uniform = 'uniform' in sizes ? sizes.uniform : 0;
  const widths = 'widths' in sizes ? sizes.widths : null;
  coord.fill(0);
  let tvSum = 0;
  let tvCarry = 0;
  let massSum = 0;
  let massCarry = 0;
  let l1 = 0;
  let weight = 0;
  let weighted = 0;
  let min = Infinity;
  let max = -Infinity;
  let argMin = 0;
  let argMax = 0;
  let above = 0;
  let below = 0;
  let extrema = 0;
  let allowance = 0;
  for (let c = 0; c < cells; c++) {
    const v = x[c]!;
    if (v < min) {
      min = v;
      argMin = c;
    }
    if (v > max) {
      max = v;
      argMax = c;
    }
    if (v > limits.upperLimit) above++;
    else if (v < limits.lowerLimit) below++;
    let size = uniform;
    if (widths !== null) {
      size = 1;
      for (let k = 0; k < dims; k++) size *= widths[k]![coord[k]!]!;
    }
    const term = v * size;
    const ms = massSum + term;
    if (Math.abs(massSum) >= Math.abs(term)) massCarry += massSum - ms + term;
    else massCarry += term - ms + massSum;
    massSum = ms;
    const av = v < 0 ? -v : v;
    l1 += av * size;
    let cellBits = 0;
    let flat = false;
    for (let k = 0; k < dims; k++) {
      const n = shape[k]!;
      if (n < 2) continue;
      const pos = coord[k]!;
      const stride = strides[k]!;
      const wrap = periodic[k]!;
      const fwd = pos < n - 1 ? c + stride : wrap ? c - (n - 1) * stride : -1;
      const back = pos > 0 ? c - stride : wrap ? c + (n - 1) * stride : -1;
      let outSign = 0;
      let outSize = 0;
      if (fwd >= 0) {
        const vn = x[fwd]!;
        const d = vn - v;
        const ad = d < 0 ? -d : d;
        const t = tvSum + ad;
        if (tvSum >= ad) tvCarry += tvSum - t + ad;
        else tvCarry += ad - t + tvSum;
        tvSum = t;
        outSize = ad;
        if (d > floor) {
          outSign = 1;
          cellBits |= HIGHER;
        } else if (d < negFloor) {
          outSign = -1;
          cellBits |= LOWER;
        } else {
          flat = true;
          weight += 2;
          weighted += av + (vn < 0 ? -vn : vn);
        }
      } else cellBits |= TOUCHES;
      let inSign = 0;
      let inSize = 0;
      if (back >= 0) {
        const d = v - x[back]!;
        inSize = d < 0 ? -d : d;
        if (d > floor) {
          inSign = 1;
          cellBits |= LOWER;
        } else if (d < negFloor) {
          inSign = -1;
          cellBits |= HIGHER;
        } else flat = true;
      } else cellBits |= TOUCHES;
      const jump = inSign - outSign;
      if (jump !== 0) {
        const aj = jump < 0 ? -jump : jump;
        weight += aj;
        weighted += aj * av;
        if (aj === 2) allowance += inSize + outSize;
      }
    }
    if (!flat) {
      extrema += extremaOfPlateau(cellBits);
    } else {
      parent[c] = c;
      bits[c] = MEMBER;
      plateau[plateauCount++] = c;
      joinVisitedPlateaus(x, c, v, floor, shape, strides, periodic, coord, parent);
    }
    // Advance the multi-index (last axis fastest).
    for (let k = dims - 1; k >= 0; k--) {
      const next = coord[k]! + 1;
      if (next < shape[k]!) {
        coord[k] = next;
        break;
      }
      coord[k] = 0;
    }
  }
  out.tv = tvSum + tvCarry;
  out.mass = massSum + massCarry;
  out.l1 = l1;
  out.weight = weight;
  out.weightedMagnitude = weighted;
  out.min = min;
  out.max = max;
  out.argMin = argMin;
  out.argMax = argMax;
  out.above = above;
  out.below = below;
  out.extrema = extrema + plateauExtrema(x, floor, shape, strides, periodic, buffers, plateauCount);
  out.allowance = 0.5 * allowance;
}

/**
 * Unions plateau cell c with its flat neighbours already visited (backward ones, and the
 * wrap-around forward one at the end of a periodic axis).
 */
function joinVisitedPlateaus(
  x: FieldArray,
  c: number,
  v: number,
  floor: number,
  shape: readonly number[],
  strides: readonly number[],
  periodic: readonly boolean[],
  coord: Int32Array,
  parent: Int32Array,
): void {
  for (let k = 0; k < shape.length; k++) {
    const n = shape[k]!;
    if (n < 2) continue;
    const pos = coord[k]!;
    const stride = strides[k]!;
    for (let side = 0; side < 2; side++) {
      let nb = -1;
      if (side === 0 && pos > 0) nb = c - stride;
      else if (side === 1 && pos === n - 1 && periodic[k]) nb = c - (n - 1) * stride;
      if (nb < 0) continue;
      const d = x[nb]! - v;
      if (d > floor || d < -floor) continue;
      const a = findRoot(parent, c);
      const b = findRoot(parent, nb);
      if (a !== b) parent[b] = a;
    }
  }
}

/**
 * Counts the plateaus that are extrema, once every plateau cell has been joined: each difference
 * that leaves a plateau (to a cell of another plateau or to a single cell) marks the plateau's
 * root as having a higher or lower neighbour; a plateau cell on a non-periodic end marks it as
 * touching the boundary. Differences between two cells of the same plateau are ignored, even
 * when larger than the floor (a plateau creeping up a gentle slope), as on a 1D line. Clears the
 * marks for the next step.
 */
function plateauExtrema(
  x: FieldArray,
  floor: number,
  shape: readonly number[],
  strides: readonly number[],
  periodic: readonly boolean[],
  buffers: NdBuffers,
  count: number,
): number {
  const { parent, bits, plateau } = buffers;
  const dims = shape.length;
  for (let p = 0; p < count; p++) {
    const c = plateau[p]!;
    const root = findRoot(parent, c);
    const v = x[c]!;
    let rest = c;
    let mark = 0;
    for (let k = dims - 1; k >= 0; k--) {
      const n = shape[k]!;
      const pos = rest % n;
      rest = (rest - pos) / n;
      if (n < 2) continue;
      const stride = strides[k]!;
      const back = pos > 0 ? c - stride : periodic[k] ? c + (n - 1) * stride : -1;
      const fwd = pos < n - 1 ? c + stride : periodic[k] ? c - (n - 1) * stride : -1;
      for (let side = 0; side < 2; side++) {
        const nb = side === 0 ? back : fwd;
        if (nb < 0) {
          mark |= TOUCHES;
          continue;
        }
        const d = x[nb]! - v;
        if (!(d > floor || d < -floor)) continue;
        if ((bits[nb]! & MEMBER) !== 0 && findRoot(parent, nb) === root) continue;
        mark |= d > 0 ? HIGHER : LOWER;
      }
    }
    bits[root] = bits[root]! | mark;
  }
  let extrema = 0;
  for (let p = 0; p < count; p++) {
    const c = plateau[p]!;
    if (parent[c] === c) extrema += extremaOfPlateau(bits[c]!);
  }
  for (let p = 0; p < count; p++) bits[plateau[p]!] = 0;
  return extrema;
}
