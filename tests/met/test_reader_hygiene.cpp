// What every text reader does alike with awkward files (issue 13, items 11 and 18): an open
// quote, a byte order mark, CR-only lines, a semicolon separator, NUL bytes, huge lines, a folder
// instead of a file, and a year-9999 row after a 2026 row. Expected messages are lidbox's own
// wording (common practice, no source); the sizes are closed forms stated beside each check.
#include <doctest/doctest.h>

#include <filesystem>
#include <fstream>
#include <string>

#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/met/csv_met.hpp"

using namespace lidbox;

namespace {

const std::string kHeader = "time,mixing_height [m],wind_speed [m/s],wind_from [deg]\n";

std::string met_error(const std::string& text) {
  try {
    (void)parse_met_csv(text, {}, "m.csv");
  } catch (const InputError& e) {
    return e.what();
  }
  return "no error";
}

}  // namespace

TEST_CASE("an unterminated quote in a met row is an error at its line") {
  CHECK(met_error(kHeader + "2026-01-05T00:00Z,\"100,1,0\n2026-01-05T01:00Z,100,1,0\n") ==
        "m.csv:2: a quote opened at character 19 is not closed (\"100,1,0); expected a closing "
        "quote on the same line");
}

TEST_CASE("a year-9999 row after a 2026 row is refused before its hours are allocated") {
  // Hours from 2026-01-05T01:00Z to 9999-01-05T00:00Z: days_from_civil difference times 24, a
  // closed form (Python datetime: 2 912 078 days), so 2 912 078 x 24 - 1 = 69 889 871 missing
  // hours.
  const std::string text =
      kHeader + "2026-01-05T00:00Z,100,1,0\n9999-01-05T00:00Z,100,1,0\n";
  CHECK(met_error(text) ==
        "m.csv:3: a gap of 69889871 hours (2026-01-05T01:00:00Z to 9999-01-04T23:00:00Z); "
        "expected gaps of at most 3 hours (set [met] max_gap_hours to fill longer gaps, or split "
        "the run)");
}

TEST_CASE("a byte order mark is accepted by the met reader") {
  const std::string bom = "\xEF\xBB\xBF";
  const MetSeries m =
      parse_met_csv(bom + kHeader + "2026-01-05T00:00Z,100,1,0\n2026-01-05T01:00Z,200,1,0\n", {},
                    "m.csv");
  CHECK(m.size() == 2);
}

TEST_CASE("CR-only line endings get a clear message in every CSV reader") {
  CHECK(met_error("time,mixing_height [m],wind_speed [m/s],wind_from [deg]\r2026-01-05T00:00Z,"
                  "100,1,0\r2026-01-05T01:00Z,100,1,0\r") ==
        "m.csv:1: lines end in a carriage return alone (CR, old Mac style); expected lines ending "
        "in LF or CR LF");
}

TEST_CASE("a semicolon-separated file gets a hint about the separator") {
  CHECK(met_error("time;mixing_height [m]\n2026-01-05T00:00Z;100\n") ==
        "m.csv:1: no \"time\" column (found: time;mixing_height [m]) (the header holds "
        "semicolons: the separator must be a comma); expected a column named time holding ISO "
        "8601 times");
}

TEST_CASE("a NUL byte in a header is shown escaped and does not cut the message") {
  const std::string header("ti\0me,mixing_height [m],wind_speed [m/s],wind_from [deg]\n", 58);
  CHECK(met_error(header + "2026-01-05T00:00Z,100,1,0\n") ==
        "m.csv:1: no \"time\" column (found: ti\\0me, mixing_height [m], wind_speed [m/s], "
        "wind_from [deg]); expected a column named time holding ISO 8601 times");
}

TEST_CASE("a huge one-line file is quoted in at most 80 bytes") {
  // 1 MB of one line stands for the 200 MB of the report; the excerpt is the same either way.
  const std::string line(1000000, 'x');
  const std::string e = met_error(line);
  // 80 bytes of the line, then the ellipsis (3 bytes in UTF-8), inside the message's own words.
  CHECK(e == "m.csv:1: a first line of 1000000 bytes (" + std::string(80, 'x') +
                 "\xE2\x80\xA6); expected a header row of column names such as \"time,"
                 "mixing_height [m],wind_speed [m/s],wind_from [deg]\", then one line per hour");
  CHECK(e.size() < 300);
}

TEST_CASE("the excerpt cuts at a UTF-8 boundary and escapes control bytes") {
  // "é" is two bytes (C3 A9): 79 ASCII bytes then é would split at byte 80.
  CHECK(excerpt(std::string(79, 'a') + "\xC3\xA9" + "b") ==
        std::string(79, 'a') + "\xE2\x80\xA6");
  CHECK(excerpt(std::string("a\x01z", 3)) == "a\\x01z");
  CHECK(excerpt("short") == "short");
}

TEST_CASE("a folder given as a met file is named as a folder") {
  const auto dir = std::filesystem::temp_directory_path() / "lidbox_test_folder.csv";
  std::filesystem::create_directories(dir);
  try {
    (void)read_met_csv(dir.string(), {}, "met.csv");
    FAIL("no error");
  } catch (const InputError& e) {
    CHECK(std::string(e.what()) == "met.csv: the path is a folder; expected a file");
  }
  std::filesystem::remove(dir);
}
