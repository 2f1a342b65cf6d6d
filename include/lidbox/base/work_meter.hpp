// A count of the work the output writers do on a run's hours: every read of an hour's values
// through RunResult's accessors and every byte handed to an output file adds to it. A test
// compares the counts for runs of n and 2n hours: work that is linear in the run's length at most
// doubles, and a sum started again from the first hour for every row shows up at once. A count,
// not a time, so it is the same on a loaded machine. Counting is a thread-local add.
#pragma once

#include <cstdint>

namespace lidbox::work_meter {

inline thread_local std::uint64_t local_count = 0;

inline void add(std::uint64_t units = 1) {
  local_count += units;
}

// Moves this thread's count into the process total; a worker thread calls it before it ends.
void merge_thread();
// The process total, this thread's count included.
std::uint64_t total();
// Sets the process total and this thread's count to zero.
void reset();

}  // namespace lidbox::work_meter
