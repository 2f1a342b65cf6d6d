// Findings of the met CSV fuzz target (tests/fuzz/fuzz_met_csv.cpp), each kept as a test.
#include <doctest/doctest.h>

#include <string>

#include "lidbox/base/error.hpp"
#include "lidbox/met/csv_met.hpp"

using namespace lidbox;

TEST_CASE("a row 9 500 years after the previous one is refused at its line, without allocating the gap") {
  // Seed tests/fuzz/corpus/fuzz_met_csv/far-years.csv: the reader used to append one missing
  // hour per hour of the gap (83 million rows, gigabytes) before the gap rule refused it, which
  // took libFuzzer past its 10 s limit.
  const std::string text =
      "time,mixing_height [m],wind_speed [m/s],wind_from [deg]\n"
      "0500-01-01T00:00Z,100,1,10\n"
      "9999-12-31T23:00Z,100,1,10\n";
  std::string message;
  try {
    (void)parse_met_csv(text, {}, "met.csv");
  } catch (const InputError& e) {
    message = e.what();
  }
  // 83 275 270 hours lie strictly between the two rows (proleptic Gregorian day count, checked
  // with Python's datetime: (9999-12-31T23 - 0500-01-01T00) / 1 h - 1). Before the fix the
  // message came from fill_gaps, after the allocation, and named no line.
  CHECK(message ==
        "met.csv:3: a gap of 83275270 hours (0500-01-01T01:00:00Z to 9999-12-31T22:00:00Z); "
        "expected gaps of at most 3 hours (set [met] max_gap_hours to fill longer gaps, or split "
        "the run)");
}
