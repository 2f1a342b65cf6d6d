// The rendered diagnostics: the daily table's header and a hand-made day, and the case file's
// [diagnostics] fields agreeing with the scheme fields.
#include <doctest/doctest.h>

#include <string>
#include <vector>

#include "lidbox/engine/case_file.hpp"
#include "lidbox/report/diagnostics_report.hpp"

using namespace lidbox;

TEST_CASE(
    "the case file's diagnostics fields are the scheme fields beyond mixing height and wind") {
  const std::vector<std::string> names(diagnostic_field_names().begin() + 2,
                                       diagnostic_field_names().end());
  CHECK(names == diagnostics_extra_fields());
}

TEST_CASE("stagnation.csv carries units in its header and one row per day") {
  // Hand-made: two UTC days of 300 m and 2 m/s (600 m2/s every hour), then a windy day.
  HourlyDiagnosticsInput in;
  in.source = "hand-made";
  in.first_hour_start_utc = 1768003200;  // 2026-01-10T00:00:00Z
  for (int h = 0; h < 72; ++h) {
    in.field[0].push_back(300.0);
    in.field[1].push_back(h < 48 ? 2.0 : 10.0);
  }
  const DiagnosticsSetup setup = load_diagnostics_setup("usfs-vcis", {"korshover-angell-1982-10m"});
  const DiagnosticsResult r = diagnose(in, setup);
  const std::string csv = render_stagnation_csv(setup, r);
  // usfs-vcis: 600 m2/s < 2350 is poor; 3000 m2/s is marginal (edges from memory, see the table).
  CHECK(csv ==
        "date_lst,hours,ventilation_min [m2/s],ventilation_mean [m2/s],ventilation_afternoon_max "
        "[m2/s],"
        "usfs-vcis_afternoon_max [m2/s],usfs-vcis_category,korshover-angell-1982-10m_stagnant,"
        "korshover-angell-1982-10m_streak_day\n"
        "2026-01-10,24,600,600,600,600,poor,1,1\n"
        "2026-01-11,24,600,600,600,600,poor,1,2\n"
        "2026-01-12,24,3000,3000,3000,3000,marginal,0,0\n");
  CHECK(render_episodes_csv(setup, r) ==
        "scheme,first_date_lst,last_date_lst,days,episode_min_days\n");
  const std::string summary = render_diagnostics_summary(setup, r);
  CHECK(summary.find("poor: 2 d, marginal: 1 d, fair: 0 d, good: 0 d") != std::string::npos);
  CHECK(summary.find("korshover-angell-1982-10m: 2 stagnation days of 3 judged, longest streak 2 "
                     "d, 0 episode(s) "
                     "of >= 4 d") != std::string::npos);
}
