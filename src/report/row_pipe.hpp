// Rows of numbers handed from the thread that computes them (a run stepping hour by hour) to a
// thread that formats and writes them, in blocks. At most kBlocksInFlight blocks wait for the
// writer, so memory stays bounded whatever the run's length: when the writer falls behind, the
// producer waits for it.
#pragma once

#include <condition_variable>
#include <cstddef>
#include <deque>
#include <exception>
#include <functional>
#include <mutex>
#include <thread>
#include <vector>

namespace lidbox {

class RowPipe {
 public:
  // Called on the writer thread with whole rows, in the order they were filled.
  using Format = std::function<void(const double* rows, std::size_t n_rows)>;
  static constexpr std::size_t kRowsPerBlock = 2048;
  static constexpr std::size_t kBlocksInFlight = 3;

  RowPipe(std::size_t width, Format format);
  ~RowPipe();  // stops the writer (after an error elsewhere); close() is the normal end
  RowPipe(const RowPipe&) = delete;
  RowPipe& operator=(const RowPipe&) = delete;

  // Room for the next row's `width` values; a full block is handed over first, which rethrows
  // an error the writer met (close() rethrows a later one).
  double* row();
  // Hands the last rows over and waits for the writer; rethrows its error.
  void close();

 private:
  struct Block {
    std::vector<double> values;
    std::size_t rows = 0;
  };
  void hand_over();  // the filling block to the writer (waits while too many are in flight)
  void work();       // the writer thread
  void rethrow_locked();

  std::size_t width_;
  Format format_;
  Block filling_;
  std::mutex mutex_;
  std::condition_variable changed_;
  std::deque<Block> full_;     // waiting for the writer, oldest first
  std::vector<Block> spare_;   // written blocks, for reuse
  std::size_t writing_ = 0;    // blocks the writer holds (0 or 1)
  bool closing_ = false;
  bool stop_ = false;
  std::exception_ptr error_;
  std::thread thread_;
};

}  // namespace lidbox
