// A case file rewritten with fitted scales: the original text, line for line, with
//   * each fitted sector's emission of the fitted pollutant multiplied by its scale,
//   * the pollutant's background values (a constant, or each by_wind_from value) and its
//     free-troposphere value multiplied by the background's scale,
//   * the name given a "-calibrated" suffix (its default output folder differs from the
//   original's),
//   * relative paths (met file, rule-set files, rules_dir) rewritten to stay valid from the folder
//     the calibrated case is written to,
// and a comment line above every changed line that names the fit and the old value. Values keep
// their unit as written. Nothing else changes, so a diff against the original shows the fit.
//
// What a case file cannot hold is said in `notes` and in a comment at the top: a fitted constant
// offset, and a background taken from a met column (its scale is reported, not written).
#pragma once

#include <filesystem>
#include <string>
#include <vector>

#include "lidbox/analysis/sector_fit.hpp"
#include "lidbox/engine/case_file.hpp"

namespace lidbox {

struct CalibratedCase {
  std::string text;
  std::vector<std::string> changes;  // "line 42: [sectors.traffic] emissions PM25 12 kg/h -> ..."
  std::vector<std::string> notes;
};

// `case_text` is the original file's text (c.file names it); `fit_label` names the fit in the
// comments ("NNLS fit of PM2.5 to monitors a.csv, b.csv"); `output_dir` is where the calibrated
// file will be written.
CalibratedCase calibrated_case(const CaseSpec& c, const std::string& case_text,
                               const SectorFitReport& fit, const std::string& fit_label,
                               const std::filesystem::path& output_dir);

}  // namespace lidbox
