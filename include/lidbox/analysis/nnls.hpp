// Least squares with non-negative unknowns: Lawson–Hanson's active-set algorithm (Lawson C.L. and
// Hanson R.J., Solving Least Squares Problems, SIAM 1995, chapter 23, algorithm NNLS), the method
// scipy.optimize.nnls documents; tests compare with scipy.
//
//   minimise ‖A x − b‖₂ over x, with x_j ≥ 0 for the constrained columns j ≥ n_free and the
//   first n_free columns free (an offset, for example).
//
// The tall problem (m rows, hours × monitors) is first reduced by a Householder QR of [A b]: the
// (n+1)×(n+1) triangle R has ‖A x − b‖² = ‖R_A x − r_b‖² + const, so the active-set iterations run
// on n + 1 rows, whatever m is. Free columns come first in that triangle and are eliminated
// exactly (their rows can always be zeroed), which leaves an NNLS in the constrained unknowns.
// The same triangle, from a Cholesky factor of the Gram matrix [A b]ᵀ[A b], serves the bootstrap
// (sector_fit.hpp), where Gram matrices of resampled blocks are summed.
//
// Dense matrices are column-major: element (i, j) at [j * rows + i].
#pragma once

#include <cstddef>
#include <vector>

namespace lidbox {

struct DenseMatrix {
  std::size_t rows = 0;
  std::size_t cols = 0;
  std::vector<double> v;  // column-major

  DenseMatrix() = default;
  DenseMatrix(std::size_t r, std::size_t c) : rows(r), cols(c), v(r * c, 0.0) {}
  [[nodiscard]] double& operator()(std::size_t i, std::size_t j) { return v[j * rows + i]; }
  [[nodiscard]] double operator()(std::size_t i, std::size_t j) const { return v[j * rows + i]; }
};

struct NnlsSolution {
  std::vector<double> x;
  std::vector<bool> at_bound;  // constrained unknowns held at zero by the constraint
  double residual_norm = 0.0;  // ‖A x − b‖₂
  int iterations = 0;          // outer iterations (columns moved into the passive set)
  bool converged = true;
};

// The upper triangle R ((n+1)×(n+1)) of the QR factorisation of [A b] (A m×n, m ≥ 1). Rows of
// R beyond min(m, n+1) are zero. Linear in m.
DenseMatrix qr_triangle(const DenseMatrix& A, const std::vector<double>& b);

// The same triangle from the Gram matrix G = [A b]ᵀ[A b] ((n+1)×(n+1)) by Cholesky; a pivot that
// rounding drives to zero or below (a column that depends on the others, or b in their span) is
// set to zero, so a noise-free b gives a zero residual.
DenseMatrix cholesky_triangle(const DenseMatrix& gram);

// NNLS on the triangle of [A b] with the first n_free unknowns free. `max_iterations` 0 means
// 3 n (scipy's default).
NnlsSolution nnls_from_triangle(const DenseMatrix& R, std::size_t n_free, int max_iterations = 0);

// NNLS on A and b directly (qr_triangle, then nnls_from_triangle).
NnlsSolution nnls(const DenseMatrix& A, const std::vector<double>& b, std::size_t n_free = 0);

// Small symmetric positive definite helpers (k ≤ a few dozen).
// The inverse of a symmetric positive definite matrix; false when it is not (numerically).
bool invert_spd(const DenseMatrix& S, DenseMatrix& inverse);
// Eigenvalues of a symmetric matrix (cyclic Jacobi), ascending.
std::vector<double> symmetric_eigenvalues(const DenseMatrix& S);

}  // namespace lidbox
