#include "lidbox/base/data_dir.hpp"

#include <algorithm>

#include <cstdlib>
#include <system_error>
#include <vector>

#include "lidbox/base/error.hpp"
#include "lidbox/base/text.hpp"

namespace lidbox {

namespace fs = std::filesystem;

DataDirLookup process_data_dir_lookup() {
  DataDirLookup l;
  if (const char* env = std::getenv("LIDBOX_DATA_DIR"); env && *env) l.env_data_dir = env;
  std::error_code ec;
  // Linux names the running program here whatever the current folder or argv[0] say; elsewhere
  // the lookup falls through to the source tree.
  l.executable = fs::read_symlink("/proc/self/exe", ec);
  if (ec) l.executable.clear();
  l.executable_to_data = LIDBOX_DATA_FROM_BINDIR;
  l.source_data = fs::path(LIDBOX_SOURCE_DIR) / "src" / "data";
  return l;
}

fs::path find_data_dir(std::string_view kind, const DataDirLookup& lookup) {
  std::error_code ec;
  std::vector<std::string> looked;
  // The installed data first: a binary reads the data of its own version, whatever a variable
  // left over from another installation says.
  if (!lookup.executable.empty()) {
    const fs::path installed =
        (lookup.executable.parent_path() / lookup.executable_to_data).lexically_normal() / kind;
    if (fs::is_directory(installed, ec)) return installed;
    looked.push_back(installed.string());
  }
  if (lookup.env_data_dir) {
    if (!fs::is_directory(*lookup.env_data_dir, ec)) {
      throw InputError("LIDBOX_DATA_DIR", "\"" + *lookup.env_data_dir + "\" is not a folder",
                       "a folder holding lidbox's data (" + std::string(kind) +
                           "/ and the like), or the variable unset");
    }
    return fs::path(*lookup.env_data_dir) / kind;
  }
  const fs::path source = lookup.source_data / kind;
  if (fs::is_directory(source, ec)) return source;
  looked.push_back(source.string());
  throw InputError("lidbox data \"" + std::string(kind) + "\"",
                   "no folder at " + join(looked, " or "),
                   "an installed lidbox (share/lidbox beside its bin folder) or LIDBOX_DATA_DIR "
                   "naming a copy of its data folder");
}

fs::path data_dir(std::string_view kind) {
  return find_data_dir(kind, process_data_dir_lookup());
}

std::optional<std::string> shipped_data_label(const fs::path& file, std::string_view kind) {
  fs::path dir;
  try {
    dir = data_dir(kind);
  } catch (const InputError&) {
    // No data folder at all: nothing can be a shipped file, and the caller that needs the folder
    // reports its absence itself.
    return std::nullopt;
  }
  std::error_code ec;
  const fs::path d = fs::weakly_canonical(dir, ec);
  if (ec) return std::nullopt;
  const fs::path f = fs::weakly_canonical(file, ec);
  if (ec) return std::nullopt;
  const fs::path rel = f.lexically_relative(d);
  if (rel.empty() || rel == "." || *rel.begin() == "..") return std::nullopt;
  return "lidbox data: " + std::string(kind) + "/" + rel.generic_string();
}

std::vector<std::string> data_file_ids(const std::filesystem::path& dir) {
  std::vector<std::string> out;
  std::error_code ec;
  for (const auto& e : std::filesystem::directory_iterator(dir, ec)) {
    if (e.path().extension() == ".toml") out.push_back(e.path().stem().string());
  }
  std::sort(out.begin(), out.end());
  return out;
}

bool names_a_data_file(std::string_view reference) {
  return reference.find('/') != std::string_view::npos ||
         (reference.size() > 5 && reference.substr(reference.size() - 5) == ".toml");
}

}  // namespace lidbox
