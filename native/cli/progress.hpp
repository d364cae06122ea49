// A one-line progress bar on stderr, shown only when stderr is a terminal
// (never in pipes or logs), redrawn at most ten times a second.
#pragma once

#include <unistd.h>

#include <chrono>
#include <cstdint>
#include <cstdio>
#include <optional>
#include <string>

namespace tamis::cli {

class Progress {
 public:
  Progress(std::string label, std::optional<uint64_t> total)
      : label_(std::move(label)), total_(total), enabled_(isatty(STDERR_FILENO) && total && *total > 0) {}
  ~Progress() { finish(); }

  void update(uint64_t done) {
    if (!enabled_) return;
    const auto now = std::chrono::steady_clock::now();
    if (now - last_ < std::chrono::milliseconds(100)) return;
    last_ = now;
    const double share = std::min(1.0, static_cast<double>(done) / static_cast<double>(*total_));
    const int filled = static_cast<int>(share * 30);
    std::fprintf(stderr, "\r%s [%.*s%*s] %3d%% %.1f/%.1f MB", label_.c_str(), filled,
                 "##############################", 30 - filled, "", static_cast<int>(share * 100),
                 static_cast<double>(done) / 1e6, static_cast<double>(*total_) / 1e6);
    drawn_ = true;
  }

  void finish() {
    if (drawn_) std::fprintf(stderr, "\r\033[K");
    drawn_ = false;
  }

 private:
  std::string label_;
  std::optional<uint64_t> total_;
  bool enabled_;
  bool drawn_ = false;
  std::chrono::steady_clock::time_point last_{};
};

}  // namespace tamis::cli
