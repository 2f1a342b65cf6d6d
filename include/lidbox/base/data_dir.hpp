// Where lidbox finds the data it ships (rule sets today, in rules/; more kinds later): the folder
// src/data/ of the source tree, installed as <prefix>/share/lidbox/. The one place that knows.
//
// The data folder is, in this order:
//   1. the installed folder beside the running program: <dir of /proc/self/exe>/../share/lidbox
//      (the relative part as configured: CMAKE_INSTALL_BINDIR to CMAKE_INSTALL_DATADIR/lidbox),
//      used when it holds the kind asked for, so an installed binary always reads the data of
//      its own version;
//   2. $LIDBOX_DATA_DIR when set and not empty (a binary without installed data: a build tree, a
//      copied binary); a value that names no folder is an InputError, not a silent fall-through;
//   3. <source dir>/src/data as compiled in (LIDBOX_SOURCE_DIR): a program in its build tree.
// A different folder of rule sets for one run is the case's [standards] rules_dir or
// $LIDBOX_RULES_DIR (rule_set.hpp), which take the place of the data's rules/.
// None of them holding the kind is an InputError naming the places looked at.
//
// Reports name a shipped file by a label that does not depend on where lidbox is checked out or
// installed ("lidbox data: rules/us-naaqs.toml"); files of the user keep the path the user gave.
#pragma once

#include <filesystem>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace lidbox {

// The inputs of the lookup, so that it can be tested on folders of the test's own making.
struct DataDirLookup {
  std::optional<std::string> env_data_dir;   // $LIDBOX_DATA_DIR; nullopt when unset or empty
  std::filesystem::path executable;          // the running program; empty when unknown
  std::filesystem::path executable_to_data;  // relative, "../share/lidbox"
  std::filesystem::path source_data;         // "<source dir>/src/data"
};

// The lookup of the running process: the environment, /proc/self/exe and the compiled-in paths.
DataDirLookup process_data_dir_lookup();

// The folder of one kind of shipped data ("rules"), by the order above.
std::filesystem::path find_data_dir(std::string_view kind, const DataDirLookup& lookup);
// The same for the running process.
std::filesystem::path data_dir(std::string_view kind);

// "lidbox data: <kind>/<file>" when `file` lies inside the running process's data folder of that
// kind; nullopt for any other file, or when there is no data folder.
std::optional<std::string> shipped_data_label(const std::filesystem::path& file,
                                              std::string_view kind);

// The ids of the data files in a folder (rule sets, indices, ventilation tables, stagnation
// schemes): the stems of its *.toml files, sorted; empty for a folder that cannot be read.
std::vector<std::string> data_file_ids(const std::filesystem::path& dir);

// Whether a reference to such data names a file rather than an id: it holds a '/' or ends in
// ".toml" ("us-naaqs" is an id, "rules/mine.toml" and "mine.toml" are files).
bool names_a_data_file(std::string_view reference);

}  // namespace lidbox
