#include "lidbox/grid/grid_run.hpp"

#include <algorithm>
#include <atomic>
#include <cmath>
#include <filesystem>
#include <limits>
#include <map>
#include <memory>
#include <mutex>
#include <optional>
#include <thread>

#include "grid/thread_team.hpp"
#include "lidbox/base/atomic_file.hpp"
#include "lidbox/base/caution.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/base/percentile.hpp"
#include "lidbox/base/text.hpp"
#include "lidbox/engine/run.hpp"
#include "lidbox/grid/grid_files.hpp"
#include "lidbox/met/netcdf_grid.hpp"

namespace lidbox {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr std::size_t kBudgetBytes = 64u << 20;  // met slab memory per chunk (two slabs in flight)

UtcSeconds floor_div(UtcSeconds a, UtcSeconds b) {
  return a >= 0 ? a / b : -((-a + b - 1) / b);
}

// The period a local-standard day belongs to, as a sortable key, and its bounds.
struct PeriodKey {
  long key = 0;
  UtcSeconds start_utc = 0, end_utc = 0;
};

PeriodKey period_of(GridPeriod kind, UtcSeconds local_day_start, int offset_s) {
  const CivilTime c = civil_from_utc_seconds(local_day_start);
  int y0 = c.year, m0 = c.month, y1 = c.year, m1 = c.month;  // first month and the month after
  PeriodKey p;
  switch (kind) {
    case GridPeriod::year:
      p.key = c.year;
      m0 = 1;
      y1 = c.year + 1;
      m1 = 1;
      break;
    case GridPeriod::month:
      p.key = c.year * 12L + (c.month - 1);
      m1 = c.month + 1;
      if (m1 == 13) {
        m1 = 1;
        y1 = c.year + 1;
      }
      break;
    case GridPeriod::season: {
      const int season = (c.month % 12) / 3;  // 0 DJF, 1 MAM, 2 JJA, 3 SON
      const int year = c.month == 12 ? c.year + 1 : c.year;
      p.key = year * 4L + season;
      m0 = season == 0 ? 12 : season * 3;
      y0 = season == 0 ? year - 1 : year;
      m1 = season == 3 ? 12 : season * 3 + 3;
      y1 = year;
      break;
    }
  }
  p.start_utc = days_from_civil(y0, m0, 1) * kSecondsPerDay - offset_s;
  p.end_utc = days_from_civil(y1, m1, 1) * kSecondsPerDay - offset_s;
  return p;
}

// One day of a chunk: hours [first, first + count) of the chunk, starting at hour of day `hod`.
struct ChunkDay {
  std::size_t first = 0, count = 0, hod = 0;
  UtcSeconds local_start = 0;      // local standard midnight, as seconds of the local clock
  std::vector<PeriodKey> periods;  // per kind
};

struct PeriodAcc {
  int valid_days = 0;
  std::vector<int> stagnant, streak, longest, episodes;
  double vent_sum = 0.0;
  std::vector<double> vent_daily;
  double dil_sum = 0.0;
  int dil_days = 0, exceed_days = 0;
  void reset(std::size_t schemes) {
    valid_days = 0;
    stagnant.assign(schemes, 0);
    streak.assign(schemes, 0);
    longest.assign(schemes, 0);
    episodes.assign(schemes, 0);
    vent_sum = 0.0;
    vent_daily.clear();
    dil_sum = 0.0;
    dil_days = exceed_days = 0;
  }
};

// A cell's first bad hour: the model hour, the global cell index and the met read there (NaN
// where missing). Doubles, so that MPI ranks gather them like the maps; hour -1: none.
struct DropRecord {
  double hour = -1.0, cell = 0.0, h = 0.0, u = 0.0, v = 0.0;
  // The earliest hour, then the first cell in storage order: the same whatever the threads and
  // processes.
  bool earlier_than(const DropRecord& o) const {
    return hour < o.hour || (hour == o.hour && cell < o.cell);
  }
};

struct CellState {
  BoxState box;
  bool started = false;
  bool dropped = false;  // set on the day that holds the cell's first bad hour
  // Hours of the current chunk the cell steps through: all of them, or up to its first bad hour.
  std::size_t steps = 0;
  std::vector<PeriodAcc> acc;      // per kind
  std::vector<StreakCounter> run;  // per scheme: the streak across periods, for the episodes
};

// Maps of one completed period for the cells of this block: maps[var][cell].
struct PeriodMaps {
  GridPeriod kind = GridPeriod::year;
  PeriodKey period;
  std::vector<std::vector<double>> maps;
};

struct Layout {
  std::vector<GridVariableSpec> vars;
  std::size_t schemes = 0, percentiles = 0;
  bool exceedance = false;
};

Layout map_layout(const GridCase& gc) {
  Layout L;
  L.schemes = gc.diagnostics.schemes.size();
  L.percentiles = gc.grid.percentiles.size();
  L.exceedance = gc.grid.exceedance_level_s_m.has_value();
  L.vars.push_back({"valid_days", "days with all 24 hours of met", "day", "", "time: sum"});
  for (const auto& s : gc.diagnostics.schemes) {
    std::string id = s.id;
    std::replace(id.begin(), id.end(), '-', '_');
    // Every day the criterion holds; the episodes (episode_min_days in a row) have their own
    // map below.
    const std::string episodes =
        s.episode_min_days > 1
            ? ", in an episode of " + std::to_string(s.episode_min_days) + " days or more or not"
            : "";
    L.vars.push_back(
        {"stagnation_days_" + id,
         "days the stagnation criterion of " + s.id + " holds (" + s.title + ")" + episodes, "day",
         "", "time: sum"});
    L.vars.push_back({"longest_streak_" + id,
                      "longest run of stagnation days by " + s.id + " within the period", "day", "",
                      "time: maximum"});
    L.vars.push_back({"stagnation_episodes_" + id,
                      "episodes of " + s.id + " (" + std::to_string(s.episode_min_days) +
                          " or more stagnation days in a row), counted in the period of the day "
                          "they reach that length; a run goes on across periods",
                      "1", "", "time: sum"});
  }
  L.vars.push_back({"ventilation_mean",
                    "mean of the daily mean ventilation coefficient (mixing height x 10 m wind)",
                    "m2 s-1", "", "time: mean"});
  for (double q : gc.grid.percentiles) {
    L.vars.push_back({"ventilation_p" + format_number(q),
                      format_number(q) + "th percentile of the daily mean ventilation coefficient",
                      "m2 s-1", "", "time: percentile"});
  }
  const std::string stat = gc.grid.exceedance_statistic == GridExceedanceStatistic::daily_mean
                               ? "daily mean"
                               : "daily maximum hour";
  L.vars.push_back({"dilution_mean",
                    "mean " + stat + " concentration per unit emission flux (emission part)",
                    "s m-1", "", "time: mean"});
  if (L.exceedance) {
    L.vars.push_back({"exceedance_days",
                      "days the " + stat + " concentration per unit emission flux exceeds " +
                          format_number(*gc.grid.exceedance_level_s_m) + " s m-1",
                      "day", "", "time: sum"});
  }
  return L;
}

// The maps of one cell for a closed period.
void close_cell_period(const GridCase& gc, const Layout& L, PeriodAcc& a, bool dropped,
                       PeriodMaps& out, std::size_t cell) {
  std::size_t v = 0;
  auto put = [&](double x) { out.maps[v++][cell] = dropped ? kNaN : x; };
  put(a.valid_days);
  for (std::size_t s = 0; s < L.schemes; ++s) {
    put(a.stagnant[s]);
    put(a.longest[s]);
    put(a.episodes[s]);
  }
  const double n = static_cast<double>(a.vent_daily.size());
  put(n > 0 ? a.vent_sum / n : kNaN);
  for (double q : gc.grid.percentiles) put(percentile_linear(a.vent_daily, q));
  put(a.dil_days > 0 ? a.dil_sum / a.dil_days : kNaN);
  if (L.exceedance) put(a.exceed_days);
  a.reset(L.schemes);
}

struct SeriesLayout {
  std::vector<std::size_t> cells;  // global cell indices, sorted, unique
  std::vector<GridVariableSpec> vars = {
      {"mixing_height", "mixing height of the met as given", "m",
       "atmosphere_boundary_layer_thickness", ""},
      {"wind_speed", "10 m wind speed of the met as given", "m s-1", "wind_speed", ""},
      {"ventilation", "ventilation coefficient (mixing height x wind speed)", "m2 s-1", "", ""},
      {"concentration", "hour mean mixed-layer concentration (background and emission)", "g m-3",
       "", "time: mean (interval: 1 hour)"},
      {"concentration_per_unit_flux",
       "emission part of the hour mean concentration divided by the flux", "s m-1", "",
       "time: mean (interval: 1 hour)"}};
};

// Everything a worker needs for one chunk.
struct Chunk {
  std::size_t hour0 = 0, hours = 0;       // model hours [hour0, hour0 + hours)
  std::vector<std::vector<double>> slab;  // NetcdfGrid::read of this block's rows
  Forcing templ;                          // clock and emissions shared by every cell
  std::vector<ChunkDay> days;
};

class Runner {
 public:
  Runner(const GridCase& gc, const NetcdfGrid& grid, std::size_t row0, std::size_t rows)
      : gc_(gc),
        grid_(grid),
        row0_(row0),
        rows_(rows),
        cells_(rows * grid.columns_per_row()),
        engine_(gc.cell.footprint, {gc.cell.pollutants[0].processes}, 1, gc.cell.engine),
        layout_(map_layout(gc)) {
    const bool inst = gc.cell.met.reading == MetReading::instantaneous;
    hours_total_ = inst ? grid.records() - 1 : grid.records();
    const bool shift = !inst && gc.cell.met.hour_label == HourLabel::period_end;
    first_hour_utc_ = grid.first_stamp_utc() - (shift ? kSecondsPerHour : 0);
    state_.resize(cells_);
    cell_open_.assign(gc.grid.periods.size(), std::vector<long>(cells_, kNoPeriod));
    for (auto& s : state_) {
      s.acc.resize(gc.grid.periods.size());
      for (auto& a : s.acc) a.reset(layout_.schemes);
      s.run.clear();
      for (const auto& scheme : gc.diagnostics.schemes) s.run.emplace_back(scheme.episode_min_days);
    }
  }

  [[nodiscard]] std::size_t hours() const { return hours_total_; }
  [[nodiscard]] UtcSeconds first_hour_utc() const { return first_hour_utc_; }
  [[nodiscard]] const Layout& layout() const { return layout_; }
  [[nodiscard]] std::size_t cells() const { return cells_; }

  // Hour boundaries of chunks: whole local-standard days of `days` each; the first chunk ends at
  // a local midnight and holds at least a day.
  std::vector<std::size_t> chunk_bounds(std::size_t days) const {
    const UtcSeconds o = gc_.cell.zone.standard_offset_s();
    const UtcSeconds local0 = first_hour_utc_ + o;
    const auto into_day = static_cast<std::size_t>(
        (local0 - floor_div(local0, kSecondsPerDay) * kSecondsPerDay) / kSecondsPerHour);
    std::vector<std::size_t> b = {0};
    std::size_t h = (into_day == 0 ? 0 : 24 - into_day) + 24 * days;
    if (h < 24) h += 24 * days;
    while (h < hours_total_) {
      b.push_back(h);
      h += 24 * days;
    }
    b.push_back(hours_total_);
    return b;
  }

  void load(Chunk& ch, std::size_t hour0, std::size_t hour1) const {
    const bool inst = gc_.cell.met.reading == MetReading::instantaneous;
    ch.hour0 = hour0;
    ch.hours = hour1 - hour0;
    grid_.read(hour0, ch.hours + (inst ? 1 : 0), row0_, rows_, ch.slab);
  }

  // The forcing template (clock factors, emissions) and the days of a chunk; every rank and
  // thread sees the same.
  void prepare(Chunk& ch) const {
    const bool inst = gc_.cell.met.reading == MetReading::instantaneous;
    MetSeries m;
    m.source = grid_.source();
    m.first_stamp_utc =
        grid_.first_stamp_utc() + static_cast<UtcSeconds>(ch.hour0) * kSecondsPerHour;
    const std::size_t nodes = ch.hours + (inst ? 1 : 0);
    m.mixing_height_m.assign(nodes, 1000.0);
    m.wind_u_m_s.assign(nodes, 1.0);
    m.wind_v_m_s.assign(nodes, 0.0);
    m.filled.assign(nodes, 0);
    m.source_line.assign(nodes, 0);
    std::vector<HourRecord> hours;
    if (nodes < 2) {
      ch.templ = Forcing{};
    } else {
      ch.templ = build_forcing(gc_.cell, m, hours);
    }
    ch.days.clear();
    const UtcSeconds o = gc_.cell.zone.standard_offset_s();
    for (std::size_t i = 0; i < ch.hours;) {
      const UtcSeconds local =
          first_hour_utc_ + static_cast<UtcSeconds>(ch.hour0 + i) * kSecondsPerHour + o;
      const UtcSeconds day = floor_div(local, kSecondsPerDay);
      ChunkDay d;
      d.first = i;
      d.hod = static_cast<std::size_t>((local - day * kSecondsPerDay) / kSecondsPerHour);
      d.local_start = day * kSecondsPerDay;
      d.count = std::min<std::size_t>(24 - d.hod, ch.hours - i);
      for (GridPeriod k : gc_.grid.periods)
        d.periods.push_back(period_of(k, d.local_start, static_cast<int>(o)));
      ch.days.push_back(d);
      i += d.count;
    }
  }

  // Periods that close within the chunk (or, at the end of the series, all that are open), in
  // the order they close; allocated for this block's cells.
  std::vector<PeriodMaps> closing(const Chunk& ch, bool last) {
    std::vector<PeriodMaps> out;
    for (const auto& d : ch.days) {
      for (std::size_t k = 0; k < gc_.grid.periods.size(); ++k) {
        if (open_.size() <= k) open_.resize(gc_.grid.periods.size());
        if (open_[k] && open_[k]->key != d.periods[k].key) out.push_back(new_maps(k, *open_[k]));
        open_[k] = d.periods[k];
      }
    }
    if (last) {
      for (std::size_t k = 0; k < open_.size(); ++k) {
        if (open_[k]) out.push_back(new_maps(k, *open_[k]));
      }
    }
    return out;
  }

  // Steps cells [c0, c1) of the block through the chunk, kBatch cells at a time: held met
  // steps them together (BoxEngine::step_held_hours), interpolated met one by one. Everything
  // reads the chunk's slab as stored (hour-major) and goes day by day across the batch, so that
  // a day's rows of the batch stay in cache.
  void work(unsigned thread, const Chunk& ch, std::size_t c0, std::size_t c1,
            std::vector<PeriodMaps>& closing_maps, const std::vector<std::size_t>& series_local,
            std::vector<std::vector<double>>& series_out) {
    Worker& w = *workers_.at(thread);
    for (std::size_t b0 = c0; b0 < c1; b0 += kBatch) {
      const std::size_t b1 = std::min(c1, b0 + kBatch);
      w.b0 = b0;
      w.nb = b1 - b0;
      w.total.assign(w.nb * ch.hours, kNaN);
      w.dil.assign(w.nb * ch.hours, kNaN);
      w.active.clear();
      if (gc_.cell.met.reading == MetReading::hour_average) {
        check_held(ch, w);
        w.cut = kNever;
        for (std::size_t c = b0; c < b1; ++c) {
          if (!start_cell(ch, c, w)) continue;
          w.active.push_back(c);
          if (state_[c].steps < ch.hours) w.cut = std::min(w.cut, state_[c].steps);
        }
        step_held(ch, w);
      } else {
        // Interpolated met: each cell's own forcing (Worker::F, filled by start_cell) is used
        // before the next cell's replaces it.
        for (std::size_t c = b0; c < b1; ++c) {
          if (start_cell(ch, c, w)) step_interpolated(c, w);
        }
      }
      for (std::size_t c = b0; c < b1; ++c) write_series(ch, c, w, series_local, series_out);
      for (const auto& d : ch.days) {
        for (std::size_t c = b0; c < b1; ++c) day(ch, d, c, state_[c], w, closing_maps);
      }
    }
  }

  // One Worker (scratch memory, reused from chunk to chunk) per thread of the run.
  void make_workers(unsigned threads) {
    workers_.clear();
    for (unsigned t = 0; t < threads; ++t) workers_.push_back(std::make_unique<Worker>(engine_));
  }

  std::size_t dropped() const {
    std::size_t n = 0;
    for (const auto& s : state_) n += s.dropped ? 1 : 0;
    return n;
  }
  DropRecord first_drop() const { return first_drop_; }
  std::size_t row0() const { return row0_; }

 private:
  static constexpr std::size_t kNever = std::numeric_limits<std::size_t>::max();
  static constexpr std::size_t kBatch = 512;  // cells stepped together (their state stays in cache)

  struct Worker {
    explicit Worker(const BoxEngine& e) : hr(e.make_result()) {}
    Forcing F;
    HourResult hr;
    BoxEngine::BatchWork batch;
    std::vector<std::size_t> active;  // cells of the batch still stepped
    std::vector<BoxState*> boxes;
    std::vector<double> h, u, v, cb, means;  // per active cell, one hour
    std::size_t b0 = 0, nb = 0;              // the batch: its first cell, its cells
    std::size_t cut = 0;                     // the next hour at which an active cell stops stepping
    // [hour * nb + cell - b0]: hour mean concentration and per unit flux
    std::vector<double> dil, total;
    std::vector<double> dil24;    // per hour of a day
    std::vector<double> bad_met;  // per cell of the batch: 1 when a held hour's met is bad
    std::array<std::vector<double>, kDiagnosticFields> day;
    std::vector<int> verdict, reached;  // per scheme, one day
  };

  PeriodMaps new_maps(std::size_t k, const PeriodKey& p) const {
    PeriodMaps m;
    m.kind = gc_.grid.periods[k];
    m.period = p;
    m.maps.assign(layout_.vars.size(), std::vector<double>(cells_, kNaN));
    return m;
  }

  double met(const Chunk& ch, std::size_t col, std::size_t node, std::size_t cell) const {
    return ch.slab[col][node * cells_ + cell];
  }
  static std::size_t at(const Worker& w, std::size_t hour, std::size_t cell) {
    return hour * w.nb + (cell - w.b0);
  }

  // The per-cell forcing, as build_forcing would give it for this cell's met, up to its first
  // bad node (named in the summary); returns the number of good nodes before it.
  std::size_t fill_forcing(const Chunk& ch, std::size_t cell, Worker& w) const {
    const bool inst = gc_.cell.met.reading == MetReading::instantaneous;
    const std::size_t nodes = ch.hours + (inst ? 1 : 0);
    w.F = ch.templ;
    const std::size_t good = first_bad_node(ch, cell, nodes);
    for (std::size_t i = 0; i < good; ++i) {
      w.F.mixing_height_m[i] = met(ch, 0, i, cell);
      w.F.wind_u_m_s[i] = met(ch, 1, i, cell);
      w.F.wind_v_m_s[i] = met(ch, 2, i, cell);
    }
    const PollutantSpec& ps = gc_.cell.pollutants[0];
    if (ps.background.kind == BackgroundSpec::Kind::by_wind_from) {
      const std::size_t hours = inst ? (good > 0 ? good - 1 : 0) : good;
      for (std::size_t i = 0; i < std::min(hours, ch.hours); ++i) {
        const double u =
            inst ? 0.5 * (w.F.wind_u_m_s[i] + w.F.wind_u_m_s[i + 1]) : w.F.wind_u_m_s[i];
        const double v =
            inst ? 0.5 * (w.F.wind_v_m_s[i] + w.F.wind_v_m_s[i + 1]) : w.F.wind_v_m_s[i];
        w.F.background(0, i) = ps.background.for_direction(wind_from_deg(u, v));
      }
    }
    return good;
  }

  void note_drop(const Chunk& ch, std::size_t cell, std::size_t node, double h, double u,
                 double v) const {
    std::lock_guard<std::mutex> lock(drop_mutex_);
    const DropRecord r{static_cast<double>(ch.hour0 + node),
                       static_cast<double>(row0_ * grid_.columns_per_row() + cell), h, u, v};
    if (first_drop_.hour < 0.0 || r.earlier_than(first_drop_)) first_drop_ = r;
  }

  // Whether the cell steps through this chunk, and through how many of its hours (CellState::
  // steps): its met is checked, and a bad hour stops it there; from the day that holds that hour
  // on, the cell is dropped (day()), whatever the chunk length. A cell's first chunk starts its
  // box (spin-up on the first day, as a point run would); a bad hour in that day drops the cell
  // from the start.
  bool start_cell(const Chunk& ch, std::size_t cell, Worker& w) {
    CellState& s = state_[cell];
    s.steps = 0;
    if (s.dropped || ch.hours == 0) return false;
    const bool inst = gc_.cell.met.reading == MetReading::instantaneous;
    if (!s.started || inst) {
      const std::size_t good = fill_forcing(ch, cell, w);  // nodes before the first bad one
      // Hour i needs node i (held) or nodes i and i + 1 (instantaneous).
      s.steps = inst ? (good > 0 ? std::min(ch.hours, good - 1) : 0) : std::min(ch.hours, good);
      if (!s.started) {
        if (s.steps < std::min<std::size_t>(24, ch.hours)) {
          s.steps = 0;
          s.dropped = true;
          return false;
        }
        MetSeries m;
        m.source = grid_.source();
        RunResult spin;
        s.box = start_state(gc_.cell, m, w.F, engine_, spin);
        s.started = true;
      }
      return s.steps > 0;
    }
    s.steps = w.bad_met[cell - w.b0] == 0.0 ? ch.hours : first_bad_node(ch, cell, ch.hours);
    return s.steps > 0;
  }

  // The first of the cell's met records [0, nodes) of the chunk with no positive finite mixing
  // height or a wind component not finite (noted for the summary), or `nodes` when none is.
  std::size_t first_bad_node(const Chunk& ch, std::size_t cell, std::size_t nodes) const {
    for (std::size_t i = 0; i < nodes; ++i) {
      const double h = met(ch, 0, i, cell), u = met(ch, 1, i, cell), v = met(ch, 2, i, cell);
      if (!(h > 0.0) || !std::isfinite(h) || !std::isfinite(u) || !std::isfinite(v)) {
        note_drop(ch, cell, i, h, u, v);
        return i;
      }
    }
    return nodes;
  }

  // Flags the batch's cells whose held met has a bad hour in this chunk (no positive finite
  // mixing height, or a wind component not finite), in one pass over the slab as stored;
  // start_cell names the first bad hour of a flagged cell.
  void check_held(const Chunk& ch, Worker& w) const {
    constexpr double kMax = std::numeric_limits<double>::max();
    w.bad_met.assign(w.nb, 0.0);
    double* bad = w.bad_met.data();
    for (std::size_t i = 0; i < ch.hours; ++i) {
      const double* h = &ch.slab[0][i * cells_ + w.b0];
      const double* u = &ch.slab[1][i * cells_ + w.b0];
      const double* v = &ch.slab[2][i * cells_ + w.b0];
      for (std::size_t b = 0; b < w.nb; ++b) {  // NaN fails every comparison: bad
        // Selects one test at a time: the form GCC vectorises.
        bad[b] = h[b] > 0.0 ? bad[b] : 1.0;
        bad[b] = h[b] <= kMax ? bad[b] : 1.0;
        bad[b] = std::fabs(u[b]) <= kMax ? bad[b] : 1.0;
        bad[b] = std::fabs(v[b]) <= kMax ? bad[b] : 1.0;
      }
    }
  }

  // The active cells of the batch through the chunk's held hours together, each through its
  // CellState::steps hours (a cell leaves the batch at its first bad hour).
  void step_held(const Chunk& ch, Worker& w) {
    std::size_t n = w.active.size();
    const std::size_t J = engine_.parts();
    const PollutantSpec& ps = gc_.cell.pollutants[0];
    const bool by_wind = ps.background.kind == BackgroundSpec::Kind::by_wind_from;
    w.boxes.resize(n);
    w.h.resize(n);
    w.u.resize(n);
    w.v.resize(n);
    w.cb.resize(n);
    w.means.resize(n * J);
    for (std::size_t a = 0; a < n; ++a) w.boxes[a] = &state_[w.active[a]].box;
    for (std::size_t i = 0; i < ch.hours && n > 0; ++i) {
      if (w.cut == i) n = leave_batch(i, w);
      for (std::size_t a = 0; a < n; ++a) {
        const std::size_t c = w.active[a];
        w.h[a] = ch.slab[0][i * cells_ + c];
        w.u[a] = ch.slab[1][i * cells_ + c];
        w.v[a] = ch.slab[2][i * cells_ + c];
        if (by_wind) w.cb[a] = ps.background.for_direction(wind_from_deg(w.u[a], w.v[a]));
      }
      if (n == 0) break;
      engine_.step_held_hours(w.boxes.data(), n,
                              {w.h.data(), w.u.data(), w.v.data(), by_wind ? w.cb.data() : nullptr},
                              ch.templ, i, w.batch, w.means.data());
      for (std::size_t a = 0; a < n; ++a) {
        const double* m = &w.means[a * J];
        double t = 0.0;
        for (std::size_t j = 0; j < J; ++j) t += m[j];  // HourResult::mean_total's order
        const std::size_t k = at(w, i, w.active[a]);
        w.total[k] = t;
        w.dil[k] = m[2] / gc_.grid.flux_g_m2_s;
      }
    }
  }

  // Drops the cells whose steps end at hour i from the batch's active list (order kept); sets
  // the next hour at which one ends; returns the cells left.
  std::size_t leave_batch(std::size_t i, Worker& w) const {
    std::size_t kept = 0;
    w.cut = kNever;
    for (std::size_t a = 0; a < w.active.size(); ++a) {
      const std::size_t steps = state_[w.active[a]].steps;
      if (steps <= i) continue;
      w.cut = std::min(w.cut, steps);
      w.active[kept] = w.active[a];
      w.boxes[kept] = w.boxes[a];
      ++kept;
    }
    w.active.resize(kept);
    return kept;
  }

  // One cell through the chunk's interpolated hours (w.F filled by start_cell).
  void step_interpolated(std::size_t cell, Worker& w) {
    CellState& s = state_[cell];
    for (std::size_t i = 0; i < s.steps; ++i) {
      engine_.step_hour(s.box, w.F, i, w.hr);
      const std::size_t k = at(w, i, cell);
      w.total[k] = w.hr.mean_total(0);
      w.dil[k] = w.hr.mean(0, 2) / gc_.grid.flux_g_m2_s;
    }
  }

  void write_series(const Chunk& ch, std::size_t cell, const Worker& w,
                    const std::vector<std::size_t>& series_local,
                    std::vector<std::vector<double>>& out) const {
    const auto it = std::lower_bound(series_local.begin(), series_local.end(), cell);
    if (it == series_local.end() || *it != cell) return;
    const std::size_t k = static_cast<std::size_t>(it - series_local.begin());
    for (std::size_t i = 0; i < ch.hours; ++i) {
      const double h = met(ch, 0, i, cell), u = met(ch, 1, i, cell), v = met(ch, 2, i, cell);
      const double speed = wind_speed_m_s(u, v);
      const std::size_t m = at(w, i, cell);
      const double vals[5] = {h, speed, h * speed, w.total[m], w.dil[m]};
      for (std::size_t var = 0; var < 5; ++var) out[var][k * ch.hours + i] = vals[var];
    }
  }

  void day(const Chunk& ch, const ChunkDay& d, std::size_t cell, CellState& s, Worker& w,
           std::vector<PeriodMaps>& closing_maps) {
    for (std::size_t k = 0; k < s.acc.size(); ++k)
      close_if_needed(k, d.periods[k].key, s, cell, closing_maps);
    if (d.first + d.count > s.steps) s.dropped = true;  // the day of the cell's first bad hour
    // The day's hours of the met as given and of the concentration per unit flux.
    for (std::size_t f = 0; f < kDiagnosticFields; ++f) w.day[f].assign(24, kNaN);
    w.dil24.assign(24, kNaN);
    const auto& cols = grid_.column_names();
    for (std::size_t j = 0; j < d.count; ++j) {
      const std::size_t i = d.first + j, h = d.hod + j;
      w.day[static_cast<std::size_t>(DiagnosticField::mixing_height)][h] = met(ch, 0, i, cell);
      w.day[static_cast<std::size_t>(DiagnosticField::wind_10m)][h] =
          wind_speed_m_s(met(ch, 1, i, cell), met(ch, 2, i, cell));
      for (std::size_t c = 3; c < cols.size(); ++c)
        w.day[field_index(cols[c])][h] = met(ch, c, i, cell);
      w.dil24[h] = w.dil[at(w, i, cell)];
    }
    DayHours hours;
    for (std::size_t f = 0; f < kDiagnosticFields; ++f) hours.field[f] = w.day[f].data();
    const VentilationDay vent = ventilation_day(hours.of(DiagnosticField::mixing_height),
                                                hours.of(DiagnosticField::wind_10m));
    const bool complete = d.count == 24 && !s.dropped && std::isfinite(vent.mean_m2_s);
    w.verdict.assign(layout_.schemes, -1);
    if (complete) {
      for (std::size_t sc = 0; sc < layout_.schemes; ++sc)
        w.verdict[sc] = judge_day(gc_.diagnostics.schemes[sc], hours);
    }
    const double dil = daily_statistic(
        w.dil24.data(), gc_.grid.exceedance_statistic == GridExceedanceStatistic::daily_mean
                            ? DailyStatistic::mean
                            : DailyStatistic::max);
    // An episode counts in the period of the day its streak reaches the scheme's minimum length,
    // as a point run's StreakCounter counts it; the streak goes on across period ends.
    w.reached.assign(layout_.schemes, 0);
    for (std::size_t sc = 0; sc < layout_.schemes; ++sc) {
      const int before = s.run[sc].episodes();
      s.run[sc].add(w.verdict[sc]);
      w.reached[sc] = s.run[sc].episodes() - before;
    }
    for (auto& a : s.acc) {
      for (std::size_t sc = 0; sc < layout_.schemes; ++sc) {
        a.episodes[sc] += w.reached[sc];
        if (w.verdict[sc] == 1) {
          ++a.stagnant[sc];
          ++a.streak[sc];
          a.longest[sc] = std::max(a.longest[sc], a.streak[sc]);
        } else {
          a.streak[sc] = 0;
        }
      }
      if (!complete) continue;
      ++a.valid_days;
      a.vent_sum += vent.mean_m2_s;
      a.vent_daily.push_back(vent.mean_m2_s);
      if (std::isfinite(dil)) {
        a.dil_sum += dil;
        ++a.dil_days;
        if (layout_.exceedance && dil > *gc_.grid.exceedance_level_s_m) ++a.exceed_days;
      }
    }
  }

  // Closes the cell's period of kind k into its maps when `now` is another period.
  void close_if_needed(std::size_t k, long now, CellState& s, std::size_t cell,
                       std::vector<PeriodMaps>& closing_maps) {
    long& open = cell_open_[k][cell];
    if (open != kNoPeriod && open != now) {
      bool found = false;
      for (auto& pm : closing_maps) {
        if (pm.kind == gc_.grid.periods[k] && pm.period.key == open) {
          close_cell_period(gc_, layout_, s.acc[k], s.dropped, pm, cell);
          found = true;
          break;
        }
      }
      if (!found) throw InternalError("grid run: a period closed that the chunk did not announce");
    }
    open = now;
  }

 public:
  // At the end of the series: the open periods of cells [c0, c1) close into `closing_maps`.
  void finish_cells(std::size_t c0, std::size_t c1, std::vector<PeriodMaps>& closing_maps) {
    for (std::size_t cell = c0; cell < c1; ++cell) {
      for (std::size_t k = 0; k < gc_.grid.periods.size(); ++k) {
        close_if_needed(k, kEndOfSeries, state_[cell], cell, closing_maps);
      }
    }
  }

 private:
  static constexpr long kNoPeriod = std::numeric_limits<long>::min();
  static constexpr long kEndOfSeries = std::numeric_limits<long>::max();

  static std::size_t field_index(const std::string& name) {
    const auto& names = diagnostic_field_names();
    for (std::size_t f = 0; f < names.size(); ++f) {
      if (name == names[f]) return f;
    }
    throw InternalError("grid run: unknown field column " + name);
  }

  const GridCase& gc_;
  const NetcdfGrid& grid_;
  std::size_t row0_, rows_, cells_;
  BoxEngine engine_;
  Layout layout_;
  std::size_t hours_total_ = 0;
  UtcSeconds first_hour_utc_ = 0;
  std::vector<CellState> state_;
  std::vector<std::optional<PeriodKey>> open_;
  std::vector<std::vector<long>> cell_open_;
  mutable std::mutex drop_mutex_;
  mutable DropRecord first_drop_;
  std::vector<std::unique_ptr<Worker>> workers_;
};

// Great-circle nearest cell (as the point reader picks it: netcdf_met.hpp).
std::size_t nearest_cell(const NetcdfGrid& g, double lat_deg, double lon_deg) {
  constexpr double kRad = 3.14159265358979323846 / 180.0;
  std::size_t best = 0;
  double best_d = std::numeric_limits<double>::infinity();
  for (std::size_t r = 0; r < g.rows(); ++r) {
    for (std::size_t c = 0; c < g.columns_per_row(); ++c) {
      const double p1 = lat_deg * kRad, p2 = g.latitude_deg()[r] * kRad;
      const double dl = (g.longitude_deg()[c] - lon_deg) * kRad;
      const double h = std::sin((p2 - p1) / 2) * std::sin((p2 - p1) / 2) +
                       std::cos(p1) * std::cos(p2) * std::sin(dl / 2) * std::sin(dl / 2);
      if (h < best_d) {
        best_d = h;
        best = r * g.columns_per_row() + c;
      }
    }
  }
  return best;
}

std::vector<double> gathered(const GridBlocks& b, const std::vector<double>& local) {
  if (!b.gather) return local;
  std::vector<double> all;
  b.gather(local, all);
  return all;
}

GridFileInfo file_info(const GridCase& gc, const NetcdfGrid& grid, const std::string& what) {
  GridFileInfo info;
  info.title = gc.base.title + ": " + what;
  info.source = "lidbox " LIDBOX_VERSION " grid run of " + gc.base.file + " on " + grid.source();
  info.comment =
      std::string(gc.base.invented ? "INVENTED scenario. " : "") +
      "Every cell is its own well-mixed box; " +
      (gc.grid.unit_flux ? "unit emission flux 1 g m-2 s-1 (dilution potential)"
                         : "emission flux " + format_number(gc.grid.flux_g_m2_s) + " g m-2 s-1") +
      " of " + gc.cell.pollutants[0].name + "; days in local standard time of " +
      gc.base.zone.spec() + ".";
  if (gc.diagnostics.table) info.attributes["ventilation_table"] = gc.diagnostics.table->id;
  std::vector<std::string> schemes;
  for (const auto& s : gc.diagnostics.schemes) schemes.push_back(s.id + " (" + s.source + ")");
  if (!schemes.empty()) info.attributes["stagnation_schemes"] = join(schemes, "; ");
  return info;
}

// The hourly-series cells: the nearest cell of each chosen point, once each, in order.
SeriesLayout series_layout(const GridCase& gc, const NetcdfGrid& grid) {
  SeriesLayout series;
  for (const auto& [lat, lon] : gc.grid.series)
    series.cells.push_back(nearest_cell(grid, lat, lon));
  std::sort(series.cells.begin(), series.cells.end());
  series.cells.erase(std::unique(series.cells.begin(), series.cells.end()), series.cells.end());
  return series;
}

// The files the root process writes: maps per period, and the series of chosen cells.
struct GridOutputs {
  std::vector<std::unique_ptr<GridMapFile>> maps;  // one per gc.grid.periods, in order
  std::unique_ptr<GridSeriesFile> series_file;
};

GridOutputs open_grid_outputs(const GridCase& gc, const NetcdfGrid& grid, const Runner& runner,
                              const SeriesLayout& series, const std::string& output_dir) {
  GridOutputs out;
  for (GridPeriod k : gc.grid.periods) {
    out.maps.push_back(std::make_unique<GridMapFile>(
        output_dir, std::string("maps_") + to_string(k) + ".nc",
        file_info(gc, grid, std::string("maps per ") + to_string(k)), grid.latitude_name(),
        grid.latitude_deg(), grid.longitude_name(), grid.longitude_deg(), runner.layout().vars));
  }
  if (!series.cells.empty()) {
    const std::size_t ncol = grid.columns_per_row();
    std::vector<double> la, lo;
    for (std::size_t c : series.cells) {
      la.push_back(grid.latitude_deg()[c / ncol]);
      lo.push_back(grid.longitude_deg()[c % ncol]);
    }
    out.series_file = std::make_unique<GridSeriesFile>(
        output_dir, "series.nc", file_info(gc, grid, "hourly series of chosen cells"), la, lo,
        series.vars);
  }
  return out;
}

// Starts this process's cells through one chunk on the team: the threads take blocks of cells
// in turn from `next_block` (set to 0; it must outlive the job), so that a thread slowed by the
// reading of the next chunk takes fewer. Every cell's results are its own, so the files do not
// depend on which thread took it. ThreadTeam::wait() ends it.
void start_chunk(ThreadTeam& team, Runner& runner, const Chunk& cur, bool last,
                 std::vector<PeriodMaps>& closing, const std::vector<std::size_t>& series_local,
                 std::vector<std::vector<double>>& series_out,
                 std::atomic<std::size_t>& next_block) {
  constexpr std::size_t kBlock = 256;  // cells
  team.start([&runner, &cur, last, &closing, &series_local, &series_out, &next_block](unsigned t) {
    for (;;) {
      const std::size_t c0 = next_block.fetch_add(1) * kBlock;
      if (c0 >= runner.cells()) return;
      const std::size_t c1 = std::min(runner.cells(), c0 + kBlock);
      runner.work(t, cur, c0, c1, closing, series_local, series_out);
      if (last) runner.finish_cells(c0, c1, closing);
    }
  });
}

// The chunk's closed periods and series, gathered from every process; the root writes them.
void write_chunk(const GridCase& gc, const GridBlocks& blocks, const Runner& runner,
                 const Chunk& cur, const std::vector<PeriodMaps>& closing,
                 const SeriesLayout& series, const std::vector<std::vector<double>>& series_out,
                 GridOutputs& out) {
  const bool root = blocks.rank == 0;
  for (const auto& pm : closing) {
    std::vector<std::vector<double>> full;
    for (const auto& m : pm.maps) full.push_back(gathered(blocks, m));
    if (root) {
      const auto k = static_cast<std::size_t>(
          std::find(gc.grid.periods.begin(), gc.grid.periods.end(), pm.kind) -
          gc.grid.periods.begin());
      out.maps[k]->append(pm.period.start_utc, pm.period.end_utc, full);
    }
  }
  if (series.cells.empty()) return;
  std::vector<std::vector<double>> by_time(series.vars.size());
  for (std::size_t v = 0; v < series.vars.size(); ++v) {
    const auto all = gathered(blocks, series_out[v]);  // [cell][hour], cells in order
    if (!root) continue;
    by_time[v].resize(all.size());
    for (std::size_t k = 0; k < series.cells.size(); ++k) {
      for (std::size_t i = 0; i < cur.hours; ++i)
        by_time[v][i * series.cells.size() + k] = all[k * cur.hours + i];
    }
  }
  if (root) {
    out.series_file->append(
        runner.first_hour_utc() + static_cast<UtcSeconds>(cur.hour0) * kSecondsPerHour, cur.hours,
        by_time);
  }
}

// "cell (<lat> deg N, <lon> deg E) at <UTC>: mixing height <h> m, wind (<u>, <v>) m/s".
std::string drop_text(const NetcdfGrid& grid, UtcSeconds first_hour_utc, const DropRecord& r) {
  const auto cell = static_cast<std::size_t>(r.cell);
  const std::size_t row = cell / grid.columns_per_row(), col = cell % grid.columns_per_row();
  auto shown = [](double x, const char* unit) {
    return std::isnan(x) ? std::string("missing") : format_number(x) + unit;
  };
  return "cell (" + format_number(grid.latitude_deg()[row]) + " deg N, " +
         format_number(grid.longitude_deg()[col]) + " deg E) at " +
         format_utc(first_hour_utc + static_cast<UtcSeconds>(r.hour) * kSecondsPerHour) +
         ": mixing height " + shown(r.h, " m") + ", wind (" + shown(r.u, "") + ", " +
         shown(r.v, "") + ") m/s";
}

// The first dropped cell of every process (the root's answer; "" when none was dropped).
std::string first_drop_text(const NetcdfGrid& grid, const GridBlocks& blocks,
                            const Runner& runner) {
  const DropRecord mine = runner.first_drop();
  const auto drops = gathered(blocks, {mine.hour, mine.cell, mine.h, mine.u, mine.v});
  DropRecord first;
  for (std::size_t k = 0; k + 4 < drops.size(); k += 5) {
    const DropRecord d{drops[k], drops[k + 1], drops[k + 2], drops[k + 3], drops[k + 4]};
    if (d.hour >= 0.0 && (first.hour < 0.0 || d.earlier_than(first))) first = d;
  }
  return first.hour >= 0.0 ? drop_text(grid, runner.first_hour_utc(), first) : "";
}

// summary.txt of a grid run.
std::string grid_summary_text(const GridCase& gc, const NetcdfGrid& grid, const GridRunSummary& S,
                              UtcSeconds first_hour_utc) {
  std::string t =
      "lidbox grid: " + gc.base.file + " (" + gc.base.title + ")\n" + kScreeningCaution + "\n\n";
  t += "met: " + grid.source() + ", " + std::to_string(S.rows) + " x " + std::to_string(S.columns) +
       " cells (" + join(grid.column_variables()) + "), " + std::to_string(S.hours) +
       " hours from " + format_utc(first_hour_utc) + "\n";
  t += "each cell: " + gc.cell.pollutants[0].name + ", " +
       (gc.grid.unit_flux ? std::string("unit flux 1 g m-2 s-1")
                          : format_number(gc.grid.flux_g_m2_s) + " g m-2 s-1") +
       ", box " + format_number(gc.base.footprint.x_side_m / 1000) + " x " +
       format_number(gc.base.footprint.y_side_m / 1000) + " km; days in local standard time of " +
       gc.base.zone.spec() + "\n";
  t += "ran on " + std::to_string(S.threads) + " thread(s) x " + std::to_string(S.processes) +
       " process(es), chunks of " + std::to_string(S.chunk_days) + " day(s)\n";
  if (S.dropped_cells > 0) {
    t += "dropped cells (missing or non-positive met; their maps are fill values): " +
         std::to_string(S.dropped_cells) +
         (S.first_dropped.empty() ? "" : ", first " + S.first_dropped) + "\n";
  }
  if (!S.chunk_note.empty()) t += "note: " + S.chunk_note + "\n";
  t += "written:";
  for (const auto& f : S.files) t += " " + f;
  t += "\n";
  return t;
}

// Threads for this process: the option, else the case, else the cores; never more than cells.
unsigned threads_of(const GridCase& gc, const GridRunOptions& options, std::size_t cells) {
  unsigned T = options.threads ? options.threads : gc.grid.threads;
  if (T == 0) T = std::max(1u, std::thread::hardware_concurrency());
  return static_cast<unsigned>(std::min<std::size_t>(T, std::max<std::size_t>(1, cells)));
}

}  // namespace

GridRunSummary run_grid(const GridCase& gc, const std::string& output_dir,
                        const GridRunOptions& options) {
  const NetcdfGrid grid(gc.base.met.path, gc.met);
  const GridBlocks& blocks = options.blocks;
  const bool root = blocks.rank == 0;
  const std::size_t R = grid.rows();
  const auto r = static_cast<std::size_t>(blocks.rank), P = static_cast<std::size_t>(blocks.size);
  const std::size_t row0 = r * R / P, row1 = (r + 1) * R / P;
  Runner runner(gc, grid, row0, row1 - row0);
  if (runner.hours() < 24) {
    throw InputError(grid.source(), std::to_string(runner.hours()) + " hours",
                     "at least 24 hours for a grid run");
  }
  GridRunSummary S;
  S.cells = grid.cells();
  S.rows = R;
  S.columns = grid.columns_per_row();
  S.hours = runner.hours();
  S.processes = blocks.size;
  S.chunk_note = grid.chunk_note();
  S.threads = threads_of(gc, options, runner.cells());
  // Every process takes the same chunks (the collectives follow them); results do not depend on
  // the chunk length.
  const std::size_t bytes_per_hour =
      2 * grid.cells() / P * grid.column_names().size() * sizeof(double) + 1;
  S.chunk_days = gc.grid.chunk_days > 0
                     ? static_cast<std::size_t>(gc.grid.chunk_days)
                     : std::max<std::size_t>(1, kBudgetBytes / bytes_per_hour / 24);
  const auto bounds = runner.chunk_bounds(S.chunk_days);
  const SeriesLayout series = series_layout(gc, grid);
  const std::size_t ncol = grid.columns_per_row();
  std::vector<std::size_t> series_local;
  for (std::size_t c : series.cells) {
    if (c >= row0 * ncol && c < row1 * ncol) series_local.push_back(c - row0 * ncol);
  }
  GridOutputs out;
  if (root) out = open_grid_outputs(gc, grid, runner, series, output_dir);

  Chunk cur, next;
  runner.load(cur, bounds[0], bounds[1]);
  runner.prepare(cur);
  runner.make_workers(S.threads);
  ThreadTeam team(S.threads);  // after the chunks: it stops before they go
  for (std::size_t j = 0; j + 1 < bounds.size(); ++j) {
    const bool last = j + 2 == bounds.size();
    std::vector<PeriodMaps> closing = runner.closing(cur, last);
    std::vector<std::vector<double>> series_out(
        series.vars.size(), std::vector<double>(series_local.size() * cur.hours, kNaN));
    // With two threads or more, this thread reads the next chunk while the team steps this one
    // (NetCDF-C is called from this thread only); one thread steps, then reads.
    std::atomic<std::size_t> next_block{0};
    start_chunk(team, runner, cur, last, closing, series_local, series_out, next_block);
    if (team.size() == 1) team.wait();
    if (!last) {
      try {
        runner.load(next, bounds[j + 1], bounds[j + 2]);
      } catch (...) {
        team.finish_quietly();  // the team is done with this chunk before it goes
        throw;
      }
    }
    team.wait();
    write_chunk(gc, blocks, runner, cur, closing, series, series_out, out);
    if (options.progress)
      options.progress(static_cast<double>(bounds[j + 1]) / static_cast<double>(runner.hours()));
    if (!last) {
      std::swap(cur, next);
      runner.prepare(cur);
    }
  }
  const auto dropped = gathered(blocks, {static_cast<double>(runner.dropped())});
  for (double d : dropped) S.dropped_cells += static_cast<std::size_t>(d);
  S.first_dropped = first_drop_text(grid, blocks, runner);
  if (!root) return S;
  for (auto& m : out.maps) S.files.push_back(m->close());
  if (out.series_file) S.files.push_back(out.series_file->close());
  S.text = grid_summary_text(gc, grid, S, runner.first_hour_utc());
  write_output_files(output_dir, {{"summary.txt", S.text}});
  S.files.push_back((std::filesystem::path(output_dir) / "summary.txt").string());
  return S;
}

}  // namespace lidbox
