#include "steps/collapse_spaces.hpp"

#include "sql/sql_step.hpp"
#include "steps/cell_map.hpp"
#include "steps/text_step_support.hpp"
#include "utf8.hpp"

namespace tamis {

namespace {

// Moves i past the character at v[i] and says whether it is white space.
bool next_is_white_space(std::string_view v, size_t& i) {
  const auto b = static_cast<unsigned char>(v[i]);
  if (b < 0x80) {
    ++i;
    return b == ' ' || (b >= 0x09 && b <= 0x0D);
  }
  return utf8::is_white_space(utf8::next(v, i));
}

// Moves i past the white space that starts at v[i], if any.
void skip_white_space(std::string_view v, size_t& i) {
  while (i < v.size()) {
    size_t next = i;
    if (!next_is_white_space(v, next)) return;
    i = next;
  }
}

// Writes the collapsed value into out; false when nothing changes.
bool collapse(std::string_view v, std::string& out) {
  size_t i = 0;
  skip_white_space(v, i);  // the leading run is left for trim
  size_t copied = 0;       // v[0, copied) is settled: in out, or unchanged so far
  bool changed = false;
  while (i < v.size()) {
    const size_t run_start = i;
    if (!next_is_white_space(v, i)) continue;
    skip_white_space(v, i);
    if (i == v.size()) break;  // the trailing run is left for trim
    if (i - run_start == 1 && v[run_start] == ' ') continue;
    if (!changed) {
      out.reserve(v.size());
      changed = true;
    }
    out.append(v.substr(copied, run_start - copied));
    out += ' ';
    copied = i;
  }
  if (changed) out.append(v.substr(copied));
  return changed;
}

class CollapseSpaces final : public Step {
 public:
  CollapseSpaces(std::vector<size_t> columns, Schema input) : columns_(std::move(columns)), input_(std::move(input)) {}

  std::string_view op() const override { return "collapse_spaces"; }

  std::string describe() const override {
    return "Turn each run of white space inside the values of " + join_names(input_, columns_) +
           " into a single space.";
  }

  Result<Table> apply(const Table& batch, StepState*, ChangeRecord& change) const override {
    return map_text_cells(batch, columns_, change, [](std::string_view v, std::string& out) {
      return collapse(v, out) ? CellResult::replaced : CellResult::unchanged;
    });
  }

  // regexp_replace over the inner part (between the leading and trailing
  // runs) with the White_Space characters written out as a class. SQLite has
  // no regular expressions: there the inner part is TRIM with the White_Space
  // characters, each of them becomes a space by nested REPLACE, and 31
  // nested REPLACE(.., '  ', ' ') halve every run of spaces 31 times, which
  // leaves one space of any run shorter than 2^31 characters, longer than
  // SQLite's largest text (SQLITE_MAX_LENGTH, at most 2^31 - 1 bytes). The
  // REPLACE calls are spread over nested SELECTs, each at most 24 deep, as
  // SQLite's parser stack holds about 33 nested calls.
  SqlSupport sql_support(Dialect) const override { return SqlSupport::exact; }

  Result<SqlStepText> to_sql(const SqlContext& sql) const override {
    SqlStepText out;
    if (sql.dialect == Dialect::sqlite) {
      out.select = sqlite_select(sql);
      return out;
    }
    const Dialect d = sql.dialect;
    std::vector<std::pair<size_t, std::string>> replaced;
    for (const size_t c : columns_) {
      const std::string x = sql.column(c);
      const std::string space = sql::regex_class(d, sql::white_space_characters());
      const std::string inner = sql::regex_replace_all(d, x, std::string("^") + space + std::string("+|") + space + "+$", "");
      replaced.emplace_back(
          c, std::string("CASE WHEN ") + inner + std::string(" = '' THEN ") + x + "\n            ELSE " +
                 sql::concat(d, {sql::regex_first_match(d, x, std::string("^") + space + "+"),
                                 sql::regex_replace_all(d, inner, space + "+", " "),
                                 sql::regex_first_match(d, x, space + "+$")}) +
                 " END");
    }
    out.select = sql.select_replacing(replaced);
    return out;
  }

  nlohmann::ordered_json parameters() const override {
    nlohmann::ordered_json p;
    p["columns"] = column_list(input_, columns_);
    return p;
  }

 private:
  std::string sqlite_select(const SqlContext& sql) const {
    const Dialect d = Dialect::sqlite;
    const std::u32string& white = sql::white_space_characters();
    std::vector<std::pair<std::string, std::string>> to_space;
    for (const char32_t w : white) {
      if (w == U' ') continue;
      std::string one;
      utf8::append(one, w);
      to_space.emplace_back(std::move(one), " ");
    }
    const std::vector<std::pair<std::string, std::string>> halve_16(16, {"  ", " "}), halve_15(15, {"  ", " "});
    const std::string inner_name = sql.helper("tamis_inner"), spaced_name = sql.helper("tamis_spaced"),
                      halved_name = sql.helper("tamis_halved");
    std::string inner, spaced, halved;
    std::vector<std::pair<size_t, std::string>> replaced;
    for (const size_t c : columns_) {
      const std::string x = sql.column(c);
      const std::string k = std::string("_") + std::to_string(c);
      inner += std::string(", ") + sql::trim_characters(d, x, white, "both") + " AS " + inner_name + k;
      spaced += std::string(", ") + sql::replace_each(d, inner_name + k, to_space) + " AS " + spaced_name + k;
      halved += std::string(", ") + sql::replace_each(d, spaced_name + k, halve_16) + " AS " + halved_name + k;
      const std::string leading = sql::substring(d, x, "1", std::string("length(") + x + ") - length(" +
                                                             sql::trim_characters(d, x, white, "leading") + ")");
      const std::string trailing =
          sql::substring(d, x, std::string("length(") + sql::trim_characters(d, x, white, "trailing") + ") + 1");
      replaced.emplace_back(c, std::string("CASE WHEN ") + inner_name + k + " = '' THEN " + x + "\n            ELSE " +
                                   sql::concat(d, {leading, sql::replace_each(d, halved_name + k, halve_15), trailing}) +
                                   " END");
    }
    const std::string from = std::string("(SELECT *") + halved + "\n      FROM (SELECT *" + spaced + "\n            FROM (SELECT *" +
                             inner + "\n                  FROM " + sql.from + ") AS tamis_inner) AS tamis_spaced) AS tamis_halved";
    return sql.select_replacing(replaced, from);
  }

  std::vector<size_t> columns_;
  Schema input_;
};

}  // namespace

Result<std::unique_ptr<Step>> parse_collapse_spaces(StepParams& params) {
  auto columns = text_columns(params, "columns");
  if (!columns) return columns.take_error();
  if (Status s = params.finish(); !s) return s.take_error();
  return std::unique_ptr<Step>(new CollapseSpaces(std::move(*columns), params.input()));
}

}  // namespace tamis
