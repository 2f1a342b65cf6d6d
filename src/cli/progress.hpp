#pragma once

#include <string>

namespace lidbox::cli {

// A progress line on stderr for long runs; silent when stderr is not a terminal, so logs and
// tests stay clean.
class Progress {
 public:
  Progress();
  void update(double fraction, const char* stage);
  void finish();

 private:
  bool tty_ = false;
  int last_percent_ = -1;
  std::string last_stage_;
  bool shown_ = false;
};

}  // namespace lidbox::cli
