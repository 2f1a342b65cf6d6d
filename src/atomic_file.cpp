#include "lidbox/atomic_file.hpp"

#include <unistd.h>

#include <cstdio>
#include <filesystem>
#include <fstream>

#include "lidbox/error.hpp"

namespace lidbox {

std::vector<std::string> write_files_atomically(const std::string& directory,
                                                const std::vector<OutputFile>& files) {
  namespace fs = std::filesystem;
  std::error_code ec;
  fs::create_directories(directory, ec);
  if (ec) {
    throw InputError(directory, "the output folder cannot be created (" + ec.message() + ")",
                     "a writable folder");
  }
  const std::string tag = ".tmp-" + std::to_string(::getpid());
  std::vector<std::string> temps;
  auto cleanup = [&temps] {
    for (const auto& t : temps) std::remove(t.c_str());
  };
  for (const auto& f : files) {
    const std::string tmp = (fs::path(directory) / ("." + f.name + tag)).string();
    temps.push_back(tmp);
    std::ofstream out(tmp, std::ios::binary | std::ios::trunc);
    out.write(f.content.data(), static_cast<std::streamsize>(f.content.size()));
    out.close();
    if (!out) {
      cleanup();
      throw InputError(tmp, "the file cannot be written", "a writable output folder with free space");
    }
  }
  std::vector<std::string> written;
  for (std::size_t i = 0; i < files.size(); ++i) {
    const std::string final_path = (fs::path(directory) / files[i].name).string();
    if (std::rename(temps[i].c_str(), final_path.c_str()) != 0) {
      cleanup();
      throw InputError(final_path, "the file cannot be put in place", "a writable output folder");
    }
    written.push_back(final_path);
  }
  return written;
}

}  // namespace lidbox
