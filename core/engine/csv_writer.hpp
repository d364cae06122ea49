// RFC 4180 writer with minimal quoting: a field is quoted only when it holds
// the delimiter, the quote character, CR or LF (RFC 4180 §2 rule 6), or when
// it is the only field of a record and empty (so the record is not mistaken
// for an empty line). Output is UTF-8. Typed cells use their canonical text
// form (design §3).
#pragma once

#include <array>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "byte_io.hpp"
#include "dates.hpp"
#include "error.hpp"
#include "table.hpp"

namespace tamis {

struct CsvWriteOptions {
  char delimiter = ',';
  char quote = '"';
  std::string line_ending = "\n";
  std::string null_marker;  // how NULL is written (unquoted unless it needs quotes)
  std::string date_format = "%Y-%m-%d";
};

class CsvWriter {
 public:
  static Result<CsvWriter> make(ByteSink& sink, CsvWriteOptions options);

  Status write_row(std::span<const std::string_view> fields);
  Status write_table(const Table& table);
  // Flushes the buffer and commits the sink.
  Status finish();

 private:
  // The text of a date, kept because a column's dates repeat.
  struct CachedDate {
    int32_t days = 0;
    uint8_t length = 0;  // 0: nothing cached
    char text[27];
  };

  CsvWriter(ByteSink& sink, CsvWriteOptions options, DateFormat date_format);
  // Room for n more bytes at buffer_[used_]: the buffer grows within a row
  // and is written out between rows, once it holds enough.
  void make_room(size_t n) {
    if (used_ + n > buffer_.size()) grow(n);
  }
  void grow(size_t n);
  void append_byte(char c) {
    make_room(1);
    buffer_[used_++] = c;
  }
  void append_field(std::string_view value, bool only_field);
  void append_cell(const Column& column, const ColumnChunk& chunk, size_t row, bool only_field);
  std::string_view date_text(int32_t days);
  Status end_row();
  Status flush();

  ByteSink* sink_;
  CsvWriteOptions options_;
  DateFormat date_format_;
  std::array<uint8_t, 256> needs_quotes_{};
  std::string buffer_;  // written text is buffer_[0, used_)
  size_t used_ = 0;
  std::string cell_;
  std::vector<CachedDate> dates_;
};

// Canonical text form of one typed value (integer, decimal at scale, date,
// boolean); text values are returned as they are.
void append_canonical(const Column& column, const ColumnChunk& chunk, size_t row,
                      const DateFormat& date_format, std::string& out);

}  // namespace tamis
