#include "grid/thread_team.hpp"

namespace lidbox {

ThreadTeam::ThreadTeam(unsigned threads) : size_(threads == 0 ? 1 : threads), errors_(size_) {
  if (size_ == 1) return;
  threads_.reserve(size_);
  for (unsigned t = 0; t < size_; ++t) threads_.emplace_back([this, t] { loop(t); });
}

ThreadTeam::~ThreadTeam() {
  finish_quietly();
  {
    const std::lock_guard<std::mutex> lock(mutex_);
    stop_ = true;
  }
  go_.notify_all();
  for (auto& th : threads_) th.join();
}

void ThreadTeam::start(std::function<void(unsigned)> job) {
  for (auto& e : errors_) e = nullptr;
  if (size_ == 1) {
    try {
      job(0);
    } catch (...) {
      errors_[0] = std::current_exception();
    }
    return;
  }
  {
    const std::lock_guard<std::mutex> lock(mutex_);
    job_ = std::move(job);
    pending_ = size_;
    ++generation_;
  }
  go_.notify_all();
}

void ThreadTeam::wait() {
  finish_quietly();
  for (const auto& e : errors_) {
    if (e) std::rethrow_exception(e);
  }
}

void ThreadTeam::finish_quietly() {
  std::unique_lock<std::mutex> lock(mutex_);
  done_.wait(lock, [this] { return pending_ == 0; });
}

void ThreadTeam::loop(unsigned t) {
  std::size_t seen = 0;
  for (;;) {
    std::unique_lock<std::mutex> lock(mutex_);
    go_.wait(lock, [&] { return stop_ || generation_ != seen; });
    if (stop_) return;
    seen = generation_;
    const std::function<void(unsigned)>& job = job_;  // unchanged until every thread is done
    lock.unlock();
    try {
      job(t);
    } catch (...) {
      errors_[t] = std::current_exception();
    }
    lock.lock();
    if (--pending_ == 0) done_.notify_all();
  }
}

}  // namespace lidbox
