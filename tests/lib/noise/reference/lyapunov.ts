/**
 * Reference fixture for tests/lib/noise/gmam.test.ts: the Lyapunov solution S of A S + S A^T + I = 0
 * for the non-normal drift A = [[-1, 5], [0, -2]], computed with ml-matrix (a general-purpose
 * linear-algebra library, not Brinkmap code) through the Kronecker form
 *   (I (x) A + A (x) I) vec(S) = -vec(I)   (Horn & Johnson, Topics in Matrix Analysis, §4.4),
 * and the quasi-potential V(z) = 1/2 z^T S^-1 z at three points, with S^-1 from ml-matrix's inverse.
 * Run: node --import tsx tests/lib/noise/reference/lyapunov.ts > tests/lib/noise/reference/lyapunov.json
 */
import { Matrix, inverse, solve } from 'ml-matrix';

const A = new Matrix([[-1, 5], [0, -2]]);
const n = A.rows;
const I = Matrix.eye(n);
const K = kron(I, A).add(kron(A, I));
const rhs = Matrix.columnVector(Array.from({ length: n * n }, (_, k) => (k % (n + 1) === 0 ? -1 : 0)));
const vecS = solve(K, rhs);
// vec stacks columns: S[i][j] = vecS[j * n + i].
const S = new Matrix(n, n);
for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) S.set(i, j, vecS.get(j * n + i, 0));
const Sinv = inverse(S);
const points = [[1, 0], [0, 1], [-0.5, 0.7]];
const potentials = points.map((z) => {
  const v = Matrix.columnVector(z);
  return 0.5 * v.transpose().mmul(Sinv).mmul(v).get(0, 0);
});
const residual = A.mmul(S).add(S.mmul(A.transpose())).add(I).norm('frobenius');
process.stdout.write(`${JSON.stringify({ library: 'ml-matrix', A: A.to2DArray(), S: S.to2DArray(), residual, points, potentials }, null, 2)}\n`);

function kron(X: Matrix, Y: Matrix): Matrix {
  const out = new Matrix(X.rows * Y.rows, X.columns * Y.columns);
  for (let i = 0; i < X.rows; i++) for (let j = 0; j < X.columns; j++) for (let k = 0; k < Y.rows; k++) for (let l = 0; l < Y.columns; l++) {
    out.set(i * Y.rows + k, j * Y.columns + l, X.get(i, j) * Y.get(k, l));
  }
  return out;
}
