// Output files are written whole or not at all: every file goes to a temporary name in its
// destination folder and is renamed into place only when all of them were written; on any
// failure while writing, the temporaries are removed and nothing of the set is left behind.
// (Renames come last and stay within one folder; one failing half-way could leave the files
// renamed before it - not seen in practice, and stated here rather than hidden.)
#pragma once

#include <string>
#include <vector>

namespace lidbox {

struct OutputFile {
  std::string name;     // file name inside the folder
  std::string content;  // bytes to write
};

// Creates `directory` if needed. Returns the paths written. Failure is an InputError naming the
// path (an output folder that cannot be written is the user's to fix).
std::vector<std::string> write_files_atomically(const std::string& directory,
                                                const std::vector<OutputFile>& files);

}  // namespace lidbox
