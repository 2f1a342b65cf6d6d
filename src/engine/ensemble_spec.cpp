#include "lidbox/engine/ensemble_spec.hpp"

#include <fnmatch.h>

#include <algorithm>
#include <filesystem>

#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"

namespace lidbox {

namespace {

namespace fs = std::filesystem;

bool is_pattern(const std::string& s) {
  return s.find_first_of("*?[") != std::string::npos;
}

bool is_netcdf_name(const std::string& s) {
  const std::string ext = fs::path(s).extension().string();
  return ext == ".nc" || ext == ".nc4" || ext == ".cdf";
}

std::string resolve(const std::string& base_dir, const std::string& name) {
  const fs::path p(name);
  return p.is_absolute() ? p.string() : (fs::path(base_dir) / p).string();
}

// A pattern's matches in its folder (wildcards in the file name only), sorted by name.
void expand_pattern(const std::string& pattern, const std::string& base_dir,
                    const std::string& where, EnsembleSpec& e) {
  const fs::path p(pattern);
  const std::string dir_part = p.parent_path().string();
  if (is_pattern(dir_part)) {
    throw InputError(where, "\"" + pattern + "\", a pattern in the folder part",
                     "wildcards ('*', '?', '[...]') in the file name only");
  }
  const fs::path dir = fs::path(resolve(base_dir, dir_part.empty() ? "." : dir_part));
  std::vector<std::string> names;
  std::error_code ec;
  for (fs::directory_iterator it(dir, ec), end; !ec && it != end; it.increment(ec)) {
    const std::string name = it->path().filename().string();
    if (it->is_regular_file() && fnmatch(p.filename().c_str(), name.c_str(), FNM_PERIOD) == 0) {
      names.push_back(name);
    }
  }
  std::sort(names.begin(), names.end());
  if (names.empty()) {
    throw InputError(where, "\"" + pattern + "\" matches no file",
                     "a pattern that matches the members' met files");
  }
  for (const auto& n : names) {
    const std::string shown = dir_part.empty() ? n : (fs::path(dir_part) / n).string();
    e.display_names.push_back(shown);
    e.files.push_back(resolve(base_dir, shown));
  }
}

std::vector<double> read_percentiles(const TomlTable& r) {
  if (!r.has("percentiles")) return {5.0, 25.0, 50.0, 75.0, 95.0};
  const std::vector<double> q = r.number_array("percentiles");
  const std::string expected = "rising percentiles from 0 to 100, such as [5, 25, 50, 75, 95]";
  if (q.empty()) throw InputError(r.where("percentiles"), "an empty array", expected);
  for (std::size_t i = 0; i < q.size(); ++i) {
    if (q[i] < 0.0 || q[i] > 100.0 || (i > 0 && !(q[i] > q[i - 1]))) {
      throw InputError(r.where("percentiles"),
                       format_number(q[i]) + " at position " + std::to_string(i + 1), expected);
    }
  }
  return q;
}

}  // namespace

std::optional<EnsembleSpec> read_ensemble_spec(const TomlTable& top, const std::string& base_dir) {
  const auto r = top.optional_table("ensemble", {"members", "percentiles", "kernel_dressing"});
  if (!r) return std::nullopt;
  EnsembleSpec e;
  e.where = r->where("members");
  const toml::node* n = r->node("members");
  const std::string expected =
      "members = [\"m01.csv\", \"m02.csv\"] (met files), a pattern such as \"members/m*.csv\", or "
      "one NetCDF file with a member dimension";
  if (!n) r->throw_missing("members", expected);
  if (n->is_string()) {
    const std::string s = r->required_string("members");
    if (is_pattern(s)) {
      expand_pattern(s, base_dir, e.where, e);
    } else if (is_netcdf_name(s)) {
      e.netcdf_members = true;
      e.display_names.push_back(s);
      e.files.push_back(resolve(base_dir, s));
    } else {
      throw InputError(
          e.where, "\"" + s + "\", a single met file that is not NetCDF",
          "a list or pattern of at least 2 met files, or a NetCDF file with a member dimension");
    }
  } else if (n->is_array()) {
    for (const auto& s : r->string_array("members")) {
      e.display_names.push_back(s);
      e.files.push_back(resolve(base_dir, s));
    }
  } else {
    r->throw_wrong_type("members", expected);
  }
  if (!e.netcdf_members && e.files.size() < 2) {
    throw InputError(
        e.where, std::to_string(e.files.size()) + (e.files.size() == 1 ? " member" : " members"),
        "at least 2 members: a probability from one member is no probability");
  }
  e.percentiles = read_percentiles(*r);
  e.kernel_dressing = r->optional_bool("kernel_dressing").value_or(false);
  return e;
}

}  // namespace lidbox
