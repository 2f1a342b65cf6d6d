#include "lidbox/base/output_folder.hpp"

#include <fcntl.h>
#include <signal.h>
#include <sys/stat.h>
#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <charconv>
#include <cmath>
#include <cstdio>
#include <cstring>
#include <system_error>

#include "lidbox/base/error.hpp"
#include "lidbox/base/work_meter.hpp"

namespace lidbox {

namespace fs = std::filesystem;

namespace {

std::function<void(std::size_t)>& test_hook() {
  static std::function<void(std::size_t)> hook;
  return hook;
}

[[noreturn]] void fail_path(const fs::path& p, const std::string& why) {
  throw InputError(p.string(), "cannot be written (" + why + ")", "a writable output folder");
}

// The prefix of every temporary of `target`: ".<name>.tmp-"; the process id follows.
std::string temporary_prefix(const fs::path& target) {
  std::string s = ".";
  s += target.filename().string();
  s += ".tmp-";
  return s;
}

// A temporary ".<x>.tmp-<pid>..." whose process is gone (a crash or a kill).
bool stale_temporary(const std::string& entry, const std::string& prefix) {
  if (entry.rfind(prefix, 0) != 0) return false;
  long pid = 0;
  const char* first = entry.data() + prefix.size();
  const auto [end, ec] = std::from_chars(first, entry.data() + entry.size(), pid);
  if (ec != std::errc() || end == first || pid <= 0) return false;
  if (pid == ::getpid()) return false;
  return ::kill(static_cast<pid_t>(pid), 0) != 0 && errno == ESRCH;
}

// The files a run writes, in the order a run lists them (tables, summary, chart, standards,
// NetCDF); "*" stands for the window length of rolling_<k>h files.
const std::vector<std::string>& run_output_order() {
  static const std::vector<std::string> names = {"hourly.csv",
                                                 "budget.csv",
                                                 "summary.txt",
                                                 "chart.svg",
                                                 "limits.csv",
                                                 "daily.csv",
                                                 "periods.csv",
                                                 "episodes.csv",
                                                 "aqi.csv",
                                                 "aqhi.csv",
                                                 "index.csv",
                                                 "rolling_*.csv",
                                                 "report.md",
                                                 "report.json",
                                                 "bulletin.html",
                                                 "bulletin.md",
                                                 "bulletin.txt",
                                                 "stagnation.csv",
                                                 "stagnation_episodes.csv",
                                                 "hourly.nc",
                                                 "budget.nc",
                                                 "daily.nc",
                                                 "rolling_*.nc",
                                                 "ensemble_hourly.csv",
                                                 "ensemble_days.csv",
                                                 "ensemble_episodes.csv",
                                                 "cut.csv"};
  return names;
}

// Position of a name in run_output_order(), or its size for names not in it.
std::size_t output_rank(const std::string& n) {
  const auto& order = run_output_order();
  for (std::size_t k = 0; k < order.size(); ++k) {
    const std::string& o = order[k];
    const auto star = o.find('*');
    if (star == std::string::npos ? n == o
                                  : n.size() > o.size() && n.rfind(o.substr(0, star), 0) == 0 &&
                                        n.compare(n.size() - (o.size() - star - 1),
                                                  o.size() - star - 1, o.substr(star + 1)) == 0) {
      return k;
    }
  }
  return order.size();
}

// A folder that a lidbox run wrote: its summary.txt starts with "lidbox " (render_summary).
bool lidbox_run_folder(const fs::path& dir) {
  std::FILE* f = std::fopen((dir / "summary.txt").c_str(), "rb");
  if (!f) return false;
  char head[7] = {};
  const std::size_t got = std::fread(head, 1, sizeof head, f);
  std::fclose(f);
  return got == sizeof head && std::string_view(head, sizeof head) == "lidbox ";
}

void sync_path(const fs::path& p, int flags) {
  const int fd = ::open(p.c_str(), flags | O_CLOEXEC);
  if (fd < 0) fail_path(p, std::strerror(errno));
  const int st = ::fsync(fd);
  const int err = errno;
  ::close(fd);
  if (st != 0) fail_path(p, std::strerror(err));
}

void remove_quietly(const fs::path& p) {
  std::error_code ignored;
  fs::remove_all(p, ignored);
}

}  // namespace

void set_publish_test_hook(std::function<void(std::size_t step)> hook) {
  test_hook() = std::move(hook);
}

OutputFolder::OutputFolder(fs::path target) : target_(std::move(target)) {
  if (target_.filename().empty()) target_ = target_.parent_path();  // "out/" -> "out"
  const fs::path parent = target_.has_parent_path() ? target_.parent_path() : fs::path(".");
  std::error_code ec;
  fs::create_directories(parent, ec);
  if (ec) fail_path(parent, ec.message());
  const std::string prefix = temporary_prefix(target_);
  for (const auto& e : fs::directory_iterator(parent, ec)) {
    const std::string n = e.path().filename().string();
    if (stale_temporary(n, prefix)) remove_quietly(e.path());
  }
  if (fs::exists(target_, ec)) {
    if (!fs::is_directory(target_, ec)) {
      throw InputError(target_.string(), "is a file", "a folder for the run's outputs");
    }
    const bool ours = lidbox_run_folder(target_);
    std::vector<std::string> foreign;
    for (const auto& e : fs::directory_iterator(target_, ec)) {
      const std::string n = e.path().filename().string();
      // Per-file temporaries of earlier versions, left by a crash.
      if (n.size() > 1 && n[0] == '.' && n.find(".tmp-") != std::string::npos) {
        const std::string own = n.substr(0, n.find(".tmp-") + 5);
        if (stale_temporary(n, own)) {
          remove_quietly(e.path());
          continue;
        }
      }
      if (output_rank(n) == run_output_order().size()) foreign.push_back(n);
    }
    std::sort(foreign.begin(), foreign.end());
    if (!ours && !foreign.empty()) {
      throw InputError(target_.string(),
                       "holds \"" + foreign.front() + "\", which a lidbox run does not write",
                       "a new or empty folder, or one an earlier run wrote (a run replaces "
                       "the whole folder)");
    }
  }
  stage_ = parent / (prefix + std::to_string(::getpid()));
  remove_quietly(stage_);
  fs::create_directory(stage_, ec);
  if (ec) fail_path(stage_, ec.message());
}

OutputFolder::~OutputFolder() {
  if (!published_) remove_quietly(stage_);
}

fs::path OutputFolder::staged(std::string_view name) const {
  return stage_ / std::string(name);
}

void OutputFolder::completed(const std::string& name) {
  const std::lock_guard<std::mutex> lock(mutex_);
  names_.push_back(name);
  if (test_hook()) test_hook()(names_.size());
}

void OutputFolder::adopt(std::string_view name) {
  sync_path(staged(name), O_RDONLY);
  std::error_code ec;
  work_meter::add(fs::file_size(staged(name), ec));
  completed(std::string(name));
}

void OutputFolder::write_whole(std::string_view name, std::string_view content) {
  TextFile f(*this, std::string(name));
  f.text(content);
  f.close();
}

std::vector<fs::path> OutputFolder::publish() {
  sync_path(stage_, O_RDONLY | O_DIRECTORY);
  if (test_hook()) test_hook()(names_.size() + 1);
  std::error_code ec;
  const bool replace = fs::exists(target_, ec);
  if (!replace) {
    if (::rename(stage_.c_str(), target_.c_str()) != 0) fail_path(target_, std::strerror(errno));
  } else if (::renameat2(AT_FDCWD, stage_.c_str(), AT_FDCWD, target_.c_str(), RENAME_EXCHANGE) !=
             0) {
    // A file system without the exchange: the previous run steps aside first, under a
    // temporary name that the next run cleans up if this one dies here.
    if (errno != EINVAL && errno != ENOSYS) fail_path(target_, std::strerror(errno));
    const fs::path aside = stage_.string() + ".previous";
    if (::rename(target_.c_str(), aside.c_str()) != 0) fail_path(target_, std::strerror(errno));
    if (::rename(stage_.c_str(), target_.c_str()) != 0) fail_path(target_, std::strerror(errno));
    ::rename(aside.c_str(), stage_.c_str());
  }
  published_ = true;
  const fs::path parent = target_.has_parent_path() ? target_.parent_path() : fs::path(".");
  sync_path(parent, O_RDONLY | O_DIRECTORY);
  if (test_hook()) test_hook()(names_.size() + 2);
  if (replace) remove_quietly(stage_);  // the previous run, now under the temporary name
  std::vector<std::string> names = names_;
  std::stable_sort(names.begin(), names.end(), [](const std::string& a, const std::string& b) {
    return output_rank(a) < output_rank(b);
  });
  std::vector<fs::path> out;
  for (const auto& n : names) out.push_back(target_ / n);
  return out;
}

TextFile::TextFile(OutputFolder& folder, std::string name)
    : folder_(folder), name_(std::move(name)), buffer_(new char[kBuffer]) {
  const fs::path p = folder_.staged(name_);
  fd_ = ::open(p.c_str(), O_WRONLY | O_CREAT | O_TRUNC | O_CLOEXEC, 0644);
  if (fd_ < 0) fail(std::strerror(errno));
}

TextFile::~TextFile() {
  if (fd_ >= 0) ::close(fd_);
}

void TextFile::fail(const std::string& why) {
  fail_path(folder_.target() / name_, why);
}

void TextFile::flush() {
  std::size_t done = 0;
  while (done < used_) {
    const ssize_t w = ::write(fd_, buffer_.get() + done, used_ - done);
    if (w < 0) {
      if (errno == EINTR) continue;
      fail(std::strerror(errno));
    }
    done += static_cast<std::size_t>(w);
  }
  work_meter::add(used_);
  used_ = 0;
}

char* TextFile::room(std::size_t n) {
  if (kBuffer - used_ < n) flush();
  return buffer_.get() + used_;
}

TextFile& TextFile::text(std::string_view s) {
  while (!s.empty()) {
    if (used_ == kBuffer) flush();
    const std::size_t k = std::min(s.size(), kBuffer - used_);
    std::memcpy(buffer_.get() + used_, s.data(), k);
    used_ += k;
    s.remove_prefix(k);
  }
  return *this;
}

TextFile& TextFile::number(double v, int digits) {
  if (std::isnan(v)) return *this;
  if (v == 0.0) return ch('0');
  char* p = room(64);
  const auto r = std::to_chars(p, p + 64, v, std::chars_format::general, digits);
  used_ += static_cast<std::size_t>(r.ptr - p);
  return *this;
}

TextFile& TextFile::scientific(double v, int digits) {
  char* p = room(64);
  const auto r = std::to_chars(p, p + 64, v, std::chars_format::scientific, digits);
  used_ += static_cast<std::size_t>(r.ptr - p);
  return *this;
}

TextFile& TextFile::integer(long long v) {
  char* p = room(24);
  const auto r = std::to_chars(p, p + 24, v);
  used_ += static_cast<std::size_t>(r.ptr - p);
  return *this;
}

namespace {

char* two_digits(char* p, int v) {
  p[0] = static_cast<char>('0' + v / 10);
  p[1] = static_cast<char>('0' + v % 10);
  return p + 2;
}

// "YYYY-MM-DDTHH:MM:SS" as format_civil in time.cpp prints it (%04d for the year).
char* civil_text(char* p, UtcSeconds t) {
  const CivilTime c = civil_from_utc_seconds(t);
  if (c.year >= 0 && c.year <= 9999) {
    p = two_digits(p, c.year / 100);
    p = two_digits(p, c.year % 100);
  } else {
    p += std::snprintf(p, 16, "%04d", c.year);
  }
  *p++ = '-';
  p = two_digits(p, c.month);
  *p++ = '-';
  p = two_digits(p, c.day);
  *p++ = 'T';
  p = two_digits(p, c.hour);
  *p++ = ':';
  p = two_digits(p, c.minute);
  *p++ = ':';
  return two_digits(p, c.second);
}

}  // namespace

TextFile& TextFile::utc(UtcSeconds t) {
  char* p = room(40);
  char* e = civil_text(p, t);
  *e++ = 'Z';
  used_ += static_cast<std::size_t>(e - p);
  return *this;
}

TextFile& TextFile::with_offset(UtcSeconds t, int offset_s) {
  char* p = room(48);
  char* e = civil_text(p, t + offset_s);
  const int a = offset_s < 0 ? -offset_s : offset_s;
  *e++ = offset_s < 0 ? '-' : '+';
  if (a / 3600 > 99) {
    e += std::snprintf(e, 8, "%02d", a / 3600);
  } else {
    e = two_digits(e, a / 3600);
  }
  *e++ = ':';
  e = two_digits(e, (a % 3600) / 60);
  used_ += static_cast<std::size_t>(e - p);
  return *this;
}

void TextFile::close() {
  flush();
  if (::fsync(fd_) != 0) fail(std::strerror(errno));
  const int st = ::close(fd_);
  fd_ = -1;
  if (st != 0) fail(std::strerror(errno));
  folder_.completed(name_);
}

}  // namespace lidbox
