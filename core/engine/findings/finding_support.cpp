#include "findings/finding_support.hpp"

#include <algorithm>
#include <set>

#include "recipe.hpp"
#include "steps/typed_support.hpp"
#include "string_index.hpp"
#include "utf8.hpp"

namespace tamis {

ColumnValues collect_values(const Column& column) {
  ColumnValues out;
  if (column.type() != Type::text) return out;
  StringIndex numbers;  // numbers the values as out.values holds them
  uint64_t row = 0;
  auto add = [&](std::string_view v, uint64_t count, uint64_t first_row) {
    out.non_null += count;
    const auto [number, added] = numbers.insert(v);
    if (added) out.values.push_back({v, count, first_row});
    else out.values[number].count += count;
  };
  for (size_t k = 0; k < column.chunk_count(); ++k) {
    const ColumnChunk& chunk = column.chunk(k);
    if (chunk.layout == TextLayout::dictionary) {
      uint64_t non_null = 0;
      for (const DictionaryCount& c : count_dictionary_values(chunk)) {
        add(chunk.own_text(c.code), c.count, row + c.first_row);
        non_null += c.count;
      }
      out.nulls += chunk.rows - non_null;
      row += chunk.rows;
      continue;
    }
    for (size_t i = 0; i < chunk.rows; ++i, ++row) {
      if (chunk.is_null(i)) {
        ++out.nulls;
        continue;
      }
      add(chunk.text(i), 1, row);
    }
  }
  return out;
}

bool ValuesCache::holds(const Entry& entry, const Column& column) {
  if (entry.type != column.type() || entry.chunks.size() != column.chunk_count()) return false;
  for (size_t k = 0; k < entry.chunks.size(); ++k)
    if (entry.chunks[k] != column.chunk_ptr(k)) return false;
  return true;
}

const ColumnValues* ValuesCache::find(const Column& column) const {
  for (const Entry& entry : entries_)
    if (holds(entry, column)) return entry.values.get();
  return nullptr;
}

const ColumnValues& ValuesCache::add(const Column& column, ColumnValues values) {
  Entry entry;
  entry.type = column.type();
  for (size_t k = 0; k < column.chunk_count(); ++k) entry.chunks.push_back(column.chunk_ptr(k));
  entry.values = std::make_unique<ColumnValues>(std::move(values));
  entries_.push_back(std::move(entry));
  return *entries_.back().values;
}

void ValuesCache::keep_only(const Table& table) {
  std::erase_if(entries_, [&table](const Entry& entry) {
    for (size_t c = 0; c < table.column_count(); ++c)
      if (holds(entry, table.column(c))) return false;
    return true;
  });
}

const ColumnValues& DetectorContext::values(size_t column) {
  const Column& counted = table.column(column);
  if (const ColumnValues* known = values_.find(counted)) return *known;
  spend(table.row_count());
  return values_.add(counted, collect_values(counted));
}

std::vector<size_t> DetectorContext::text_columns() const {
  std::vector<size_t> out;
  for (size_t c = 0; c < table.column_count(); ++c) {
    const Column& column = table.column(c);
    if (column.type() != Type::text) continue;
    bool any = false;
    for (size_t k = 0; k < column.chunk_count() && !any; ++k) {
      const ColumnChunk& chunk = column.chunk(k);
      if (!chunk.has_nulls()) any = chunk.rows > 0;
      else
        for (size_t i = 0; i < chunk.rows && !any; ++i) any = !chunk.is_null(i);
    }
    if (any) out.push_back(c);
  }
  return out;
}

Task<bool> DetectorContext::add_fix(Finding& finding, nlohmann::ordered_json step, bool safe, std::string why_review,
                                    StepList first) {
  auto preview = co_await this->preview(std::move(first), step);
  if (!preview) {
    finding.details.push_back("the suggested " + step.value("op", std::string("?")) +
                              " step did not run: " + preview.error().to_string());
    co_return false;
  }
  SuggestedFix fix;
  fix.step = std::move(step);
  fix.safe = safe;
  if (!safe) fix.why_review = std::move(why_review);
  fix.preview = std::move(*preview);
  finding.fixes.push_back(std::move(fix));
  co_return true;
}

StepList DetectorContext::earlier_fixes(const std::string& column,
                                        std::initializer_list<std::string_view> kinds) const {
  StepList out;
  for (const Finding& f : findings) {
    if (f.fixes.empty() || f.columns.size() != 1 || f.columns[0] != column) continue;
    if (std::find(kinds.begin(), kinds.end(), f.kind) != kinds.end()) out.push_back(f.fixes.front().step);
  }
  return out;
}

namespace {

Result<CompiledRecipe> compile_steps(const Schema& schema, const StepList& steps) {
  Recipe recipe;
  for (const auto& s : steps) {
    const nlohmann::json definition = nlohmann::json::parse(s.dump());
    recipe.steps.push_back({definition.value("op", std::string()), true, definition.value("note", std::string()),
                            definition});
  }
  return compile_recipe(recipe, schema);
}

std::string row_text(const Table& table, size_t row) {
  std::string out;
  for (size_t c = 0; c < table.column_count(); ++c) {
    if (c) out += " | ";
    out += cell_text(table.column(c), row);
  }
  return out;
}

// The removed rows among `lines` (source lines, all in `base`), in row order.
void removed_examples(const Table& base, std::set<uint64_t> lines, FixPreview& preview) {
  ColumnCursor cursor(base.source_lines());
  for (size_t row = 0; row < base.row_count() && !lines.empty(); ++row, cursor.next()) {
    const auto line = static_cast<uint64_t>(cursor.number());
    if (!lines.erase(line)) continue;
    FixExample e;
    e.before = row_text(base, row);
    e.removed = true;
    e.source_line = line;
    preview.examples.push_back(std::move(e));
  }
}

void changed_examples(const Table& base, const Table& after, const ChangeRecord& change, size_t limit,
                      FixPreview& preview) {
  struct Pair {
    std::string name;
    const Column* before;
    const Column* after;
    ColumnCursor before_cursor, after_cursor;
  };
  std::vector<Pair> pairs;
  for (const auto& [name, count] : change.cells_changed) {
    if (count == 0) continue;
    const auto b = base.find(name);
    const auto a = after.find(name);
    if (!b || !a) continue;
    pairs.push_back({name, &base.column(*b), &after.column(*a), ColumnCursor(base.column(*b)),
                     ColumnCursor(after.column(*a))});
  }
  if (pairs.empty() || base.row_count() != after.row_count()) return;
  ColumnCursor lines(base.source_lines());
  std::string before_text, after_text;
  const auto text_at = [](const Column& column, const ColumnCursor& cursor, std::string& out) {
    out.clear();
    if (cursor.is_null()) out = "NULL";
    else if (column.type() == Type::text) out.assign(cursor.text());
    else append_canonical_value(column.type(), column.scale(), cursor.number(), out);
  };
  for (size_t row = 0; row < base.row_count() && preview.examples.size() < limit; ++row) {
    for (Pair& p : pairs) {
      const bool same_null = p.before_cursor.is_null() == p.after_cursor.is_null();
      bool same = same_null && p.before_cursor.is_null();
      if (same_null && !same) {
        if (p.before->type() == Type::text && p.after->type() == Type::text) {
          same = p.before_cursor.text() == p.after_cursor.text();
        } else {
          text_at(*p.before, p.before_cursor, before_text);
          text_at(*p.after, p.after_cursor, after_text);
          same = before_text == after_text;
        }
      }
      if (!same && preview.examples.size() < limit) {
        text_at(*p.before, p.before_cursor, before_text);
        text_at(*p.after, p.after_cursor, after_text);
        preview.examples.push_back({p.name, before_text, after_text, false, static_cast<uint64_t>(lines.number())});
      }
      p.before_cursor.next();
      p.after_cursor.next();
    }
    lines.next();
  }
}

// The examples of a fix, batch by batch: removed rows while any are
// removed, else changed cells, in source order either way.
class ExampleCollector {
 public:
  explicit ExampleCollector(size_t limit) : limit_(limit) {}
  void add(const Table& before, const Table& after, const ChangeRecord& change) {
    if (removed_.examples.size() < limit_ && change.removed.size() > removed_seen_) {
      std::set<uint64_t> lines;
      for (size_t i = removed_seen_; i < change.removed.size() && removed_.examples.size() + lines.size() < limit_; ++i)
        lines.insert(change.removed[i].line);
      removed_examples(before, std::move(lines), removed_);
    }
    removed_seen_ = change.removed.size();
    if (changed_.examples.size() < limit_ && change.rows_removed + change.rows_rejected == 0)
      changed_examples(before, after, change, limit_, changed_);
  }
  std::vector<FixExample> take(bool rows_removed) {
    return std::move(rows_removed ? removed_.examples : changed_.examples);
  }

 private:
  size_t limit_;
  size_t removed_seen_ = 0;
  FixPreview removed_, changed_;
};

}  // namespace

Result<Table> apply_steps(const Table& table, const StepList& steps) {
  if (steps.empty()) return table;
  auto compiled = compile_steps(schema_of(table), steps);
  if (!compiled) return compiled.take_error();
  return apply_recipe(*compiled, table);
}

Task<Result<Table>> apply_sliced(SliceControl& control, const Table& table, const StepList& steps,
                                 size_t batch_cells) {
  if (steps.empty()) co_return table;
  auto compiled = compile_steps(schema_of(table), steps);
  if (!compiled) co_return compiled.take_error();
  BatchedRun run(std::move(*compiled), table, batch_cells);
  co_await SlicedWork{control, [&run](WorkBudget& budget) { return run.advance(budget); }};
  if (run.error()) co_return *run.error();
  co_return run.take_output();
}

Task<Result<FixPreview>> DetectorContext::preview(StepList first, nlohmann::ordered_json step) {
  first.push_back(step);
  auto compiled = compile_steps(schema_of(table), first);
  if (!compiled) co_return compiled.take_error();
  BatchedRun run(std::move(*compiled), table, options.batch_cells);
  run.discard_output();
  ExampleCollector examples(options.examples);
  run.observe_batches([&examples](const Table& before, const Table& after, const ChangeRecord& change) {
    examples.add(before, after, change);
  });
  co_await SlicedWork{control_, [&run](WorkBudget& budget) { return run.advance(budget); }};
  if (run.error()) co_return *run.error();
  const ChangeRecord& change = run.changes().back();
  FixPreview preview;
  preview.rows_removed = change.rows_removed + change.rows_rejected;
  for (const auto& [name, count] : change.cells_changed) preview.cells_changed += count;
  preview.warnings = change.conflicts;
  preview.warnings.insert(preview.warnings.end(), change.warnings.begin(), change.warnings.end());
  preview.examples = examples.take(preview.rows_removed > 0);
  co_return preview;
}

std::string cell_text(const Column& column, size_t row) {
  if (column.is_null(row)) return "NULL";
  if (column.type() == Type::text) return std::string(column.text(row));
  std::string out;
  append_canonical_value(column.type(), column.scale(), column.number(row), out);
  return out;
}

std::string sql_identifier(std::string_view name) {
  std::string out = "\"";
  for (const char ch : name) {
    if (ch == '"') out += '"';
    out += ch;
  }
  out += '"';
  return out;
}

std::string sql_text(std::string_view value) {
  std::string out = "'";
  for (const char ch : value) {
    if (ch == '\'') out += '\'';
    out += ch;
  }
  out += '\'';
  return out;
}

std::string shown_value(std::string_view value) {
  std::string out = "\"";
  size_t i = 0, n = 0;
  while (i < value.size() && n < 40) {
    const char32_t c = utf8::next(value, i);
    if (c == '\n') out += "\\n";
    else if (c == '\r') out += "\\r";
    else if (c == '\t') out += "\\t";
    else utf8::append(out, c);
    ++n;
  }
  if (i < value.size()) out += "…";
  out += '"';
  return out;
}

std::string count_of(uint64_t n, std::string_view singular, std::string_view plural) {
  std::string out = std::to_string(n);
  out += ' ';
  out += n == 1 ? singular : plural;
  return out;
}

}  // namespace tamis
