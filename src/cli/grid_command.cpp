#include "grid_command.hpp"

#include <unistd.h>

#include <chrono>
#include <cstdio>
#include <iostream>
#include <memory>

#include "lidbox/base/error.hpp"
#include "lidbox/grid/grid_run.hpp"

#ifdef LIDBOX_MPI
// The C API only: CMake defines OMPI_SKIP_MPICXX, since Open MPI's deprecated C++ bindings do not
// compile clean under -Wextra.
#include <mpi.h>
#endif

namespace lidbox::cli {

namespace {

struct GridArgs {
  std::string case_file;
  std::string output_dir;
  unsigned threads = 0;
  bool quiet = false;
};

// Progress with the time left on stderr: a line that redraws itself on a terminal, a line per
// tenth of the run otherwise (logs of batch jobs).
class GridProgress {
 public:
  explicit GridProgress(bool quiet) : quiet_(quiet), tty_(::isatty(STDERR_FILENO) != 0) {}
  void update(double f) {
    if (quiet_) return;
    const double s =
        std::chrono::duration<double>(std::chrono::steady_clock::now() - start_).count();
    const int tenth = static_cast<int>(f * 10.0);
    if (!tty_ && tenth == last_tenth_) return;
    last_tenth_ = tenth;
    const double left = f > 0.0 ? s * (1.0 - f) / f : 0.0;
    std::fprintf(stderr, "%sgrid %5.1f%%  %.0f s elapsed, about %.0f s left%s", tty_ ? "\r" : "",
                 f * 100.0, s, left, tty_ ? "   " : "\n");
    std::fflush(stderr);
    shown_ = true;
  }
  void finish() {
    if (shown_ && tty_) std::fprintf(stderr, "\n");
  }

 private:
  bool quiet_, tty_;
  int last_tenth_ = -1;
  bool shown_ = false;
  std::chrono::steady_clock::time_point start_ = std::chrono::steady_clock::now();
};

#ifdef LIDBOX_MPI
GridBlocks mpi_blocks() {
  GridBlocks b;
  MPI_Comm_rank(MPI_COMM_WORLD, &b.rank);
  MPI_Comm_size(MPI_COMM_WORLD, &b.size);
  const int size = b.size, rank = b.rank;
  b.gather = [size, rank](const std::vector<double>& local, std::vector<double>& all) {
    const int n = static_cast<int>(local.size());
    std::vector<int> counts(static_cast<std::size_t>(size)), displs(static_cast<std::size_t>(size));
    MPI_Gather(&n, 1, MPI_INT, counts.data(), 1, MPI_INT, 0, MPI_COMM_WORLD);
    int total = 0;
    if (rank == 0) {
      for (int r = 0; r < size; ++r) {
        displs[static_cast<std::size_t>(r)] = total;
        total += counts[static_cast<std::size_t>(r)];
      }
      all.assign(static_cast<std::size_t>(total), 0.0);
    }
    MPI_Gatherv(local.data(), n, MPI_DOUBLE, all.data(), counts.data(), displs.data(), MPI_DOUBLE,
                0, MPI_COMM_WORLD);
  };
  return b;
}
#endif

void run(const GridArgs& a) {
  const GridCase gc = load_grid_case(a.case_file);
  GridRunOptions o;
  o.threads = a.threads;
#ifdef LIDBOX_MPI
  o.blocks = mpi_blocks();
#endif
  const bool root = o.blocks.rank == 0;
  GridProgress progress(a.quiet || !root);
  o.progress = [&progress](double f) { progress.update(f); };
  const GridRunSummary s =
      run_grid(gc, a.output_dir.empty() ? gc.base.output_directory : a.output_dir, o);
  progress.finish();
  if (root && !a.quiet) std::cout << s.text;
}

}  // namespace

void add_grid_command(CLI::App& app, int& exit_code) {
  auto a = std::make_shared<GridArgs>();
  CLI::App* sub =
      app.add_subcommand("grid", "Run every cell of a CF grid as its own box: maps per period");
  sub->add_option("case", a->case_file, "Case file with a [grid] table (TOML)")->required();
  sub->add_option("-o,--output", a->output_dir, "Output folder (default: outputs/<case name>)");
  sub->add_option("--threads", a->threads,
                  "Worker threads; from 2 on, one more reads the next chunk meanwhile (default: "
                  "[grid] threads, "
                  "else all cores)");
  sub->add_flag("-q,--quiet", a->quiet, "Print nothing on success, no progress");
  sub->callback([a, &exit_code] {
#ifdef LIDBOX_MPI
    MPI_Init(nullptr, nullptr);
    try {
      run(*a);
    } catch (const InputError& e) {
      std::cerr << "lidbox: error: " << e.what() << '\n';
      MPI_Abort(MPI_COMM_WORLD, 2);
    } catch (const std::exception& e) {
      std::cerr << "lidbox: internal error: " << e.what() << " (please report this)\n";
      MPI_Abort(MPI_COMM_WORLD, 1);
    }
    MPI_Finalize();
#else
    run(*a);
#endif
    exit_code = 0;
  });
}

}  // namespace lidbox::cli
