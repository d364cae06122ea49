#include "input_check.hpp"

#include <algorithm>

#include "dates.hpp"
#include "steps/row_filter.hpp"

namespace tamis {

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

Table InputCheck::apply(const Table& raw, std::vector<RemovedRow>& failing) const {
  const Table kept = all_kept_ ? raw : raw.with_columns(keep_);
  if (std::all_of(types_.begin(), types_.end(), [](Type t) { return t == Type::text; })) return kept;
  static const DateFormat iso = DateFormat::compile("%Y-%m-%d").value();
  std::vector<uint8_t> keep(kept.row_count(), 1);
  const size_t failing_before = failing.size();
  for (size_t r = 0; r < kept.row_count(); ++r)
    for (size_t c = 0; c < types_.size(); ++c) {
      if (types_[c] == Type::text || kept.column(c).is_null(r)) continue;
      const std::string_view value = kept.column(c).text(r);
      if (fits_declared_type(types_[c], value, iso)) continue;
      failing.push_back({kept.source_line(r), "column '" + kept.name(c) + "' is declared " +
                                                  std::string(type_name(types_[c])) + " in input.columns; '" +
                                                  std::string(value) + "' is not"});
      keep[r] = 0;
      break;
    }
  if (failing.size() == failing_before) return kept;
  return select_rows(kept, keep);
}

}  // namespace tamis
