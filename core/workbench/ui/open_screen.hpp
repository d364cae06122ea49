// The open screen: before a file is loaded, shows how it will be read
// (encoding, delimiter, header row, lines to skip: detected, each with the
// reason, and each changeable) with a preview of the first rows.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "csv_reader.hpp"
#include "platform.hpp"

namespace tamis::ui {

class OpenScreen {
 public:
  explicit OpenScreen(Platform& platform);

  // Reads the start of the file and detects its dialect.
  void start(std::string path);
  bool active() const { return active_; }
  void close() { active_ = false; }
  const std::string& path() const { return path_; }
  // The options as the user settled them (detected values made explicit).
  CsvOptions options() const;

  enum class Choice { none, load, cancel };
  Choice draw();

  // Test mode: the same changes as the controls make.
  Status set_option(std::string_view key, std::string_view value);
  // Columns of the preview as read with the current options.
  size_t preview_columns() const { return columns_.size(); }

 private:
  void refresh_preview();

  Platform& platform_;
  bool active_ = false;
  std::string path_;
  std::optional<uint64_t> size_;
  // What the user chose; nullopt = as detected.
  std::optional<Encoding> encoding_;
  std::optional<char> delimiter_;
  std::optional<bool> header_;
  int skip_rows_ = 0;
  // The latest preview.
  ReadReport detected_;
  std::vector<std::string> columns_;
  std::optional<Table> rows_;
  std::string error_;
};

}  // namespace tamis::ui
