// What the exact emission cut writes (emission_cut.hpp): cut.csv, one row per rule and exceeded
// day (and a whole-run row per rule exceeded on more than one day), and one summary line per
// rule: "eu-2008-50 PM10-day (daily_mean above 50 ug/m3) on 2026-02-11: cut home_heating by
// 16.2 % from 2026-02-10 18:00 local, or all sectors by 12.1 %". Cuts are rounded UP to 0.1 %,
// so the printed cut suffices; a cut that cannot suffice says what the rest alone gives.
#pragma once

#include <string>

#include "lidbox/analysis/emission_cut.hpp"

namespace lidbox {

std::string render_cut_csv(const CaseSpec& c, const EmissionCut& cut);
// The summary section (ends with a newline).
std::string render_cut_summary(const CaseSpec& c, const EmissionCut& cut);
// "16.2 %": the cut 1 - scale in percent, rounded up to one decimal.
std::string cut_percent(double scale);

}  // namespace lidbox
