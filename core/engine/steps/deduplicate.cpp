#include "steps/deduplicate.hpp"

#include "sql/sql_step.hpp"
#include "steps/row_filter.hpp"
#include "steps/typed_support.hpp"

namespace tamis {

namespace {

// The index's table is far larger than the CPU caches: the slot of the key
// this many rows ahead is fetched while the current one is looked up.
constexpr size_t kPrefetchAhead = 8;

struct DeduplicateState final : StepState {
  explicit DeduplicateState(RowIndexTuning tuning) : index(tuning) {}
  RowIndex index;
};

std::vector<uint64_t> hashes_of(const RowKeys& keys, const RowIndex& index) {
  std::vector<uint64_t> hashes(keys.size());
  for (size_t r = 0; r < keys.size(); ++r) hashes[r] = index.hash_of(keys.key(r));
  return hashes;
}

class Deduplicate final : public Step {
 public:
  Deduplicate(std::vector<size_t> columns, bool all_columns, bool keep_last, KeyCompare compare,
              std::optional<RowIndexTuning> tuning, Schema input)
      : columns_(std::move(columns)), all_columns_(all_columns), keep_last_(keep_last), compare_(compare),
        tuning_(tuning), input_(std::move(input)) {}

  std::string_view op() const override { return "deduplicate"; }

  std::string describe() const override {
    std::string what = all_columns_ ? "Remove rows that repeat another row in every column"
                                    : "Remove rows whose " + join_names(input_, columns_) + " repeat another row's";
    if (compare_ == KeyCompare::trimmed) what += " (ignoring white space at the ends of text)";
    if (compare_ == KeyCompare::casefold) what += " (ignoring differences of letter case)";
    return what + (keep_last_ ? ", keeping the last of each set." : ", keeping the first of each set.");
  }

  std::unique_ptr<StepState> start() const override {
    return std::make_unique<DeduplicateState>(tuning_ ? *tuning_ : default_row_index_tuning());
  }

  bool needs_first_pass() const override { return keep_last_; }

  Status observe(const Table& batch, StepState* state) const override {
    RowIndex& index = static_cast<DeduplicateState*>(state)->index;
    const RowKeys keys(batch, columns_, compare_);
    ColumnCursor lines(batch.source_lines());
    const std::vector<uint64_t> hashes = hashes_of(keys, index);
    for (size_t r = 0; r < keys.size(); ++r, lines.next()) {
      if (r + kPrefetchAhead < keys.size()) index.prefetch(hashes[r + kPrefetchAhead]);
      const auto line = static_cast<uint64_t>(lines.number());
      auto stored = index.insert(keys.key(r), hashes[r], line);
      if (!stored) return stored.take_error();
      if (!stored->second)
        if (Status s = index.set_line(stored->first.record, line); !s) return s;
    }
    return Ok{};
  }

  Result<Table> apply(const Table& batch, StepState* state, ChangeRecord& change) const override {
    RowIndex& index = static_cast<DeduplicateState*>(state)->index;
    const RowKeys keys(batch, columns_, compare_);
    ColumnCursor lines(batch.source_lines());
    std::vector<uint8_t> keep;  // filled once a row is removed
    size_t removed = 0;
    const std::vector<uint64_t> hashes = hashes_of(keys, index);
    for (size_t r = 0; r < keys.size(); ++r, lines.next()) {
      if (r + kPrefetchAhead < keys.size()) index.prefetch(hashes[r + kPrefetchAhead]);
      const auto line = static_cast<uint64_t>(lines.number());
      uint64_t kept_line = line;
      if (keep_last_) {
        // Read-only, so running it again in a later pass changes nothing.
        auto found = index.find(keys.key(r), hashes[r]);
        if (!found) return found.take_error();
        if (!*found) return usage_error("(deduplicate) a row on line " + std::to_string(line) +
                                        " was not seen in the first pass over the input");
        kept_line = (*found)->line;
      } else {
        auto stored = index.insert(keys.key(r), hashes[r], line);
        if (!stored) return stored.take_error();
        kept_line = stored->first.line;
      }
      if (kept_line == line) continue;
      if (keep.empty()) keep.assign(batch.row_count(), 1);
      keep[r] = 0;
      ++removed;
      change.note_removed(line, "duplicate of line " + std::to_string(kept_line));
    }
    change.rows_in += batch.row_count();
    change.rows_out += batch.row_count() - removed;
    if (removed == 0) return batch;
    return select_rows(batch, keep);
  }

  SqlSupport sql_support(Dialect) const override {
    // ROW_NUMBER() OVER (PARTITION BY ... ORDER BY line) in every dialect;
    // trimming the White_Space set is TRIM with those characters (a regular
    // expression in MySQL). SQL's LOWER is case mapping, not case folding.
    return compare_ == KeyCompare::casefold ? SqlSupport::approximate : SqlSupport::exact;
  }

  Result<SqlStepText> to_sql(const SqlContext& sql) const override {
    const Dialect d = sql.dialect;
    std::string keys;
    for (const size_t c : columns_) {
      std::string key = sql.key(c);
      if (input_[c].type == Type::text && compare_ == KeyCompare::trimmed)
        key = sql::exact_key(d, sql::trim_characters(d, sql.column(c), sql::white_space_characters(), "both"), Type::text);
      if (input_[c].type == Type::text && compare_ == KeyCompare::casefold)
        key = sql::exact_key(d, std::string("LOWER(") + sql.column(c) + ")", Type::text);
      keys += (keys.empty() ? "" : ", ") + key;
    }
    const std::string copy = sql.helper("tamis_copy");
    SqlStepText out;
    out.select = std::string("SELECT ") + sql.column_list() + std::string("\nFROM (SELECT *,\n             ROW_NUMBER() OVER (PARTITION BY ") + keys +
                 std::string("\n                                ORDER BY ") + sql.line() + (keep_last_ ? " DESC" : "") +
                 std::string(") AS ") + copy + std::string("\n      FROM ") + sql.from + ") AS numbered\nWHERE " + copy + " = 1";
    if (compare_ == KeyCompare::casefold) out.approximation = "LOWER stands in for Unicode case folding";
    return out;
  }

  nlohmann::ordered_json parameters() const override {
    nlohmann::ordered_json p;
    if (all_columns_) {
      p["columns"] = "*";
    } else {
      p["columns"] = nlohmann::ordered_json::array();
      for (const size_t c : columns_) p["columns"].push_back(input_[c].name);
    }
    p["keep"] = keep_last_ ? "last" : "first";
    p["compare"] = compare_ == KeyCompare::exact ? "exact" : compare_ == KeyCompare::trimmed ? "trimmed" : "casefold";
    return p;
  }

 private:
  std::vector<size_t> columns_;
  bool all_columns_;
  bool keep_last_;
  KeyCompare compare_;
  std::optional<RowIndexTuning> tuning_;
  Schema input_;
};

Result<std::unique_ptr<Step>> parse_with(StepParams& params, std::optional<RowIndexTuning> tuning) {
  // Without columns, every column is compared, as with "*".
  const auto* written = params.raw("columns");
  const bool all_columns = !written || (written->is_string() && written->get<std::string>() == "*");
  auto columns = params.columns_or_all("columns");
  if (!columns) return columns.take_error();
  if (columns->empty()) return params.error("columns", "the table has no columns to compare");
  auto keep = params.choice("keep", {"first", "last"}, "first");
  if (!keep) return keep.take_error();
  auto compare = params.choice("compare", {"exact", "trimmed", "casefold"}, "exact");
  if (!compare) return compare.take_error();
  if (Status s = params.finish(); !s) return s.take_error();
  const KeyCompare how = *compare == "exact" ? KeyCompare::exact
                         : *compare == "trimmed" ? KeyCompare::trimmed
                                                 : KeyCompare::casefold;
  return std::unique_ptr<Step>(
      new Deduplicate(std::move(*columns), all_columns, *keep == "last", how, tuning, params.input()));
}

}  // namespace

Result<std::unique_ptr<Step>> parse_deduplicate(StepParams& params) { return parse_with(params, std::nullopt); }

Result<std::unique_ptr<Step>> parse_deduplicate_tuned(StepParams& params, RowIndexTuning tuning) {
  return parse_with(params, tuning);
}

}  // namespace tamis
