// Shared by the libFuzzer targets of tests/fuzz/ (built with LIDBOX_FUZZ=ON, clang only).
//
// A parser may refuse its input only with lidbox::InputError (exit code 2 at the command line).
// Anything else is a finding: a sanitizer report or crash stops the fuzzer by itself, and
// `expect_input_errors_only` turns any other escaping exception into an abort, so that libFuzzer
// saves the input as a crash file.
#pragma once

#include <cstddef>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <exception>
#include <string>

#include "lidbox/base/error.hpp"

namespace lidbox::fuzz {

inline std::string text_of(const std::uint8_t* data, std::size_t size) {
  return std::string(reinterpret_cast<const char*>(data), size);
}

template <class F>
void expect_input_errors_only(const char* target, F&& body) {
  try {
    body();
  } catch (const InputError&) {
    // expected: the input is refused with a placed message
  } catch (const std::exception& e) {
    std::fprintf(stderr, "%s: finding: an exception other than InputError escaped: %s\n", target,
                 e.what());
    std::abort();
  } catch (...) {
    std::fprintf(stderr, "%s: finding: a non-standard exception escaped\n", target);
    std::abort();
  }
}

}  // namespace lidbox::fuzz
