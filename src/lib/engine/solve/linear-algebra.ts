/**
 * Dense LU decomposition with partial pivoting and its solve, for the small (3–40 component)
 * linear systems of the Rosenbrock solver. Matrices are row-major Float64Arrays:
 * A[i * n + j] is row i, column j.
 *
 * Algorithm: Gaussian elimination with partial (row) pivoting, PA = LU with unit lower L
 * (Golub & Van Loan 1996, Matrix Computations, 3rd ed., Sect. 3.4).
 */

/**
 * Factorises the n×n matrix `a` in place into L (below the diagonal, unit diagonal implied)
 * and U (on and above it). `pivots[k]` receives the row swapped with row k at step k.
 * Returns false, leaving `a` partly factorised, when a pivot is zero or not finite: the
 * matrix is singular to working precision or holds NaN/Infinity, and no solve is possible.
 */
export function luDecompose(a: Float64Array, n: number, pivots: Int32Array): boolean {
  for (let k = 0; k < n; k++) {
    let p = k;
    let maxAbs = Math.abs(a[k * n + k]);
    for (let i = k + 1; i < n; i++) {
      const v = Math.abs(a[i * n + k]);
      if (v > maxAbs) {
        maxAbs = v;
        p = i;
      }
    }
    pivots[k] = p;
    // Written as a negated comparison so that a NaN pivot also counts as singular.
    if (!(maxAbs > 0) || maxAbs === Infinity) return false;
    if (p !== k) {
      const rowK = k * n;
      const rowP = p * n;
      for (let j = 0; j < n; j++) {
        const tmp = a[rowK + j];
        a[rowK + j] = a[rowP + j];
        a[rowP + j] = tmp;
      }
    }
    const rowK = k * n;
    const inv = 1 / a[rowK + k];
    for (let i = k + 1; i < n; i++) {
      const rowI = i * n;
      const m = a[rowI + k] * inv;
      a[rowI + k] = m;
      if (m !== 0) {
        for (let j = k + 1; j < n; j++) a[rowI + j] -= m * a[rowK + j];
      }
    }
  }
  return true;
}

/**
 * Solves A x = b in place (b becomes x), with `lu` and `pivots` from a successful
 * luDecompose of A.
 */
export function luSolve(lu: Float64Array, n: number, pivots: Int32Array, b: Float64Array): void {
  // Apply the row swaps in the order they were made, then forward and back substitution.
  for (let k = 0; k < n; k++) {
    const p = pivots[k];
    if (p !== k) {
      const tmp = b[k];
      b[k] = b[p];
      b[p] = tmp;
    }
  }
  for (let i = 1; i < n; i++) {
    const rowI = i * n;
    let s = b[i];
    for (let j = 0; j < i; j++) s -= lu[rowI + j] * b[j];
    b[i] = s;
  }
  for (let i = n - 1; i >= 0; i--) {
    const rowI = i * n;
    let s = b[i];
    for (let j = i + 1; j < n; j++) s -= lu[rowI + j] * b[j];
    b[i] = s / lu[rowI + i];
  }
}
