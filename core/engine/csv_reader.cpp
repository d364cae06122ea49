#include "csv_reader.hpp"

#include <algorithm>
#include <unordered_set>

#include "csv_sniff.hpp"
#include "utf8.hpp"

namespace tamis {

namespace {
constexpr size_t kSampleBytes = 1 << 16;  // detection looks at the first 64 KiB
constexpr size_t kListedProblems = 10;

std::string shown_char(char c) {
  if (c == '\t') return "tab";
  if (static_cast<unsigned char>(c) < 0x20) return "control character " + std::to_string(+c);
  return "'" + std::string(1, c) + "'";
}

std::string join_lines(const std::vector<uint64_t>& lines) {
  std::string out;
  for (size_t i = 0; i < lines.size(); ++i) out += (i ? ", " : "") + std::to_string(lines[i]);
  return out;
}
}  // namespace

std::vector<std::string> ReadReport::warnings() const {
  std::vector<std::string> out = header_notes;
  if (blank_lines > 0)
    out.push_back(std::to_string(blank_lines) + " empty line(s) skipped (they hold no record), first at line " +
                  std::to_string(first_blank_line));
  if (bare_quotes > 0)
    out.push_back(std::to_string(bare_quotes) +
                  " quote character(s) inside unquoted fields kept as text, first at line " +
                  std::to_string(first_bare_quote_line));
  if (undefined_bytes > 0)
    out.push_back(std::to_string(undefined_bytes) +
                  " byte(s) undefined in windows-1252 (0x81 0x8D 0x8F 0x90 0x9D) decoded as C1 controls, "
                  "first at byte offset " + std::to_string(first_undefined_byte.value_or(0)));
  if (rejected > 0)
    out.push_back(std::to_string(rejected) + " malformed record(s) set aside, at lines " +
                  join_lines(first_rejected_lines) + (rejected > first_rejected_lines.size() ? ", ..." : ""));
  return out;
}

CsvReader::CsvReader(std::unique_ptr<ByteSource> source, std::string name, CsvOptions options)
    : source_(std::move(source)), name_(std::move(name)), options_(options) {}

CsvReader::~CsvReader() = default;

Result<std::unique_ptr<CsvReader>> CsvReader::open(std::unique_ptr<ByteSource> source,
                                                   std::string display_name, CsvOptions options,
                                                   RejectSink on_reject) {
  if (options.delimiter && *options.delimiter == options.quote)
    return usage_error("the delimiter and the quote character must differ");
  if (options.delimiter && (*options.delimiter == '\n' || *options.delimiter == '\r'))
    return usage_error("the delimiter cannot be a line break");
  if (options.batch_rows == 0) return usage_error("batch_rows must be at least 1");
  std::unique_ptr<CsvReader> r(new CsvReader(std::move(source), std::move(display_name), options));
  r->on_reject_ = std::move(on_reject);
  Status s = r->read_first_block();
  if (s) s = r->skip_lines(options.skip_rows);
  if (s) s = r->read_header();
  if (!s) return s.take_error();
  return r;
}

Status CsvReader::read_first_block() {
  raw_.resize(kSampleBytes);
  size_t have = 0;
  while (have < raw_.size()) {
    auto n = source_->read(raw_.data() + have, raw_.size() - have);
    if (!n) return n.take_error();
    if (*n == 0) {
      source_done_ = true;
      break;
    }
    have += *n;
  }
  raw_.resize(have);
  source_bytes_read_ = have;

  EncodingGuess guess;
  if (options_.encoding) {
    guess = {*options_.encoding, bom_length(raw_, *options_.encoding), "given"};
  } else {
    guess = detect_encoding(raw_, source_done_);
  }
  report_.encoding = guess.encoding;
  report_.encoding_reason = guess.reason;
  utf8_was_guessed_ = !options_.encoding && guess.bom_length == 0 && guess.encoding == Encoding::utf8;
  buf_offset_ = guess.bom_length;
  if (guess.encoding == Encoding::utf8) {
    buf_ = std::move(raw_);
    buf_.erase(0, guess.bom_length);
    raw_.clear();
    return Ok{};
  }
  auto t = Transcoder::open(guess.encoding);
  if (!t) return t.take_error();
  transcoder_ = std::move(*t);
  const std::string_view body = std::string_view(raw_).substr(guess.bom_length);
  if (guess.encoding == Encoding::windows1252)
    report_.undefined_bytes += count_windows1252_undefined(body, &report_.first_undefined_byte, guess.bom_length);
  Status s = transcoder_->convert(body, source_done_, buf_, guess.bom_length);
  if (!s) {
    Error e = s.take_error();
    e.file = name_;
    return e;
  }
  return Ok{};
}

// The encoding was guessed from the first block. When a later byte turns out
// not to be UTF-8 and everything before it was ASCII (which windows-1252
// reads the same way), the rest of the input is windows-1252, as the
// detection rule says; non-ASCII UTF-8 earlier means mixed encodings, an error.
bool CsvReader::switch_to_windows1252(const char* invalid) {
  if (!utf8_was_guessed_ || seen_non_ascii_) return false;
  utf8_was_guessed_ = false;
  auto t = Transcoder::open(Encoding::windows1252);
  if (!t) return false;
  transcoder_ = std::move(*t);
  const uint64_t offset = buf_offset_ + static_cast<uint64_t>(invalid - buf_.data());
  report_.encoding = Encoding::windows1252;
  report_.encoding_reason = "byte offset " + std::to_string(offset) + " is the first non-ASCII byte and is not UTF-8";
  const std::string rest = buf_.substr(pos_);
  buf_.resize(pos_);
  const uint64_t rest_offset = buf_offset_ + pos_;
  report_.undefined_bytes += count_windows1252_undefined(rest, &report_.first_undefined_byte, rest_offset);
  return static_cast<bool>(transcoder_->convert(rest, source_done_, buf_, rest_offset));
}

Status CsvReader::fill() {
  if (source_done_) return Ok{};
  if (pos_ > 0) {
    buf_.erase(0, pos_);
    buf_offset_ += pos_;
    pos_ = 0;
  }
  // A record longer than a block makes the reads grow, so re-scanning it
  // after each read stays linear overall.
  read_size_ = std::max(read_size_, buf_.size());
  std::string& target = transcoder_ ? raw_ : buf_;
  const size_t old = transcoder_ ? 0 : buf_.size();
  target.resize(old + read_size_);
  auto n = source_->read(target.data() + old, read_size_);
  if (!n) return n.take_error();
  target.resize(old + *n);
  if (*n == 0) source_done_ = true;
  if (transcoder_) {
    if (report_.encoding == Encoding::windows1252)
      report_.undefined_bytes += count_windows1252_undefined(raw_, &report_.first_undefined_byte, source_bytes_read_);
    Status s = transcoder_->convert(raw_, source_done_, buf_, source_bytes_read_);
    if (!s) {
      Error e = s.take_error();
      e.file = name_;
      return e;
    }
  }
  source_bytes_read_ += *n;
  return Ok{};
}

Status CsvReader::skip_lines(size_t count) {
  for (size_t k = 0; k < count; ++k) {
    for (;;) {
      const size_t nl = buf_.find_first_of("\r\n", pos_);
      if (nl == std::string::npos || (buf_[nl] == '\r' && nl + 1 == buf_.size() && !source_done_)) {
        if (source_done_) {
          pos_ = buf_.size();
          return Ok{};
        }
        if (Status s = fill(); !s) return s;
        continue;
      }
      pos_ = nl + ((buf_[nl] == '\r' && nl + 1 < buf_.size() && buf_[nl + 1] == '\n') ? 2 : 1);
      ++line_;
      break;
    }
  }
  return Ok{};
}

void CsvReader::build_stop_tables() {
  const auto delimiter = static_cast<unsigned char>(report_.delimiter);
  const auto quote = static_cast<unsigned char>(options_.quote);
  for (int b = 0x80; b < 0x100; ++b) stop_unquoted_[b] = stop_quoted_[b] = 1;  // UTF-8 check
  for (unsigned char b : {static_cast<unsigned char>('\n'), static_cast<unsigned char>('\r'),
                          static_cast<unsigned char>('\0'), quote})
    stop_unquoted_[b] = stop_quoted_[b] = 1;
  stop_unquoted_[delimiter] = 1;
}

Error CsvReader::error_at(const char* where, std::string message) const {
  // Locate the line start by scanning back from the error (errors are rare).
  const char* base = buf_.data();
  const char* start = where;
  while (start > base + pos_ && start[-1] != '\n' && start[-1] != '\r') --start;
  uint64_t line = line_;
  for (const char* q = base + pos_; q < start; ++q)
    line += *q == '\n' || (*q == '\r' && (q + 1 >= start || q[1] != '\n'));
  Error e = input_error(name_, line, std::move(message));
  e.column = utf8::code_point_count(std::string_view(start, static_cast<size_t>(where - start))) + 1;
  if (!transcoder_) e.byte_offset = buf_offset_ + static_cast<uint64_t>(where - base);
  return e;
}

CsvReader::Outcome CsvReader::fail(Error error) {
  error_ = std::move(error);
  return Outcome::failed;
}

CsvReader::Outcome CsvReader::parse_record() {
  fields_.clear();
  scratch_.clear();
  record_problem_.reset();
  record_bare_quotes_ = 0;
  const char* const base = buf_.data();
  const char* const end = base + buf_.size();
  const bool eof = source_done_;
  const char delimiter = report_.delimiter;
  const char quote = options_.quote;
  const char* p = base + pos_;
  uint64_t line = line_;
  record_line_ = line_;

  auto at_line_break = [&](const char* q) { return *q == '\n' || *q == '\r'; };
  // Steps over a line break at p; false when a CR is the last byte read so far.
  auto step_line_break = [&]() {
    if (*p == '\r') {
      if (p + 1 == end && !eof) return false;
      p += (p + 1 < end && p[1] == '\n') ? 2 : 1;
    } else {
      ++p;
    }
    ++line;
    return true;
  };
  // Checks the UTF-8 sequence at p and steps over it.
  auto step_utf8 = [&]() -> std::optional<Outcome> {
    int n = utf8::sequence_length(reinterpret_cast<const unsigned char*>(p),
                                  reinterpret_cast<const unsigned char*>(end));
    if (n < 0 && !eof) return Outcome::need_more;
    if (n <= 0) {
      if (switch_to_windows1252(p)) return Outcome::need_more;
      return fail(error_at(p, "invalid UTF-8 byte sequence (is the file in another encoding? "
                              "choose it with --encoding)"));
    }
    seen_non_ascii_ = true;
    p += n;
    return std::nullopt;
  };
  auto nul_error = [&]() { return fail(error_at(p, "NUL byte in the text; expected a text file")); };

  if (at_line_break(p)) {
    if (!step_line_break()) return Outcome::need_more;
    next_pos_ = static_cast<size_t>(p - base);
    next_line_ = line;
    return Outcome::blank_line;
  }
  for (;;) {
    // An unquoted field is scanned and kept; text after a closing quote is
    // scanned only to find where the field ends (the record is malformed).
    bool scan_unquoted = true, keep_scanned = true;
    if (p < end && *p == quote) {
      scan_unquoted = false;
      const char* opening = p;
      const char* segment = ++p;
      const auto scratch_start = static_cast<uint32_t>(scratch_.size());
      bool unescaped = false;
      for (;;) {
        while (p < end && !stop_quoted_[static_cast<unsigned char>(*p)]) ++p;
        if (p == end) {
          if (!eof) return Outcome::need_more;
          return fail(error_at(opening, "quoted field is never closed; expected a closing " + shown_char(quote) +
                                            " before the end of the file"));
        }
        if (*p == quote) {
          if (p + 1 == end && !eof) return Outcome::need_more;
          if (p + 1 < end && p[1] == quote) {
            scratch_.append(segment, static_cast<size_t>(p + 1 - segment));
            p += 2;
            segment = p;
            unescaped = true;
            continue;
          }
          break;
        }
        if (at_line_break(p)) {
          if (!step_line_break()) return Outcome::need_more;
        } else if (*p == '\0') {
          return nul_error();
        } else if (auto o = step_utf8()) {
          return *o;
        }
      }
      if (unescaped) {
        scratch_.append(segment, static_cast<size_t>(p - segment));
        fields_.push_back({scratch_start, static_cast<uint32_t>(scratch_.size() - scratch_start), true});
      } else {
        fields_.push_back({static_cast<uint32_t>(segment - base), static_cast<uint32_t>(p - segment), false});
      }
      ++p;
      if (p == end && !eof) return Outcome::need_more;
      if (p < end && *p != delimiter && !at_line_break(p)) {
        const Error where = error_at(p, "");
        record_problem_ = "unexpected " + shown_char(*p) + " after a closing quote at column " +
                          std::to_string(where.column) + "; expected the delimiter or the end of the line";
        scan_unquoted = true;
        keep_scanned = false;
      }
    }
    if (scan_unquoted) {
      const char* start = p;
      for (;;) {
        while (p < end && !stop_unquoted_[static_cast<unsigned char>(*p)]) ++p;
        if (p == end) {
          if (!eof) return Outcome::need_more;
          break;
        }
        if (*p == delimiter || at_line_break(p)) break;
        if (*p == quote) {
          if (record_bare_quotes_++ == 0) bare_quote_line_ = line;
          ++p;
        } else if (*p == '\0') {
          return nul_error();
        } else if (auto o = step_utf8()) {
          return *o;
        }
      }
      if (keep_scanned) fields_.push_back({static_cast<uint32_t>(start - base), static_cast<uint32_t>(p - start), false});
    }
    if (p < end && *p == delimiter) {
      ++p;
      continue;
    }
    record_end_ = static_cast<size_t>(p - base);
    if (p < end && !step_line_break()) return Outcome::need_more;
    next_pos_ = static_cast<size_t>(p - base);
    next_line_ = line;
    return Outcome::record;
  }
}

std::string_view CsvReader::field(size_t i) const {
  const FieldRef& f = fields_[i];
  return std::string_view((f.in_scratch ? scratch_.data() : buf_.data()) + f.offset, f.length);
}

namespace {
// Empty names become column_N; repeated names get _2, _3... (never colliding
// with another name in the header).
std::vector<std::string> unique_names(std::vector<std::string> names, std::vector<std::string>& notes) {
  std::unordered_set<std::string> taken(names.begin(), names.end());
  for (size_t i = 0; i < names.size(); ++i)
    if (names[i].empty()) {
      names[i] = "column_" + std::to_string(i + 1);
      notes.push_back("column " + std::to_string(i + 1) + " has no name in the header; named " + names[i]);
    }
  std::unordered_set<std::string> seen;
  for (size_t i = 0; i < names.size(); ++i) {
    if (seen.insert(names[i]).second) continue;
    std::string renamed;
    for (size_t k = 2;; ++k) {
      renamed = names[i] + "_" + std::to_string(k);
      if (!taken.count(renamed) && !seen.count(renamed)) break;
    }
    notes.push_back("column " + std::to_string(i + 1) + " repeats the name '" + names[i] + "'; renamed " + renamed);
    names[i] = renamed;
    seen.insert(renamed);
  }
  return names;
}
}  // namespace

Status CsvReader::read_header() {
  const std::string_view sample = std::string_view(buf_).substr(pos_);
  if (options_.delimiter) {
    report_.delimiter = *options_.delimiter;
    report_.delimiter_reason = "given";
  } else {
    report_.delimiter = detect_delimiter(sample, options_.quote, source_done_, report_.delimiter_reason);
  }
  build_stop_tables();
  if (options_.header == HeaderMode::detect) {
    report_.header = detect_header(sample, report_.delimiter, options_.quote, source_done_, report_.header_reason);
  } else {
    report_.header = options_.header == HeaderMode::yes;
    report_.header_reason = "given";
  }
  for (;;) {
    if (pos_ == buf_.size()) {
      if (source_done_)
        return input_error(name_, 0,
                           report_.header ? "the file is empty; expected a header line" : "the file is empty; expected records");
      if (Status s = fill(); !s) return s;
      continue;
    }
    const Outcome o = parse_record();
    if (o == Outcome::need_more) {
      if (Status s = fill(); !s) return s;
      continue;
    }
    if (o == Outcome::failed) return *error_;
    if (o == Outcome::blank_line) {
      if (report_.blank_lines++ == 0) report_.first_blank_line = line_;
      pos_ = next_pos_;
      line_ = next_line_;
      continue;
    }
    break;
  }
  // A malformed header leaves no column names to trust; a malformed first
  // data record is handled like any other record by next_batch().
  if (record_problem_ && report_.header) return input_error(name_, record_line_, *record_problem_);
  if (report_.header) {
    std::vector<std::string> first;
    for (size_t i = 0; i < fields_.size(); ++i) first.emplace_back(field(i));
    names_ = unique_names(std::move(first), report_.header_notes);
    pos_ = next_pos_;
    line_ = next_line_;
  } else {
    for (size_t i = 0; i < fields_.size(); ++i) names_.push_back("column_" + std::to_string(i + 1));
  }
  builders_.resize(names_.size());
  last_batch_bytes_.assign(names_.size(), 0);
  return Ok{};
}

Status CsvReader::handle_problem(std::string reason) {
  if (!options_.lenient) return collect_more_problems_and_fail(std::move(reason));
  if (report_.rejected++ < kListedProblems) report_.first_rejected_lines.push_back(record_line_);
  if (!on_reject_) return Ok{};
  return on_reject_(RejectedRecord{record_line_, std::move(reason), buf_.substr(pos_, record_end_ - pos_)});
}

Status CsvReader::collect_more_problems_and_fail(std::string first_reason) {
  std::vector<uint64_t> lines{record_line_};
  const uint64_t first_line = record_line_;
  pos_ = next_pos_;
  line_ = next_line_;
  bool more = false;
  while (!more) {
    if (pos_ == buf_.size()) {
      if (source_done_) break;
      if (Status s = fill(); !s) break;
      continue;
    }
    const Outcome o = parse_record();
    if (o == Outcome::need_more) {
      if (Status s = fill(); !s) break;
      continue;
    }
    if (o == Outcome::failed) break;
    if (o == Outcome::record && (record_problem_ || fields_.size() != names_.size())) {
      if (lines.size() == kListedProblems) more = true;
      else lines.push_back(record_line_);
    }
    pos_ = next_pos_;
    line_ = next_line_;
  }
  std::string message = first_reason + ". Malformed record(s) at line(s) " + join_lines(lines) +
                        (more ? " and more" : "");
  finished_ = true;
  return input_error(name_, first_line, std::move(message));
}

Result<std::optional<Table>> CsvReader::next_batch() {
  if (finished_) return std::optional<Table>{};
  const size_t columns = names_.size();
  for (size_t c = 0; c < columns; ++c)
    if (last_batch_bytes_[c] > 0)
      builders_[c].reserve(options_.batch_rows, last_batch_bytes_[c] + last_batch_bytes_[c] / 16 + 64);
  std::vector<int64_t> lines;
  lines.reserve(std::min<size_t>(options_.batch_rows, 1 << 16));
  while (lines.size() < options_.batch_rows) {
    if (pos_ == buf_.size()) {
      if (source_done_) break;
      if (Status s = fill(); !s) return s.take_error();
      continue;
    }
    const Outcome o = parse_record();
    if (o == Outcome::need_more) {
      if (Status s = fill(); !s) return s.take_error();
      continue;
    }
    if (o == Outcome::failed) {
      finished_ = true;
      return *error_;
    }
    if (o == Outcome::blank_line) {
      if (report_.blank_lines++ == 0) report_.first_blank_line = line_;
    } else if (record_problem_ || fields_.size() != columns) {
      std::string reason = record_problem_ ? *record_problem_
                                           : "expected " + std::to_string(columns) + " fields, found " +
                                                 std::to_string(fields_.size());
      if (Status s = handle_problem(std::move(reason)); !s) return s.take_error();
    } else {
      for (size_t c = 0; c < columns; ++c) builders_[c].append(field(c));
      lines.push_back(static_cast<int64_t>(record_line_));
      if (record_bare_quotes_ > 0 && (report_.bare_quotes += record_bare_quotes_) == record_bare_quotes_)
        report_.first_bare_quote_line = bare_quote_line_;
    }
    pos_ = next_pos_;
    line_ = next_line_;
  }
  if (lines.empty()) {
    finished_ = true;
    return std::optional<Table>{};
  }
  std::vector<ColumnPtr> cols;
  cols.reserve(columns);
  for (size_t c = 0; c < columns; ++c) {
    last_batch_bytes_[c] = builders_[c].bytes();
    auto col = std::make_shared<Column>(Type::text);
    col->append_chunk(builders_[c].finish());
    cols.push_back(std::move(col));
  }
  auto line_chunk = std::make_shared<ColumnChunk>();
  line_chunk->rows = lines.size();
  line_chunk->numbers = std::move(lines);
  auto line_column = std::make_shared<Column>(Type::integer);
  line_column->append_chunk(std::move(line_chunk));
  report_.rows += line_column->size();
  auto table = Table::make(names_, std::move(cols), std::move(line_column));
  if (!table) return table.take_error();
  return std::optional<Table>(std::move(*table));
}

Result<Table> read_csv(std::unique_ptr<ByteSource> source, std::string display_name, CsvOptions options,
                       ReadReport* report, CsvReader::RejectSink on_reject, ProgressSink on_progress) {
  auto reader = CsvReader::open(std::move(source), std::move(display_name), options, std::move(on_reject));
  if (!reader) return reader.take_error();
  Table table;
  for (;;) {
    auto batch = (*reader)->next_batch();
    if (!batch) return batch.take_error();
    if (!batch->has_value()) break;
    if (Status s = table.append(**batch); !s) return s.take_error();
    if (on_progress) on_progress((*reader)->bytes_read(), (*reader)->total_bytes());
  }
  if (table.column_count() == 0) {
    std::vector<ColumnPtr> empty;
    for (size_t c = 0; c < (*reader)->column_names().size(); ++c) empty.push_back(std::make_shared<Column>());
    auto made = Table::make((*reader)->column_names(), std::move(empty), std::make_shared<Column>(Type::integer));
    if (!made) return made.take_error();
    table = std::move(*made);
  }
  if (report) *report = (*reader)->report();
  return table;
}

}  // namespace tamis
