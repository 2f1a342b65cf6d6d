#include "lidbox/base/atomic_file.hpp"

#include <unistd.h>
#include <cerrno>
#include <cstring>
#include <fstream>
#include <system_error>

#include "lidbox/base/error.hpp"
#include "lidbox/base/work_meter.hpp"

namespace lidbox {

namespace {

std::filesystem::path temporary_for(const std::filesystem::path& target) {
  // The process id keeps two lidbox runs writing the same folder from sharing a temporary.
  // Appended piece by piece: g++ 12 at -O3 reports a bogus -Wrestrict overlap for
  // "literal" + std::string&& (GCC bug 105329).
  std::string name = ".";
  name += target.filename().string();
  name += ".tmp-";
  name += std::to_string(::getpid());
  return target.parent_path() / name;
}

[[noreturn]] void fail(const std::filesystem::path& p, const std::string& why) {
  throw InputError(p.string(), "cannot be written (" + why + ")", "a writable output folder");
}

}  // namespace

const OutputFile& output_named(const std::vector<OutputFile>& files, std::string_view name) {
  for (const auto& f : files) {
    if (f.name == name) return f;
  }
  throw InternalError("no output file named \"" + std::string(name) + "\" in the set");
}

std::vector<std::filesystem::path> write_output_files(const std::filesystem::path& dir,
                                                      const std::vector<OutputFile>& files) {
  std::vector<std::pair<std::filesystem::path, std::string>> targets;
  std::vector<std::filesystem::path> paths;
  for (const auto& f : files) {
    targets.emplace_back(dir / f.name, f.content);
    paths.push_back(dir / f.name);
  }
  write_files_atomically(targets);
  return paths;
}

void write_file_atomically(const std::filesystem::path& path, std::string_view content) {
  write_files_atomically({{path, std::string(content)}});
}

void write_files_atomically(
    const std::vector<std::pair<std::filesystem::path, std::string>>& files) {
  std::vector<std::filesystem::path> temps;
  auto cleanup = [&temps] {
    std::error_code ignored;
    for (const auto& t : temps) std::filesystem::remove(t, ignored);
  };
  try {
    for (const auto& [target, content] : files) {
      const auto dir = target.parent_path();
      if (!dir.empty()) {
        std::error_code ec;
        std::filesystem::create_directories(dir, ec);
        if (ec) fail(dir, ec.message());
      }
      const auto tmp = temporary_for(target);
      temps.push_back(tmp);
      std::ofstream out(tmp, std::ios::binary | std::ios::trunc);
      if (!out) fail(target, std::strerror(errno));
      out.write(content.data(), static_cast<std::streamsize>(content.size()));
      work_meter::add(content.size());
      out.close();
      if (!out) fail(target, "write failed");
    }
    for (std::size_t i = 0; i < files.size(); ++i) {
      std::error_code ec;
      std::filesystem::rename(temps[i], files[i].first, ec);
      if (ec) fail(files[i].first, ec.message());
    }
  } catch (...) {
    cleanup();
    throw;
  }
}

}  // namespace lidbox
