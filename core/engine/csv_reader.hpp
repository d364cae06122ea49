// Streaming CSV/TSV reader: RFC 4180 plus what real extracts contain.
//
// Records may hold quoted delimiters, doubled quotes and line breaks; LF,
// CRLF and a lone CR all end a record. Encoding, delimiter and header row are
// detected from the first block unless given. The reader hands out batches of
// rows as Tables whose text lives in one arena per column, and never drops a
// row silently: a malformed record either stops the read (strict) or goes to
// the reject sink with its source line and reason (lenient). Completely empty
// lines are not records; they are skipped and counted.
#pragma once

#include <array>
#include <cstdint>
#include <functional>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "byte_io.hpp"
#include "encoding.hpp"
#include "error.hpp"
#include "table.hpp"

namespace tamis {

class Transcoder;

enum class HeaderMode : uint8_t { detect, yes, no };

struct CsvOptions {
  std::optional<Encoding> encoding;  // nullopt: detect
  std::optional<char> delimiter;     // nullopt: detect among , ; tab |
  char quote = '"';
  HeaderMode header = HeaderMode::detect;
  size_t skip_rows = 0;  // physical lines before the header (CSVW "skipRows")
  bool lenient = false;  // malformed records go to the reject sink instead of stopping
  size_t batch_rows = 65536;
};

struct RejectedRecord {
  uint64_t line = 0;    // physical line where the record starts
  std::string reason;
  std::string text;     // the record as it stood in the file (decoded), without its line break
};

struct ReadReport {
  Encoding encoding = Encoding::utf8;
  std::string encoding_reason;
  char delimiter = ',';
  std::string delimiter_reason;
  bool header = true;
  std::string header_reason;
  uint64_t rows = 0;            // data rows delivered
  uint64_t rejected = 0;        // records set aside (lenient)
  std::vector<uint64_t> first_rejected_lines;  // up to 10
  uint64_t blank_lines = 0;     // empty physical lines skipped
  uint64_t first_blank_line = 0;
  uint64_t bare_quotes = 0;     // quote characters inside unquoted fields, kept as text
  uint64_t first_bare_quote_line = 0;
  uint64_t undefined_bytes = 0; // windows-1252 bytes 0x81 0x8D 0x8F 0x90 0x9D
  std::optional<uint64_t> first_undefined_byte;
  std::vector<std::string> header_notes;  // renamed columns

  // Everything worth telling the user, one sentence each.
  std::vector<std::string> warnings() const;
};

class CsvReader {
 public:
  using RejectSink = std::function<Status(const RejectedRecord&)>;

  // Reads the first block, detects the dialect and reads the header.
  // display_name is used in messages (the path, or "<stdin>").
  static Result<std::unique_ptr<CsvReader>> open(std::unique_ptr<ByteSource> source,
                                                 std::string display_name, CsvOptions options,
                                                 RejectSink on_reject = {});
  ~CsvReader();

  const std::vector<std::string>& column_names() const { return names_; }
  const ReadReport& report() const { return report_; }

  // The next batch of at most options.batch_rows rows; nullopt at the end.
  Result<std::optional<Table>> next_batch();

  // Progress: source bytes consumed so far and the total when known.
  uint64_t bytes_read() const { return source_bytes_read_; }
  std::optional<uint64_t> total_bytes() const { return source_->size(); }

 private:
  enum class Outcome : uint8_t { record, blank_line, need_more, failed };
  struct FieldRef {
    uint32_t offset;  // into buf_ (from record start) or scratch_
    uint32_t length;
    bool in_scratch;
  };

  CsvReader(std::unique_ptr<ByteSource> source, std::string name, CsvOptions options);
  Status read_first_block();
  Status fill();
  bool switch_to_windows1252(const char* invalid);
  void build_stop_tables();
  Outcome parse_record();
  Outcome fail(Error error);
  Error error_at(const char* where, std::string message) const;
  std::string_view field(size_t i) const;
  Status read_header();
  Status skip_lines(size_t count);
  Status handle_problem(std::string reason);
  Status collect_more_problems_and_fail(std::string first_reason);

  std::unique_ptr<ByteSource> source_;
  std::string name_;
  CsvOptions options_;
  RejectSink on_reject_;
  ReadReport report_;
  std::vector<std::string> names_;
  std::unique_ptr<Transcoder> transcoder_;

  std::string buf_;            // decoded UTF-8 text
  size_t pos_ = 0;             // start of the next record in buf_
  uint64_t buf_offset_ = 0;    // source offset of buf_[0] (exact for UTF-8 input)
  uint64_t source_bytes_read_ = 0;
  bool source_done_ = false;
  size_t read_size_ = 1 << 20;
  std::string raw_;            // undecoded bytes for non-UTF-8 input

  uint64_t line_ = 1;          // physical line at pos_
  // Per-record parse state.
  std::vector<FieldRef> fields_;
  std::string scratch_;        // unescaped quoted fields
  uint64_t record_line_ = 0;
  size_t record_end_ = 0;      // buf_ offset just after the record's text (before its line break)
  size_t next_pos_ = 0;        // buf_ offset of the record after this one
  uint64_t next_line_ = 0;
  std::optional<std::string> record_problem_;
  uint64_t record_bare_quotes_ = 0;
  uint64_t bare_quote_line_ = 0;
  std::optional<Error> error_;
  std::array<uint8_t, 256> stop_unquoted_{};
  std::array<uint8_t, 256> stop_quoted_{};

  std::vector<TextChunkBuilder> builders_;
  std::vector<size_t> last_batch_bytes_;
  bool finished_ = false;
  bool utf8_was_guessed_ = false;
  bool seen_non_ascii_ = false;
};

// Reads a whole input into one table; on_progress gets (bytes read, total).
using ProgressSink = std::function<void(uint64_t, std::optional<uint64_t>)>;
Result<Table> read_csv(std::unique_ptr<ByteSource> source, std::string display_name,
                       CsvOptions options, ReadReport* report = nullptr,
                       CsvReader::RejectSink on_reject = {}, ProgressSink on_progress = {});

}  // namespace tamis
