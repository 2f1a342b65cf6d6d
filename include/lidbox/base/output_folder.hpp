// A run's output set is published as one step: all files or none, never a mix of two runs.
//
// The files are written into a fresh temporary folder beside the target, ".<name>.tmp-<pid>"
// (same parent, so the same file system). Each file is flushed to the disk (fsync) when it is
// complete; publish() syncs the temporary folder and swaps it in with a single rename
// (Linux renameat2 RENAME_EXCHANGE when the target exists, a plain rename when it does not),
// then syncs the parent folder. The previous run is REMOVED after the swap (not kept), so a
// folder holds one run; a crash between the swap and the removal leaves the previous run under a
// temporary name, which the next run cleans up like any stale temporary. A temporary whose
// process is gone (a crash, a kill) is removed when the next run into the same parent folder
// starts. An error before publish() removes the temporary folder and leaves the target as it was.
//
// The target must be absent, empty, a folder that a lidbox run wrote (its summary.txt starts
// with "lidbox "), or hold only names that a run writes; anything else is an InputError naming
// the folder and the first foreign entry, so that a folder of the user's own files is never
// swapped away.
//
// Numbers are formatted with std::to_chars into a large buffer that goes to the file as it
// fills: no file's contents are held whole in memory or copied again.
#pragma once

#include <cstddef>
#include <cstdint>
#include <filesystem>
#include <functional>
#include <memory>
#include <mutex>
#include <string>
#include <string_view>
#include <vector>

#include "lidbox/base/time.hpp"

namespace lidbox {

// Test hook: called with the number of steps done (1 .. files: after each completed file;
// files + 1: after the folder's sync, before the swap; files + 2: after the swap, before the
// previous run is removed). A test makes it abort the process to check that a kill at any of
// these points leaves either the previous set or the new one. Process-wide; empty by default.
void set_publish_test_hook(std::function<void(std::size_t step)> hook);

class OutputFolder {
 public:
  // Cleans stale temporaries beside `target`, checks the target (see above) and creates the
  // temporary folder. InputError naming the folder when it cannot.
  explicit OutputFolder(std::filesystem::path target);
  ~OutputFolder();  // removes the temporary folder unless published
  OutputFolder(const OutputFolder&) = delete;
  OutputFolder& operator=(const OutputFolder&) = delete;

  [[nodiscard]] const std::filesystem::path& target() const { return target_; }
  // Where a file named `name` is written before publishing.
  [[nodiscard]] std::filesystem::path staged(std::string_view name) const;
  // A file written by someone else (a NetCDF library) into staged(name): syncs it and counts it.
  void adopt(std::string_view name);
  // A whole file from memory (small texts).
  void write_whole(std::string_view name, std::string_view content);
  // Swaps the folder in; returns the published files' paths, a run's files in their usual order
  // (hourly.csv, budget.csv, summary.txt, chart.svg, standards tables, NetCDF files).
  std::vector<std::filesystem::path> publish();

 private:
  friend class TextFile;
  void completed(const std::string& name);

  std::filesystem::path target_;
  std::filesystem::path stage_;
  std::mutex mutex_;  // files complete on two threads
  std::vector<std::string> names_;
  bool published_ = false;
};

// One text file in an OutputFolder, written through a 1 MiB buffer.
class TextFile {
 public:
  TextFile(OutputFolder& folder, std::string name);
  ~TextFile();  // closes without publishing the file when close() was not reached (an error)
  TextFile(const TextFile&) = delete;
  TextFile& operator=(const TextFile&) = delete;

  TextFile& text(std::string_view s);
  TextFile& ch(char c) {
    if (used_ == kBuffer) flush();
    buffer_[used_++] = c;
    return *this;
  }
  // The same characters as format_number(v, digits) (text.hpp): %.*g, "" for NaN, "0" for 0.
  TextFile& number(double v, int digits = 7);
  // printf's "%.<digits>e".
  TextFile& scientific(double v, int digits);
  TextFile& integer(long long v);
  // "2026-01-05T13:00:00Z" and "2026-01-05T06:00:00-07:00", as format_utc / format_with_offset.
  TextFile& utc(UtcSeconds t);
  TextFile& with_offset(UtcSeconds t, int offset_s);
  // Flushes, syncs and closes; the file then belongs to the folder's set.
  void close();

 private:
  static constexpr std::size_t kBuffer = 1 << 20;
  char* room(std::size_t n);  // at least n free bytes at buffer_ + used_
  void flush();
  [[noreturn]] void fail(const std::string& why);

  OutputFolder& folder_;
  std::string name_;
  int fd_ = -1;
  std::unique_ptr<char[]> buffer_;
  std::size_t used_ = 0;
};

}  // namespace lidbox
