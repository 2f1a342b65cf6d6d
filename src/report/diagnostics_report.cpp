#include "lidbox/report/diagnostics_report.hpp"

#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"

namespace lidbox {

std::string render_stagnation_csv(const DiagnosticsSetup& setup, const DiagnosticsResult& r) {
  std::string out =
      "date_lst,hours,ventilation_min [m2/s],ventilation_mean [m2/s],ventilation_afternoon_max "
      "[m2/s]";
  if (setup.table) {
    out += "," + setup.table->id + "_" + to_string(setup.table->statistic) + " [" +
           setup.table->unit + "]," + setup.table->id + "_category";
  }
  for (const auto& s : setup.schemes) out += "," + s.id + "_stagnant," + s.id + "_streak_day";
  out += "\n";
  // Fields are appended one by one: g++ 12 at -O3 warns falsely (-Wrestrict, GCC bug 105329)
  // on a one-character literal plus a temporary string.
  for (const auto& d : r.days) {
    out.append(d.date).append(",").append(std::to_string(d.hours));
    for (double v : {d.ventilation.min_m2_s, d.ventilation.mean_m2_s,
                     d.ventilation.afternoon_max_m2_s}) {
      out.append(",").append(format_number(v));
    }
    if (setup.table) {
      out.append(",").append(format_number(d.category_value)).append(",");
      if (d.category >= 0)
        out.append(setup.table->categories[static_cast<std::size_t>(d.category)].name);
    }
    for (std::size_t s = 0; s < setup.schemes.size(); ++s) {
      out.append(",");
      if (d.verdict[s] >= 0) out.append(std::to_string(d.verdict[s]));
      out.append(",").append(std::to_string(d.streak_day[s]));
    }
    out += "\n";
  }
  return out;
}

std::string render_episodes_csv(const DiagnosticsSetup& setup, const DiagnosticsResult& r) {
  std::string out = "scheme,first_date_lst,last_date_lst,days,episode_min_days\n";
  for (const auto& e : r.episodes) {
    const auto& s = setup.schemes[e.scheme];
    out += s.id + "," + r.days[e.first_day].date + "," +
           r.days[e.first_day + static_cast<std::size_t>(e.days) - 1].date + "," +
           std::to_string(e.days) + "," + std::to_string(s.episode_min_days) + "\n";
  }
  return out;
}

std::string render_diagnostics_summary(const DiagnosticsSetup& setup, const DiagnosticsResult& r) {
  std::string out = "Ventilation and stagnation (met only, local standard days):\n";
  if (setup.table) {
    const auto& t = *setup.table;
    out += "  ventilation " + std::string(to_string(t.statistic)) + " by " + t.id + " (" + t.unit +
           "): ";
    std::vector<std::string> parts;
    for (std::size_t k = 0; k < t.categories.size(); ++k) {
      parts.push_back(t.categories[k].name + ": " + std::to_string(r.category_days[k]) + " d");
    }
    out += join(parts) + "\n    source: " + t.source + " [" + t.path + "; " + t.checked + "]\n";
    if (!t.wind_note.empty()) out += "    note: " + t.wind_note + "\n";
  }
  if (setup.schemes.empty())
    out += "  no stagnation scheme chosen ([diagnostics] schemes or --scheme)\n";
  for (std::size_t s = 0; s < setup.schemes.size(); ++s) {
    const auto& sc = setup.schemes[s];
    const auto& m = r.summary[s];
    out += "  " + sc.id + ": " + std::to_string(m.stagnant_days) + " stagnation days of " +
           std::to_string(m.judged_days) + " judged, longest streak " +
           std::to_string(m.longest_streak) + " d, " + std::to_string(m.episodes) +
           " episode(s) of >= " + std::to_string(sc.episode_min_days) + " d\n";
    for (const auto& e : r.episodes) {
      if (e.scheme != s) continue;
      out += "    episode " + r.days[e.first_day].date + " .. " +
             r.days[e.first_day + static_cast<std::size_t>(e.days) - 1].date + " (" +
             std::to_string(e.days) + " d)\n";
    }
    std::vector<std::string> crit;
    for (const auto& c : sc.criteria) crit.push_back(c.text);
    out +=
        "    criteria: " + join(crit, "; ") + "\n    source: " + sc.source + " [" + sc.path + "]\n";
  }
  return out;
}

void append_diagnostics_outputs(std::vector<OutputFile>& files, const DiagnosticsSetup& setup,
                                const DiagnosticsResult& r) {
  bool found = false;
  for (auto& f : files) {
    if (f.name == "summary.txt") {
      f.content.append("\n").append(render_diagnostics_summary(setup, r));
      found = true;
    }
  }
  if (!found)
    throw InternalError("append_diagnostics_outputs: no summary.txt among the run's files");
  files.push_back({"stagnation.csv", render_stagnation_csv(setup, r)});
  files.push_back({"stagnation_episodes.csv", render_episodes_csv(setup, r)});
}

}  // namespace lidbox
