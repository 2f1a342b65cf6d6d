// Private to grid runs: a team of threads that live for the whole run and take one job after
// another (a chunk of the series), so that no thread, and no allocator arena of a new thread, is
// made per chunk: peak memory stays flat in the series' length however many chunks it has.
//
// start(job) hands job(t) to each thread t = 0..size()-1 and returns at once; the caller may work
// meanwhile (a grid run reads the next chunk) and then calls wait(), which returns when every
// thread has finished and rethrows the first exception a thread caught (lowest t). A team of one
// thread has none of its own: start() runs job(0) on the caller, so a one-thread run uses one
// core. The destructor waits for a job still running, then stops the threads: a caller unwinding
// from an exception never leaves a thread working on its data (but locals of the caller declared
// after the team go first: call finish_quietly() before they do).
#pragma once

#include <condition_variable>
#include <cstddef>
#include <exception>
#include <functional>
#include <mutex>
#include <thread>
#include <vector>

namespace lidbox {

class ThreadTeam {
 public:
  explicit ThreadTeam(unsigned threads);
  ThreadTeam(const ThreadTeam&) = delete;
  ThreadTeam& operator=(const ThreadTeam&) = delete;
  ~ThreadTeam();

  [[nodiscard]] unsigned size() const { return size_; }
  void start(std::function<void(unsigned)> job);
  void wait();
  // Waits without rethrowing: for a caller that is already unwinding from its own exception.
  void finish_quietly();

 private:
  void loop(unsigned t);

  unsigned size_;
  std::vector<std::thread> threads_;
  std::mutex mutex_;
  std::condition_variable go_, done_;
  std::function<void(unsigned)> job_;
  std::size_t generation_ = 0;
  unsigned pending_ = 0;
  bool stop_ = false;
  std::vector<std::exception_ptr> errors_;
};

}  // namespace lidbox
