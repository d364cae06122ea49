#include "run_support.hpp"

#include <algorithm>
#include <filesystem>

#include "dates.hpp"

namespace tamis::cli {

Result<Recipe> load_recipe_file(const std::string& path) {
  auto source = open_file_source(path);
  if (!source) return source.take_error();
  std::string text;
  char buffer[1 << 16];
  for (;;) {
    auto n = (*source)->read(buffer, sizeof buffer);
    if (!n) return n.take_error();
    if (*n == 0) break;
    text.append(buffer, *n);
  }
  return parse_recipe(text, path == "-" ? "<stdin>" : path);
}

namespace {

// The table without the listed rows (sorted, distinct).
Result<Table> without_rows(const Table& table, const std::vector<size_t>& dropped) {
  auto filter = [&](const Column& column) {
    auto out = std::make_shared<Column>(column.type(), column.scale());
    size_t next = 0;
    for (size_t k = 0; k < column.chunk_count(); ++k) {
      const ColumnChunk& chunk = column.chunk(k);
      const size_t start = column.chunk_start(k);
      const size_t end = start + chunk.rows;
      if (next >= dropped.size() || dropped[next] >= end) {
        out->append_chunk(column.chunk_ptr(k));
        continue;
      }
      if (column.type() == Type::text) {
        TextChunkBuilder builder;
        for (size_t i = 0; i < chunk.rows; ++i) {
          if (next < dropped.size() && dropped[next] == start + i) {
            ++next;
            continue;
          }
          if (chunk.is_null(i)) builder.append_null();
          else builder.append(chunk.text(i));
        }
        out->append_chunk(builder.finish());
        continue;
      }
      auto kept = std::make_shared<ColumnChunk>();
      std::vector<bool> nulls;
      for (size_t i = 0; i < chunk.rows; ++i) {
        if (next < dropped.size() && dropped[next] == start + i) {
          ++next;
          continue;
        }
        kept->numbers.push_back(chunk.numbers[i]);
        nulls.push_back(chunk.is_null(i));
      }
      kept->rows = kept->numbers.size();
      if (std::find(nulls.begin(), nulls.end(), true) != nulls.end()) {
        kept->validity.assign((kept->rows + 63) / 64, 0);
        for (size_t i = 0; i < kept->rows; ++i)
          if (!nulls[i]) kept->validity[i >> 6] |= uint64_t{1} << (i & 63);
      }
      out->append_chunk(std::move(kept));
    }
    return ColumnPtr(std::move(out));
  };
  std::vector<ColumnPtr> columns;
  for (size_t c = 0; c < table.column_count(); ++c) columns.push_back(filter(table.column(c)));
  return Table::make(table.names(), std::move(columns), filter(table.source_lines()));
}

}  // namespace

Result<InputCheck> InputCheck::make(const RecipeInput& input, const std::vector<std::string>& file_columns,
                                    const std::string& file) {
  auto keep = check_input_columns(input, file_columns, file);
  if (!keep) return keep.take_error();
  InputCheck check;
  check.keep_ = std::move(*keep);
  check.all_kept_ = check.keep_.size() == file_columns.size();
  for (size_t c : check.keep_) {
    Type type = Type::text;
    for (const InputColumn& declared : input.columns)
      if (declared.name == file_columns[c]) type = declared.type;
    check.types_.push_back(type);
    check.schema_.push_back({file_columns[c], Type::text, 0});
  }
  return check;
}

Result<Table> InputCheck::apply(const Table& raw, std::vector<RemovedRow>& failing) const {
  Table kept = raw;
  if (!all_kept_) {
    std::vector<std::string> names;
    std::vector<ColumnPtr> columns;
    for (size_t c : keep_) {
      names.push_back(raw.name(c));
      columns.push_back(raw.column_ptr(c));
    }
    auto t = Table::make(std::move(names), std::move(columns), raw.source_lines_ptr());
    if (!t) return t.take_error();
    kept = std::move(*t);
  }
  if (std::all_of(types_.begin(), types_.end(), [](Type t) { return t == Type::text; })) return kept;
  static const DateFormat iso = DateFormat::compile("%Y-%m-%d").value();
  std::vector<size_t> dropped;
  for (size_t r = 0; r < kept.row_count(); ++r)
    for (size_t c = 0; c < types_.size(); ++c) {
      if (types_[c] == Type::text || kept.column(c).is_null(r)) continue;
      const std::string_view value = kept.column(c).text(r);
      if (fits_declared_type(types_[c], value, iso)) continue;
      failing.push_back({kept.source_line(r), "column '" + kept.name(c) + "' is declared " +
                                                  std::string(type_name(types_[c])) + " in input.columns; '" +
                                                  std::string(value) + "' is not"});
      dropped.push_back(r);
      break;
    }
  if (dropped.empty()) return kept;
  return without_rows(kept, dropped);
}

Status RejectsFile::open(const std::string& path) {
  auto sink = open_file_sink(path);
  if (!sink) return sink.take_error();
  sink_ = std::move(*sink);
  auto writer = CsvWriter::make(*sink_, CsvWriteOptions{});
  if (!writer) return writer.take_error();
  writer_.emplace(std::move(*writer));
  const std::string_view header[] = {"line", "reason", "record"};
  return writer_->write_row(header);
}

Status RejectsFile::add(uint64_t line, const std::string& reason, const std::string& record) {
  if (!writer_) return Ok{};
  const std::string number = std::to_string(line);
  const std::string_view row[] = {number, reason, record};
  return writer_->write_row(row);
}

Status RejectsFile::commit() { return writer_ ? writer_->finish() : Status(Ok{}); }

std::string record_text(const Table& table, size_t row, char delimiter) {
  std::string out;
  for (size_t c = 0; c < table.column_count(); ++c) {
    if (c) out += delimiter;
    if (table.column(c).is_null(row)) continue;
    const std::string_view v = table.column(c).text(row);
    const bool quote = v.find_first_of(std::string{delimiter, '"', '\r', '\n'}) != std::string_view::npos;
    if (!quote) {
      out.append(v);
      continue;
    }
    out += '"';
    for (char ch : v) {
      if (ch == '"') out += '"';
      out += ch;
    }
    out += '"';
  }
  return out;
}

std::optional<size_t> row_at_line(const Table& table, uint64_t line) {
  size_t lo = 0, hi = table.row_count();
  while (lo < hi) {
    const size_t mid = lo + (hi - lo) / 2;
    if (table.source_line(mid) < line) lo = mid + 1;
    else hi = mid;
  }
  if (lo < table.row_count() && table.source_line(lo) == line) return lo;
  return std::nullopt;
}

bool same_file(const std::string& a, const std::string& b) {
  std::error_code ec;
  return a != "-" && b != "-" && std::filesystem::exists(a, ec) && std::filesystem::exists(b, ec) &&
         std::filesystem::equivalent(a, b, ec);
}

}  // namespace tamis::cli
