#include "lidbox/analysis/calibrated_case.hpp"

#include <cmath>
#include <cstdlib>
#include <map>
#include <sstream>

#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/base/toml_table.hpp"

namespace lidbox {

namespace {

// One value to rewrite: the string node and its new text.
struct Edit {
  std::size_t line = 0;  // 1-based
  std::size_t column = 0;
  std::string old_token;  // the quoted string as it stands in the file
  std::string new_token;
  std::string what;  // for the comment and the change list
};

std::string quoted(const std::string& s) {
  return "\"" + s + "\"";
}

// "12 kg/h" scaled by x -> "19.32 kg/h" (7 significant digits, the unit as written).
std::string scaled_quantity(const std::string& text, double x, const std::string& where) {
  const auto q = split_quantity(text);
  if (!q) throw InternalError(where + ": \"" + text + "\" is not a quantity");
  return format_number(q->number * x, 7) + (q->unit.empty() ? "" : " " + q->unit);
}

void scale_string_node(const toml::node* n, double x, const std::string& what,
                       std::vector<Edit>& edits) {
  if (!n || !n->is_string()) return;
  const std::string old = n->value<std::string>().value_or("");
  Edit e;
  e.line = n->source().begin.line;
  e.column = n->source().begin.column;
  e.old_token = quoted(old);
  e.new_token = quoted(scaled_quantity(old, x, what));
  e.what = what + " " + old + " -> " + scaled_quantity(old, x, what);
  edits.push_back(e);
}

void path_node(const toml::node* n, const std::filesystem::path& case_dir,
               const std::filesystem::path& out_dir, const std::string& what,
               std::vector<Edit>& edits) {
  if (!n || !n->is_string()) return;
  const std::string old = n->value<std::string>().value_or("");
  const std::filesystem::path p(old);
  if (p.is_absolute()) return;
  const std::filesystem::path target = std::filesystem::absolute(case_dir / p).lexically_normal();
  std::filesystem::path rel =
      target.lexically_relative(std::filesystem::absolute(out_dir).lexically_normal());
  if (rel.empty()) rel = target;
  if (rel.string() == old) return;
  Edit e;
  e.line = n->source().begin.line;
  e.column = n->source().begin.column;
  e.old_token = quoted(old);
  e.new_token = quoted(rel.generic_string());
  e.what = what + " path made relative to this file's folder (was \"" + old + "\")";
  edits.push_back(e);
}

std::string scale_text(double x) {
  return std::string("x").append(format_number(x, 6));  // not "x" + ...: GCC bug 105329
}

// The case's index of the fitted pollutant (by name or canonical identity).
std::size_t fitted_pollutant(const CaseSpec& c, const SectorFitReport& fit) {
  for (std::size_t i = 0; i < c.pollutants.size(); ++i) {
    const std::string& n = c.pollutants[i].name;
    if (n == fit.pollutant || canonical_pollutant(n) == fit.pollutant) return i;
  }
  throw InternalError("calibrated_case: pollutant " + fit.pollutant + " not in the case");
}

// Edits that scale the background of pollutant `pname` (string values, wind-sector values and
// the free troposphere); a background from a met column cannot be scaled and gets a note.
void scale_background(const toml::table& root, const std::string& pname, double x,
                      std::vector<Edit>& edits, std::vector<std::string>& notes) {
  const toml::node* pt = root["pollutants"][pname].node();
  const toml::table* t = pt ? pt->as_table() : nullptr;
  if (!t) return;
  const toml::node* bg = t->get("background");
  if (bg && bg->is_string()) {
    scale_string_node(bg, x, "[pollutants." + pname + "] background", edits);
  } else if (bg && bg->is_table()) {
    const toml::table& bt = *bg->as_table();
    if (bt.contains("column")) {
      notes.push_back("the background of " + pname +
                      " comes from a met column and cannot be scaled in the case file; "
                      "its fitted scale is " +
                      format_number(x, 5));
    }
    if (const toml::array* arr = bt.get_as<toml::array>("by_wind_from")) {
      for (const toml::node& el : *arr) {
        if (const toml::table* sec = el.as_table()) {
          scale_string_node(sec->get("value"), x,
                            "[pollutants." + pname + "] background by_wind_from value", edits);
        }
      }
    }
  }
  scale_string_node(t->get("free_troposphere"), x, "[pollutants." + pname + "] free_troposphere",
                    edits);
}

// Edits for every fitted column, each description ending with its scale factor.
void scale_fitted_columns(const toml::table& root, const std::string& pname,
                          const SectorFitReport& fit, std::vector<Edit>& edits,
                          std::vector<std::string>& notes) {
  for (const FitEstimate& e : fit.estimates) {
    if (e.name == "offset") {
      notes.push_back("the fitted offset (" + format_number(e.value, 5) + " " + fit.unit +
                      ") is not a case-file quantity and is not written");
    } else if (e.name == "background") {
      scale_background(root, pname, e.value, edits, notes);
    } else {
      const toml::node* em = root["sectors"][e.name]["emissions"][pname].node();
      scale_string_node(em, e.value, "[sectors." + e.name + "] emissions " + pname, edits);
    }
  }
  for (Edit& ed : edits) {
    for (const FitEstimate& e : fit.estimates) {
      const bool bg = e.name == "background" && ed.what.rfind("[pollutants.", 0) == 0;
      const bool sec = ed.what.rfind("[sectors." + e.name + "]", 0) == 0;
      if (bg || sec) ed.what.append(" (").append(scale_text(e.value)).append(")");
    }
  }
}

// Edits for the new name and for paths, made relative to the output folder.
void rename_and_relocate(const toml::table& root, const CaseSpec& c,
                         const std::filesystem::path& output_dir, std::vector<Edit>& edits) {
  if (const toml::node* n = root.get("name"); n && n->is_string()) {
    Edit e;
    e.line = n->source().begin.line;
    e.column = n->source().begin.column;
    e.old_token = quoted(c.name);
    e.new_token = quoted(c.name + "-calibrated");
    e.what = "name \"" + c.name + "\" -> \"" + c.name + "-calibrated\"";
    edits.push_back(e);
  }
  const std::filesystem::path case_dir = std::filesystem::path(c.file).parent_path();
  path_node(root["met"]["file"].node(), case_dir, output_dir, "[met] file", edits);
  if (const toml::array* rs = root["standards"]["rule_sets"].as_array()) {
    for (const toml::node& el : *rs) {
      const std::string v = el.value<std::string>().value_or("");
      if (std::filesystem::path(v).extension() == ".toml") {
        path_node(&el, case_dir, output_dir, "[standards] rule_sets", edits);
      }
    }
  }
  path_node(root["standards"]["rules_dir"].node(), case_dir, output_dir, "[standards] rules_dir",
            edits);
}

// Replaces an edit's token on its line: the occurrence nearest the node's column (columns
// count characters, not bytes).
void apply_edit(std::string& line, std::size_t line_no, const Edit& e) {
  std::size_t best = std::string::npos, pos = line.find(e.old_token);
  auto distance = [&](std::size_t at) {
    return std::llabs(static_cast<long long>(at + 1) - static_cast<long long>(e.column));
  };
  while (pos != std::string::npos) {
    if (best == std::string::npos || distance(pos) < distance(best)) best = pos;
    pos = line.find(e.old_token, pos + 1);
  }
  if (best == std::string::npos) {
    throw InternalError("calibrated_case: " + e.old_token + " not found on line " +
                        std::to_string(line_no));
  }
  line.replace(best, e.old_token.size(), e.new_token);
}

// The case text with the edits applied, line by line; several edits on one line share one
// comment above it.
std::string apply_edits(const std::string& case_text, const std::vector<Edit>& edits,
                        const std::string& fit_label, CalibratedCase& out) {
  std::map<std::size_t, std::vector<const Edit*>> by_line;
  for (const Edit& e : edits) by_line[e.line].push_back(&e);
  std::ostringstream o;
  o << "# Calibrated by lidbox evaluate: " << fit_label << ".\n"
    << "# Every changed line below has a comment above it naming the fit and the old value.\n";
  for (const auto& n : out.notes) o << "# Note: " << n << ".\n";
  std::istringstream in(case_text);
  std::string line;
  for (std::size_t line_no = 1; std::getline(in, line); ++line_no) {
    const auto it = by_line.find(line_no);
    if (it != by_line.end()) {
      const std::size_t indent = line.find_first_not_of(" \t");
      const std::string pad = line.substr(0, indent == std::string::npos ? 0 : indent);
      std::vector<std::string> whats;
      for (const Edit* e : it->second) {
        apply_edit(line, line_no, *e);
        whats.push_back(e->what);
        out.changes.push_back("line " + std::to_string(line_no) + ": " + e->what);
      }
      o << pad << "# lidbox evaluate (" << fit_label << "): " << join(whats, "; ") << "\n";
    }
    o << line << "\n";
  }
  return o.str();
}

}  // namespace

CalibratedCase calibrated_case(const CaseSpec& c, const std::string& case_text,
                               const SectorFitReport& fit, const std::string& fit_label,
                               const std::filesystem::path& output_dir) {
  CalibratedCase out;
  const TomlDocument doc(case_text, c.file);
  const toml::table& root = doc.root();
  const std::string pname = c.pollutants[fitted_pollutant(c, fit)].name;
  std::vector<Edit> edits;
  scale_fitted_columns(root, pname, fit, edits, out.notes);
  rename_and_relocate(root, c, output_dir, edits);
  out.text = apply_edits(case_text, edits, fit_label, out);
  return out;
}

}  // namespace lidbox
