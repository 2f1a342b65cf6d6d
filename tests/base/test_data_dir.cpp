#include <doctest/doctest.h>

#include <unistd.h>
#include <cstdio>
#include <filesystem>
#include <string>
#include <vector>

#include "lidbox/base/data_dir.hpp"
#include "lidbox/base/error.hpp"

using namespace lidbox;
namespace fs = std::filesystem;

namespace {

// A scratch tree shaped like an installation and a source tree: prefix/bin/lidbox,
// prefix/share/lidbox/rules, src/data/rules, own/rules.
struct Tree {
  fs::path root = fs::path(LIDBOX_BINARY_DIR) / ("data-dir-test-" + std::to_string(::getpid()));
  Tree() {
    fs::remove_all(root);
    fs::create_directories(root / "prefix" / "bin");
    fs::create_directories(root / "source" / "src" / "data" / "rules");
    fs::create_directories(root / "own" / "rules");
  }
  ~Tree() {
    std::error_code ignored;
    fs::remove_all(root, ignored);
  }
  [[nodiscard]] DataDirLookup lookup() const {
    DataDirLookup l;
    l.executable = root / "prefix" / "bin" / "lidbox";
    l.executable_to_data = fs::path("..") / "share" / "lidbox";
    l.source_data = root / "source" / "src" / "data";
    return l;
  }
  void install() const { fs::create_directories(root / "prefix" / "share" / "lidbox" / "rules"); }
};

}  // namespace

TEST_CASE("a program in its build tree finds the data of the source tree") {
  const Tree t;
  CHECK(find_data_dir("rules", t.lookup()) == t.root / "source" / "src" / "data" / "rules");
}

TEST_CASE("an installed program finds the data beside its bin folder before the source tree") {
  const Tree t;
  t.install();
  CHECK(find_data_dir("rules", t.lookup()) == t.root / "prefix" / "share" / "lidbox" / "rules");
}

TEST_CASE("an installed program reads its own data even when LIDBOX_DATA_DIR is set") {
  const Tree t;
  t.install();
  DataDirLookup l = t.lookup();
  l.env_data_dir = (t.root / "own").string();
  CHECK(find_data_dir("rules", l) == t.root / "prefix" / "share" / "lidbox" / "rules");
}

TEST_CASE("a program without installed data takes LIDBOX_DATA_DIR before the source tree") {
  const Tree t;
  DataDirLookup l = t.lookup();
  l.env_data_dir = (t.root / "own").string();
  CHECK(find_data_dir("rules", l) == t.root / "own" / "rules");
}

TEST_CASE("LIDBOX_DATA_DIR naming no folder is an error rather than a fall-through") {
  const Tree t;
  DataDirLookup l = t.lookup();
  l.env_data_dir = (t.root / "nowhere").string();
  CHECK_THROWS_WITH_AS(find_data_dir("rules", l),
                       ("LIDBOX_DATA_DIR: \"" + (t.root / "nowhere").string() +
                        "\" is not a folder; expected a folder holding lidbox's data (rules/ and "
                        "the like), or the variable unset")
                           .c_str(),
                       InputError);
}

TEST_CASE("no data folder anywhere is an error naming the places looked at") {
  const Tree t;
  fs::remove_all(t.root / "source");
  CHECK_THROWS_WITH_AS(
      find_data_dir("rules", t.lookup()),
      ("lidbox data \"rules\": no folder at " +
       (t.root / "prefix" / "share" / "lidbox" / "rules").string() + " or " +
       (t.root / "source" / "src" / "data" / "rules").string() +
       "; expected an installed lidbox (share/lidbox beside its bin folder) or LIDBOX_DATA_DIR "
       "naming a copy of its data folder")
          .c_str(),
      InputError);
}

TEST_CASE("shipped files are labelled by their place in the data and other files are not") {
  // The test binary lives in its build tree, so its data folder is the source tree's.
  const fs::path rules = fs::path(LIDBOX_SOURCE_DIR) / "src" / "data" / "rules";
  CHECK(shipped_data_label(rules / "us-naaqs.toml", "rules") ==
        std::optional<std::string>("lidbox data: rules/us-naaqs.toml"));
  CHECK(shipped_data_label(rules / ".." / "rules" / "who-2021.toml", "rules") ==
        std::optional<std::string>("lidbox data: rules/who-2021.toml"));
  CHECK(shipped_data_label(rules, "rules") == std::nullopt);
  CHECK(shipped_data_label(fs::path(LIDBOX_SOURCE_DIR) / "met-demo" / "cindervale-advisories.toml",
                           "rules") == std::nullopt);
  CHECK(shipped_data_label("local.toml", "rules") == std::nullopt);
}

TEST_CASE("a data folder's ids are its TOML files' stems, sorted; a reference with / or .toml is a file") {
  const Tree t;
  const fs::path dir = t.root / "own" / "rules";
  for (const char* name : {"zeta.toml", "alpha.toml", "notes.md", "beta.TOML.bak"}) {
    std::FILE* f = std::fopen((dir / name).c_str(), "w");
    REQUIRE(f != nullptr);
    std::fclose(f);
  }
  fs::create_directories(dir / "folder.toml.d");
  CHECK(data_file_ids(dir) == std::vector<std::string>{"alpha", "zeta"});
  CHECK(data_file_ids(t.root / "missing").empty());
  CHECK_FALSE(names_a_data_file("us-naaqs"));
  CHECK(names_a_data_file("mine.toml"));
  CHECK(names_a_data_file("rules/mine"));
  CHECK_FALSE(names_a_data_file(".toml"));  // five characters: no stem, so an id as written
}
