#include <doctest/doctest.h>

#include <cmath>

#include "lidbox/engine/case_file.hpp"
#include "lidbox/met/csv_met.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/engine/run.hpp"

using namespace lidbox;

namespace {

std::string case_text(const std::string& zone, const std::string& extra_met = "",
                      const std::string& hours = "") {
  std::string h = hours.empty() ? "" : "hour_of_day = [" + hours + "]\n";
  return "name = \"t\"\ntime_zone = \"" + zone +
         "\"\n[airshed]\nx_side = \"10 km\"\ny_side = \"10 km\"\n[met]\nfile = \"m.csv\"\n" +
         extra_met +
         "[pollutants.CO]\nunit = \"ug/m3\"\nbackground = \"100 ug/m3\"\nfree_troposphere = \"80 "
         "ug/m3\"\n[sectors.s]\nemissions = { CO = \"100 g/s\" }\n" + h;
}

MetSeries flat_met(UtcSeconds start, std::size_t n, double h = 300.0) {
  MetSeries m;
  m.source = "m.csv";
  m.first_stamp_utc = start;
  m.mixing_height_m.assign(n, h);
  m.wind_u_m_s.assign(n, 2.0);
  m.wind_v_m_s.assign(n, 0.0);
  m.filled.assign(n, 0);
  m.source_line.assign(n, 0);
  return m;
}

std::string one_hot(int hour) {
  std::string s;
  for (int i = 0; i < 24; ++i) s += std::string(i ? "," : "") + (i == hour ? "1" : "0");
  return s;
}

}  // namespace

TEST_CASE("hour averages stamped at the period end cover the hour before their stamp") {
  // Physics note section 9: the label convention is a per-input choice.
  const CaseSpec c = parse_case(case_text("UTC", "hour_label = \"period_end\"\n"), "c.toml", ".");
  std::vector<HourRecord> hours;
  const UtcSeconds t = parse_iso8601("2026-01-05T01:00Z", nullptr, "t");
  (void)build_forcing(c, flat_met(t, 30), hours);
  CHECK(format_utc(hours.front().start_utc) == "2026-01-05T00:00:00Z");
  const CaseSpec s = parse_case(case_text("UTC"), "c.toml", ".");
  (void)build_forcing(s, flat_met(t, 30), hours);
  CHECK(format_utc(hours.front().start_utc) == "2026-01-05T01:00:00Z");
  CHECK(hours.size() == 30);
  const CaseSpec i = parse_case(case_text("UTC", "reading = \"instantaneous\"\n"), "c.toml", ".");
  (void)build_forcing(i, flat_met(t, 30), hours);
  CHECK(hours.size() == 29);
}

TEST_CASE("the emission clock follows local civil time across the spring clock change") {
  // US rule (15 U.S.C. 260a): clocks go forward at 02:00 EST on 8 March 2026. A sector that
  // emits only in the local hour 08:00-09:00 emits at 13:00Z on 7 March (EST, UTC-5) and at
  // 12:00Z on 8 March (EDT, UTC-4).
  const CaseSpec c = parse_case(case_text("EST5EDT,M3.2.0,M11.1.0", "", one_hot(8)), "c.toml", ".");
  std::vector<HourRecord> hours;
  const UtcSeconds t0 = parse_iso8601("2026-03-07T00:00Z", nullptr, "t");
  const Forcing F = build_forcing(c, flat_met(t0, 72), hours);
  std::vector<std::string> emitting;
  for (std::size_t i = 0; i < F.n_hours; ++i) {
    if (F.clock_factor[i * 2] > 0.0) emitting.push_back(format_utc(hours[i].start_utc));
  }
  CHECK(emitting == std::vector<std::string>{"2026-03-07T13:00:00Z", "2026-03-08T12:00:00Z",
                                             "2026-03-09T12:00:00Z"});
  // The normalised weight of the one hour is 24 (mean of the 24 weights is 1/24).
  CHECK(F.clock_factor[13 * 2] == doctest::Approx(24.0));
}

TEST_CASE("a zone half an hour off the UTC hours splits each hour at the local hour change") {
  // UTC+05:30: the UTC hour 02:00-03:00 is local 07:30-08:30, so the local hour 08 starts
  // 1800 s into it.
  const CaseSpec c = parse_case(case_text("+05:30", "", one_hot(8)), "c.toml", ".");
  std::vector<HourRecord> hours;
  const Forcing F = build_forcing(c, flat_met(parse_iso8601("2026-01-05T00:00Z", nullptr, "t"), 30), hours);
  CHECK(F.clock_split_s == 1800);
  CHECK(F.clock(0, 2, 0) == 0.0);
  CHECK(F.clock(0, 2, 1) == doctest::Approx(24.0));
  CHECK(F.clock(0, 3, 0) == doctest::Approx(24.0));
  CHECK(F.clock(0, 3, 1) == 0.0);
  // And the run still closes its budget with the split hours.
  const RunResult r = run_case(c, flat_met(parse_iso8601("2026-01-05T00:00Z", nullptr, "t"), 30));
  CHECK(r.relative_closure(0, true) < 1e-12);
}

TEST_CASE("spin-up repeats the first day until it repeats itself") {
  // Physics note section 9: after a converged spin-up, running the same day again changes the
  // hour means by less than the tolerance.
  const CaseSpec c = parse_case(case_text("UTC", "", one_hot(7)), "c.toml", ".");
  MetSeries m = flat_met(parse_iso8601("2026-01-05T00:00Z", nullptr, "t"), 48);
  for (std::size_t i = 0; i < 48; ++i) {
    const double hour = static_cast<double>(i % 24);
    m.mixing_height_m[i] = 100.0 + 700.0 * std::max(0.0, std::sin((hour - 8.0) / 10.0 * 3.14159265));
  }
  const RunResult r = run_case(c, m);
  CHECK(r.spin_up_converged);
  CHECK(r.spin_up_days >= 2);
  double worst = 0.0, peak = 0.0;
  for (std::size_t i = 0; i < 24; ++i) {
    worst = std::max(worst, std::fabs(r.total(i + 24, 0) - r.total(i, 0)));
    peak = std::max(peak, r.total(i, 0));
  }
  CHECK(worst / peak < c.spin_up_tolerance);
  // With spin-up the initial part is zero: everything is background or sector.
  CHECK(r.mean(0, 0, 1) == 0.0);
}

TEST_CASE("a background column of the met file is converted from its header unit") {
  std::string text = case_text("UTC");
  text.replace(text.find("background = \"100 ug/m3\""), 24, "background = { column = \"co_bg\" }");
  const CaseSpec c = parse_case(text, "c.toml", ".");
  MetSeries m = flat_met(parse_iso8601("2026-01-05T00:00Z", nullptr, "t"), 30);
  m.extra.push_back({"co_bg", "mg/m3", std::vector<double>(30, 0.25)});
  m.extra[0].values[3] = 0.5;
  std::vector<HourRecord> hours;
  const Forcing F = build_forcing(c, m, hours);
  // 0.25 mg/m3 = 2.5e-4 g/m3 (closed form: unit prefixes).
  CHECK(F.background_g_m3[0] == doctest::Approx(2.5e-4));
  CHECK(F.background_g_m3[3] == doctest::Approx(5e-4));
  m.extra[0].name = "co_background";
  CHECK_THROWS_WITH_AS((void)build_forcing(c, m, hours),
                       "m.csv: no column \"co_bg\" for the background of CO (other columns: "
                       "co_background); expected a column \"co_bg [unit]\"",
                       InputError);
}

namespace {

// Two hours of instantaneous met with the lid rising from 200 m to 800 m, a weak wind.
MetSeries rising_met() {
  MetSeries m = flat_met(parse_iso8601("2026-01-05T00:00Z", nullptr, "t"), 3, 200.0);
  m.mixing_height_m = {200.0, 800.0, 800.0};
  m.source_line = {2, 3, 4};
  return m;
}

std::string residual_case(const std::string& initial_residual, const std::string& top) {
  std::string text = case_text("UTC", "reading = \"instantaneous\"\n");
  text.replace(text.find("[pollutants.CO]"), 15,
               "[model]\nspin_up = \"none\"\n" +
                   (top.empty() ? "" : "initial_residual_top = \"" + top + "\"\n") +
                   "[pollutants.CO]\ninitial = \"300 ug/m3\"\ninitial_residual = \"" +
                   initial_residual + "\"");
  return text;
}

}  // namespace

TEST_CASE("the initial residual layer has a top of its own and is entrained by the rising lid") {
  // Closed form by mass balance: with no loss and no wind aloft in the residual layer, a lid
  // rising from 200 m to 800 m under a residual layer topped at 600 m takes in
  // Cr0 (600 - 200) of residual air and Ca (800 - 600) of free-troposphere air in the first
  // hour, whatever the sub-steps: 150 ug/m3 x 400 m = 0.06 g/m2 and 80 ug/m3 x 200 m = 0.016.
  const CaseSpec with = parse_case(residual_case("150 ug/m3", "600 m"), "c.toml", ".");
  const CaseSpec clean = parse_case(residual_case("0 ug/m3", "600 m"), "c.toml", ".");
  const RunResult a = run_case(with, rising_met());
  const RunResult b = run_case(clean, rising_met());
  CHECK(a.initial_residual_mass_g_m2[0] == doctest::Approx(150e-6 * 400.0).epsilon(1e-14));
  CHECK(a.budget_of(0, 0).entrained_from_residual ==
        doctest::Approx(150e-6 * 400.0).epsilon(1e-12));
  CHECK(a.budget_of(0, 0).entrained_from_free_troposphere ==
        doctest::Approx(80e-6 * 200.0).epsilon(1e-12));
  CHECK(b.budget_of(0, 0).entrained_from_residual == 0.0);
  CHECK(b.budget_of(0, 0).entrained_from_free_troposphere ==
        doctest::Approx(80e-6 * 200.0).epsilon(1e-12));
  // The start value now matters: it is carried in the "initial" part of the hour means.
  CHECK(a.mean(0, 0, 1) > b.mean(0, 0, 1) + 1e-5);
  CHECK(a.relative_closure(0, true) < 1e-12);
  // Without a top, no residual layer: refused rather than ignored.
  CHECK_THROWS_WITH_AS((void)parse_case(residual_case("150 ug/m3", ""), "c.toml", "."),
                       "c.toml:13: [pollutants.CO] initial_residual: an initial residual-layer "
                       "concentration without a residual-layer top; expected initial_residual_top "
                       "= \"800 m\" (say) in [model], the top of the residual layer at the start, "
                       "at or above the first hour's lid",
                       InputError);
  // A top below the first lid.
  const CaseSpec low = parse_case(residual_case("150 ug/m3", "150 m"), "c.toml", ".");
  CHECK_THROWS_WITH_AS((void)run_case(low, rising_met()),
                       "c.toml:11: [model] initial_residual_top: a top of 150 m, below the first "
                       "lid of 200 m (m.csv:2); expected a residual-layer top at or above the "
                       "first lid",
                       InputError);
}
