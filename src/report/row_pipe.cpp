#include "report/row_pipe.hpp"

#include <utility>

namespace lidbox {

RowPipe::RowPipe(std::size_t width, Format format) : width_(width), format_(std::move(format)) {
  filling_.values.resize(width_ * kRowsPerBlock);
  thread_ = std::thread([this] { work(); });
}

RowPipe::~RowPipe() {
  {
    std::lock_guard<std::mutex> lock(mutex_);
    stop_ = true;
  }
  changed_.notify_all();
  if (thread_.joinable()) thread_.join();
}

void RowPipe::rethrow_locked() {
  if (error_) std::rethrow_exception(error_);
}

double* RowPipe::row() {
  if (filling_.rows == kRowsPerBlock) hand_over();
  return filling_.values.data() + width_ * filling_.rows++;
}

void RowPipe::hand_over() {
  std::unique_lock<std::mutex> lock(mutex_);
  changed_.wait(lock, [this] { return error_ || full_.size() + writing_ < kBlocksInFlight; });
  rethrow_locked();
  Block next;
  if (!spare_.empty()) {
    next = std::move(spare_.back());
    spare_.pop_back();
  } else {
    next.values.resize(width_ * kRowsPerBlock);
  }
  next.rows = 0;
  full_.push_back(std::move(filling_));
  filling_ = std::move(next);
  lock.unlock();
  changed_.notify_all();
}

void RowPipe::close() {
  if (filling_.rows > 0) hand_over();
  std::unique_lock<std::mutex> lock(mutex_);
  closing_ = true;
  changed_.notify_all();
  changed_.wait(lock, [this] { return error_ || (full_.empty() && writing_ == 0); });
  stop_ = true;
  changed_.notify_all();
  lock.unlock();
  thread_.join();
  std::lock_guard<std::mutex> relock(mutex_);
  rethrow_locked();
}

void RowPipe::work() {
  std::unique_lock<std::mutex> lock(mutex_);
  for (;;) {
    changed_.wait(lock, [this] { return stop_ || !full_.empty(); });
    // Stopped: by close() once everything is written, or by the destructor after an error
    // elsewhere (the files are then discarded unpublished, so waiting blocks are dropped).
    if (error_ || full_.empty() || (stop_ && !closing_)) return;
    Block b = std::move(full_.front());
    full_.pop_front();
    writing_ = 1;
    lock.unlock();
    std::exception_ptr failed;
    try {
      format_(b.values.data(), b.rows);
    } catch (...) {
      failed = std::current_exception();
    }
    lock.lock();
    writing_ = 0;
    if (failed) error_ = failed;
    spare_.push_back(std::move(b));
    changed_.notify_all();
  }
}

}  // namespace lidbox
