#include "lidbox/base/work_meter.hpp"

#include <atomic>

namespace lidbox::work_meter {

namespace {
std::atomic<std::uint64_t> g_total{0};
}  // namespace

void merge_thread() {
  g_total.fetch_add(local_count, std::memory_order_relaxed);
  local_count = 0;
}

std::uint64_t total() {
  return g_total.load(std::memory_order_relaxed) + local_count;
}

void reset() {
  g_total.store(0, std::memory_order_relaxed);
  local_count = 0;
}

}  // namespace lidbox::work_meter
