#include "progress.hpp"

#include <unistd.h>

#include <cstdio>

namespace lidbox::cli {

Progress::Progress() : tty_(::isatty(STDERR_FILENO) != 0) {}

void Progress::update(double fraction, const char* stage) {
  if (!tty_) return;
  const int percent = static_cast<int>(fraction * 100.0);
  if (percent == last_percent_ && last_stage_ == stage) return;
  last_percent_ = percent;
  last_stage_ = stage;
  const int width = 30;
  const int filled = percent * width / 100;
  std::fprintf(stderr, "\r%-8s [%.*s%*s] %3d%%", stage, filled, "##############################",
               width - filled, "", percent);
  std::fflush(stderr);
  shown_ = true;
}

void Progress::finish() {
  if (shown_) std::fprintf(stderr, "\r%60s\r", "");
}

}  // namespace lidbox::cli
