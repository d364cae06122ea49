#include "error.hpp"

namespace tamis {

int exit_code(ErrorKind kind) {
  switch (kind) {
    case ErrorKind::rule_failed: return 1;
    case ErrorKind::usage: return 2;
    case ErrorKind::bad_input: return 3;
    case ErrorKind::io: return 4;
  }
  return 3;
}

std::string Error::to_string() const {
  std::string out;
  if (!file.empty()) {
    out += file;
    if (line > 0) {
      out += ':' + std::to_string(line);
      if (column > 0) out += ':' + std::to_string(column);
    }
    out += ": ";
  }
  if (step) out += "step " + std::to_string(*step + 1) + ": ";
  out += "error: " + message;
  if (byte_offset) {
    out += " (at byte offset " + std::to_string(*byte_offset);
    if (line > 0 && file.empty()) out += ", line " + std::to_string(line);
    out += ')';
  }
  return out;
}

Error usage_error(std::string message) {
  Error e;
  e.kind = ErrorKind::usage;
  e.message = std::move(message);
  return e;
}

Error io_error(std::string file, std::string message) {
  Error e = usage_error(std::move(message));
  e.kind = ErrorKind::io;
  e.file = std::move(file);
  return e;
}

Error input_error(std::string file, uint64_t line, std::string message) {
  Error e = usage_error(std::move(message));
  e.kind = ErrorKind::bad_input;
  e.file = std::move(file);
  e.line = line;
  return e;
}

}  // namespace tamis
