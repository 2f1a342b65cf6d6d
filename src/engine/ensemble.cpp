#include "lidbox/engine/ensemble.hpp"

#include <algorithm>
#include <atomic>
#include <exception>
#include <filesystem>
#include <mutex>
#include <thread>

#include "lidbox/base/error.hpp"
#include "lidbox/met/netcdf_members.hpp"

namespace lidbox {

namespace {

bool is_netcdf_name(const std::string& s) {
  const std::string ext = std::filesystem::path(s).extension().string();
  return ext == ".nc" || ext == ".nc4" || ext == ".cdf";
}

std::string axis_text(const MetSeries& m) {
  return std::to_string(m.size()) + " hourly stamps from " + format_utc(m.first_stamp_utc);
}

void check_time_axis(const MetSeries& member, const std::string& label, const MetSeries& det,
                     const CaseSpec& c) {
  if (member.first_stamp_utc == det.first_stamp_utc && member.size() == det.size()) return;
  throw InputError(
      label, axis_text(member) + ", not the time axis of the [met] file",
      "every member on the time axis of \"" + c.met.display_name + "\" (" + axis_text(det) + ")");
}

}  // namespace

EnsembleMet read_ensemble_met(const CaseSpec& c, const MetSeries& deterministic) {
  if (!c.ensemble) throw InternalError("read_ensemble_met on a case without [ensemble]");
  const EnsembleSpec& e = *c.ensemble;
  EnsembleMet out;
  CaseSpec m = c;  // its [met] settings, one member's file at a time
  if (e.netcdf_members) {
    m.met.format = MetFormat::netcdf;
    m.met.path = e.files.front();
    m.met.display_name = e.display_names.front();
    m.met.netcdf.display_name = e.display_names.front();
    m.met.netcdf.member.reset();
    const auto values = netcdf_member_values(m.met.path, m.met.netcdf);
    if (values.size() < 2) {
      throw InputError(
          e.where,
          "\"" + e.display_names.front() + "\" with " + std::to_string(values.size()) + " member",
          "at least 2 members: a probability from one member is no probability");
    }
    for (long long v : values) {
      m.met.netcdf.member = v;
      const std::string label = e.display_names.front() + " member " + std::to_string(v);
      out.members.push_back(read_case_met(m));
      out.labels.push_back(label);
      check_time_axis(out.members.back(), label, deterministic, c);
    }
    return out;
  }
  for (std::size_t k = 0; k < e.files.size(); ++k) {
    m.met.path = e.files[k];
    m.met.display_name = e.display_names[k];
    m.met.format = is_netcdf_name(e.files[k]) ? MetFormat::netcdf : MetFormat::csv;
    m.met.netcdf.display_name = e.display_names[k];
    out.members.push_back(read_case_met(m));
    out.labels.push_back(e.display_names[k]);
    check_time_axis(out.members.back(), e.display_names[k], deterministic, c);
  }
  return out;
}

std::vector<RunResult> run_ensemble(const CaseSpec& c, const std::vector<MetSeries>& members,
                                    unsigned threads, const std::function<void(double)>& progress) {
  const std::size_t n = members.size();
  std::vector<RunResult> results(n);
  std::vector<std::exception_ptr> errors(n);
  if (threads == 0) threads = std::max(1u, std::thread::hardware_concurrency());
  threads = static_cast<unsigned>(std::min<std::size_t>(threads, std::max<std::size_t>(n, 1)));
  std::atomic<std::size_t> next{0};
  std::size_t done = 0;
  std::mutex progress_mutex;
  auto work = [&] {
    for (std::size_t k = next++; k < n; k = next++) {
      try {
        results[k] = run_case(c, members[k]);
      } catch (...) {
        errors[k] = std::current_exception();
      }
      if (progress) {
        const std::lock_guard<std::mutex> lock(progress_mutex);
        ++done;
        progress(static_cast<double>(done) / static_cast<double>(n));
      }
    }
  };
  std::vector<std::thread> pool;
  for (unsigned t = 1; t < threads; ++t) pool.emplace_back(work);
  work();  // the calling thread is one of the workers
  for (auto& t : pool) t.join();
  for (const auto& e : errors) {
    if (e) std::rethrow_exception(e);
  }
  return results;
}

}  // namespace lidbox
