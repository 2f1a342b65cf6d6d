#include <doctest/doctest.h>

#include <algorithm>
#include <string>

#include "lidbox/base/error.hpp"
#include "lidbox/standards/pollutant.hpp"
#include "lidbox/standards/rule_set.hpp"

using namespace lidbox;

namespace {

const std::filesystem::path kRulesDir =
    std::filesystem::path(LIDBOX_SOURCE_DIR) / "src" / "data" / "rules";

// A minimal valid file; tests replace one line to make it wrong.
std::string good_file(const std::string& limit_body) {
  return "[rule_set]\n"                        // line 1
         "id = \"local\"\n"                    // 2
         "name = \"Local test rules\"\n"       // 3
         "legal_source = \"invented\"\n"       // 4
         "legal_date = \"2026-01-01\"\n"       // 5
         "reference_temperature_K = 293.0\n"   // 6
         "reference_pressure_Pa = 101300.0\n"  // 7
         "\n"                                  // 8
         "[[limit]]\n"                         // 9
         + limit_body;
}

const char* kLimit =
    "id = \"PM10-day\"\n"            // 10
    "pollutant = \"PM10\"\n"         // 11
    "kind = \"limit value\"\n"       // 12
    "averaging = \"day\"\n"          // 13
    "statistic = \"daily_mean\"\n"   // 14
    "level = 50.0\n"                 // 15
    "unit = \"ug/m3\"\n"             // 16
    "form = \"exceedances\"\n"       // 17
    "allowed_exceedances = 35\n"     // 18
    "legal_source = \"invented\"\n"  // 19
    "checked = \"PRAC: test\"\n";    // 20

std::string replaced(std::string text, const std::string& from, const std::string& to) {
  const auto pos = text.find(from);
  REQUIRE(pos != std::string::npos);
  text.replace(pos, from.size(), to);
  return text;
}

std::string error_of(const std::string& text) {
  try {
    (void)parse_rule_set(text, "local.toml");
  } catch (const InputError& e) {
    return e.what();
  }
  return "no error";
}

}  // namespace

TEST_CASE("the four shipped rule sets load") {
  const auto ids = list_rule_sets(kRulesDir);
  CHECK(ids == std::vector<std::string>{"eu-2008-50", "eu-2024-2881", "us-naaqs", "who-2021"});
  for (const auto& id : ids) {
    const RuleSet rs = load_rule_set(id, kRulesDir);
    CHECK(rs.id == id);
    CHECK_FALSE(rs.limits.empty());
    CHECK_FALSE(rs.legal_source.empty());
    for (const auto& l : rs.limits) {
      CHECK_FALSE(l.legal_source.empty());
      CHECK_FALSE(l.checked.empty());
    }
  }
}

TEST_CASE("the US rule set carries the 2024 PM2.5 annual level of 9.0") {
  // 89 FR 16202 (6 March 2024), effective 6 May 2024: primary annual PM2.5 lowered to 9.0 ug/m3.
  const RuleSet us = load_rule_set("us-naaqs", kRulesDir);
  const auto it = std::find_if(us.limits.begin(), us.limits.end(),
                               [](const Limit& l) { return l.id == "PM2.5-annual-primary"; });
  REQUIRE(it != us.limits.end());
  CHECK(it->level == 9.0);
  CHECK(it->statistic == StatisticKind::annual_mean_of_quarterly_means);
  CHECK(it->years_averaged == 3);
  // 40 CFR 50.3: 25 degC and 760 mm Hg.
  CHECK(us.reference.temperature_K == 298.15);
  CHECK(us.reference.pressure_Pa == 101325.0);
  // EU reference conditions 293 K and 101.3 kPa (Directive 2000/69/EC Annex II).
  const RuleSet eu = load_rule_set("eu-2008-50", kRulesDir);
  CHECK(eu.reference.temperature_K == 293.0);
  CHECK(eu.reference.pressure_Pa == 101300.0);
}

TEST_CASE("a good minimal file parses") {
  const RuleSet rs = parse_rule_set(good_file(kLimit), "local.toml");
  REQUIRE(rs.limits.size() == 1);
  CHECK(rs.limits[0].where == "local.toml:9");
  CHECK(rs.limits[0].averaging_h == 24);
  CHECK(rs.limits[0].allowed_exceedances == 35);
}

TEST_CASE("an unknown statistic names file and line and lists the choices") {
  const std::string text =
      good_file(replaced(kLimit, "statistic = \"daily_mean\"", "statistic = \"daily_maen\""));
  CHECK(error_of(text) ==
        "local.toml:14: [[limit]] statistic: unknown statistic \"daily_maen\"; expected one of "
        "hourly_value, "
        "running_mean, daily_mean, daily_max_1h, daily_max_8h_17_windows, "
        "daily_max_8h_24_windows, annual_mean, annual_mean_of_quarterly_means, "
        "peak_season_mean (did you mean \"daily_mean\"?)");
}

TEST_CASE("an unknown key gives a did-you-mean hint") {
  const std::string text = good_file(replaced(kLimit, "level = 50.0", "levle = 50.0"));
  CHECK(error_of(text) ==
        "local.toml:15: [[limit]]: unknown key \"levle\"; expected one of id, pollutant, "
        "kind, averaging, statistic, level, unit, form, allowed_exceedances, rank, percentile, "
        "ranking, non_overlapping, rounding, day_valid_fraction, period_valid_fraction, "
        "year_coverage, min_valid_fraction, "
        "incomplete_day_counts_if_above, years_averaged, legal_source, legal_date, checked, "
        "note (did you mean \"level\"?)");
}

TEST_CASE("a unit that cannot be converted for the pollutant is refused") {
  // PM10 is a mass concentration; a mixing ratio has no meaning for it.
  const std::string text = good_file(replaced(kLimit, "unit = \"ug/m3\"", "unit = \"ppb\""));
  CHECK(error_of(text) ==
        "local.toml:16: [[limit]] unit: unit \"ppb\" is a mixing ratio; expected a "
        "molar_mass_g_mol for this "
        "pollutant, or a mass unit such as ug/m3");
  const std::string unknown = good_file(replaced(kLimit, "unit = \"ug/m3\"", "unit = \"grains\""));
  CHECK(error_of(unknown) ==
        "local.toml:16: [[limit]] unit: unknown concentration unit \"grains\"; expected one of "
        "g/m3, mg/m3, "
        "ug/m3, ng/m3, ppm, ppb, ppt");
}

TEST_CASE("bad rule files: pollutant, averaging, form, rounding, syntax and duplicates") {
  CHECK(error_of(good_file(replaced(kLimit, "\"PM10\"", "\"PM01\""))) ==
        "local.toml:11: [[limit]] pollutant: unknown pollutant \"PM01\"; expected one of PM2.5, "
        "PM10, O3, NO2, SO2, "
        "CO, NO, benzene (did you mean \"PM10\"?)");
  CHECK(error_of(good_file(replaced(kLimit, "averaging = \"day\"", "averaging = \"8-hour\""))) ==
        "local.toml:13: [[limit]] averaging: averaging \"8-hour\" with statistic \"daily_mean\"; "
        "expected averaging "
        "\"24-hour\" or \"day\"");
  CHECK(
      error_of(good_file(replaced(kLimit, "form = \"exceedances\"", "form = \"annual_value\""))) ==
      "local.toml:17: [[limit]] form: form \"annual_value\" with statistic \"daily_mean\"; "
      "expected "
      "exceedances, nth_highest or percentile");
  CHECK(error_of(good_file(std::string(kLimit) + "rounding = \"round:1\"\n")) ==
        "local.toml:21: [[limit]] rounding: \"round:1\"; expected none, round_half_up:<digits> or "
        "truncate:<digits>");
  CHECK(error_of(good_file(replaced(kLimit, "level = 50.0", "level = \"50\""))) ==
        "local.toml:15: [[limit]] level: a string; expected a plain number (no unit)");
  CHECK(error_of(good_file(replaced(kLimit, "checked = \"PRAC: test\"", "checked = \"looked\""))) ==
        "local.toml:20: [[limit]] checked: \"looked\"; expected a text starting with SRC, MEM, "
        "PRAC or "
        "DERIVED saying how the entry was verified");
  CHECK(error_of(good_file(std::string(kLimit) + "\n[[limit]]\n" + kLimit)) ==
        "local.toml:22: id \"PM10-day\" used twice; expected ids unique within the file");
  // 2^32 + 1 wraps to 1 in a 32-bit int (closed form): refused, not read as one exceedance.
  CHECK(error_of(good_file(replaced(kLimit, "= 35", "= 4294967297"))) ==
        "local.toml:18: [[limit]] allowed_exceedances: 4294967297; expected a whole number from 0 "
        "to 100000");
  CHECK(error_of(good_file(replaced(kLimit, "legal_source = \"invented\"\n", ""))) ==
        "local.toml:9: [[limit]]: no \"legal_source\"; expected a string in quotes");
  CHECK(error_of("[[limit]]\n" + std::string(kLimit)) ==
        "local.toml:1: (top level): no \"rule_set\"; expected a [rule_set] table with id and name");
  const std::string syntax = error_of("[rule_set]\nid = \n");
  CHECK(syntax.rfind("local.toml:2: TOML syntax error: ", 0) == 0);
  CHECK(error_of(good_file(std::string(kLimit)) + "[[limt]]\n") ==
        "local.toml:21: (top level): unknown key \"limt\"; expected one of rule_set, limit, alert "
        "(did you mean \"limit\"?)");
}

TEST_CASE("a rule set is found by id or by path, and an unknown id suggests the closest") {
  CHECK(load_rule_set((kRulesDir / "who-2021.toml").string(), kRulesDir).id == "who-2021");
  try {
    (void)load_rule_set("us-naqs", kRulesDir);
    FAIL("no error");
  } catch (const InputError& e) {
    CHECK(std::string(e.what()) == "rule set \"us-naqs\": not found in " + kRulesDir.string() +
                                       "; expected one of eu-2008-50, eu-2024-2881, us-naaqs, "
                                       "who-2021 (did you mean \"us-naaqs\"?)");
  }
}

TEST_CASE("the rules directory can be given explicitly") {
  CHECK(rules_directory(std::filesystem::path("/x/y")) == std::filesystem::path("/x/y"));
}

TEST_CASE("a shipped rule set is named as lidbox data and a user's file by its path") {
  // Reports must read the same wherever lidbox is checked out or installed.
  CHECK(load_rule_set("us-naaqs", kRulesDir).path == "lidbox data: rules/us-naaqs.toml");
  CHECK(load_rule_set("eu-2008", kRulesDir).path == "lidbox data: rules/eu-2008-50.toml");
  const std::string by_path = (kRulesDir / "who-2021.toml").string();
  CHECK(load_rule_set(by_path, kRulesDir).path == by_path);
  const auto own = std::filesystem::path(LIDBOX_BINARY_DIR) / "rule-set-label-test";
  std::filesystem::create_directories(own);
  std::filesystem::copy_file(kRulesDir / "who-2021.toml", own / "who-2021.toml",
                             std::filesystem::copy_options::overwrite_existing);
  CHECK(load_rule_set("who-2021", own).path == (own / "who-2021.toml").string());
  std::filesystem::remove_all(own);
}

TEST_CASE("several rule sets load in order and a repeated one is refused") {
  const auto sets = load_rule_sets({"us-naaqs", "eu-2008"}, kRulesDir);
  REQUIRE(sets.size() == 2);
  CHECK(sets[1].id == "eu-2008-50");
  CHECK_THROWS_WITH_AS(load_rule_sets({"eu-2008-50", "eu-2008"}, kRulesDir),
                       "rule set \"eu-2008\": id \"eu-2008-50\" already loaded; expected each "
                       "rule set once",
                       InputError);
}

TEST_CASE("a rule says a valid day and a covered year apart, and the old single key is refused") {
  // Issue 13 item 2: one fraction did two jobs. The published rules keep them apart, e.g. the
  // EU: a day with 75 % of its hours (Annex XI A) and a year with 90 % data capture (Directive
  // 2008/50/EC Annex I A, legislation.gov.uk copy).
  const RuleSet rs =
      parse_rule_set(good_file(replaced(kLimit, "allowed_exceedances = 35\n",
                                        "allowed_exceedances = 35\nday_valid_fraction = 0.75\n"
                                        "year_coverage = 0.9\n")),
                     "local.toml");
  CHECK(rs.limits[0].day_valid_fraction == 0.75);
  CHECK(rs.limits[0].year_coverage == 0.9);
  // Unset: 75 % for both (the documented defaults).
  const RuleSet plain = parse_rule_set(good_file(kLimit), "local.toml");
  CHECK(plain.limits[0].day_valid_fraction == 0.75);
  CHECK(plain.limits[0].year_coverage == 0.75);
  CHECK(error_of(good_file(replaced(kLimit, "allowed_exceedances = 35\n",
                                    "allowed_exceedances = 35\nmin_valid_fraction = 0.9\n"))) ==
        "local.toml:19: [[limit]] min_valid_fraction: min_valid_fraction, which mixed a day's "
        "completeness with a year's; expected day_valid_fraction (the share of a day's hours or "
        "8-h windows that makes a valid day) and year_coverage (the share of a year's values "
        "that makes a covered year)");
  CHECK(error_of(good_file(replaced(kLimit, "allowed_exceedances = 35\n",
                                    "allowed_exceedances = 35\nyear_coverage = 1.5\n"))) ==
        "local.toml:19: [[limit]] year_coverage: 1.5; expected a fraction in (0, 1]");
  // A day's rule on an hourly statistic would do nothing: refused.
  const std::string hourly =
      replaced(replaced(kLimit, "averaging = \"day\"", "averaging = \"1-hour\""),
               "statistic = \"daily_mean\"", "statistic = \"hourly_value\"");
  CHECK(error_of(good_file(replaced(hourly, "allowed_exceedances = 35\n",
                                    "allowed_exceedances = 35\nday_valid_fraction = 0.75\n"))) ==
        "local.toml:19: [[limit]] day_valid_fraction: day_valid_fraction with statistic "
        "\"hourly_value\"; expected day_valid_fraction only for statistics built from days");
}

TEST_CASE("pollutant identities are matched through the alias table and nothing else") {
  // CF standard names: design/references.md 7.1 (both PM spellings in use). Case does not
  // matter; a blank inside a name or an unlisted word is no match (issue 13 item 12).
  CHECK(std::string(find_pollutant("PM2.5")->name) == "PM2.5");
  CHECK(std::string(find_pollutant("pm25")->name) == "PM2.5");
  CHECK(std::string(find_pollutant("pm2_5")->name) == "PM2.5");
  CHECK(std::string(find_pollutant("mass_concentration_of_pm2p5_ambient_aerosol_in_air")->name) ==
        "PM2.5");
  CHECK(std::string(
            find_pollutant("mass_concentration_of_pm10_ambient_aerosol_particles_in_air")->name) ==
        "PM10");
  CHECK(std::string(find_pollutant("Ozone")->name) == "O3");
  CHECK(std::string(find_pollutant("mole_fraction_of_sulfur_dioxide_in_air")->name) == "SO2");
  CHECK(find_pollutant("fine_dust") == nullptr);
  CHECK(find_pollutant("PM 10") == nullptr);
  CHECK(find_pollutant("P.M.1.0") == nullptr);  // the former folding took this for PM10
  // In a rule file an unknown name is an error with the hint.
  CHECK(error_of(good_file(replaced(kLimit, "\"PM10\"", "\"PM 10\""))) ==
        "local.toml:11: [[limit]] pollutant: unknown pollutant \"PM 10\"; expected one of PM2.5, "
        "PM10, O3, NO2, SO2, CO, NO, benzene (did you mean \"PM10\"?)");
}
