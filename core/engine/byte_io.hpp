// Where bytes come from and go to. The engine reads and writes through these
// two interfaces so each shell can plug in its own (files and pipes natively,
// slices of a browser File object in WebAssembly).
#pragma once

#include <cstdint>
#include <memory>
#include <optional>
#include <string>
#include <string_view>

#include "error.hpp"

namespace tamis {

class ByteSource {
 public:
  virtual ~ByteSource() = default;
  // Reads up to capacity bytes; 0 means the end of the input.
  virtual Result<size_t> read(char* buffer, size_t capacity) = 0;
  // Total size when known in advance (for progress), else nullopt.
  virtual std::optional<uint64_t> size() const { return std::nullopt; }
};

class ByteSink {
 public:
  virtual ~ByteSink() = default;
  virtual Status write(std::string_view bytes) = 0;
  // Makes the written bytes visible at their destination (for files: the
  // atomic rename). A sink destroyed without commit leaves nothing behind.
  virtual Status commit() = 0;
};

// "-" is standard input.
Result<std::unique_ptr<ByteSource>> open_file_source(const std::string& path);
std::unique_ptr<ByteSource> memory_source(std::string bytes);
// Reads SIZE bytes kept alive by BYTES, without copying them: a file the
// browser page read into memory once is opened many times.
std::unique_ptr<ByteSource> shared_memory_source(std::shared_ptr<const char> bytes, size_t size);

// "-" is standard output. A file is written to a temporary name beside the
// target and renamed over it on commit, so a failed run never leaves a
// half-written output and never touches an existing file until success.
Result<std::unique_ptr<ByteSink>> open_file_sink(const std::string& path);
// Collects the bytes in memory (tests, the browser's download buffer).
class MemorySink final : public ByteSink {
 public:
  Status write(std::string_view bytes) override {
    data.append(bytes);
    return Ok{};
  }
  Status commit() override { return Ok{}; }
  std::string data;
};

}  // namespace tamis
