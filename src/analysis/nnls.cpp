#include "lidbox/analysis/nnls.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "lidbox/base/error.hpp"

namespace lidbox {

namespace {

constexpr double kEps = std::numeric_limits<double>::epsilon();

// In-place Householder QR of the columns of M (rows × cols); leaves R in the upper triangle.
void householder(DenseMatrix& M) {
  const std::size_t m = M.rows, n = M.cols;
  std::vector<double> v(m);
  for (std::size_t k = 0; k < n && k < m; ++k) {
    double norm = 0.0;
    for (std::size_t i = k; i < m; ++i) norm += M(i, k) * M(i, k);
    norm = std::sqrt(norm);
    if (norm == 0.0) continue;
    const double alpha = M(k, k) > 0.0 ? -norm : norm;
    // v = x - alpha e1, normalised so that H = I - 2 v vᵀ / (vᵀ v).
    double vv = 0.0;
    for (std::size_t i = k; i < m; ++i) {
      v[i] = M(i, k) - (i == k ? alpha : 0.0);
      vv += v[i] * v[i];
    }
    if (vv == 0.0) continue;
    for (std::size_t j = k; j < n; ++j) {
      double dot = 0.0;
      for (std::size_t i = k; i < m; ++i) dot += v[i] * M(i, j);
      const double f = 2.0 * dot / vv;
      for (std::size_t i = k; i < m; ++i) M(i, j) -= f * v[i];
    }
    for (std::size_t i = k + 1; i < m; ++i) M(i, k) = 0.0;
  }
}

// Least squares on the columns `cols` of E against f (E small: rows ≤ a few dozen). Columns whose
// pivot vanishes get 0.
std::vector<double> solve_subset(const DenseMatrix& E, const std::vector<double>& f,
                                 const std::vector<std::size_t>& cols) {
  const std::size_t k = E.rows, p = cols.size();
  DenseMatrix M(k, p + 1);
  for (std::size_t j = 0; j < p; ++j) {
    for (std::size_t i = 0; i < k; ++i) M(i, j) = E(i, cols[j]);
  }
  for (std::size_t i = 0; i < k; ++i) M(i, p) = f[i];
  householder(M);
  std::vector<double> z(p, 0.0);
  double scale = 0.0;
  for (std::size_t j = 0; j < p && j < k; ++j) scale = std::max(scale, std::fabs(M(j, j)));
  for (std::size_t jj = std::min(p, k); jj-- > 0;) {
    double s = M(jj, p);
    for (std::size_t l = jj + 1; l < p; ++l) s -= M(jj, l) * z[l];
    const double d = M(jj, jj);
    z[jj] = std::fabs(d) > 1e-13 * scale ? s / d : 0.0;
  }
  return z;
}

double frobenius(const DenseMatrix& E) {
  double s = 0.0;
  for (double x : E.v) s += x * x;
  return std::sqrt(s);
}

// Lawson–Hanson on a small dense system E x ≈ f, x ≥ 0 (Lawson & Hanson 1995, ch. 23).
NnlsSolution lawson_hanson(const DenseMatrix& E, const std::vector<double>& f, int max_iter) {
  const std::size_t k = E.rows, p = E.cols;
  NnlsSolution s;
  s.x.assign(p, 0.0);
  std::vector<bool> passive(p, false);
  double fnorm = 0.0;
  for (double x : f) fnorm += x * x;
  fnorm = std::sqrt(fnorm);
  const double tol = 1e3 * kEps * frobenius(E) * fnorm;
  auto gradient = [&](std::vector<double>& w) {
    std::vector<double> r(f);
    for (std::size_t j = 0; j < p; ++j) {
      if (s.x[j] == 0.0) continue;
      for (std::size_t i = 0; i < k; ++i) r[i] -= E(i, j) * s.x[j];
    }
    for (std::size_t j = 0; j < p; ++j) {
      double d = 0.0;
      for (std::size_t i = 0; i < k; ++i) d += E(i, j) * r[i];
      w[j] = d;
    }
  };
  std::vector<double> w(p);
  for (;;) {
    gradient(w);
    std::size_t t = p;
    double best = tol;
    for (std::size_t j = 0; j < p; ++j) {
      if (!passive[j] && w[j] > best) {
        best = w[j];
        t = j;
      }
    }
    if (t == p) break;
    if (s.iterations >= max_iter) {
      s.converged = false;
      break;
    }
    ++s.iterations;
    passive[t] = true;
    for (int inner = 0; inner < 10 * static_cast<int>(p) + 10; ++inner) {
      std::vector<std::size_t> cols;
      for (std::size_t j = 0; j < p; ++j) {
        if (passive[j]) cols.push_back(j);
      }
      const std::vector<double> z = solve_subset(E, f, cols);
      bool all_positive = true;
      for (double v : z) all_positive = all_positive && v > 0.0;
      if (all_positive) {
        for (std::size_t c = 0; c < cols.size(); ++c) s.x[cols[c]] = z[c];
        break;
      }
      // Step from x towards z as far as feasibility allows, then drop the columns that hit zero.
      double alpha = 1.0;
      for (std::size_t c = 0; c < cols.size(); ++c) {
        if (z[c] <= 0.0) {
          const double xj = s.x[cols[c]];
          alpha = std::min(alpha, xj / (xj - z[c]));
        }
      }
      for (std::size_t c = 0; c < cols.size(); ++c) {
        double& xj = s.x[cols[c]];
        xj += alpha * (z[c] - xj);
        if (xj <= 0.0 || (z[c] <= 0.0 && xj <= 1e-14 * std::fabs(z[c]))) {
          xj = 0.0;
          passive[cols[c]] = false;
        }
      }
    }
  }
  return s;
}

}  // namespace

DenseMatrix qr_triangle(const DenseMatrix& A, const std::vector<double>& b) {
  if (b.size() != A.rows || A.rows == 0) {
    throw InternalError("qr_triangle: " + std::to_string(A.rows) + " rows and " +
                        std::to_string(b.size()) + " right-hand values");
  }
  const std::size_t n = A.cols;
  DenseMatrix M(A.rows, n + 1);
  std::copy(A.v.begin(), A.v.end(), M.v.begin());
  std::copy(b.begin(), b.end(), M.v.begin() + static_cast<long>(A.rows * n));
  householder(M);
  DenseMatrix R(n + 1, n + 1);
  for (std::size_t j = 0; j <= n; ++j) {
    for (std::size_t i = 0; i <= j && i < M.rows; ++i) R(i, j) = M(i, j);
  }
  return R;
}

DenseMatrix cholesky_triangle(const DenseMatrix& G) {
  const std::size_t n = G.rows;
  DenseMatrix R(n, n);
  for (std::size_t j = 0; j < n; ++j) {
    double d = G(j, j);
    for (std::size_t k = 0; k < j; ++k) d -= R(k, j) * R(k, j);
    if (d <= 1e-13 * std::fabs(G(j, j)) || !(d > 0.0)) continue;  // dependent: row stays zero
    const double rjj = std::sqrt(d);
    R(j, j) = rjj;
    for (std::size_t i = j + 1; i < n; ++i) {
      double s = G(j, i);
      for (std::size_t k = 0; k < j; ++k) s -= R(k, j) * R(k, i);
      R(j, i) = s / rjj;
    }
  }
  return R;
}

NnlsSolution nnls_from_triangle(const DenseMatrix& R, std::size_t n_free, int max_iterations) {
  const std::size_t n = R.cols - 1;
  if (n_free > n) throw InternalError("nnls_from_triangle: more free unknowns than columns");
  const std::size_t p = n - n_free;
  DenseMatrix E(R.rows - n_free, p);
  std::vector<double> f(R.rows - n_free);
  for (std::size_t i = n_free; i < R.rows; ++i) {
    for (std::size_t j = 0; j < p; ++j) E(i - n_free, j) = R(i, n_free + j);
    f[i - n_free] = R(i, n);
  }
  const int max_iter =
      max_iterations > 0 ? max_iterations : static_cast<int>(3 * std::max<std::size_t>(p, 1));
  NnlsSolution c = lawson_hanson(E, f, max_iter);
  NnlsSolution s;
  s.iterations = c.iterations;
  s.converged = c.converged;
  s.x.assign(n, 0.0);
  s.at_bound.assign(n, false);
  for (std::size_t j = 0; j < p; ++j) {
    s.x[n_free + j] = c.x[j];
    s.at_bound[n_free + j] = c.x[j] == 0.0;
  }
  // Free unknowns by back-substitution in their rows.
  for (std::size_t i = n_free; i-- > 0;) {
    double v = R(i, n);
    for (std::size_t j = i + 1; j < n; ++j) v -= R(i, j) * s.x[j];
    s.x[i] = R(i, i) != 0.0 ? v / R(i, i) : 0.0;
  }
  double res = 0.0;
  for (std::size_t i = 0; i < R.rows; ++i) {
    double v = R(i, n);
    for (std::size_t j = 0; j < n; ++j) v -= R(i, j) * s.x[j];
    res += v * v;
  }
  s.residual_norm = std::sqrt(res);
  return s;
}

NnlsSolution nnls(const DenseMatrix& A, const std::vector<double>& b, std::size_t n_free) {
  return nnls_from_triangle(qr_triangle(A, b), n_free);
}

bool invert_spd(const DenseMatrix& S, DenseMatrix& inv) {
  const std::size_t n = S.rows;
  DenseMatrix L(n, n);  // lower Cholesky factor
  for (std::size_t j = 0; j < n; ++j) {
    double d = S(j, j);
    for (std::size_t k = 0; k < j; ++k) d -= L(j, k) * L(j, k);
    if (!(d > 1e-14 * std::fabs(S(j, j))) || !(d > 0.0)) return false;
    L(j, j) = std::sqrt(d);
    for (std::size_t i = j + 1; i < n; ++i) {
      double s = S(i, j);
      for (std::size_t k = 0; k < j; ++k) s -= L(i, k) * L(j, k);
      L(i, j) = s / L(j, j);
    }
  }
  inv = DenseMatrix(n, n);
  for (std::size_t c = 0; c < n; ++c) {
    std::vector<double> y(n, 0.0);
    for (std::size_t i = 0; i < n; ++i) {  // L y = e_c
      double s = i == c ? 1.0 : 0.0;
      for (std::size_t k = 0; k < i; ++k) s -= L(i, k) * y[k];
      y[i] = s / L(i, i);
    }
    for (std::size_t i = n; i-- > 0;) {  // Lᵀ x = y
      double s = y[i];
      for (std::size_t k = i + 1; k < n; ++k) s -= L(k, i) * inv(k, c);
      inv(i, c) = s / L(i, i);
    }
  }
  return true;
}

std::vector<double> symmetric_eigenvalues(const DenseMatrix& S) {
  const std::size_t n = S.rows;
  DenseMatrix A = S;
  for (int sweep = 0; sweep < 100; ++sweep) {
    double off = 0.0;
    for (std::size_t i = 0; i < n; ++i) {
      for (std::size_t j = i + 1; j < n; ++j) off += A(i, j) * A(i, j);
    }
    if (off < 1e-30 * (frobenius(A) * frobenius(A) + 1e-300)) break;
    for (std::size_t p = 0; p < n; ++p) {
      for (std::size_t q = p + 1; q < n; ++q) {
        if (A(p, q) == 0.0) continue;
        // Rotation that zeroes A(p, q) (Golub & Van Loan, symmetric Schur decomposition).
        const double theta = (A(q, q) - A(p, p)) / (2.0 * A(p, q));
        const double t =
            (theta >= 0.0 ? 1.0 : -1.0) / (std::fabs(theta) + std::sqrt(theta * theta + 1.0));
        const double c = 1.0 / std::sqrt(t * t + 1.0), s = t * c;
        for (std::size_t k = 0; k < n; ++k) {
          const double akp = A(k, p), akq = A(k, q);
          A(k, p) = c * akp - s * akq;
          A(k, q) = s * akp + c * akq;
        }
        for (std::size_t k = 0; k < n; ++k) {
          const double apk = A(p, k), aqk = A(q, k);
          A(p, k) = c * apk - s * aqk;
          A(q, k) = s * apk + c * aqk;
        }
      }
    }
  }
  std::vector<double> ev(n);
  for (std::size_t i = 0; i < n; ++i) ev[i] = A(i, i);
  std::sort(ev.begin(), ev.end());
  return ev;
}

}  // namespace lidbox
