// What `tamis run` and `tamis check` share beyond the engine's input check
// and rejects (input_check.hpp, run_rejects.hpp): the cap on rejected rows,
// and the guard against writing over what a command reads.
#pragma once

#include <cstdint>
#include <optional>
#include <string>

#include "error.hpp"

namespace tamis::cli {

// --max-rejects / input.max_rejects: a count ("25") or a share of the rows
// read ("0.5%").
struct RejectCap {
  std::optional<uint64_t> count;
  std::optional<double> percent;
  std::string text;

  static Result<RejectCap> parse(const std::string& text);
  bool exceeded(uint64_t rejected, uint64_t rows_read) const;
};

// True when both paths name the same existing file.
bool same_file(const std::string& a, const std::string& b);

}  // namespace tamis::cli
