// The standards report rendered for people and programs: long-format CSV tables, a Markdown
// report and a JSON report (standards_report.hpp computes them). Both reports carry
// kScreeningCaution and the legal source of every rule used; the AQI table version is named
// wherever AQI values appear.
//
// Files (prefix + name): limits.csv, daily.csv, periods.csv, aqi.csv, aqhi.csv, episodes.csv,
// rolling_<k>h.csv (one per requested window), report.md, report.json. Times in CSV are UTC
// ("2024-07-01T13:00:00Z"); dates of daily values are LST dates, with the offset stated in the
// reports.
#pragma once

#include <filesystem>
#include <string>
#include <vector>

#include "lidbox/base/atomic_file.hpp"
#include "lidbox/standards/standards_report.hpp"

namespace lidbox {

// Renders every file in memory (no I/O), so nothing is written when rendering fails. File names
// carry options.file_prefix: "obs_limits.csv", "obs_report.md", ...
std::vector<OutputFile> render_standards_report(const StandardsReport& report);
std::string report_markdown(const StandardsReport& report);
std::string report_json(const StandardsReport& report);

// Writes the rendered files into `dir`, atomically (atomic_file.hpp), and returns their paths.
std::vector<std::filesystem::path> write_standards_report(const StandardsReport& report,
                                                          const std::filesystem::path& dir);

}  // namespace lidbox
