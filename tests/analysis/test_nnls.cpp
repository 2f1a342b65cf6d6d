#include <doctest/doctest.h>

#include <cmath>
#include <cstdio>
#include <random>

#include "lidbox/analysis/nnls.hpp"

using namespace lidbox;

namespace {
DenseMatrix from_rows(const std::vector<std::vector<double>>& rows) {
  DenseMatrix A(rows.size(), rows.front().size());
  for (std::size_t i = 0; i < rows.size(); ++i) {
    for (std::size_t j = 0; j < rows[i].size(); ++j) A(i, j) = rows[i][j];
  }
  return A;
}
}  // namespace

TEST_CASE("nnls reproduces the examples of the scipy.optimize.nnls documentation") {
  // scipy.optimize.nnls documentation, "Examples": A = [[1, 0], [1, 0], [0, 1]];
  // b = [2, 1, 1] gives x = [1.5, 1], rnorm 0.7071067811865475;
  // b = [-1, -1, -1] gives x = [0, 0], rnorm 1.7320508075688772.
  const DenseMatrix A = from_rows({{1, 0}, {1, 0}, {0, 1}});
  const NnlsSolution s = nnls(A, {2, 1, 1});
  CHECK(s.x[0] == doctest::Approx(1.5).epsilon(1e-14));
  CHECK(s.x[1] == doctest::Approx(1.0).epsilon(1e-14));
  CHECK(s.residual_norm == doctest::Approx(0.7071067811865475).epsilon(1e-14));
  const NnlsSolution z = nnls(A, {-1, -1, -1});
  CHECK(z.x[0] == 0.0);
  CHECK(z.x[1] == 0.0);
  CHECK(z.at_bound == std::vector<bool>{true, true});
  CHECK(z.residual_norm == doctest::Approx(1.7320508075688772).epsilon(1e-14));
}

TEST_CASE(
    "nnls recovers known non-negative solutions and a free offset to 1e-9 on seeded problems") {
  // Closed form: b = A x exactly with x >= 0 has the NNLS solution x.
  for (unsigned seed : {1u, 2u, 3u, 4u, 5u}) {
    std::printf("seed %u\n", seed);
    std::mt19937_64 rng(seed);
    std::uniform_real_distribution<double> u(0.0, 1.0);
    const std::size_t m = 300, n = 6;
    DenseMatrix A(m, n);
    std::vector<double> x(n);
    for (std::size_t j = 0; j < n; ++j) {
      x[j] = j == 0 ? -3.0 : 0.2 + 2.0 * u(rng);  // column 0: a free offset, negative
      for (std::size_t i = 0; i < m; ++i)
        A(i, j) = j == 0 ? 1.0 : u(rng) * (1.0 + std::sin(0.1 * static_cast<double>(i * j)));
    }
    std::vector<double> b(m, 0.0);
    for (std::size_t i = 0; i < m; ++i) {
      for (std::size_t j = 0; j < n; ++j) b[i] += A(i, j) * x[j];
    }
    const NnlsSolution s = nnls(A, b, 1);
    for (std::size_t j = 0; j < n; ++j) CHECK(s.x[j] == doctest::Approx(x[j]).epsilon(1e-9));
    CHECK(s.residual_norm < 1e-9);
  }
}

TEST_CASE("a column pushed below zero is held at the bound") {
  // A = I, b = (1, -1): x = (1, 0) with the second unknown at the bound (closed form).
  const NnlsSolution s = nnls(from_rows({{1, 0}, {0, 1}}), {1, -1});
  CHECK(s.x[0] == doctest::Approx(1.0));
  CHECK(s.x[1] == 0.0);
  CHECK(s.at_bound == std::vector<bool>{false, true});
}

TEST_CASE("the Cholesky triangle of the Gram matrix and the QR triangle give the same NNLS") {
  // Closed form: R^T R = [A b]^T [A b] for both triangles (up to row signs).
  std::mt19937_64 rng(9);
  std::printf("seed 9\n");
  std::uniform_real_distribution<double> u(0.0, 1.0);
  DenseMatrix A(100, 3);
  std::vector<double> b(100);
  for (std::size_t i = 0; i < 100; ++i) {
    for (std::size_t j = 0; j < 3; ++j) A(i, j) = u(rng);
    b[i] = 2 * A(i, 0) - A(i, 1) + 0.1 * u(rng);
  }
  DenseMatrix G(4, 4);
  for (std::size_t i = 0; i < 100; ++i) {
    const double z[4] = {A(i, 0), A(i, 1), A(i, 2), b[i]};
    for (int a = 0; a < 4; ++a) {
      for (int c = 0; c < 4; ++c) G(a, c) += z[a] * z[c];
    }
  }
  const NnlsSolution q = nnls_from_triangle(qr_triangle(A, b), 0);
  const NnlsSolution c = nnls_from_triangle(cholesky_triangle(G), 0);
  for (int j = 0; j < 3; ++j) CHECK(q.x[j] == doctest::Approx(c.x[j]).epsilon(1e-9));
  CHECK(q.x[1] == 0.0);  // the true coefficient is negative
  CHECK(q.residual_norm == doctest::Approx(c.residual_norm).epsilon(1e-7));
}

TEST_CASE("symmetric eigenvalues and the SPD inverse of a small matrix") {
  // [[2, 1], [1, 2]] has eigenvalues 1 and 3 and inverse [[2, -1], [-1, 2]] / 3 (closed form).
  DenseMatrix S(2, 2);
  S(0, 0) = 2;
  S(0, 1) = S(1, 0) = 1;
  S(1, 1) = 2;
  const auto ev = symmetric_eigenvalues(S);
  CHECK(ev[0] == doctest::Approx(1.0));
  CHECK(ev[1] == doctest::Approx(3.0));
  DenseMatrix inv;
  REQUIRE(invert_spd(S, inv));
  CHECK(inv(0, 0) == doctest::Approx(2.0 / 3.0));
  CHECK(inv(0, 1) == doctest::Approx(-1.0 / 3.0));
  DenseMatrix singular(2, 2);
  singular(0, 0) = singular(0, 1) = singular(1, 0) = singular(1, 1) = 1.0;
  CHECK_FALSE(invert_spd(singular, inv));
}
