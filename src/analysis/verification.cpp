#include "lidbox/analysis/verification.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <map>
#include <random>

#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"

namespace lidbox {

namespace {
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
double ratio(double num, double den) {
  return den != 0.0 ? num / den : kNaN;
}
}  // namespace

void ContingencyTable::add(bool forecast_yes, bool observed_yes) {
  if (forecast_yes && observed_yes) ++a;
  if (forecast_yes && !observed_yes) ++b;
  if (!forecast_yes && observed_yes) ++c;
  if (!forecast_yes && !observed_yes) ++d;
}

CategoricalScores categorical_scores(const ContingencyTable& t) {
  const double a = static_cast<double>(t.a), b = static_cast<double>(t.b);
  const double c = static_cast<double>(t.c), d = static_cast<double>(t.d);
  const double n = a + b + c + d;
  CategoricalScores s;
  s.pod = ratio(a, a + c);
  s.far = ratio(b, a + b);
  s.pofd = ratio(b, b + d);
  s.frequency_bias = ratio(a + b, a + c);
  s.csi = ratio(a, a + b + c);
  s.accuracy = ratio(a + d, n);
  const double ar = n > 0.0 ? (a + b) * (a + c) / n : kNaN;
  s.ets = ratio(a - ar, a + b + c - ar);
  const double e = n > 0.0 ? ((a + b) * (a + c) + (c + d) * (b + d)) / n : kNaN;
  s.hss = ratio(a + d - e, n - e);
  s.peirce = s.pod - s.pofd;
  return s;
}

BrierDecomposition brier_decomposition(const std::vector<double>& p, const std::vector<int>& o,
                                       const std::string& where) {
  if (p.size() != o.size() || p.empty()) {
    throw InputError(
        where,
        std::to_string(p.size()) + " probabilities and " + std::to_string(o.size()) + " outcomes",
        "the same number, at least one");
  }
  BrierDecomposition r;
  r.n = p.size();
  std::map<double, std::pair<long long, long long>> groups;  // p_k -> (n_k, events)
  double bs = 0.0, events = 0.0;
  for (std::size_t i = 0; i < p.size(); ++i) {
    if (!(p[i] >= 0.0 && p[i] <= 1.0)) {
      throw InputError(where + ": case " + std::to_string(i + 1),
                       "probability " + format_number(p[i]), "a probability from 0 to 1");
    }
    if (o[i] != 0 && o[i] != 1) {
      throw InputError(where + ": case " + std::to_string(i + 1), "outcome " + std::to_string(o[i]),
                       "0 or 1");
    }
    bs += (p[i] - o[i]) * (p[i] - o[i]);
    events += o[i];
    auto& g = groups[p[i]];
    ++g.first;
    g.second += o[i];
  }
  const double N = static_cast<double>(p.size());
  r.brier = bs / N;
  const double ob = events / N;
  r.climatology = ob;
  r.uncertainty = ob * (1.0 - ob);
  for (const auto& [pk, g] : groups) {
    const double nk = static_cast<double>(g.first);
    const double ok = static_cast<double>(g.second) / nk;
    r.reliability += nk * (pk - ok) * (pk - ok);
    r.resolution += nk * (ok - ob) * (ok - ob);
    r.table.push_back({pk, g.first, ok});
  }
  r.reliability /= N;
  r.resolution /= N;
  r.skill = r.uncertainty > 0.0 ? 1.0 - r.brier / r.uncertainty : kNaN;
  return r;
}

std::vector<long long> rank_histogram(const std::vector<std::vector<double>>& members,
                                      const std::vector<double>& observation, std::uint64_t seed,
                                      const std::string& where) {
  if (members.size() != observation.size() || members.empty()) {
    throw InputError(where,
                     std::to_string(members.size()) + " ensembles and " +
                         std::to_string(observation.size()) + " observations",
                     "one ensemble per observation, at least one");
  }
  const std::size_t M = members.front().size();
  if (M == 0) throw InputError(where, "an ensemble of 0 members", "at least one member");
  std::vector<long long> bins(M + 1, 0);
  std::mt19937_64 rng(seed);
  for (std::size_t c = 0; c < members.size(); ++c) {
    if (members[c].size() != M) {
      throw InputError(where + ": case " + std::to_string(c + 1),
                       std::to_string(members[c].size()) + " members",
                       std::to_string(M) + " as in the first case");
    }
    std::size_t below = 0, ties = 0;
    for (double x : members[c]) {
      if (x < observation[c]) ++below;
      if (x == observation[c]) ++ties;
    }
    // A tie with t members may rank anywhere from below to below + t.
    std::size_t rank = below;
    if (ties > 0) rank += std::uniform_int_distribution<std::size_t>(0, ties)(rng);
    ++bins[rank];
  }
  return bins;
}

}  // namespace lidbox
