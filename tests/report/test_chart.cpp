#include <doctest/doctest.h>

#include <cmath>
#include <cstdint>
#include <random>
#include <string>
#include <vector>

#include "lidbox/report/chart.hpp"
#include "report/svg_writer.hpp"

using namespace lidbox;

namespace {

// Hours from 2026-01-01T00:00Z (20454 days after 1970-01-01) with a fixed civil offset.
std::vector<HourRecord> hours_from(UtcSeconds start, std::size_t n, int offset_s) {
  std::vector<HourRecord> h(n);
  for (std::size_t i = 0; i < n; ++i) {
    h[i].start_utc = start + static_cast<UtcSeconds>(i) * kSecondsPerHour;
    h[i].civil_offset_s = offset_s;
  }
  return h;
}

constexpr UtcSeconds k2026 = 20454 * kSecondsPerDay;

// Every label of a row lies inside the plot and keeps the gap to its neighbour, with the width
// the CLI test estimates (0.6 em per character).
void check_no_overlap(const std::vector<TickLabel>& row, double px_per_hour, double width,
                      double font) {
  for (std::size_t k = 0; k < row.size(); ++k) {
    const double x = row[k].hour * px_per_hour;
    CHECK(x >= 0.0);
    CHECK(x <= width);
    if (k == 0) continue;
    const double prev = row[k - 1].hour * px_per_hour;
    const double room = 0.5 * (label_width_px(row[k - 1].text.size(), font) +
                               label_width_px(row[k].text.size(), font));
    CHECK(x - prev >= room + kTickLabelGapPx - 1e-9);
  }
}

}  // namespace

TEST_CASE("a run of up to 14 days is drawn hour by hour and a longer one by local days") {
  const auto two_weeks = hours_from(k2026, 14 * 24, -7 * 3600);
  const TimeBins b = make_time_bins(two_weeks, 1000);
  CHECK(b.days_per_bin == 0);
  CHECK(b.count() == 14 * 24);
  // 15 days starting at 00 UTC, 7 hours behind UTC: local midnight falls at 07 UTC, so the first
  // local day holds 7 hours (17:00 to 23:00 local), then whole days, and a last one of 17 hours.
  const auto longer = hours_from(k2026, 15 * 24, -7 * 3600);
  const TimeBins d = make_time_bins(longer, 1000);
  CHECK(d.days_per_bin == 1);
  REQUIRE(d.count() == 16);
  CHECK(d.first[0] == 0);
  CHECK(d.first[1] == 7);
  CHECK(d.first[2] == 31);
  CHECK(d.first[16] == 360);
}

TEST_CASE("daily bins give the mean and the highest hour of each local day") {
  const auto h = hours_from(k2026, 15 * 24, -7 * 3600);
  const TimeBins b = make_time_bins(h, 1000);
  // Value = hour index: closed form. A whole day from hour f: mean f + 11.5, highest f + 23.
  // The first, partial day holds hours 0..6: mean 3, highest 6.
  const BinStats s = bin_statistics(b, [](std::size_t i) { return static_cast<double>(i); });
  CHECK(s.mean[0] == doctest::Approx(3.0));
  CHECK(s.max[0] == 6.0);
  for (std::size_t k = 1; k + 1 < b.count(); ++k) {
    CHECK(s.mean[k] == doctest::Approx(static_cast<double>(b.first[k]) + 11.5));
    CHECK(s.max[k] == static_cast<double>(b.first[k]) + 23.0);
  }
  // The last day holds hours 343..359: mean 351, highest 359.
  CHECK(s.mean[15] == doctest::Approx(351.0));
  CHECK(s.max[15] == 359.0);
}

TEST_CASE("missing hours are left out of a bin and a bin without any value is missing") {
  const auto h = hours_from(k2026, 20 * 24, 0);
  const TimeBins b = make_time_bins(h, 1000);
  REQUIRE(b.count() == 20);
  // Day 0: only the even hours 0, 2, ..., 22: mean 11, highest 22 (closed form). Day 1: none.
  const BinStats s = bin_statistics(b, [](std::size_t i) {
    if (i < 24) return i % 2 == 0 ? static_cast<double>(i) : std::nan("");
    if (i < 48) return std::nan("");
    return 1.0;
  });
  CHECK(s.mean[0] == doctest::Approx(11.0));
  CHECK(s.max[0] == 22.0);
  CHECK(std::isnan(s.mean[1]));
  CHECK(std::isnan(s.max[1]));
  CHECK(s.mean[2] == 1.0);
}

TEST_CASE("a run too long for one bin per day gets bins of several whole days") {
  // 100 whole UTC days into at most 30 bins: ceil(100 / 30) = 4 days a bin, 25 bins.
  const auto h = hours_from(k2026, 100 * 24, 0);
  const TimeBins b = make_time_bins(h, 30);
  CHECK(b.days_per_bin == 4);
  REQUIRE(b.count() == 25);
  CHECK(b.first[1] == 96);
  // The mean of hours 0..95 is 47.5, their highest 95 (closed form).
  const BinStats s = bin_statistics(b, [](std::size_t i) { return static_cast<double>(i); });
  CHECK(s.mean[0] == doctest::Approx(47.5));
  CHECK(s.max[0] == 95.0);
}

TEST_CASE("three days get six-hourly hour labels and dated weekday labels") {
  // 922 px over 72 h = 12.8 px/h. "00:00" at 12 px is 36 px + 8 px gap: 3 h (38.4 px) is too
  // close, 6 h (76.8 px) fits. A day (307 px) fits "Mon 01-05" (64.8 px + 8 px).
  const double width = 922.0;
  const auto h = hours_from(k2026 + 4 * kSecondsPerDay, 72, -7 * 3600);  // from Mon 01-05 00Z
  const TimeTicks t = choose_time_ticks(h, width, 12.0);
  CHECK(t.hour_step == 6);
  REQUIRE(t.hour_row.size() == 12);
  CHECK(t.hour_row[0].text == "18:00");  // 00 UTC is 17:00 local; the first tick is at 18:00
  CHECK(t.hour_row[0].hour == 1.0);
  CHECK(t.date_step == "1 day");
  REQUIRE(t.date_row.size() == 3);
  CHECK(t.date_row[0].text == "Mon 01-05");  // local midnight of 2026-01-05 is 07 UTC on the 5th
  CHECK(t.date_row[0].hour == 7.0);
  CHECK(t.date_row[1].text == "Tue 01-06");
  check_no_overlap(t.hour_row, width / 72.0, width, 12.0);
  check_no_overlap(t.date_row, width / 72.0, width, 12.0);
}

TEST_CASE("ninety days get weekly date labels on Mondays and no hour labels") {
  // 922 px over 2160 h = 0.427 px/h: 12 h is 5.1 px, too close for any hour label. "01-05" needs
  // 36 + 8 px: a day (10.2 px) and two (20.5 px) are too close, a week (71.7 px) fits.
  const auto h = hours_from(k2026, 90 * 24, 0);
  const TimeTicks t = choose_time_ticks(h, 922.0, 12.0);
  CHECK(t.hour_step == 0);
  CHECK(t.hour_row.empty());
  CHECK(t.date_step == "7 days");
  REQUIRE(t.date_row.size() == 13);
  CHECK(t.date_row[0].text == "01-05");  // 2026-01-05 is a Monday
  CHECK(t.date_row[1].text == "01-12");
  check_no_overlap(t.date_row, 922.0 / 2160.0, 922.0, 12.0);
}

TEST_CASE("thirty years get a label every second year") {
  // 30 years of 8766 h on 922 px: a year is 30.7 px, "2026" needs 28.8 + 8 px, two years fit.
  const auto h = hours_from(k2026, 30 * 8766, 0);
  const TimeTicks t = choose_time_ticks(h, 922.0, 12.0);
  CHECK(t.date_step == "2 years");
  // 10957.5 days from 2026-01-01 reach 2056-01-01 12:00: even years 2026 to 2056.
  REQUIRE(t.date_row.size() == 16);
  CHECK(t.date_row[0].text == "2026");
  CHECK(t.date_row[1].text == "2028");
  check_no_overlap(t.date_row, 922.0 / static_cast<double>(h.size()), 922.0, 12.0);
}

TEST_CASE("tick labels never overlap whatever the run's length and start (seeded)") {
  const unsigned seed = 20261202;
  INFO("seed " << seed);
  std::mt19937 rng(seed);
  std::uniform_int_distribution<std::size_t> length(1, 40000);
  std::uniform_int_distribution<int> start_hour(0, 24 * 365), offset_h(-12, 14);
  for (int k = 0; k < 200; ++k) {
    const std::size_t n = length(rng);
    const auto h = hours_from(k2026 + start_hour(rng) * kSecondsPerHour, n, offset_h(rng) * 3600);
    const double width = 500.0 + 10.0 * static_cast<double>(k);
    const TimeTicks t = choose_time_ticks(h, width, 12.0);
    // From a month on, at least two dates are named (the coarsest step then is two months).
    if (n >= 30 * 24) CHECK(t.date_row.size() >= 2);
    check_no_overlap(t.hour_row, width / static_cast<double>(n), width, 12.0);
    check_no_overlap(t.date_row, width / static_cast<double>(n), width, 12.0);
  }
}

TEST_CASE("a value axis runs in steps of 1, 2, 2.5 or 5 times a power of ten") {
  // common practice (no source): about five steps covering the range.
  NiceAxis a = nice_axis(0.0, 63.0);
  CHECK(a.step == 20.0);
  CHECK(a.hi == 80.0);
  a = nice_axis(0.0, 2.9);
  CHECK(a.step == doctest::Approx(1.0));
  CHECK(a.hi == doctest::Approx(3.0));
  a = nice_axis(-3.0, 11.0);
  CHECK(a.step == doctest::Approx(5.0));
  CHECK(a.lo == doctest::Approx(-5.0));
  CHECK(a.hi == doctest::Approx(15.0));
}

TEST_CASE("the zone is named by its abbreviations or its name, not by its rule") {
  CHECK(zone_display_name(TimeZone::parse("MST7MDT,M3.2.0,M11.1.0", "t")) ==
        "MST/MDT, UTC-07:00 standard");
  CHECK(zone_display_name(TimeZone::parse("<+0330>-3:30", "t")) == "+0330, UTC+03:30 standard");
  CHECK(zone_display_name(TimeZone::parse("+01:00", "t")) == "UTC+01:00");
  CHECK(zone_display_name(TimeZone::parse("UTC", "t")) == "UTC");
  CHECK(zone_display_name(TimeZone::parse("Europe/Paris", "t")) == "Europe/Paris");
}

TEST_CASE("the SVG writer prints tenths without a trailing zero and escapes text") {
  // Closed form: round half away from zero to a tenth (std::llround).
  svg::Writer w(10, 10, 12.0);
  w.raw("[").num(12.34).raw(" ").num(12.0).raw(" ").num(-3.05).raw(" ").num(-0.04).raw("]");
  w.text(1, 2, "a<b & \"c\"", "");
  const std::string s = w.finish();
  CHECK(s.find("[12.3 12 -3.1 0]") != std::string::npos);
  CHECK(s.find("<text x=\"1\" y=\"2\">a&lt;b &amp; &quot;c&quot;</text>") != std::string::npos);
  CHECK(s.rfind("</svg>\n") == s.size() - 7);
}
