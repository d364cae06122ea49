#include "byte_io.hpp"

#include <cerrno>
#include <cstdio>
#include <cstring>
#include <filesystem>

namespace tamis {

namespace {

std::string system_message() { return std::strerror(errno); }

class FileSource final : public ByteSource {
 public:
  FileSource(std::FILE* file, std::string path, std::optional<uint64_t> size)
      : file_(file), path_(std::move(path)), size_(size) {}
  ~FileSource() override {
    if (file_ != stdin) std::fclose(file_);
  }
  Result<size_t> read(char* buffer, size_t capacity) override {
    const size_t n = std::fread(buffer, 1, capacity, file_);
    if (n == 0 && std::ferror(file_)) return io_error(path_, "cannot read: " + system_message());
    return n;
  }
  std::optional<uint64_t> size() const override { return size_; }

 private:
  std::FILE* file_;
  std::string path_;
  std::optional<uint64_t> size_;
};

// Reads bytes that the source shares with their owner.
class SharedBytesSource final : public ByteSource {
 public:
  SharedBytesSource(std::shared_ptr<const char> bytes, size_t size) : bytes_(std::move(bytes)), size_(size) {}
  Result<size_t> read(char* buffer, size_t capacity) override {
    const size_t n = std::min(capacity, size_ - pos_);
    std::memcpy(buffer, bytes_.get() + pos_, n);
    pos_ += n;
    return n;
  }
  std::optional<uint64_t> size() const override { return size_; }

 private:
  std::shared_ptr<const char> bytes_;
  size_t size_;
  size_t pos_ = 0;
};

class FileSink final : public ByteSink {
 public:
  FileSink(std::FILE* file, std::string target, std::string temporary)
      : file_(file), target_(std::move(target)), temporary_(std::move(temporary)) {}
  ~FileSink() override {
    if (file_ && file_ != stdout) {
      std::fclose(file_);
      std::remove(temporary_.c_str());
    }
  }
  Status write(std::string_view bytes) override {
    if (std::fwrite(bytes.data(), 1, bytes.size(), file_) != bytes.size())
      return io_error(target_, "cannot write: " + system_message());
    return Ok{};
  }
  Status commit() override {
    if (std::fflush(file_) != 0) return io_error(target_, "cannot write: " + system_message());
    if (file_ == stdout) return Ok{};
    const int closed = std::fclose(file_);
    file_ = nullptr;
    if (closed != 0) {
      std::remove(temporary_.c_str());
      return io_error(target_, "cannot write: " + system_message());
    }
    if (std::rename(temporary_.c_str(), target_.c_str()) != 0) {
      const std::string why = system_message();
      std::remove(temporary_.c_str());
      return io_error(target_, "cannot replace the output file: " + why);
    }
    return Ok{};
  }

 private:
  std::FILE* file_;
  std::string target_;
  std::string temporary_;
};

}  // namespace

Result<std::unique_ptr<ByteSource>> open_file_source(const std::string& path) {
  if (path == "-") return std::unique_ptr<ByteSource>(new FileSource(stdin, "<stdin>", std::nullopt));
  std::error_code ec;
  if (std::filesystem::is_directory(path, ec)) return io_error(path, "is a directory, expected a file");
  std::FILE* f = std::fopen(path.c_str(), "rb");
  if (!f) return io_error(path, "cannot open: " + system_message());
  std::optional<uint64_t> size;
  const auto n = std::filesystem::file_size(path, ec);
  if (!ec) size = n;
  return std::unique_ptr<ByteSource>(new FileSource(f, path, size));
}

std::unique_ptr<ByteSource> memory_source(std::string bytes) {
  auto owned = std::make_shared<const std::string>(std::move(bytes));
  const size_t size = owned->size();
  return shared_memory_source(std::shared_ptr<const char>(owned, owned->data()), size);
}

std::unique_ptr<ByteSource> shared_memory_source(std::shared_ptr<const char> bytes, size_t size) {
  return std::make_unique<SharedBytesSource>(std::move(bytes), size);
}

Result<std::unique_ptr<ByteSink>> open_file_sink(const std::string& path) {
  if (path == "-") return std::unique_ptr<ByteSink>(new FileSink(stdout, "<stdout>", ""));
  const std::string temporary = path + ".tamis-partial";
  std::FILE* f = std::fopen(temporary.c_str(), "wb");
  if (!f) return io_error(path, "cannot create: " + system_message());
  return std::unique_ptr<ByteSink>(new FileSink(f, path, temporary));
}

}  // namespace tamis
