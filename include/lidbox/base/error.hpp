// lidbox error root.
//
// Two branches, because the command line maps them to different exit codes:
//   InputError    – the user's input is wrong (file, line, variable, option): exit code 2,
//                   nothing is written.
//   InternalError – lidbox itself is wrong (a broken invariant): exit code 1.
// Every message has one shape:  "<where>: <what was found>; expected <what was expected>".
// Context is added as an error rises ("case.toml: [met]: ...") with InputError::within().
#pragma once

#include <stdexcept>
#include <string>

namespace lidbox {

// A NUL byte (from a binary file quoted in a message) would end what() early: it is written
// as \0 instead.
inline std::string without_nul(std::string message) {
  for (std::size_t i = message.find('\0'); i != std::string::npos; i = message.find('\0', i)) {
    message.replace(i, 1, "\\0");
  }
  return message;
}

class Error : public std::runtime_error {
 public:
  explicit Error(const std::string& message) : std::runtime_error(without_nul(message)) {}
};

class InputError : public Error {
 public:
  // "<where>: <found>; expected <expected>"
  InputError(const std::string& where, const std::string& found, const std::string& expected)
      : Error(where + ": " + found + "; expected " + expected) {}
  // A message that already has the shape above (used when re-wrapping).
  explicit InputError(const std::string& message) : Error(message) {}

  // The same error with an outer location in front: "outer: <message>".
  [[nodiscard]] InputError within(const std::string& outer) const {
    return InputError(outer + ": " + what());
  }
};

class InternalError : public Error {
 public:
  explicit InternalError(const std::string& message) : Error("internal error: " + message) {}
};

}  // namespace lidbox
