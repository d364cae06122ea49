// Errors are values: every fallible engine call returns Result<T>, and an
// Error carries the context a user needs to find the problem (file, line,
// column, byte offset, recipe step) plus the kind that decides the exit code.
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <utility>
#include <variant>

namespace tamis {

enum class ErrorKind : uint8_t {
  usage,          // the caller asked for something impossible (bad option, bad parameter)
  bad_input,      // the data does not match what was expected (malformed CSV, wrong columns)
  io,             // the operating system refused (missing file, disk full)
  rule_failed,    // a production guard (require step) failed
};

// Exit codes shared by every command (design §5).
int exit_code(ErrorKind kind);

struct Error {
  ErrorKind kind = ErrorKind::bad_input;
  std::string message;                  // what was expected, in plain words
  std::string file;                     // empty when not about a file
  uint64_t line = 0;                    // 1-based physical line, 0 = unknown
  uint64_t column = 0;                  // 1-based character column, 0 = unknown
  std::optional<uint64_t> byte_offset;  // 0-based offset in the source bytes
  std::optional<int> step;              // 0-based recipe step index

  // "file:line:column: error: message" (parts that are unknown are left out).
  std::string to_string() const;
};

Error usage_error(std::string message);
Error input_error(std::string file, uint64_t line, std::string message);
Error io_error(std::string file, std::string message);

struct Ok {};

template <class T>
class [[nodiscard]] Result {
 public:
  Result(T value) : state_(std::move(value)) {}
  Result(Error error) : state_(std::move(error)) {}

  bool ok() const { return state_.index() == 0; }
  explicit operator bool() const { return ok(); }

  T& value() & { return std::get<0>(state_); }
  const T& value() const& { return std::get<0>(state_); }
  T&& value() && { return std::get<0>(std::move(state_)); }
  T* operator->() { return &value(); }
  const T* operator->() const { return &value(); }
  T& operator*() & { return value(); }

  const Error& error() const { return std::get<1>(state_); }
  Error&& take_error() { return std::get<1>(std::move(state_)); }

 private:
  std::variant<T, Error> state_;
};

using Status = Result<Ok>;

}  // namespace tamis
