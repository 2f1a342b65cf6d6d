// The bulletin a duty officer can hand out: one content, three renderings (bulletin.html with
// its chart inline and print rules, bulletin.md, bulletin.txt), written with every run.
//
// Content (design/decisions-references.md section 8, the EU public-information items where they
// apply): a headline in plain language (what, where, when in local time, how likely - the
// ensemble's share of members when there is one - and how bad in the words of the chosen index);
// the episode (area, threshold, start and duration, peak); the outlook per local day with its
// reasons (afternoon mixing height, wind, ventilation class and stagnation verdicts of the
// diagnostics room); who is at risk and what to do (from the index file's category); the main
// source sectors (shares of the parts at the peak hour); what cutting each would achieve (the
// [cut] table's exact cut, when the case has one); the alert timeline; issue time and validity;
// the not-official line and the caution. With monitors (lidbox evaluate), a section of what they
// measured beside what the model gave.
//
// The wording is data: src/data/bulletin/en.toml (README there), a case's [bulletin] templates
// names another file. A template naming a field it may not use is an InputError at its line.
// The bulletin never presents itself as an official alert: its not_official line and the caution
// (base/caution.hpp) are always printed, whatever the templates say.
#pragma once

#include <map>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "lidbox/analysis/emission_cut.hpp"
#include "lidbox/analysis/ensemble_statistics.hpp"
#include "lidbox/analysis/monitor_pairing.hpp"
#include "lidbox/base/atomic_file.hpp"
#include "lidbox/diagnostics/daily_diagnostics.hpp"
#include "lidbox/engine/case_file.hpp"
#include "lidbox/engine/run.hpp"
#include "lidbox/standards/standards_report.hpp"

namespace lidbox {

struct BulletinTemplates {
  std::string path;  // "lidbox data: bulletin/en.toml" for the shipped file
  std::map<std::string, std::string> text;
  [[nodiscard]] const std::string& get(const std::string& key) const { return text.at(key); }
};

// The template keys and the fields each may use (README of src/data/bulletin).
const std::map<std::string, std::vector<std::string>>& bulletin_template_fields();
BulletinTemplates parse_bulletin_templates(std::string_view toml_text, std::string_view path);
// An id of src/data/bulletin ("en") or a TOML path.
BulletinTemplates load_bulletin_templates(std::string_view id_or_path);

struct BulletinInput {
  const CaseSpec* c = nullptr;
  const RunResult* r = nullptr;
  const StandardsReport* standards = nullptr;  // none: no episodes, no index
  const EnsembleOutcome* ensemble = nullptr;   // the probabilities
  const EmissionCut* cut = nullptr;
  const DiagnosticsResult* days = nullptr;      // the outlook's reasons
  const DiagnosticsSetup* diagnostics = nullptr;
  // Monitors paired with the run (lidbox evaluate): what they measured beside what the model
  // gave, at each monitor's highest hour and on average over its paired hours.
  const std::vector<MonitorPollutant>* monitors = nullptr;
  std::optional<UtcSeconds> issue_time_utc;     // none: the first hour of the run
  std::string chart_svg;                        // embedded in the HTML
  const BulletinTemplates* templates = nullptr;
};

struct BulletinSection {
  std::string heading;
  std::vector<std::string> items;
};

struct BulletinTimelineRow {
  std::string level, pollutant, start, end, duration_h, peak, probability;
  std::string colour;  // of the index category at the peak, "#RRGGBB"
  double from_fraction = 0.0, to_fraction = 0.0;  // of the validity period, for the strip
};

struct Bulletin {
  std::string title, subtitle, not_official, headline;
  std::string category, category_colour;  // the worst category of the chosen index ("" none)
  std::vector<BulletinSection> sections;  // before the timeline
  std::string timeline_heading, timeline_none;
  std::string timeline_more;  // the first 40 episodes are listed; this names the rest ("" none)
  std::vector<BulletinTimelineRow> timeline;
  std::vector<std::pair<double, std::string>> day_ticks;  // local midnights: fraction, "01-14"
  std::vector<BulletinSection> closing;  // validity
  std::string caution_heading;
  std::string chart_svg;
};

Bulletin build_bulletin(const BulletinInput& in);
std::string bulletin_html(const Bulletin& b);
std::string bulletin_markdown(const Bulletin& b);
std::string bulletin_text(const Bulletin& b);
// bulletin.html, bulletin.md, bulletin.txt
std::vector<OutputFile> render_bulletin(const BulletinInput& in);

}  // namespace lidbox
