#include "lidbox/report/run_report.hpp"

#include <algorithm>
#include <atomic>
#include <cmath>
#include <cstdio>
#include <exception>
#include <functional>
#include <mutex>
#include <sstream>
#include <thread>

#include "lidbox/analysis/run_standards.hpp"
#include "lidbox/base/caution.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/base/work_meter.hpp"
#include "lidbox/report/chart.hpp"
#include "lidbox/report/run_netcdf.hpp"
#include "report/row_pipe.hpp"

namespace lidbox {

namespace {

std::string part_name(const CaseSpec& c, std::size_t j) {
  if (j == 0) return "background";
  if (j == 1) return "initial";
  return c.sectors[j - 2].name;
}

std::string unit_of(const PollutantSpec& p) {
  return p.unit.canonical;
}

double in_unit(const PollutantSpec& p, double g_m3) {
  return g_m3 / p.unit.to_g_m3;
}

}  // namespace

namespace {

void write_hourly_header(TextFile& f, const CaseSpec& c, std::size_t n_parts) {
  f.text(
      "period_start_utc,period_end_utc,period_start_local,period_end_local,mixing_height [m],"
      "wind_speed [m/s],wind_from [deg],ventilation_coefficient [m2/s],flushing_time [h],"
      "residual_layer_top [m],met_filled,calm_floor_applied,lid_floor_applied,substeps");
  for (const auto& p : c.pollutants) {
    const std::string u = " [" + unit_of(p) + "]";
    f.ch(',').text(p.name).text("_hour_mean").text(u).ch(',').text(p.name).text("_end_of_hour");
    f.text(u).ch(',').text(p.name).text("_residual_end_of_hour").text(u);
    for (std::size_t j = 0; j < n_parts; ++j) {
      f.ch(',').text(p.name).text("_part_").text(part_name(c, j)).text(u);
    }
  }
  f.ch('\n');
}

// An hourly.csv row as numbers: 13 fields of the hour, then per pollutant its total, end-of-hour
// mixed and residual values and its parts, in the pollutant's reporting unit.
constexpr std::size_t kHourFields = 13;
std::size_t hourly_row_width(const RunResult& r) {
  return kHourFields + r.n_pollutants * (3 + r.n_parts);
}

void fill_hourly_row(const CaseSpec& c, const RunResult& r, std::size_t i, double* row) {
  const HourRecord& h = r.hours[i];
  const std::size_t n = r.hours.size();
  const UtcSeconds end = h.start_utc + kSecondsPerHour;
  // The offset at the end of hour i is the one at the start of hour i + 1.
  const int end_offset = i + 1 < n ? r.hours[i + 1].civil_offset_s : c.zone.civil_offset_s(end);
  const double head[kHourFields] = {static_cast<double>(h.start_utc),
                                    static_cast<double>(h.civil_offset_s),
                                    static_cast<double>(end_offset),
                                    h.mixing_height_m,
                                    h.wind_speed_m_s,
                                    h.wind_from_deg,
                                    h.ventilation_m2_s,
                                    h.flushing_time_h,
                                    h.residual_top_m,
                                    h.filled ? 1.0 : 0.0,
                                    h.calm_floor ? 1.0 : 0.0,
                                    h.lid_floor ? 1.0 : 0.0,
                                    static_cast<double>(h.substeps)};
  std::copy(head, head + kHourFields, row);
  double* v = row + kHourFields;
  for (std::size_t p = 0; p < r.n_pollutants; ++p) {
    const PollutantSpec& ps = c.pollutants[p];
    *v++ = in_unit(ps, r.total(i, p));
    *v++ = in_unit(ps, r.end_mixed(i, p));
    *v++ = in_unit(ps, r.end_residual(i, p));
    for (std::size_t j = 0; j < r.n_parts; ++j) *v++ = in_unit(ps, r.mean(i, p, j));
  }
}

void write_hourly_rows(TextFile& f, std::size_t n_pollutants, std::size_t n_parts,
                       const double* rows, std::size_t n_rows) {
  const std::size_t width = kHourFields + n_pollutants * (3 + n_parts);
  for (std::size_t k = 0; k < n_rows; ++k) {
    const double* x = rows + k * width;
    const auto start = static_cast<UtcSeconds>(x[0]);
    const UtcSeconds end = start + kSecondsPerHour;
    f.utc(start).ch(',').utc(end).ch(',').with_offset(start, static_cast<int>(x[1])).ch(',');
    f.with_offset(end, static_cast<int>(x[2])).ch(',').number(x[3]).ch(',');
    f.number(x[4], 5).ch(',').number(x[5], 5).ch(',');
    f.number(x[6], 6).ch(',').number(x[7], 5).ch(',');
    f.number(x[8]).ch(',').ch(x[9] != 0.0 ? '1' : '0').ch(',');
    f.ch(x[10] != 0.0 ? '1' : '0').ch(',').ch(x[11] != 0.0 ? '1' : '0').ch(',');
    f.integer(static_cast<long long>(x[12]));
    const double* v = x + kHourFields;
    for (std::size_t p = 0; p < n_pollutants; ++p) {
      f.ch(',').number(v[0]).ch(',').number(v[1]).ch(',').number(v[2]);
      for (std::size_t j = 0; j < n_parts; ++j) f.ch(',').number(v[3 + j]);
      v += 3 + n_parts;
    }
    f.ch('\n');
  }
}

}  // namespace

void write_hourly_csv(TextFile& f, const CaseSpec& c, const RunResult& r) {
  write_hourly_header(f, c, r.n_parts);
  std::vector<double> row(hourly_row_width(r));
  for (std::size_t i = 0; i < r.hours.size(); ++i) {
    fill_hourly_row(c, r, i, row.data());
    write_hourly_rows(f, r.n_pollutants, r.n_parts, row.data(), 1);
  }
}

HourlyStream::HourlyStream(OutputFolder& folder, const CaseSpec& c) : folder_(folder), c_(c) {}

HourlyStream::~HourlyStream() = default;

void HourlyStream::hour(const RunResult& r, std::size_t i) {
  if (i == 0) {
    csv_ = std::make_unique<TextFile>(folder_, "hourly.csv");
    write_hourly_header(*csv_, c_, r.n_parts);
    pipe_ = std::make_unique<RowPipe>(
        hourly_row_width(r),
        [f = csv_.get(), P = r.n_pollutants, J = r.n_parts](const double* rows, std::size_t n) {
          write_hourly_rows(*f, P, J, rows, n);
        });
  }
  fill_hourly_row(c_, r, i, pipe_->row());
}

void HourlyStream::close() {
  if (!pipe_) throw InternalError("an hourly stream closed before its first hour");
  pipe_->close();
  csv_->close();
}

namespace {

const char* kBudgetHeader =
    "period_start_utc,pollutant,emitted [g/h],advected_in [g/h],advected_out [g/h],reacted [g/h],"
    "deposited [g/h],entrained_from_residual [g/h],entrained_from_free_troposphere [g/h],"
    "detrained [g/h],residual_reacted [g/h],residual_advected_in [g/h],"
    "residual_advected_out [g/h],vented_aloft [g/h],mixed_layer_mass [g],residual_layer_mass [g],"
    "cumulative_closure [g]\n";

// A budget.csv hour as numbers: its start, then per pollutant the 14 lines and masses over the
// footprint [g/h, g] and the cumulative closure [g] (closure_g_m2[p], after the hour).
constexpr std::size_t kBudgetValues = 15;
std::size_t budget_row_width(std::size_t n_pollutants) {
  return 1 + n_pollutants * kBudgetValues;
}

void fill_budget_row(const CaseSpec& c, const RunResult& r, std::size_t i,
                     const double* closure_g_m2, double* row) {
  const double A = c.footprint.area_m2();
  row[0] = static_cast<double>(r.hours[i].start_utc);
  double* v = row + 1;
  for (std::size_t p = 0; p < r.n_pollutants; ++p) {
    const BudgetTerms& b = r.budget_of(i, p);
    for (double x : {b.emitted, b.advected_in, b.advected_out, b.reacted, b.deposited,
                     b.entrained_from_residual, b.entrained_from_free_troposphere, b.detrained,
                     b.residual_reacted, b.residual_advected_in, b.residual_advected_out,
                     b.vented_aloft, r.mixed_mass(i, p), r.residual_mass(i, p)}) {
      *v++ = x * A;
    }
    *v++ = closure_g_m2[p] * A;
  }
}

// The rows of each hour, one per pollutant.
void write_budget_rows(TextFile& f, const CaseSpec& c, const double* rows, std::size_t n_rows) {
  const std::size_t P = c.pollutants.size();
  const std::size_t width = budget_row_width(P);
  for (std::size_t k = 0; k < n_rows; ++k) {
    const double* x = rows + k * width;
    const auto start = static_cast<UtcSeconds>(x[0]);
    for (std::size_t p = 0; p < P; ++p) {
      const double* v = x + 1 + p * kBudgetValues;
      f.utc(start).ch(',').text(c.pollutants[p].name);
      for (std::size_t j = 0; j + 1 < kBudgetValues; ++j) f.ch(',').number(v[j], 10);
      f.ch(',').scientific(v[kBudgetValues - 1], 3).ch('\n');
    }
  }
}

}  // namespace

void write_budget_csv(TextFile& f, const CaseSpec& c, const RunResult& r) {
  const std::vector<double> closure = r.closure_series_g_m2(c.engine.residual_layer);
  f.text(kBudgetHeader);
  std::vector<double> row(budget_row_width(r.n_pollutants));
  for (std::size_t i = 0; i < r.hours.size(); ++i) {
    fill_budget_row(c, r, i, closure.data() + i * r.n_pollutants, row.data());
    write_budget_rows(f, c, row.data(), 1);
  }
}

BudgetStream::BudgetStream(OutputFolder& folder, const CaseSpec& c, bool netcdf,
                           CfFileFormat format)
    : folder_(folder), c_(c), netcdf_(netcdf), format_(format) {}

BudgetStream::~BudgetStream() = default;

void BudgetStream::hour(const RunResult& r, std::size_t i) {
  const std::size_t P = r.n_pollutants;
  if (i == 0) {
    csv_ = std::make_unique<TextFile>(folder_, "budget.csv");
    csv_->text(kBudgetHeader);
    pipe_ = std::make_unique<RowPipe>(
        budget_row_width(P), [f = csv_.get(), &c = c_](const double* rows, std::size_t n) {
          write_budget_rows(*f, c, rows, n);
        });
    closure_.assign(P, 0.0);
    if (netcdf_) {
      nc_ = std::make_unique<CfStreamWriter>(folder_.staged("budget.nc").string(),
                                             budget_cf_layout(c_, r), format_);
      per_hour_ = budget_values_per_hour(r);
      block_.assign(per_hour_ * kBlockHours, 0.0);
      row_.assign(per_hour_, 0.0);
    }
  }
  for (std::size_t p = 0; p < P; ++p) closure_[p] = r.closure_latest_g_m2(i, p);
  fill_budget_row(c_, r, i, closure_.data(), pipe_->row());
  if (nc_) {
    budget_hour_values(c_, r, i, closure_.data(), row_.data());
    const std::size_t k = i - block_first_;
    for (std::size_t v = 0; v < per_hour_; ++v) block_[v * kBlockHours + k] = row_[v];
    if (k + 1 == kBlockHours || i + 1 == r.hours.size()) {
      for (std::size_t v = 0; v < per_hour_; ++v) {
        nc_->put(v, block_first_, block_.data() + v * kBlockHours, k + 1);
      }
      block_first_ = i + 1;
    }
  }
}

void BudgetStream::close() {
  if (!csv_) throw InternalError("a budget stream closed before its first hour");
  pipe_->close();
  csv_->close();
  if (nc_) {
    nc_->close();
    folder_.adopt("budget.nc");
  }
}

std::string render_summary(const CaseSpec& c, const MetSeries& met, const RunResult& r,
                           const StandardsReport* standards) {
  std::ostringstream o;
  const std::size_t n = r.hours.size();
  o << "lidbox " << LIDBOX_VERSION << " | case " << c.name;
  if (c.title != c.name) o << ": " << c.title;
  o << "\nCAUTION: " << kScreeningCaution << "\n\n";
  const UtcSeconds t0 = r.hours.front().start_utc;
  const UtcSeconds t1 = r.hours.back().start_utc + kSecondsPerHour;
  o << "Period   " << format_utc(t0) << " to " << format_utc(t1) << " (" << n
    << " hours), time zone " << c.zone.spec() << " (" << c.zone.kind_label() << ")\n";
  std::size_t filled = 0, calm = 0, lid = 0;
  for (const auto& h : r.hours) {
    filled += h.filled;
    calm += h.calm_floor;
    lid += h.lid_floor;
  }
  o << "Met      " << met.source << ", read as "
    << (c.met.reading == MetReading::instantaneous
            ? "instantaneous values (interpolated)"
            : std::string("hour averages stamped at the period ") +
                  (c.met.hour_label == HourLabel::period_start ? "start" : "end") + " (held)")
    << "\nFlags    " << filled << " h gap-filled (linear interpolation), " << calm
    << " h under the calm floor (" << format_number(c.engine.min_wind_m_s, 3) << " m/s), " << lid
    << " h under the lid floor (" << format_number(c.engine.min_mixing_height_m, 4) << " m)\n";
  if (c.spin_up == SpinUp::repeat_first_day) {
    char buf[64];
    std::snprintf(buf, sizeof buf, "%.2g %%", 100.0 * r.spin_up_last_change);
    o << "Spin-up  first day repeated " << r.spin_up_days << " times; last change " << buf
      << (r.spin_up_converged ? " (converged)" : " (NOT converged: raise spin_up_max_days)")
      << "\n";
  } else {
    o << "Spin-up  none: started from the given initial values\n";
  }
  o << "\n";
  // Peak hour per pollutant and the shares of the parts at that hour and over the run.
  o << "pollutant  unit      run mean   peak hour mean  peak hour (local start)      shares at "
       "peak\n";
  for (std::size_t p = 0; p < r.n_pollutants; ++p) {
    const PollutantSpec& ps = c.pollutants[p];
    std::size_t peak = 0;
    double sum = 0.0;
    for (std::size_t i = 0; i < n; ++i) {
      sum += r.total(i, p);
      if (r.total(i, p) > r.total(peak, p)) peak = i;
    }
    char line[256];
    std::snprintf(
        line, sizeof line, "%-10s %-8s %10s %15s  %-28s ", ps.name.c_str(), unit_of(ps).c_str(),
        format_number(in_unit(ps, sum / static_cast<double>(n)), 4).c_str(),
        format_number(in_unit(ps, r.total(peak, p)), 4).c_str(),
        format_local(r.hours[peak].start_utc, c.zone).c_str());
    o << line;
    const double tot = r.total(peak, p);
    bool first = true;
    for (std::size_t j = 0; j < r.n_parts; ++j) {
      const double share = tot > 0.0 ? 100.0 * r.mean(peak, p, j) / tot : 0.0;
      if (j == 1 && share < 0.05) continue;  // the initial part is zero after a spin-up
      char b[96];
      std::snprintf(b, sizeof b, "%s%s %.0f%%", first ? "" : ", ", part_name(c, j).c_str(), share);
      o << b;
      first = false;
    }
    o << "\n";
  }
  o << "\nBudget closure (|storage change - sum of lines| / sum of |lines|, whole run):";
  for (std::size_t p = 0; p < r.n_pollutants; ++p) {
    char b[96];
    std::snprintf(b, sizeof b, " %s %.1e", c.pollutants[p].name.c_str(),
                  r.relative_closure(p, c.engine.residual_layer));
    o << b;
  }
  o << "\n";
  if (standards) o << "\n" << standards_summary(*standards);
  return o.str();
}

namespace {

// Runs the tasks on two threads (the machine's cores), each task whole on one thread; the first
// error is raised here after both threads are done.
void run_on_two_threads(const std::vector<std::function<void()>>& tasks) {
  std::atomic<std::size_t> next{0};
  std::exception_ptr error;
  std::mutex error_mutex;
  const auto worker = [&] {
    for (std::size_t k = next++; k < tasks.size(); k = next++) {
      try {
        tasks[k]();
      } catch (...) {
        const std::lock_guard<std::mutex> lock(error_mutex);
        if (!error) error = std::current_exception();
        next = tasks.size();
      }
    }
    work_meter::merge_thread();
  };
  std::thread other(worker);
  worker();
  other.join();
  if (error) std::rethrow_exception(error);
}

}  // namespace

std::string write_run_outputs(OutputFolder& folder, const CaseSpec& c, const MetSeries& met,
                              const RunResult& r, const StandardsReport* standards, bool netcdf,
                              CfFileFormat format, bool chart, bool hourly_streamed) {
  std::string summary = render_summary(c, met, r, standards);
  std::vector<std::function<void()>> tasks;
  // NetCDF-C is not thread-safe: its files are one task. The longest tasks go first.
  if (netcdf)
    tasks.emplace_back([&] { write_run_netcdf_outputs(folder, c, r, standards, format); });
  if (!hourly_streamed) {
    tasks.emplace_back([&] {
      TextFile f(folder, "hourly.csv");
      write_hourly_csv(f, c, r);
      f.close();
    });
  }
  if (!r.budget_streamed) {
    tasks.emplace_back([&] {
      TextFile f(folder, "budget.csv");
      write_budget_csv(f, c, r);
      f.close();
    });
  }
  if (chart) {
    tasks.emplace_back([&] {
      RunChartInput in;
      in.c = &c;
      in.r = &r;
      in.standards = standards;
      in.issue_time_utc =
          standards ? standards->options.issue_time_utc : run_issue_time(c, std::nullopt);
      folder.write_whole("chart.svg", render_run_chart_svg(in));
    });
  }
  tasks.emplace_back([&] {
    if (standards) {
      for (const auto& f : render_standards_report(*standards))
        folder.write_whole(f.name, f.content);
    }
  });
  run_on_two_threads(tasks);
  return summary;
}

std::optional<UtcSeconds> run_issue_time(const CaseSpec& c,
                                         std::optional<UtcSeconds> issue_time_override) {
  if (issue_time_override) return issue_time_override;
  if (c.standards) return c.standards->issue_time_utc;
  return std::nullopt;
}

RunWritten run_and_write(OutputFolder& folder, const CaseSpec& c, const MetSeries& met,
                         const RunWriteOptions& options) {
  // The budget and the hourly table are written while the box steps, each formatted on a
  // thread of its own: the budget is not kept, and neither table waits for the run's end.
  BudgetStream budget(folder, c, options.netcdf, options.format);
  HourlyStream hourly(folder, c);
  RunStreaming streaming;
  streaming.keep_budget = false;
  streaming.on_hour = [&budget, &hourly](const RunResult& r, std::size_t i) {
    budget.hour(r, i);
    hourly.hour(r, i);
  };
  RunWritten out;
  out.result = run_case(c, met, options.progress, streaming);
  if (options.after_run) options.after_run();
  out.standards = run_standards(c, out.result, options.issue_time);
  out.issue_time_utc = run_issue_time(c, options.issue_time);
  const StandardsReport* standards = out.standards ? &*out.standards : nullptr;
  out.summary = write_run_outputs(folder, c, met, out.result, standards, options.netcdf,
                                  options.format, false, true);
  // Drawn here rather than among the tables so that a command-line issue time reaches it
  // without standards too; it costs little (tests/bench/chart.sh).
  if (options.chart) {
    RunChartInput in;
    in.c = &c;
    in.r = &out.result;
    in.standards = standards;
    in.issue_time_utc = out.issue_time_utc;
    folder.write_whole("chart.svg", render_run_chart_svg(in));
  }
  // The two tables' writers finish while the standards and the other files are made; NetCDF-C
  // is called from one thread at a time (budget.nc closes after the NetCDF task has joined).
  budget.close();
  hourly.close();
  return out;
}

}  // namespace lidbox
