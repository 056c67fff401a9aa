/**
 * A dense reference for tests, independent of the project's filter and GLS:
 * the Cholesky factor L of the symmetric positive definite matrix whose
 * (i, j) entry (j <= i) is `entry(i, j)`, and forward substitution with it
 * (L^-1 v). Null when the matrix is not positive definite. Common practice
 * (Golub & Van Loan, Matrix Computations, section 4.2; from memory).
 */
export function denseCholesky(size: number, entry: (i: number, j: number) => number): { solve(vector: ArrayLike<number>): Float64Array; logDet: number } | null {
  const lower = Array.from({ length: size }, () => new Float64Array(size));
  for (let i = 0; i < size; i++) {
    for (let j = 0; j <= i; j++) {
      let sum = entry(i, j);
      for (let k = 0; k < j; k++) sum -= lower[i][k] * lower[j][k];
      if (i === j) {
        if (!(sum > 0)) return null;
        lower[i][i] = Math.sqrt(sum);
      } else lower[i][j] = sum / lower[j][j];
    }
  }
  let logDet = 0;
  for (let i = 0; i < size; i++) logDet += 2 * Math.log(lower[i][i]);
  const solve = (vector: ArrayLike<number>): Float64Array => {
    const out = new Float64Array(size);
    for (let i = 0; i < size; i++) {
      let sum = vector[i];
      for (let k = 0; k < i; k++) sum -= lower[i][k] * out[k];
      out[i] = sum / lower[i][i];
    }
    return out;
  };
  return { solve, logDet };
}
