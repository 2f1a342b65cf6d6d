#include <doctest/doctest.h>

#include <algorithm>

#include "base/civil_calendar.hpp"
#include "lidbox/standards/episodes.hpp"

using namespace lidbox;

namespace {

const std::filesystem::path kRulesDir = std::filesystem::path(LIDBOX_SOURCE_DIR) / "src" / "data" / "rules";

UtcSeconds utc(int y, int m, int d, int h = 0) {
  return civil_calendar::days_from_ymd(y, m, d) * kSecondsPerDay + h * kSecondsPerHour;
}

}  // namespace

TEST_CASE("an SO2 alert needs three consecutive hours above 500") {
  // Directive 2008/50/EC Annex XII A: 500 ug/m3 measured over three consecutive hours.
  const RuleSet eu = load_rule_set("eu-2008-50", kRulesDir);
  const UtcSeconds t0 = utc(2025, 2, 3);
  NamedSeries s{{"SO2", HourlySeries{t0, {400, 510, 520, 400, 510, 530, 550, 400}, "ug m-3"}}};
  const auto episodes = find_episodes(s, eu, 0, t0 - 2 * kSecondsPerHour);
  REQUIRE(episodes.size() == 1);
  const Episode& e = episodes[0];
  CHECK(e.rule_id == "SO2-alert");
  CHECK(e.level_name == "alert threshold");
  CHECK(e.start_utc == t0 + 4 * kSecondsPerHour);
  CHECK(e.end_utc == t0 + 7 * kSecondsPerHour);
  CHECK(e.duration_h == 3.0);
  CHECK(e.peak == 550.0);
  CHECK(e.peak_start_utc == t0 + 6 * kSecondsPerHour);
  REQUIRE(e.lead_time_h);
  CHECK(*e.lead_time_h == 6.0);  // issued 2 h before the series, episode 4 h into it
}

TEST_CASE("a missing hour breaks a run and daily alerts count consecutive days") {
  CHECK(runs_above({501, 502, kMissing, 503, 504, 505}, 500, 3).size() == 1);
  CHECK(runs_above({501, 502, kMissing, 503, 504, 505}, 500, 3)[0].begin == 3);
  CHECK(runs_above({500, 500, 500}, 500, 1).empty());  // ">" not ">=" (common practice)
  // EU 2024/2881 PM10 alert: 90 ug/m3 daily mean on three consecutive days (from memory).
  const RuleSet eu = load_rule_set("eu-2024-2881", kRulesDir);
  std::vector<double> v(24 * 5, 50.0);
  for (std::size_t i = 24; i < 24 * 4; ++i) v[i] = 95.0;
  NamedSeries s{{"PM10", HourlySeries{utc(2025, 1, 1), v, "ug m-3"}}};
  const auto episodes = find_episodes(s, eu, 0, std::nullopt);
  const auto alert = std::find_if(episodes.begin(), episodes.end(),
                                  [](const Episode& e) { return e.rule_id == "PM10-alert"; });
  REQUIRE(alert != episodes.end());
  CHECK(alert->values_above == 3);
  CHECK(alert->duration_h == 72.0);
  CHECK(alert->start_utc == utc(2025, 1, 2));
  CHECK_FALSE(alert->lead_time_h);
  // The information threshold (one day) fires for the same run.
  CHECK(std::count_if(episodes.begin(), episodes.end(),
                      [](const Episode& e) { return e.rule_id == "PM10-information"; }) == 1);
}
