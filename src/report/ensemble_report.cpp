#include "lidbox/report/ensemble_report.hpp"

#include <cmath>
#include <cstdio>
#include <sstream>

#include "lidbox/base/caution.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/standards/averaging.hpp"

namespace lidbox {

namespace {

std::string q_label(double q) {
  return std::string("p").append(format_number(q, 6));  // not "p" + ...: GCC bug 105329
}

std::string percent(double p) {
  char b[32];
  std::snprintf(b, sizeof b, "%.0f %%", 100.0 * p);
  return b;
}

std::string utc_or_empty(double t) {
  return std::isnan(t) ? "" : format_utc(static_cast<UtcSeconds>(t));
}

std::string number_or_empty(double v, int digits = 7) {
  return std::isnan(v) ? "" : format_number(v, digits);
}

// Probabilities with four decimals (kernel tails reach 1e-200, which no forecast means).
std::string probability(double p) {
  if (std::isnan(p)) return "";
  char b[32];
  std::snprintf(b, sizeof b, "%.4f", p);
  return b;
}

}  // namespace

std::string render_ensemble_hourly_csv(const CaseSpec& c, const EnsembleOutcome& e) {
  const EnsemblePercentiles& P = e.percentiles;
  const RunResult& r0 = e.members.front();
  std::ostringstream o;
  o << "period_start_utc,period_end_utc,period_start_local,members";
  for (const auto& ps : c.pollutants) {
    const std::string u = " [" + ps.unit.canonical + "]";
    for (double q : P.percentiles()) o << ',' << ps.name << '_' << q_label(q) << u;
    o << ',' << ps.name << "_member_mean" << u;
  }
  o << '\n';
  for (std::size_t i = 0; i < P.hours(); ++i) {
    const HourRecord& h = r0.hours[i];
    o << format_utc(h.start_utc) << ',' << format_utc(h.start_utc + kSecondsPerHour) << ','
      << format_with_offset(h.start_utc, h.civil_offset_s) << ',' << P.members();
    for (std::size_t p = 0; p < P.pollutants(); ++p) {
      const double to = c.pollutants[p].unit.to_g_m3;
      for (std::size_t k = 0; k < P.percentiles().size(); ++k)
        o << ',' << format_number(P.value(i, p, k) / to);
      o << ',' << format_number(P.mean(i, p) / to);
    }
    o << '\n';
  }
  return o.str();
}

std::string render_ensemble_days_csv(const EnsembleOutcome& e) {
  std::ostringstream o;
  o << "rule_set,rule,kind,pollutant,statistic,level,unit,day_lst,members_counted,members_"
       "exceeding,"
       "probability_member_count";
  if (e.kernel_dressing) o << ",probability_kernel_dressed";
  o << ",note\n";
  for (const EnsembleDay& d : e.rules.days) {
    o << d.rule_set_id << ',' << d.rule_id << ',' << (d.alert ? "alert episode under way" : "limit")
      << ',' << d.pollutant << ',' << d.statistic << ',' << format_number(d.level) << ',' << d.unit
      << ',' << format_day(d.day) << ',' << d.members << ',' << d.exceeding << ','
      << probability(d.probability);
    if (e.kernel_dressing) o << ',' << probability(d.kernel_probability);
    o << ','
      << (d.exceeding == 0 || d.exceeding == d.members
              ? "finite ensemble: not a proof of 0 or 100 %"
              : "")
      << '\n';
  }
  return o.str();
}

std::string render_ensemble_episodes_csv(const EnsembleOutcome& e) {
  std::ostringstream o;
  o << "rule_set,rule,level_name,pollutant,members,members_with_episode,probability_member_count,"
       "first_start_earliest_utc,first_start_median_utc,first_start_latest_utc,first_length_min "
       "[h],"
       "first_length_median [h],first_length_max [h]\n";
  for (const EnsembleEpisodes& x : e.rules.episodes) {
    o << x.rule_set_id << ',' << x.rule_id << ',' << x.level_name << ',' << x.pollutant << ','
      << x.members << ',' << x.with_episode << ',' << probability(x.probability) << ','
      << utc_or_empty(x.first_start_earliest) << ',' << utc_or_empty(x.first_start_median) << ','
      << utc_or_empty(x.first_start_latest) << ',' << number_or_empty(x.length_h_min, 4) << ','
      << number_or_empty(x.length_h_median, 4) << ',' << number_or_empty(x.length_h_max, 4) << '\n';
  }
  return o.str();
}

std::string render_ensemble_summary(const CaseSpec& c, const EnsembleOutcome& e) {
  std::ostringstream o;
  const std::size_t n = e.members.size();
  o << "\nEnsemble " << n << " members (" << e.labels.front() << " ... " << e.labels.back()
    << "); percentiles of the hour means:";
  for (double q : e.percentiles.percentiles()) o << ' ' << format_number(q, 6);
  o << "\n  Probabilities count members (k of " << n
    << "); a finite ensemble proves neither 0 % nor 100 %."
    << (e.kernel_dressing ? " Kernel-dressed values: Gaussian kernels, Silverman bandwidth, "
                            "variance divisor N - 1."
                          : "")
    << "\n";
  // Peak of the median per pollutant, and its spread.
  const EnsemblePercentiles& P = e.percentiles;
  std::size_t k50 = P.percentiles().size();
  for (std::size_t k = 0; k < P.percentiles().size(); ++k) {
    if (P.percentiles()[k] == 50.0) k50 = k;
  }
  for (std::size_t p = 0; p < P.pollutants() && k50 < P.percentiles().size(); ++p) {
    std::size_t peak = 0;
    for (std::size_t i = 0; i < P.hours(); ++i) {
      if (P.value(i, p, k50) > P.value(peak, p, k50)) peak = i;
    }
    const double to = c.pollutants[p].unit.to_g_m3;
    const HourRecord& h = e.members.front().hours[peak];
    o << "  " << c.pollutants[p].name << " peak of the median "
      << format_number(P.value(peak, p, k50) / to, 4) << ' ' << c.pollutants[p].unit.canonical
      << " at " << format_local(h.start_utc, c.zone) << " ("
      << q_label(P.percentiles().front()) << ' ' << format_number(P.value(peak, p, 0) / to, 4)
      << ", " << q_label(P.percentiles().back()) << ' '
      << format_number(P.value(peak, p, P.percentiles().size() - 1) / to, 4) << ")\n";
  }
  // The days with members exceeding, one line per rule.
  std::string key;
  std::ostringstream line;
  auto flush = [&] {
    if (!key.empty()) o << line.str() << "\n";
    line.str("");
  };
  for (const EnsembleDay& d : e.rules.days) {
    if (d.exceeding == 0) continue;
    const std::string k = d.rule_set_id + " " + d.rule_id;
    if (k != key) {
      flush();
      key = k;
      line << "  " << k
           << (d.alert ? " episode under way"
                       : " above " + format_number(d.level, 4) + " " + d.unit)
           << ":";
    } else {
      line << ",";
    }
    line << ' ' << format_day(d.day) << ' ' << d.exceeding << '/' << d.members << " ("
         << percent(d.probability);
    if (e.kernel_dressing && !std::isnan(d.kernel_probability))
      line << ", dressed " << percent(d.kernel_probability);
    line << ')';
  }
  flush();
  if (key.empty()) o << "  no member exceeds a daily rule's level on any day\n";
  for (const EnsembleEpisodes& x : e.rules.episodes) {
    if (x.with_episode == 0) continue;
    o << "  " << x.rule_set_id << ' ' << x.rule_id << " episode in " << x.with_episode << '/'
      << x.members << " members (" << percent(x.probability) << "): first start "
      << utc_or_empty(x.first_start_earliest) << " to " << utc_or_empty(x.first_start_latest)
      << " (median " << utc_or_empty(x.first_start_median) << "), length "
      << format_number(x.length_h_min, 4) << "-" << format_number(x.length_h_max, 4) << " h\n";
  }
  return o.str();
}

std::vector<OutputFile> render_ensemble_outputs(const CaseSpec& c, const EnsembleOutcome& e) {
  return {{"ensemble_hourly.csv", render_ensemble_hourly_csv(c, e)},
          {"ensemble_days.csv", render_ensemble_days_csv(e)},
          {"ensemble_episodes.csv", render_ensemble_episodes_csv(e)},
          {"ensemble.nc", render_ensemble_netcdf(c, e)}};
}

}  // namespace lidbox
