/**
 * Small dense matrices (Jacobians up to 6 x 40) as row-major Float64Arrays, with routines that
 * never allocate: every buffer comes from the caller or from a reusable LinalgWorkspace.
 * The SVD is the one-sided (Hestenes) Jacobi method, which keeps small singular values
 * accurate to working precision relative to the matrix, unlike forming J J^T first
 * (Demmel & Veselic, "Jacobi's method is more accurate than QR", SIAM J. Matrix Anal. Appl. 13, 1992).
 */

/** Row-major dense matrix; `data` may be longer than rows * cols so one buffer can serve several shapes. */
export interface Matrix {
  rows: number;
  cols: number;
  data: Float64Array;
}

/** Thin SVD A = U diag(s) V^T with s descending; U is rows x k, V is cols x k, k = min(rows, cols). */
export interface SvdResult {
  s: Float64Array;
  u: Matrix;
  v: Matrix;
}

/** Scratch buffers for one matrix shape bound; reuse one per solver, not shared between threads. */
export interface LinalgWorkspace {
  readonly maxSmall: number;
  readonly maxLarge: number;
  readonly rowsWork: Float64Array;
  readonly rotation: Float64Array;
  readonly gram: Float64Array;
  readonly vector: Float64Array;
  readonly singular: Float64Array;
  readonly rowNorms: Float64Array;
  readonly svd: SvdResult;
}

const JACOBI_TOLERANCE = 1e-15;
/** Rows shorter than this times ||A||_F that are not orthogonal to the others are rounding noise of a rank-deficient direction. */
const ABSOLUTE_FLOOR = Number.EPSILON;
const MAX_SWEEPS = 60;
const SAFE_LOW = 2 ** -100;
/** Relative Cholesky pivot below which the normal equations lose too many digits (sigma ratio near 1e-4). */
const NORMAL_EQUATIONS_MIN_PIVOT = 1e-8;
const SAFE_HIGH = 2 ** 100;

/** Zero-filled rows x cols matrix (dimensionless container). */
export function createMatrix(rows: number, cols: number): Matrix {
  return { rows, cols, data: new Float64Array(rows * cols) };
}

/** Matrix copied from an array of equal-length rows (dimensionless container). */
export function matrixFromRows(rows: ReadonlyArray<ArrayLike<number>>): Matrix {
  const m = rows.length;
  const n = m === 0 ? 0 : rows[0]!.length;
  const out = createMatrix(m, n);
  for (let i = 0; i < m; i++) {
    const row = rows[i]!;
    if (row.length !== n) throw new RangeError(`row ${i} has ${row.length} entries, expected ${n}`);
    for (let j = 0; j < n; j++) out.data[i * n + j] = row[j]!;
  }
  return out;
}

/** Rows of a matrix as plain nested arrays (dimensionless container). */
export function matrixToRows(a: Readonly<Matrix>): number[][] {
  const rows: number[][] = [];
  for (let i = 0; i < a.rows; i++) rows.push(Array.from(a.data.subarray(i * a.cols, (i + 1) * a.cols)));
  return rows;
}

/** Scratch for matrices whose smaller dimension is at most maxSmall and larger at most maxLarge. */
export function createLinalgWorkspace(maxSmall = 6, maxLarge = 40): LinalgWorkspace {
  if (maxSmall > maxLarge) [maxSmall, maxLarge] = [maxLarge, maxSmall];
  return {
    maxSmall,
    maxLarge,
    rowsWork: new Float64Array(maxSmall * maxLarge),
    rotation: new Float64Array(maxSmall * maxSmall),
    gram: new Float64Array(maxSmall * maxSmall),
    vector: new Float64Array(maxLarge),
    singular: new Float64Array(maxSmall),
    rowNorms: new Float64Array(maxSmall),
    svd: {
      s: new Float64Array(maxSmall),
      u: createMatrix(maxLarge, maxSmall),
      v: createMatrix(maxLarge, maxSmall),
    },
  };
}

function checkFits(a: Readonly<Matrix>, ws: LinalgWorkspace): void {
  const small = a.rows < a.cols ? a.rows : a.cols;
  const large = a.rows < a.cols ? a.cols : a.rows;
  if (small > ws.maxSmall || large > ws.maxLarge) {
    throw new RangeError(`${a.rows} x ${a.cols} matrix exceeds workspace ${ws.maxSmall} x ${ws.maxLarge}`);
  }
}

/**
 * Copies A (fat) or A^T (tall) into w as p x q with p <= q, so the Jacobi rotations always run
 * over contiguous rows of the short side. Returns the power-of-two factor applied to the copy:
 * entries far from 1 are rescaled exactly so their squares neither underflow nor overflow.
 */
function loadRows(a: Readonly<Matrix>, w: Float64Array): number {
  const m = a.rows;
  const n = a.cols;
  const d = a.data;
  let maxAbs = 0;
  if (m <= n) {
    for (let i = 0, len = m * n; i < len; i++) {
      const x = d[i]!;
      w[i] = x;
      const ax = x < 0 ? -x : x;
      if (ax > maxAbs) maxAbs = ax;
    }
  } else {
    for (let i = 0; i < m; i++) {
      for (let j = 0; j < n; j++) {
        const x = d[i * n + j]!;
        w[j * m + i] = x;
        const ax = x < 0 ? -x : x;
        if (ax > maxAbs) maxAbs = ax;
      }
    }
  }
  if (maxAbs === 0 || (maxAbs > SAFE_LOW && maxAbs < SAFE_HIGH)) return 1;
  const exponent = Math.max(-1000, Math.min(1000, -Math.floor(Math.log2(maxAbs))));
  const scale = 2 ** exponent;
  for (let i = 0, len = m * n; i < len; i++) w[i] = w[i]! * scale;
  return scale;
}

/**
 * One-sided Jacobi on the rows of the p x q matrix w: afterwards its rows are mutually
 * orthogonal and W_before = Q W_after, with Q (p x p) accumulated only when q is non-null.
 */
function orthogonalizeRows(w: Float64Array, p: number, q: number, rot: Float64Array | null, norms: Float64Array): void {
  if (rot !== null) {
    for (let i = 0; i < p * p; i++) rot[i] = 0;
    for (let i = 0; i < p; i++) rot[i * p + i] = 1;
  }
  // Rotations preserve the Frobenius norm; a row at rounding level of it (a rank-deficient direction)
  // stays non-orthogonal noise under the relative test, so it would be rotated for every sweep left.
  // Rows that are tiny but exactly orthogonal (graded matrices) are kept: gamma = 0 skips them first.
  let floor = -1;
  for (let sweep = 0; sweep < MAX_SWEEPS; sweep++) {
    // Squared row norms are refreshed once per sweep and updated exactly within it
    // (alpha' = alpha - t gamma, beta' = beta + t gamma), so each pair costs one dot product.
    let total = 0;
    for (let i = 0; i < p; i++) {
      let sum = 0;
      for (let k = i * q, end = k + q; k < end; k++) sum += w[k]! * w[k]!;
      norms[i] = sum;
      total += sum;
    }
    if (floor < 0) floor = ABSOLUTE_FLOOR * ABSOLUTE_FLOOR * total;
    let rotated = false;
    for (let i = 0; i < p - 1; i++) {
      const oi = i * q;
      for (let j = i + 1; j < p; j++) {
        const oj = j * q;
        let gamma = 0;
        for (let k = 0; k < q; k++) gamma += w[oi + k]! * w[oj + k]!;
        const alpha = norms[i]!;
        const beta = norms[j]!;
        if (gamma === 0 || gamma * gamma <= JACOBI_TOLERANCE * JACOBI_TOLERANCE * alpha * beta) continue;
        if (alpha <= floor || beta <= floor) {
          // Dropping the short row changes A by at most eps ||A||_F, below what rounding already did,
          // and leaves an exact zero singular value with the rows still orthogonal.
          const short = alpha <= beta ? oi : oj;
          for (let k = short, end = short + q; k < end; k++) w[k] = 0;
          norms[alpha <= beta ? i : j] = 0;
          continue;
        }
        rotated = true;
        // Rutishauser's t = sign(zeta) / (|zeta| + sqrt(1 + zeta^2)), zeta = (beta - alpha) / (2 gamma), rewritten
        // with d = |beta - alpha| and h = sqrt(d^2 + 4 gamma^2) as c = (d + h) / m, s = 2 sign gamma / m,
        // m = sqrt(2 h (d + h)): one division instead of three on the critical path.
        const difference = beta - alpha;
        const sign = difference >= 0 ? 1 : -1;
        const d = difference * sign;
        const h = Math.sqrt(d * d + 4 * gamma * gamma);
        const inverseM = 1 / Math.sqrt(2 * h * (d + h));
        const c = (d + h) * inverseM;
        const s = 2 * sign * gamma * inverseM;
        const shift = s * gamma / c;
        norms[i] = alpha - shift;
        norms[j] = beta + shift;
        for (let k = 0; k < q; k++) {
          const x = w[oi + k]!;
          const y = w[oj + k]!;
          w[oi + k] = c * x - s * y;
          w[oj + k] = s * x + c * y;
        }
        if (rot !== null) {
          for (let k = 0; k < p; k++) {
            const x = rot[k * p + i]!;
            const y = rot[k * p + j]!;
            rot[k * p + i] = c * x - s * y;
            rot[k * p + j] = s * x + c * y;
          }
        }
      }
    }
    if (!rotated) return;
  }
}

function rowNorm(w: Float64Array, row: number, q: number): number {
  let sum = 0;
  for (let k = row * q, end = k + q; k < end; k++) sum += w[k]! * w[k]!;
  return Math.sqrt(sum);
}

/** Singular values of A, descending, into out[0..min(rows, cols)) (units of A's entries). */
export function singularValues(a: Readonly<Matrix>, out: Float64Array, ws: LinalgWorkspace): Float64Array {
  checkFits(a, ws);
  const p = a.rows <= a.cols ? a.rows : a.cols;
  const q = a.rows <= a.cols ? a.cols : a.rows;
  const w = ws.rowsWork;
  const scale = loadRows(a, w);
  orthogonalizeRows(w, p, q, null, ws.rowNorms);
  for (let i = 0; i < p; i++) out[i] = rowNorm(w, i, q) / scale;
  for (let i = 1; i < p; i++) {
    const x = out[i]!;
    let j = i - 1;
    while (j >= 0 && out[j]! < x) {
      out[j + 1] = out[j]!;
      j--;
    }
    out[j + 1] = x;
  }
  return out;
}

/** Thin SVD A = U diag(s) V^T, s descending, into out (out.u and out.v are reshaped to rows x k and cols x k). */
export function svd(a: Readonly<Matrix>, out: SvdResult, ws: LinalgWorkspace): SvdResult {
  checkFits(a, ws);
  const m = a.rows;
  const n = a.cols;
  const fat = m <= n;
  const p = fat ? m : n;
  const q = fat ? n : m;
  const w = ws.rowsWork;
  const rot = ws.rotation;
  const scale = loadRows(a, w);
  orthogonalizeRows(w, p, q, rot, ws.rowNorms);
  const s = out.s;
  for (let i = 0; i < p; i++) s[i] = rowNorm(w, i, q);
  // Rows of w carry sigma_i times the long-side singular vectors; rot holds the short-side ones.
  const long = fat ? out.v : out.u;
  const short = fat ? out.u : out.v;
  long.rows = q;
  long.cols = p;
  short.rows = p;
  short.cols = p;
  const ld = long.data;
  const sd = short.data;
  for (let slot = 0; slot < p; slot++) {
    let best = slot;
    for (let i = slot + 1; i < p; i++) if (s[i]! > s[best]!) best = i;
    if (best !== slot) {
      const ts = s[slot]!;
      s[slot] = s[best]!;
      s[best] = ts;
      for (let k = 0; k < q; k++) {
        const t = w[slot * q + k]!;
        w[slot * q + k] = w[best * q + k]!;
        w[best * q + k] = t;
      }
      for (let k = 0; k < p; k++) {
        const t = rot[k * p + slot]!;
        rot[k * p + slot] = rot[k * p + best]!;
        rot[k * p + best] = t;
      }
    }
  }
  for (let i = 0; i < p; i++) {
    const sigma = s[i]!;
    if (sigma > 0) {
      const inv = 1 / sigma;
      for (let k = 0; k < q; k++) ld[k * p + i] = w[i * q + k]! * inv;
    } else {
      for (let k = 0; k < q; k++) ld[k * p + i] = 0;
    }
  }
  for (let i = 0; i < p * p; i++) sd[i] = rot[i]!;
  completeZeroColumns(long, s, p);
  if (scale !== 1) for (let i = 0; i < p; i++) s[i] = s[i]! / scale;
  return out;
}

/**
 * Columns of the long-side factor for zero singular values are undefined by the rows; fill them
 * with unit vectors orthogonal to the others so U (or V) still has orthonormal columns.
 */
function completeZeroColumns(long: Matrix, s: Float64Array, p: number): void {
  const q = long.rows;
  const d = long.data;
  for (let i = 0; i < p; i++) {
    if (s[i]! > 0) continue;
    let bestNorm = -1;
    for (let e = 0; e < q; e++) {
      for (let k = 0; k < q; k++) d[k * p + i] = k === e ? 1 : 0;
      for (let pass = 0; pass < 2; pass++) {
        for (let j = 0; j < p; j++) {
          if (j === i || (s[j]! <= 0 && j > i)) continue;
          let dot = 0;
          for (let k = 0; k < q; k++) dot += d[k * p + j]! * d[k * p + i]!;
          for (let k = 0; k < q; k++) d[k * p + i] = d[k * p + i]! - dot * d[k * p + j]!;
        }
      }
      let norm = 0;
      for (let k = 0; k < q; k++) norm += d[k * p + i]! * d[k * p + i]!;
      norm = Math.sqrt(norm);
      if (norm > 0.5) {
        for (let k = 0; k < q; k++) d[k * p + i] = d[k * p + i]! / norm;
        bestNorm = norm;
        break;
      }
    }
    if (bestNorm < 0) throw new Error('could not complete an orthonormal basis');
  }
}

/**
 * Numerical-rank tolerance max(rows, cols) eps sigma_max (Golub & Van Loan, "Matrix Computations", 4th ed.,
 * sec. 5.4.1; NumPy's matrix_rank default): singular values at or below it are rounding of an exactly
 * rank-deficient matrix whose entries are exact to working precision (units of sigma).
 */
export function defaultRankTolerance(rows: number, cols: number, sigmaMax: number): number {
  return Math.max(rows, cols) * Number.EPSILON * sigmaMax;
}

/** Number of the first `count` singular values above tolerance: the numerical rank (dimensionless; tolerance in units of s). */
export function numericalRank(s: ArrayLike<number>, count: number, tolerance: number): number {
  let rank = 0;
  for (let i = 0; i < count; i++) if (s[i]! > tolerance) rank++;
  return rank;
}

/**
 * sigma_max / sigma_min over the first `count` singular values (dimensionless): Infinity when the numerical rank
 * is below count, i.e. some sigma is at or below tolerance (units of s; default defaultRankTolerance(count, count,
 * sigma_max)); NaN for the zero matrix.
 */
export function conditionNumber(s: ArrayLike<number>, count: number = s.length, tolerance?: number): number {
  if (count === 0) return Number.NaN;
  let max = 0;
  let min = Number.POSITIVE_INFINITY;
  for (let i = 0; i < count; i++) {
    const x = s[i]!;
    if (x > max) max = x;
    if (x < min) min = x;
  }
  if (max === 0) return Number.NaN;
  const cut = tolerance ?? defaultRankTolerance(count, count, max);
  return min <= cut ? Number.POSITIVE_INFINITY : max / min;
}

/**
 * Symmetric product G = A A^T (fat) or A^T A (tall) into g as k x k, k = min(rows, cols).
 */
function gramOfShortSide(a: Readonly<Matrix>, g: Float64Array): number {
  const m = a.rows;
  const n = a.cols;
  const d = a.data;
  if (m <= n) {
    for (let i = 0; i < m; i++) {
      for (let j = 0; j <= i; j++) {
        let sum = 0;
        for (let k = 0; k < n; k++) sum += d[i * n + k]! * d[j * n + k]!;
        g[i * m + j] = sum;
        g[j * m + i] = sum;
      }
    }
    return m;
  }
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let sum = 0;
      for (let k = 0; k < m; k++) sum += d[k * n + i]! * d[k * n + j]!;
      g[i * n + j] = sum;
      g[j * n + i] = sum;
    }
  }
  return n;
}

/**
 * In-place Cholesky G = L L^T (lower triangle of g); false when a pivot falls to minPivot or below
 * (G not positive definite, or too ill-conditioned for the normal-equations route).
 */
function choleskyInPlace(g: Float64Array, k: number, minPivot: number): boolean {
  for (let j = 0; j < k; j++) {
    let diag = g[j * k + j]!;
    for (let t = 0; t < j; t++) diag -= g[j * k + t]! * g[j * k + t]!;
    if (!(diag > minPivot)) return false;
    const ljj = Math.sqrt(diag);
    g[j * k + j] = ljj;
    for (let i = j + 1; i < k; i++) {
      let sum = g[i * k + j]!;
      for (let t = 0; t < j; t++) sum -= g[i * k + t]! * g[j * k + t]!;
      g[i * k + j] = sum / ljj;
    }
  }
  return true;
}

/** Solves L L^T y = y in place with L from choleskyInPlace. */
function choleskySolveInPlace(l: Float64Array, k: number, y: Float64Array): void {
  for (let i = 0; i < k; i++) {
    let sum = y[i]!;
    for (let t = 0; t < i; t++) sum -= l[i * k + t]! * y[t]!;
    y[i] = sum / l[i * k + i]!;
  }
  for (let i = k - 1; i >= 0; i--) {
    let sum = y[i]!;
    for (let t = i + 1; t < k; t++) sum -= l[t * k + i]! * y[t]!;
    y[i] = sum / l[i * k + i]!;
  }
}

// Ill-conditioned systems take the SVD route x = sum sigma / (sigma^2 + lambda^2) (u.b) v, the minimum-norm
// least-squares solution when lambda = 0, because the normal equations would lose too many digits.
/** Damped least squares x = A^T (A A^T + lambda^2 I)^{-1} b into out[0..cols) (Wampler 1986; units of b over units of A). */
export function dampedLeastSquares(
  a: Readonly<Matrix>,
  b: ArrayLike<number>,
  lambda: number,
  out: Float64Array,
  ws: LinalgWorkspace,
): Float64Array {
  checkFits(a, ws);
  const m = a.rows;
  const n = a.cols;
  if (m === 3 && n >= 3 && threeRowDampedLeastSquares(a, b, lambda, out)) return out;
  const d = a.data;
  const g = ws.gram;
  const y = ws.vector;
  const k = gramOfShortSide(a, g);
  const damping = lambda * lambda;
  let maxDiag = 0;
  for (let i = 0; i < k; i++) {
    const diag = g[i * k + i]! + damping;
    g[i * k + i] = diag;
    if (diag > maxDiag) maxDiag = diag;
  }
  if (!choleskyInPlace(g, k, NORMAL_EQUATIONS_MIN_PIVOT * maxDiag)) return dampedSvdSolve(a, b, lambda, out, ws);
  if (m <= n) {
    // Fat: y = (A A^T + l^2 I)^{-1} b, x = A^T y.
    for (let i = 0; i < m; i++) y[i] = b[i]!;
    choleskySolveInPlace(g, m, y);
    for (let j = 0; j < n; j++) {
      let sum = 0;
      for (let i = 0; i < m; i++) sum += d[i * n + j]! * y[i]!;
      out[j] = sum;
    }
    return out;
  }
  // Tall: the same x by the push-through identity, x = (A^T A + l^2 I)^{-1} A^T b.
  for (let j = 0; j < n; j++) {
    let sum = 0;
    for (let i = 0; i < m; i++) sum += d[i * n + j]! * b[i]!;
    y[j] = sum;
  }
  choleskySolveInPlace(g, n, y);
  for (let j = 0; j < n; j++) out[j] = y[j]!;
  return out;
}

/**
 * dampedLeastSquares for a fat 3-row A with the Gram matrix, its Cholesky factor and both
 * triangular solves unrolled in the general route's operation order (same results to the bit);
 * false, with out untouched, when a pivot is too small for the normal equations. Takes lambda rather
 * than its square: a number computed by the caller would be boxed on the heap to cross the call.
 */
function threeRowDampedLeastSquares(a: Readonly<Matrix>, b: ArrayLike<number>, lambda: number, out: Float64Array): boolean {
  const n = a.cols, d = a.data;
  const damping = lambda * lambda;
  let g00 = 0, g10 = 0, g11 = 0, g20 = 0, g21 = 0, g22 = 0;
  for (let k = 0; k < n; k++) {
    const x = d[k]!, y = d[n + k]!, z = d[2 * n + k]!;
    g00 += x * x;
    g10 += y * x; g11 += y * y;
    g20 += z * x; g21 += z * y; g22 += z * z;
  }
  g00 += damping; g11 += damping; g22 += damping;
  let maxDiag = 0;
  if (g00 > maxDiag) maxDiag = g00;
  if (g11 > maxDiag) maxDiag = g11;
  if (g22 > maxDiag) maxDiag = g22;
  const minPivot = NORMAL_EQUATIONS_MIN_PIVOT * maxDiag;
  if (!(g00 > minPivot)) return false;
  const l00 = Math.sqrt(g00);
  const l10 = g10 / l00, l20 = g20 / l00;
  const diag1 = g11 - l10 * l10;
  if (!(diag1 > minPivot)) return false;
  const l11 = Math.sqrt(diag1);
  const l21 = (g21 - l20 * l10) / l11;
  const diag2 = g22 - l20 * l20 - l21 * l21;
  if (!(diag2 > minPivot)) return false;
  const l22 = Math.sqrt(diag2);
  const f0 = b[0]! / l00;
  const f1 = (b[1]! - l10 * f0) / l11;
  const f2 = (b[2]! - l20 * f0 - l21 * f1) / l22;
  const y2 = f2 / l22;
  const y1 = (f1 - l21 * y2) / l11;
  const y0 = (f0 - l10 * y1 - l20 * y2) / l00;
  for (let j = 0; j < n; j++) out[j] = 0 + d[j]! * y0 + d[n + j]! * y1 + d[2 * n + j]! * y2;
  return true;
}

function dampedSvdSolve(
  a: Readonly<Matrix>,
  b: ArrayLike<number>,
  lambda: number,
  out: Float64Array,
  ws: LinalgWorkspace,
): Float64Array {
  const f = svd(a, ws.svd, ws);
  const damping = lambda * lambda;
  const k = a.rows < a.cols ? a.rows : a.cols;
  const tol = defaultRankTolerance(a.rows, a.cols, f.s[0] ?? 0);
  const u = f.u.data;
  const v = f.v.data;
  const coef = ws.singular;
  for (let i = 0; i < k; i++) {
    const sigma = f.s[i]!;
    if (sigma <= tol) {
      coef[i] = 0;
      continue;
    }
    let dot = 0;
    for (let r = 0; r < a.rows; r++) dot += u[r * k + i]! * b[r]!;
    coef[i] = (dot * sigma) / (sigma * sigma + damping);
  }
  for (let j = 0; j < a.cols; j++) {
    let sum = 0;
    for (let i = 0; i < k; i++) sum += v[j * k + i]! * coef[i]!;
    out[j] = sum;
  }
  return out;
}
