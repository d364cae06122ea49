#include "steps/typed_support.hpp"

#include <vector>

#include "csv_writer.hpp"
#include "dates.hpp"
#include "utf8.hpp"

namespace tamis {

Result<OnError> read_on_error(StepParams& params) {
  auto word = params.choice("on_error", {"null", "keep", "reject"}, "null");
  if (!word) return word.take_error();
  return *word == "null" ? OnError::null : *word == "keep" ? OnError::keep : OnError::reject;
}

std::string_view on_error_name(OnError on_error) {
  constexpr std::string_view names[] = {"null", "keep", "reject"};
  return names[static_cast<size_t>(on_error)];
}

void append_canonical_value(Type type, int scale, int64_t value, std::string& out) {
  // The CSV writer's own function, so a step's canonical text and the
  // written file can never disagree. The one-row chunk and the column are
  // kept between calls: this runs for every converted cell. So does the
  // text of recent dates, since a column's dates repeat.
  static const DateFormat iso = DateFormat::compile("%Y-%m-%d").value();
  if (type == Type::date) {
    struct Cached {
      int64_t days = 0;
      std::string text;  // empty: nothing cached
    };
    constexpr size_t kCachedDates = 1024;  // a power of two
    thread_local std::vector<Cached> dates(kCachedDates);
    Cached& slot = dates[static_cast<uint64_t>(value) & (kCachedDates - 1)];
    if (slot.text.empty() || slot.days != value) {
      slot.days = value;
      slot.text.clear();
      iso.format(static_cast<int32_t>(value), slot.text);
    }
    out += slot.text;
    return;
  }
  thread_local ColumnChunk one = [] {
    ColumnChunk c;
    c.rows = 1;
    c.numbers.assign(1, 0);
    return c;
  }();
  thread_local Column column;
  if (column.type() != type || column.scale() != scale) column = Column(type, scale);
  one.numbers[0] = value;
  append_canonical(column, one, 0, iso, out);
}

std::string quoted_value(std::string_view value) {
  constexpr size_t kShownCodePoints = 40;
  size_t end = 0;
  for (size_t n = 0; n < kShownCodePoints && end < value.size(); ++n) utf8::next(value, end);
  std::string out = "'";
  out.append(value.substr(0, end));
  out += end < value.size() ? "…'" : "'";
  return out;
}

void TypedChunkBuilder::append_null() {
  chunk_->set_own_null(chunk_->numbers.size());
  chunk_->numbers.push_back(0);
}

std::shared_ptr<const ColumnChunk> TypedChunkBuilder::finish() {
  auto& c = *chunk_;
  c.rows = c.numbers.size();
  if (!c.validity.empty()) c.validity.resize((c.rows + 63) / 64, ~uint64_t{0});
  std::shared_ptr<const ColumnChunk> out = std::move(chunk_);
  chunk_ = std::make_shared<ColumnChunk>();
  return out;
}

void ConversionTally::restart_unless(const ChangeRecord& change) {
  if (record_ == &change) return;
  *this = ConversionTally{};
  record_ = &change;
}

void ConversionTally::note_failure(uint64_t line, std::string_view value) {
  if (failed++ == 0) {
    first_failed_line = line;
    first_failed_value = quoted_value(value);
  }
}

void ConversionTally::note_ambiguous(uint64_t line, std::string_view value) {
  if (ambiguous++ == 0) {
    first_ambiguous_line = line;
    first_ambiguous_value = quoted_value(value);
  }
}

std::string failure_warning(const ConversionTally& tally, const std::string& column, std::string_view how,
                            OnError on_error) {
  if (tally.failed == 0) return "";
  const bool one = tally.failed == 1;
  const std::string consequence = on_error == OnError::null   ? (one ? "it became NULL" : "they became NULL")
                                  : on_error == OnError::keep ? (one ? "it was left as it was" : "they were left as they were")
                                                              : (one ? "its row was rejected" : "their rows were rejected");
  return column + ": " + std::to_string(tally.failed) + (one ? " value" : " values") + " could not be " +
         std::string(how) + "; " + consequence + " (the first on line " + std::to_string(tally.first_failed_line) +
         ": " + tally.first_failed_value + ")";
}

}  // namespace tamis
