// Output files are written whole or not at all: each goes to a temporary file in the same folder
// (same file system, so the rename is atomic on POSIX), and only when every temporary is
// complete are they renamed over their targets. A reader never sees half a file, and an error
// leaves earlier versions of the targets untouched.
#pragma once

#include <filesystem>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

namespace lidbox {

// One file of an output set, rendered in memory.
struct OutputFile {
  std::string name;  // file name inside the output folder
  std::string content;
};

// The file of a set with this name; InternalError when the set has none (a renderer's bug).
const OutputFile& output_named(const std::vector<OutputFile>& files, std::string_view name);

// Writes a set of rendered files into `dir` (write_files_atomically) and returns their paths.
std::vector<std::filesystem::path> write_output_files(const std::filesystem::path& dir,
                                                      const std::vector<OutputFile>& files);

// Creates missing parent folders. Failure is an InputError naming the path and the reason
// (the user chose the output place), after the temporaries are removed.
void write_file_atomically(const std::filesystem::path& path, std::string_view content);

// Every temporary is written before the first rename, so a failure while writing (full disk,
// unwritable folder) leaves all targets untouched; a failing rename can only come after that.
void write_files_atomically(
    const std::vector<std::pair<std::filesystem::path, std::string>>& files);

}  // namespace lidbox
