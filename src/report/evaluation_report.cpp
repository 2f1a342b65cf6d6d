#include "lidbox/report/evaluation_report.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <sstream>

#include "lidbox/base/caution.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/report/chart.hpp"
#include "lidbox/standards/averaging.hpp"

namespace lidbox {

namespace {

// "undefined" where a statistic has no value (a zero denominator), never a number.
std::string num(double v, int digits = 4) {
  if (std::isnan(v)) return "undefined";
  if (std::isinf(v)) return v > 0 ? "inf" : "-inf";
  return format_number(v, digits);
}
std::string csv_num(double v, int digits = 10) {
  return std::isfinite(v) ? format_number(v, digits) : "";
}

// A table cell: a '|' inside would end the cell.
std::string md_cell(const std::string& s) {
  std::string out;
  for (char ch : s) {
    if (ch == '|') out += '\\';
    out += ch;
  }
  return out;
}

const char* method_name(FitMethod m) {
  return m == FitMethod::nnls ? "NNLS" : "Bayesian scaling";
}

std::string pairs_section(const EvaluationReportInput& in) {
  std::ostringstream o;
  o << "## Pairs used, and why others were not\n\n"
    << "| monitor | pollutant | unit in file -> case unit | monitor hours | outside the run | "
       "missing | below detection | negative (kept) | pairs used |\n"
    << "|---|---|---|---|---|---|---|---|---|\n";
  for (const auto& m : in.monitors) {
    o << "| " << m.label << " | " << m.pollutant << " | " << m.monitor_unit << " -> " << m.unit
      << " (x" << format_number(m.to_case_unit, 6) << ") | " << m.monitor_hours << " | "
      << m.outside_run << " | " << m.missing << " | " << m.below_detection;
    if (m.dropped_below_detection) o << " (" << m.dropped_below_detection << " dropped)";
    o << " | " << m.negative << " | " << m.pairs << " |\n";
  }
  o << "\nRun hours: " << in.hours->size() << " (" << format_utc(in.hours->front().start_utc)
    << " to " << format_utc(in.hours->back().start_utc) << ", hour starts). A run hour without a "
    << "monitor value is not a pair. Monitor periods that only partly overlap the run are paired "
       "on the overlap.\n";
  for (const auto& s : in.skipped) o << "- skipped column: " << s << "\n";
  o << "\n### How values are treated\n\n"
    << "- Values below detection (cells \"<L\"): " << describe(in.below) << ".\n"
    << "- Negative values (instrument noise around zero): kept as measured in every linear "
       "statistic and in the fit; clipping them would bias the mean upwards.\n"
    << "- Zeros and negatives cannot enter logarithms or ratios: MG, VG and FAC2 use only the "
       "pairs with observed and modelled values above zero (N+ in the tables), MFB and MFE only "
       "pairs with O + P > 0 (Nf).\n"
    << "- A statistic whose denominator is zero is printed \"undefined\".\n"
    << "- Daily values are computed from the paired hours only (the model is masked where the "
       "monitor has no value), on LST days, complete at the rule's own completeness (daily means: "
       "18 of 24 hours).\n";
  return o.str();
}

void statistics_table(std::ostringstream& o, const ModelEvaluation& ev) {
  o << "| monitor | pollutant | averaging | unit | N | N+ | Nf | mean O | mean P |";
  for (const auto& n : agreement_statistic_names()) o << " " << n << " |";
  o << "\n|";
  for (std::size_t i = 0; i < 9 + agreement_statistic_names().size(); ++i) o << "---|";
  o << "\n";
  for (const auto& pv : ev.pairs) {
    o << "| " << pv.monitor << " | " << pv.pollutant << " | " << pv.averaging << " | " << pv.unit
      << " | " << pv.observed.size() << " | ";
    if (pv.observed.empty()) {
      o << " | | | |";
      for (std::size_t i = 0; i < agreement_statistic_names().size(); ++i) o << " |";
      o << "\n";
      continue;
    }
    const auto& s = pv.stats;
    o << s.n_positive << " | " << s.n_fractional << " | " << num(s.mean_observed) << " | "
      << num(s.mean_modelled) << " |";
    for (const auto& n : agreement_statistic_names())
      o << " " << num(agreement_value(s, n), 3) << " |";
    o << "\n";
  }
}

void criteria_table(std::ostringstream& o, const ModelEvaluation& ev) {
  o << "| monitor | pollutant | averaging | criterion | level | bounds (value) | result |\n"
       "|---|---|---|---|---|---|---|\n";
  for (const auto& pv : ev.pairs) {
    for (const auto& cr : pv.criteria) {
      std::vector<std::string> b;
      for (std::size_t k = 0; k < cr.bound_text.size(); ++k) {
        b.push_back(md_cell(cr.bound_text[k]) + " (" + num(cr.values[k], 3) +
                    (cr.bound_met[k] ? ", met" : ", not met") + ")");
      }
      o << "| " << pv.monitor << " | " << pv.pollutant << " | " << pv.averaging << " | "
        << cr.criterion.id << " | " << cr.criterion.level << " | " << join(b, "; ") << " | "
        << (cr.met ? "**met**" : "**not met**") << " |\n";
    }
  }
}

void criteria_sources(std::ostringstream& o, const ModelEvaluation& ev) {
  std::vector<std::string> seen;
  for (const auto& pv : ev.pairs) {
    for (const auto& cr : pv.criteria) {
      const std::string key = cr.criterion.id + cr.criterion.level;
      if (std::find(seen.begin(), seen.end(), key) != seen.end()) continue;
      seen.push_back(key);
      o << "- **" << cr.criterion.id << "** (" << cr.criterion.level << "), applies to "
        << cr.criterion.applies_to << ": " << cr.criterion.citation
        << ". Checked: " << cr.criterion.checked << ".\n";
    }
  }
}

void verification_table(std::ostringstream& o, const ModelEvaluation& ev) {
  if (ev.verifications.empty()) {
    o << "No rule with a daily statistic judges the paired pollutants (name rule sets in the "
         "case's [standards] or with --rules).\n";
    return;
  }
  o << "| monitor | rule | daily value | level | days | a hits | b false alarms | c misses | d "
       "correct negatives | POD | FAR | CSI | freq. bias | ETS | HSS | Peirce |\n"
       "|---|---|---|---|---|---|---|---|---|---|---|---|---|---|---|---|\n";
  for (const auto& v : ev.verifications) {
    const auto& s = v.scores;
    o << "| " << v.monitor << " | " << v.rule_set_id << " " << v.limit_id << " | " << v.statistic
      << " | " << format_number(v.level, 6) << " " << v.unit << " | " << v.table.n() << " | "
      << v.table.a << " | " << v.table.b << " | " << v.table.c << " | " << v.table.d << " | "
      << num(s.pod, 3) << " | " << num(s.far, 3) << " | " << num(s.csi, 3) << " | "
      << num(s.frequency_bias, 3) << " | " << num(s.ets, 3) << " | " << num(s.hss, 3) << " | "
      << num(s.peirce, 3) << " |\n";
  }
}

void profiles_section(std::ostringstream& o, const ModelEvaluation& ev) {
  for (const auto& pr : ev.profiles) {
    o << "\n**" << pr.monitor << ", " << pr.pollutant << " [" << pr.unit
      << "]**: mean by local hour (observed / modelled, pairs)\n\n| hour | O | P | n "
         "|\n|---|---|---|---|\n";
    for (int h = 0; h < 24; ++h) {
      o << "| " << h << " | " << num(pr.hour_observed[h], 4) << " | " << num(pr.hour_modelled[h], 4)
        << " | " << pr.hour_count[h] << " |\n";
    }
    static const char* kDays[] = {"Mon", "Tue", "Wed", "Thu", "Fri", "Sat", "Sun"};
    o << "\nby local day of the week\n\n| day | O | P | n |\n|---|---|---|---|\n";
    for (int w = 0; w < 7; ++w) {
      o << "| " << kDays[w] << " | " << num(pr.weekday_observed[w], 4) << " | "
        << num(pr.weekday_modelled[w], 4) << " | " << pr.weekday_count[w] << " |\n";
    }
  }
}

std::string fit_section(const EvaluationReportInput& in) {
  const SectorFitReport& f = *in.fit;
  std::ostringstream o;
  o << "## Fit: " << method_name(f.method) << " of " << f.pollutant << " [" << f.unit << "]\n\n"
    << "Model: observed(t) - initial-state part(t) = sum of scale x part(t)"
    << (std::any_of(f.estimates.begin(), f.estimates.end(),
                    [](const FitEstimate& e) { return e.name == "offset"; })
            ? " + offset"
            : "")
    << ", over " << f.rows << " paired hours at " << f.monitors.size() << " monitor(s) (weights " <<
      [&] {
        std::vector<std::string> w;
        for (std::size_t k = 0; k < f.monitors.size(); ++k)
          w.push_back(f.monitors[k] + " " + format_number(f.weights[k], 4));
        return join(w);
      }()
    << ").\n\n";
  o << "| column | scale | Gaussian s.e. | t | bootstrap s.e. | bootstrap 95 % | VIF |";
  if (f.method == FitMethod::bayes) o << " prior mean | prior s.d. |";
  o << "\n|---|---|---|---|---|---|---|" << (f.method == FitMethod::bayes ? "---|---|" : "")
    << "\n";
  for (const auto& e : f.estimates) {
    o << "| " << e.name << " | " << num(e.value, 6) << " | "
      << (e.at_bound ? std::string("at bound") : num(e.gaussian_se, 3)) << " | "
      << (e.at_bound ? std::string("") : num(e.t, 3)) << " | "
      << (std::isnan(e.bootstrap_se) ? std::string("") : num(e.bootstrap_se, 3)) << " | "
      << (std::isnan(e.bootstrap_low) ? std::string("")
                                      : num(e.bootstrap_low, 4) + " to " + num(e.bootstrap_high, 4))
      << " | " << num(e.vif, 3) << " |";
    if (f.method == FitMethod::bayes)
      o << " " << num(e.prior_mean, 4) << " | " << num(e.prior_sd, 4) << " |";
    o << "\n";
  }
  o << "\n- R² = " << num(f.r2, 4) << "; residual s.d. " << num(f.residual_sd, 4) << " " << f.unit
    << " on " << num(f.residual_dof, 6) << " degrees of freedom; degrees of freedom for signal "
    << num(f.dofs, 4)
    << (f.method == FitMethod::nnls ? " (the scales off the bound)"
                                    : " (trace of the averaging kernel)")
    << ".\n"
    << "- Condition number of the unit-length columns: " << num(f.condition_number, 4)
    << " (collinearity warning above 30, Belsley, Kuh & Welsch 1980); VIF warning above 10 (rule "
       "of "
       "thumb).\n";
  if (f.method == FitMethod::bayes) {
    o << "- Observation error sigma_o = " << num(f.observation_error, 4) << " " << f.unit
      << (f.observation_error_estimated ? " (estimated: the NNLS residual standard deviation)"
                                        : " (given)")
      << "; scales without a given prior: mean 1, s.d. 1; an offset: mean 0 and a flat s.d.\n";
  }
  if (f.bootstrap > 0) {
    o << "- Bootstrap: " << f.bootstrap << " resamples of moving blocks of " << f.block_hours
      << " h (all monitors' hours together), seed " << f.seed << ".\n";
  }
  for (const auto& l : f.left_out) o << "- Not fitted: " << l << "\n";
  if (!f.warnings.empty()) {
    o << "\n**Warnings**\n\n";
    for (const auto& w : f.warnings) o << "- " << w << "\n";
  }
  if (!in.calibrated_case_name.empty()) {
    o << "\nCalibrated case written: `" << in.calibrated_case_name << "` (the original with scaled "
      << "lines, each with a comment naming the fit).\n";
  }
  for (const auto& n : in.calibrated_notes) o << "- " << n << "\n";
  return o.str();
}

std::string ensemble_section(const EvaluationReportInput& in) {
  std::ostringstream o;
  o << "\n## Ensemble (" << in.ensemble_members << " members) against the monitors\n\n"
    << "Probability of exceeding = members exceeding / members (member counting; a finite "
       "ensemble does not prove 0 % or 100 %). Outcome = the monitor's own day call. Brier score "
       "BS = REL - RES + UNC (Murphy 1973), BSS = 1 - BS/UNC against the sample climatology. "
       "Rank = members below the monitor's day value, on days every member completes (a flat "
       "histogram is what a reliable ensemble gives; Hamill 2001).\n\n";
  if (in.ensemble.empty()) {
    o << "No rule with daily calls judges the paired pollutants.\n";
    return o.str();
  }
  o << "| monitor | rule | days | BS | reliability | resolution | uncertainty | BSS | rank "
       "histogram (days) |\n|---|---|---|---|---|---|---|---|---|\n";
  for (const auto& e : in.ensemble) {
    std::vector<std::string> h;
    for (long long k : e.rank_histogram) h.push_back(std::to_string(k));
    o << "| " << e.monitor << " | " << e.rule_set_id << " " << e.limit_id << " (" << e.statistic
      << " > " << format_number(e.level, 6) << " " << e.unit << ") | " << e.brier.n << " | "
      << num(e.brier.brier, 3) << " | " << num(e.brier.reliability, 3) << " | "
      << num(e.brier.resolution, 3) << " | " << num(e.brier.uncertainty, 3) << " | "
      << num(e.brier.skill, 3) << " | " << join(h, " ") << " (" << e.days_ranked << ") |\n";
  }
  o << "\nReliability tables (forecast probability: days, observed frequency)\n\n";
  for (const auto& e : in.ensemble) {
    std::vector<std::string> rows;
    for (const auto& r : e.brier.table) {
      rows.push_back(format_number(r.forecast_probability, 3) + ": " + std::to_string(r.count) +
                     ", " + num(r.observed_frequency, 3));
    }
    o << "- " << e.monitor << " " << e.rule_set_id << " " << e.limit_id << ": " << join(rows, "; ")
      << "\n";
  }
  return o.str();
}

std::string ensemble_csv(const EvaluationReportInput& in) {
  std::ostringstream o;
  o << "monitor,rule_set,limit,pollutant,daily_value,level,unit,members,days,brier,reliability,"
       "resolution,uncertainty,brier_skill,table,forecast_probability,days_with_probability,"
       "observed_frequency,rank,days_at_rank\n";
  for (const auto& e : in.ensemble) {
    const std::string head = e.monitor + "," + e.rule_set_id + "," + e.limit_id + "," +
                             e.pollutant + "," + e.statistic + "," + format_number(e.level, 10) +
                             "," + e.unit + "," + std::to_string(e.members) + "," +
                             std::to_string(e.brier.n) + "," + csv_num(e.brier.brier) + "," +
                             csv_num(e.brier.reliability) + "," + csv_num(e.brier.resolution) +
                             "," + csv_num(e.brier.uncertainty) + "," + csv_num(e.brier.skill);
    for (const auto& r : e.brier.table) {
      o << head << ",reliability," << format_number(r.forecast_probability, 10) << "," << r.count
        << "," << csv_num(r.observed_frequency) << ",,\n";
    }
    for (std::size_t k = 0; k < e.rank_histogram.size(); ++k) {
      o << head << ",rank_histogram,,,," << k << "," << e.rank_histogram[k] << "\n";
    }
  }
  return o.str();
}

std::string render_markdown(const EvaluationReportInput& in) {
  const CaseSpec& c = *in.c;
  std::ostringstream o;
  o << "# Model against monitors: " << c.name << "\n\n> " << kScreeningCaution
    << " The monitor files are the user's measurements; lidbox does not check their quality "
       "beyond what is listed here.\n\n";
  if (c.invented) o << "The case says its scenario is **invented**.\n\n";
  o << "Case `" << c.file << "`; time zone " << c.zone.spec() << " (LST offset "
    << format_utc_offset(c.zone.standard_offset_s()) << "). Monitors: ";
  {
    std::vector<std::string> files;
    for (const auto& m : in.monitors) {
      if (std::find(files.begin(), files.end(), m.monitor) == files.end())
        files.push_back(m.monitor);
    }
    o << join(files)
      << ". Rule sets: " << (in.rule_set_ids.empty() ? "none" : join(in.rule_set_ids)) << ".\n\n";
  }
  o << pairs_section(in) << "\n";
  auto evaluation = [&](const ModelEvaluation& ev, const std::string& title) {
    o << "## Statistics: " << title << "\n\n"
      << "O observed, P modelled. FB > 0 means under-prediction; MB, NMB, MFB > 0 mean "
         "over-prediction. NMB, NME, MFB, MFE are fractions (0.15 = 15 %).\n\n";
    statistics_table(o, ev);
    o << "\n### Published criteria (" << title << ")\n\n";
    criteria_table(o, ev);
    o << "\n";
    o << "\n### Exceedance calls per rule and day (" << title << ")\n\n"
      << "a: model and monitor above the level; b: model above, monitor not (false alarm); c: "
         "monitor above, model not (miss); d: neither. Scores as defined by the CAWCR "
         "verification pages; \"undefined\" where no event was observed or forecast.\n\n";
    verification_table(o, ev);
    for (const auto& n : ev.notes) o << "- " << n << "\n";
    o << "\n";
  };
  evaluation(in.before, in.before.model_label);
  o << "### Criteria sources\n\n";
  criteria_sources(o, in.before);
  if (!in.ensemble.empty() || in.ensemble_members > 0) o << ensemble_section(in);
  o << "\n## Profiles (" << in.before.model_label << ")\n";
  profiles_section(o, in.before);
  o << "\n";
  if (in.fit) {
    o << fit_section(in) << "\n";
    if (in.after) evaluation(*in.after, in.after->model_label);
  }
  o << "## Charts\n\n`timeseries.svg` (hour means, monitor overlaid), `scatter.svg` (modelled "
       "against observed hour means, 1:1 and factor-2 lines).\n\n> "
    << kScreeningCaution << "\n";
  return o.str();
}

std::string statistics_csv(const EvaluationReportInput& in) {
  std::ostringstream o;
  o << "model,monitor,pollutant,averaging,unit,N,N_positive,N_fractional,mean_observed,mean_"
       "modelled";
  for (const auto& n : agreement_statistic_names()) o << "," << n;
  o << "\n";
  auto rows = [&](const ModelEvaluation& ev, const char* which) {
    for (const auto& pv : ev.pairs) {
      o << which << "," << pv.monitor << "," << pv.pollutant << "," << pv.averaging << ","
        << pv.unit << "," << pv.observed.size();
      if (pv.observed.empty()) {
        o << ",,,,";
        for (std::size_t i = 0; i < agreement_statistic_names().size(); ++i) o << ",";
        o << "\n";
        continue;
      }
      o << "," << pv.stats.n_positive << "," << pv.stats.n_fractional << ","
        << csv_num(pv.stats.mean_observed) << "," << csv_num(pv.stats.mean_modelled);
      for (const auto& n : agreement_statistic_names())
        o << "," << csv_num(agreement_value(pv.stats, n));
      o << "\n";
    }
  };
  rows(in.before, "before");
  if (in.after) rows(*in.after, "after");
  return o.str();
}

std::string pairs_csv(const EvaluationReportInput& in) {
  std::ostringstream o;
  o << "monitor,pollutant,unit,hour_start_utc,observed,modelled,below_detection_substituted";
  if (in.after) o << ",fitted";
  o << "\n";
  for (std::size_t k = 0; k < in.monitors.size(); ++k) {
    const auto& m = in.monitors[k];
    for (std::size_t i = 0; i < in.hours->size(); ++i) {
      if (std::isnan(m.observed[i])) continue;
      o << m.label << "," << m.pollutant << "," << m.unit << ","
        << format_utc((*in.hours)[i].start_utc) << "," << format_number(m.observed[i], 10) << ","
        << format_number(in.modelled[k][i], 10) << "," << static_cast<int>(m.substituted[i]);
      if (in.after) o << "," << format_number(in.fitted[k][i], 10);
      o << "\n";
    }
  }
  return o.str();
}

std::string profiles_csv(const EvaluationReportInput& in) {
  std::ostringstream o;
  o << "model,monitor,pollutant,unit,profile,index,observed,modelled,pairs\n";
  auto rows = [&](const ModelEvaluation& ev, const char* which) {
    for (const auto& pr : ev.profiles) {
      for (int h = 0; h < 24; ++h) {
        o << which << "," << pr.monitor << "," << pr.pollutant << "," << pr.unit << ",local_hour,"
          << h << "," << csv_num(pr.hour_observed[h]) << "," << csv_num(pr.hour_modelled[h]) << ","
          << pr.hour_count[h] << "\n";
      }
      for (int w = 0; w < 7; ++w) {
        o << which << "," << pr.monitor << "," << pr.pollutant << "," << pr.unit
          << ",local_weekday_mon0," << w << "," << csv_num(pr.weekday_observed[w]) << ","
          << csv_num(pr.weekday_modelled[w]) << "," << pr.weekday_count[w] << "\n";
      }
    }
  };
  rows(in.before, "before");
  if (in.after) rows(*in.after, "after");
  return o.str();
}

std::string verification_csv(const EvaluationReportInput& in) {
  std::ostringstream o;
  o << "model,monitor,rule_set,limit,pollutant,daily_value,level,unit,days,a,b,c,d,POD,FAR,POFD,"
       "CSI,"
       "frequency_bias,accuracy,ETS,HSS,Peirce\n";
  auto rows = [&](const ModelEvaluation& ev, const char* which) {
    for (const auto& v : ev.verifications) {
      const auto& s = v.scores;
      o << which << "," << v.monitor << "," << v.rule_set_id << "," << v.limit_id << ","
        << v.pollutant << "," << v.statistic << "," << format_number(v.level, 10) << "," << v.unit
        << "," << v.table.n() << "," << v.table.a << "," << v.table.b << "," << v.table.c << ","
        << v.table.d << "," << csv_num(s.pod) << "," << csv_num(s.far) << "," << csv_num(s.pofd)
        << "," << csv_num(s.csi) << "," << csv_num(s.frequency_bias) << "," << csv_num(s.accuracy)
        << "," << csv_num(s.ets) << "," << csv_num(s.hss) << "," << csv_num(s.peirce) << "\n";
    }
  };
  rows(in.before, "before");
  if (in.after) rows(*in.after, "after");
  return o.str();
}

std::string verification_days_csv(const EvaluationReportInput& in) {
  std::ostringstream o;
  o << "model,monitor,rule_set,limit,day_lst,observed,modelled,unit,observed_exceeded,modelled_"
       "exceeded\n";
  auto rows = [&](const ModelEvaluation& ev, const char* which) {
    for (const auto& v : ev.verifications) {
      for (const auto& d : v.days) {
        o << which << "," << v.monitor << "," << v.rule_set_id << "," << v.limit_id << ","
          << format_day(d.day) << "," << format_number(d.observed, 10) << ","
          << format_number(d.modelled, 10) << "," << v.unit << "," << (d.observed_exceeded ? 1 : 0)
          << "," << (d.modelled_exceeded ? 1 : 0) << "\n";
      }
    }
  };
  rows(in.before, "before");
  if (in.after) rows(*in.after, "after");
  return o.str();
}

std::string summary_text(const EvaluationReportInput& in) {
  std::ostringstream o;
  o << "lidbox evaluate: " << in.c->name << " against " << in.monitors.size()
    << " monitor series (screening only; see evaluation.md)\n";
  for (const auto& m : in.monitors) {
    o << "  " << m.label << " " << m.pollutant << ": " << m.pairs << " pairs (" << m.outside_run
      << " monitor hours outside the run, " << m.missing << " missing, " << m.below_detection
      << " below detection, " << m.negative << " negative kept)\n";
  }
  auto line = [&](const ModelEvaluation& ev) {
    for (const auto& pv : ev.pairs) {
      if (pv.averaging != "hour means" && pv.averaging != "daily means") continue;
      if (pv.observed.empty()) continue;
      int met = 0;
      for (const auto& c : pv.criteria) met += c.met ? 1 : 0;
      o << "  " << pv.monitor << " " << pv.pollutant << " " << pv.averaging << ": N "
        << pv.observed.size() << ", NMB " << num(pv.stats.nmb, 3) << ", r " << num(pv.stats.r, 3)
        << ", FAC2 " << num(pv.stats.fac2, 3) << ", IOA " << num(pv.stats.ioa, 3)
        << "; criteria met " << met << " of " << pv.criteria.size() << "\n";
    }
  };
  o << " " << in.before.model_label << ":\n";
  line(in.before);
  if (in.fit) {
    o << " fit (" << method_name(in.fit->method) << ", " << in.fit->pollutant << "):";
    for (const auto& e : in.fit->estimates) {
      o << " " << e.name << " " << num(e.value, 4);
      if (e.at_bound)
        o << " (at bound)";
      else
        o << " +- " << num(e.gaussian_se, 2);
    }
    o << "; R2 " << num(in.fit->r2, 3) << "\n";
    for (const auto& w : in.fit->warnings) o << "  warning: " << w << "\n";
  }
  if (in.after) {
    o << " " << in.after->model_label << ":\n";
    line(*in.after);
  }
  return o.str();
}

// ---- charts ----------------------------------------------------------------------------------

// The charts' input: per monitor the model, the monitor and the fit on the run's hours.
MonitorChartInput chart_input(const EvaluationReportInput& in) {
  MonitorChartInput chart;
  chart.c = in.c;
  chart.hours = in.hours;
  for (std::size_t k = 0; k < in.monitors.size(); ++k) {
    const auto& m = in.monitors[k];
    MonitorChartSeries s{m.label, m.pollutant, m.unit, in.modelled[k], {}, m.observed, {}};
    s.substituted.assign(m.substituted.begin(), m.substituted.end());
    if (in.after) s.fitted = in.fitted[k];
    chart.series.push_back(std::move(s));
  }
  return chart;
}

}  // namespace

std::string render_evaluation_timeseries_svg(const EvaluationReportInput& in) {
  return render_monitor_chart_svg(chart_input(in));
}

std::string render_evaluation_scatter_svg(const EvaluationReportInput& in) {
  return render_scatter_svg(chart_input(in));
}

namespace {

std::string fit_csv(const SectorFitReport& f) {
  std::ostringstream o;
  o << "method,pollutant,unit,column,scale,gaussian_se,t,at_bound,bootstrap_se,bootstrap_p2.5,"
       "bootstrap_p97.5,vif,prior_mean,prior_sd,r2,residual_sd,residual_dof,dofs,observation_error,"
       "condition_number\n";
  for (const auto& e : f.estimates) {
    o << (f.method == FitMethod::nnls ? "nnls" : "bayes") << "," << f.pollutant << "," << f.unit
      << "," << e.name << "," << format_number(e.value, 15) << "," << csv_num(e.gaussian_se, 15)
      << "," << csv_num(e.t, 15) << "," << (e.at_bound ? 1 : 0) << ","
      << csv_num(e.bootstrap_se, 15) << "," << csv_num(e.bootstrap_low, 15) << ","
      << csv_num(e.bootstrap_high, 15) << "," << csv_num(e.vif, 15) << ","
      << csv_num(e.prior_mean, 15) << "," << csv_num(e.prior_sd, 15) << "," << csv_num(f.r2, 15)
      << "," << csv_num(f.residual_sd, 15) << "," << csv_num(f.residual_dof, 15) << ","
      << csv_num(f.dofs, 15) << "," << csv_num(f.observation_error, 15) << ","
      << csv_num(f.condition_number, 15) << "\n";
  }
  return o.str();
}

std::string fit_matrix_csv(const FitDesign& d) {
  std::ostringstream o;
  o << "monitor_index,hour_index,weight,y_minus_fixed [" << d.unit << "]";
  for (const auto& c : d.columns) o << "," << c.name << " [" << d.unit << "]";
  o << "\n";
  for (std::size_t r = 0; r < d.y.size(); ++r) {
    o << d.row_monitor[r] << "," << d.row_hour[r] << "," << format_number(d.weight[r], 15) << ","
      << format_number(d.y[r], 17);
    for (std::size_t j = 0; j < d.columns.size(); ++j) o << "," << format_number(d.K(r, j), 17);
    o << "\n";
  }
  return o.str();
}

}  // namespace

std::vector<OutputFile> render_evaluation_outputs(const EvaluationReportInput& in) {
  if (!in.c || !in.hours || in.hours->empty() || in.monitors.size() != in.modelled.size()) {
    throw InternalError("render_evaluation_outputs: incomplete input");
  }
  std::vector<OutputFile> files = {{"evaluation.md", render_markdown(in)},
                                   {"statistics.csv", statistics_csv(in)},
                                   {"pairs.csv", pairs_csv(in)},
                                   {"profiles.csv", profiles_csv(in)},
                                   {"verification.csv", verification_csv(in)},
                                   {"verification_days.csv", verification_days_csv(in)},
                                   {"timeseries.svg", render_evaluation_timeseries_svg(in)},
                                   {"scatter.svg", render_evaluation_scatter_svg(in)},
                                   {"summary.txt", summary_text(in)}};
  if (in.ensemble_members > 0) files.push_back({"ensemble_verification.csv", ensemble_csv(in)});
  if (in.fit && in.design) {
    files.push_back({"fit.csv", fit_csv(*in.fit)});
    files.push_back({"fit_matrix.csv", fit_matrix_csv(*in.design)});
  }
  return files;
}

}  // namespace lidbox
