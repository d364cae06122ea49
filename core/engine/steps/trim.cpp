#include "steps/trim.hpp"

#include <array>

#include "sql/sql_step.hpp"
#include "steps/cell_map.hpp"
#include "utf8.hpp"

namespace tamis {

namespace {

class Trim final : public Step {
 public:
  Trim(std::vector<size_t> columns, std::string side, std::optional<std::u32string> chars, Schema input)
      : columns_(std::move(columns)), side_(std::move(side)), chars_(std::move(chars)), input_(std::move(input)) {
    for (char32_t c = 0; c < 0x80; ++c) ascii_trimmed_[c] = trimmed(c);
  }

  std::string_view op() const override { return "trim"; }

  std::string describe() const override {
    const std::string what = chars_ ? "the characters " + quoted_chars() : "white space";
    const std::string where = side_ == "both" ? "at both ends" : side_ == "leading" ? "at the start" : "at the end";
    return "Remove " + what + " " + where + " of " + join_names(input_, columns_) + ".";
  }

  Result<Table> apply(const Table& batch, StepState*, ChangeRecord& change) const override {
    const bool leading = side_ != "trailing", trailing = side_ != "leading";
    return map_text_cells(batch, columns_, change, [&](std::string_view v, std::string& out) {
      size_t begin = 0, end = v.size();
      // An ASCII byte is a whole character in UTF-8: it is looked up, and
      // only other bytes are decoded.
      if (leading)
        while (begin < end) {
          const auto byte = static_cast<unsigned char>(v[begin]);
          if (byte < 0x80) {
            if (!ascii_trimmed_[byte]) break;
            ++begin;
            continue;
          }
          size_t i = begin;
          if (!trimmed(utf8::next(v, i))) break;
          begin = i;
        }
      if (trailing)
        while (end > begin) {
          const auto byte = static_cast<unsigned char>(v[end - 1]);
          if (byte < 0x80) {
            if (!ascii_trimmed_[byte]) break;
            --end;
            continue;
          }
          size_t i = end;
          if (!trimmed(utf8::previous(v, i))) break;
          end = i;
        }
      if (begin == 0 && end == v.size()) return CellResult::unchanged;
      out.assign(v.substr(begin, end - begin));
      return CellResult::replaced;
    });
  }

  // TRIM with the characters listed (the White_Space set when none are
  // given, since SQL's default is the space alone); MySQL, whose TRIM removes
  // a whole string, gets a regular expression.
  SqlSupport sql_support(Dialect) const override { return SqlSupport::exact; }

  Result<SqlStepText> to_sql(const SqlContext& sql) const override {
    const std::u32string& set = chars_ ? *chars_ : sql::white_space_characters();
    std::vector<std::pair<size_t, std::string>> replaced;
    for (const size_t c : columns_) replaced.emplace_back(c, sql::trim_characters(sql.dialect, sql.column(c), set, side_));
    SqlStepText out;
    out.select = sql.select_replacing(replaced);
    return out;
  }

  nlohmann::ordered_json parameters() const override {
    nlohmann::ordered_json p;
    p["columns"] = nlohmann::ordered_json::array();
    for (size_t c : columns_) p["columns"].push_back(input_[c].name);
    p["side"] = side_;
    if (chars_) {
      std::string utf8_chars;
      for (char32_t c : *chars_) utf8::append(utf8_chars, c);
      p["chars"] = utf8_chars;
    }
    return p;
  }

 private:
  bool trimmed(char32_t c) const {
    return chars_ ? chars_->find(c) != std::u32string::npos : utf8::is_white_space(c);
  }
  std::string quoted_chars() const {
    std::string out;
    for (char32_t c : *chars_) {
      out += out.empty() ? "'" : " '";
      utf8::append(out, c);
      out += "'";
    }
    return out;
  }

  std::vector<size_t> columns_;
  std::string side_;
  std::optional<std::u32string> chars_;
  Schema input_;
  std::array<bool, 0x80> ascii_trimmed_{};
};

}  // namespace

Result<std::unique_ptr<Step>> parse_trim(StepParams& params) {
  auto columns = params.columns("columns");
  if (!columns) return columns.take_error();
  for (size_t c : *columns)
    if (params.input()[c].type != Type::text)
      return params.error("columns", "'" + params.input()[c].name + "' is " +
                                         std::string(type_name(params.input()[c].type)) + "; trim works on text");
  auto side = params.choice("side", {"both", "leading", "trailing"}, "both");
  if (!side) return side.take_error();
  std::optional<std::u32string> chars;
  if (params.raw("chars")) {
    auto text = params.text("chars");
    if (!text) return text.take_error();
    if (text->empty()) return params.error("chars", "must list at least one character");
    if (utf8::first_invalid(*text) != std::string_view::npos) return params.error("chars", "is not valid UTF-8");
    chars.emplace();
    for (size_t i = 0; i < text->size();) chars->push_back(utf8::next(*text, i));
  }
  if (Status s = params.finish(); !s) return s.take_error();
  return std::unique_ptr<Step>(new Trim(std::move(*columns), std::move(*side), std::move(chars), params.input()));
}

}  // namespace tamis
