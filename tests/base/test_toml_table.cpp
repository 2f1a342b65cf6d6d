#include <doctest/doctest.h>

#include <cmath>
#include <numbers>
#include <string>

#include "lidbox/base/error.hpp"
#include "lidbox/base/toml_table.hpp"

using namespace lidbox;

namespace {

const char* kFile =
    "name = \"demo\"\n"            // 1
    "count = 7\n"                  // 2
    "[airshed]\n"                  // 3
    "x_side = \"16 km\"\n"         // 4
    "y_side = 8000\n"              // 5
    "bearing = \"0.5 rad\"\n"      // 6
    "[model]\n"                    // 7
    "big = 4294967297\n"           // 8
    "level = \"50\"\n"             // 9
    "ratio = nan\n"                // 10
    "speed = \"0.5 m/s\"\n"        // 11
    "lifetime = \"3 day\"\n"       // 12
    "weights = [1, 2.5, \"3\"]\n"  // 13
    "[sectors.roads]\n"            // 14
    "[sectors.\"PM2.5 dust\"]\n"   // 15
    "[sectors.homes]\n"            // 16
    "[[limit]]\n"                  // 17
    "id = \"a\"\n"                 // 18
    "[[limit]]\n"                  // 19
    "id = \"b\"\n";                // 20

const std::vector<std::string> kTop = {"name", "count", "airshed", "model", "sectors", "limit"};
const std::vector<std::string> kAirshed = {"x_side", "y_side", "bearing"};
const std::vector<std::string> kModel = {"big", "level", "ratio", "speed", "lifetime", "weights"};

// The message of the InputError `f` throws, or "no error".
template <class F>
std::string error_of(F f) {
  try {
    f();
  } catch (const InputError& e) {
    return e.what();
  }
  return "no error";
}

}  // namespace

TEST_CASE("an unknown key is named with its line and the closest allowed key") {
  const TomlDocument doc("[airshed]\nx_side = \"1 km\"\nx_sid = \"2 km\"\n", "c.toml");
  const TomlTable top(doc, {"airshed"});
  CHECK(error_of([&] { (void)top.optional_table("airshed", kAirshed); }) ==
        "c.toml:3: [airshed]: unknown key \"x_sid\"; expected one of x_side, y_side, bearing "
        "(did you mean \"x_side\"?)");
  // Nothing within a third of the word's length: no hint.
  CHECK(error_of([&] { (void)TomlTable(doc, {"met"}); }) ==
        "c.toml:1: (top level): unknown key \"airshed\"; expected one of met");
}

TEST_CASE("a missing key is named at the line of its table with what it should hold") {
  const TomlDocument doc(kFile, "c.toml");
  const TomlTable top(doc, kTop);
  const TomlTable airshed = *top.optional_table("airshed", kAirshed);
  CHECK(error_of([&] { (void)airshed.required_string("name"); }) ==
        "c.toml:3: [airshed]: no \"name\"; expected a string in quotes");
  CHECK(error_of([&] { (void)airshed.required_quantity("z_side", "m", "length"); }) ==
        "c.toml:3: [airshed]: no \"z_side\"; expected a length with its unit in quotes, such as "
        "\"500 m\"");
  CHECK(error_of([&] { (void)airshed.required_whole_number("n", 0, 48); }) ==
        "c.toml:3: [airshed]: no \"n\"; expected a whole number from 0 to 48");
  CHECK(error_of([&] { airshed.throw_missing("emissions", "a table of rates"); }) ==
        "c.toml:3: [airshed]: no \"emissions\"; expected a table of rates");
}

TEST_CASE("a value of the wrong type names the key and the type found") {
  const TomlDocument doc(kFile, "c.toml");
  const TomlTable top(doc, kTop);
  const TomlTable model = *top.optional_table("model", kModel);
  CHECK(error_of([&] { (void)model.required_number("level"); }) ==
        "c.toml:9: [model] level: a string; expected a plain number (no unit)");
  CHECK(error_of([&] { (void)top.optional_bool("count"); }) ==
        "c.toml:2: (top level) count: an integer; expected true or false");
  CHECK(error_of([&] { (void)top.optional_string("airshed"); }) ==
        "c.toml:3: (top level) airshed: a table; expected a string in quotes");
  CHECK(error_of([&] { (void)model.number_array("weights"); }) ==
        "c.toml:13: [model] weights: element 3 is a string; expected an array of plain numbers");
  CHECK(error_of([&] { (void)model.string_array("weights"); }) ==
        "c.toml:13: [model] weights: element 1 is an integer; expected an array of strings in "
        "quotes");
  // TOML allows nan and inf; no number lidbox reads means either.
  CHECK(error_of([&] { (void)model.optional_number("ratio"); }) ==
        "c.toml:10: [model] ratio: nan; expected a finite number");
}

TEST_CASE("a whole number outside int is refused rather than wrapped") {
  const TomlDocument doc(kFile, "c.toml");
  const TomlTable top(doc, kTop);
  const TomlTable model = *top.optional_table("model", kModel);
  // 2^32 + 1 = 4294967297 wraps to 1 in a 32-bit int (closed form).
  CHECK(error_of([&] { (void)model.optional_whole_number("big", 0, 2147483647); }) ==
        "c.toml:8: [model] big: 4294967297; expected a whole number from 0 to 2147483647");
  CHECK(error_of([&] { (void)top.required_whole_number("count", 0, 6); }) ==
        "c.toml:2: (top level) count: 7; expected a whole number from 0 to 6");
  CHECK(top.required_whole_number("count", 7, 7) == 7);
  CHECK(error_of([&] { (void)model.optional_whole_number("level", 0, 9); }) ==
        "c.toml:9: [model] level: a string; expected a whole number from 0 to 9");
}

TEST_CASE("quantities are converted to the unit asked for") {
  const TomlDocument doc(kFile, "c.toml");
  const TomlTable top(doc, kTop);
  const TomlTable airshed = *top.optional_table("airshed", kAirshed);
  const TomlTable model = *top.optional_table("model", kModel);
  // 16 km = 16 x 10^3 m: the SI prefix kilo (BIPM SI Brochure, 9th ed., Table 7).
  CHECK(airshed.required_quantity("x_side", "m", "length") == 16000.0);
  // 0.5 rad = 0.5 x 180 / pi degrees (closed form).
  CHECK(airshed.required_quantity("bearing", "degree", "direction") ==
        doctest::Approx(0.5 * 180.0 / std::numbers::pi).epsilon(1e-12));
  // 3 day = 3 x 86400 s (BIPM SI Brochure, 9th ed., Table 8: 1 d = 86 400 s).
  CHECK(model.required_quantity("lifetime", "s", "time") == doctest::Approx(259200.0));
  CHECK(model.required_quantity("speed", "m/s", "speed") == doctest::Approx(0.5));
  CHECK_FALSE(model.optional_quantity("absent", "m", "length").has_value());
  CHECK(error_of([&] { (void)airshed.required_quantity("y_side", "m", "length"); }) ==
        "c.toml:5: [airshed] y_side: a number without a unit; expected a length with its unit in "
        "quotes, such as \"500 m\"");
  CHECK(error_of([&] { (void)model.required_quantity("lifetime", "m", "length"); }) ==
        "c.toml:12: [model] lifetime: unit \"day\" cannot be converted to \"m\"; expected a unit "
        "of length convertible to \"m\"");
  CHECK(error_of([&] { (void)top.optional_quantity("name", "m", "length"); }) ==
        "c.toml:1: (top level) name: \"demo\" does not start with a number; expected a length "
        "such as \"500 m\"");
}

TEST_CASE("a quantity string splits into its number and its unit") {
  const auto q = split_quantity(" 2e-3 ug m-2 s-1 ");
  REQUIRE(q.has_value());
  CHECK(q->number == 0.002);
  CHECK(q->unit == "ug m-2 s-1");
  CHECK(split_quantity("16km")->unit == "km");
  CHECK_FALSE(split_quantity("km 16").has_value());
  CHECK_FALSE(split_quantity("").has_value());
}

TEST_CASE("sub-tables keep the order of the file and quote keys that are not bare") {
  const TomlDocument doc(kFile, "c.toml");
  const TomlTable top(doc, kTop);
  const TomlTable sectors = *top.optional_open_table("sectors");
  CHECK(sectors.table_names_in_order() == std::vector<std::string>{"roads", "PM2.5 dust", "homes"});
  const TomlTable dust = *sectors.optional_table("PM2.5 dust", {});
  CHECK(dust.where_table() == "c.toml:15: [sectors.\"PM2.5 dust\"]");
  CHECK(error_of([&] { (void)top.table_names_in_order(); }) ==
        "c.toml:2: (top level) count: an integer; expected a table [count]");
}

TEST_CASE("an array of tables gives one table per element with its own line") {
  const TomlDocument doc(kFile, "c.toml");
  const TomlTable top(doc, kTop);
  const auto limits = top.array_of_tables("limit", {"id"}, "[[limit]] tables");
  REQUIRE(limits.size() == 2);
  CHECK(limits[1].location() == "c.toml:19");
  CHECK(limits[1].required_string("id") == "b");
  CHECK(limits[0].where("id") == "c.toml:18: [[limit]] id");
  CHECK(top.array_of_tables("alert", {"id"}, "[[alert]] tables").empty());
  CHECK(error_of([&] { (void)top.array_of_tables("limit", {"rank"}, "[[limit]] tables"); }) ==
        "c.toml:18: [[limit]]: unknown key \"id\"; expected one of rank");
  CHECK(error_of([&] { (void)top.array_of_tables("name", {}, "[[name]] tables"); }) ==
        "c.toml:1: (top level) name: a string; expected [[name]] tables");
  const TomlDocument empty("limit = []\n", "e.toml");
  CHECK(error_of([&] {
          (void)TomlTable(empty, {"limit"}).array_of_tables("limit", {}, "[[limit]] tables");
        }) == "e.toml:1: (top level) limit: an empty array; expected [[limit]] tables");
}

TEST_CASE("a TOML syntax error names the line") {
  // The description is toml++ 3.3's own wording.
  CHECK(error_of([] { const TomlDocument doc("a = 1\nb = \n", "s.toml"); }) ==
        "s.toml:2: TOML syntax error: Error while parsing key-value pair: expected value, saw "
        "'\\n'; expected valid TOML (toml.io v1.0.0)");
}

TEST_CASE("a key missing at the top level is named at line 1") {
  const TomlDocument doc("# comment\n\n[met]\n", "c.toml");
  const TomlTable top(doc, {"met", "airshed"});
  CHECK(error_of([&] { top.throw_missing("airshed", "an [airshed] table"); }) ==
        "c.toml:1: (top level): no \"airshed\"; expected an [airshed] table");
}
