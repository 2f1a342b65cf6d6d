// The monitor reader's side of tests/met/test_reader_hygiene.cpp: the same awkward files get the
// same answers (issue 13, items 11 and 18). Messages are lidbox's own wording (common practice,
// no source).
#include <doctest/doctest.h>

#include <filesystem>
#include <string>

#include "lidbox/base/error.hpp"
#include "lidbox/standards/observations_csv.hpp"

using namespace lidbox;

namespace {

std::string obs_error(const std::string& text) {
  try {
    (void)parse_observations_csv(text, "o.csv");
  } catch (const InputError& e) {
    return e.what();
  }
  return "no error";
}

}  // namespace

TEST_CASE("an unterminated quote in a monitor row is an error at its line") {
  CHECK(obs_error("time,NO2 [ppb]\n2024-07-01T00:00Z,\"12\n") ==
        "o.csv:2: a quote opened at character 19 is not closed (\"12); expected a closing quote "
        "on the same line");
}

TEST_CASE("a byte order mark is accepted by the monitor reader as by the met reader") {
  const Observations o = parse_observations_csv(
      "\xEF\xBB\xBFtime,NO2 [ppb]\n2024-07-01T00:00Z,12\n", "o.csv");
  CHECK(o.rows == 1);
}

TEST_CASE("CR-only line endings get the met reader's message in the monitor reader") {
  CHECK(obs_error("time,NO2 [ppb]\r2024-07-01T00:00Z,12\r") ==
        "o.csv:1: lines end in a carriage return alone (CR, old Mac style); expected lines ending "
        "in LF or CR LF");
}

TEST_CASE("a semicolon-separated monitor file gets a hint about the separator") {
  CHECK(obs_error("time;NO2 [ppb]\n2024-07-01T00:00Z;12\n") ==
        "o.csv:1: header \"time;NO2 [ppb]\" (the header holds semicolons: the separator must be "
        "a comma); expected \"time\" followed by columns like \"PM2.5 [ug/m3]\"");
}

TEST_CASE("a huge monitor cell is quoted in at most 80 bytes") {
  const std::string line(1000000, 'x');
  CHECK(obs_error("time,NO2 [ppb]\n2024-07-01T00:00Z," + line + "\n") ==
        "o.csv:2: column \"NO2 [ppb]\": value \"" + std::string(80, 'x') +
            "\xE2\x80\xA6\"; expected a number, or an empty cell for a missing value");
}

TEST_CASE("a folder given as a monitor file is named as a folder") {
  const auto dir = std::filesystem::temp_directory_path() / "lidbox_test_monitor_folder.csv";
  std::filesystem::create_directories(dir);
  std::string message = "no error";
  try {
    (void)read_observations_csv(dir);
  } catch (const InputError& e) {
    message = e.what();
  }
  std::filesystem::remove(dir);
  CHECK(message == dir.string() + ": the path is a folder; expected a file");
}
