// A recipe's input section applied to each batch the reader delivers: the
// one rule for `tamis run`, `tamis check`, `tamis explain` and any other
// runner of recipes over files.
#pragma once

#include <string>
#include <vector>

#include "change.hpp"
#include "recipe.hpp"
#include "table.hpp"

namespace tamis {

// Columns the recipe does not expect are dropped (unknown_columns "ignore";
// "fail" has stopped the run already), and a row whose value does not fit a
// type declared in input.columns is taken out and reported. The declared
// types are checks on the text as read: steps still see text (parse_date,
// parse_number and cast convert it). An empty value fits every type.
class InputCheck {
 public:
  static Result<InputCheck> make(const RecipeInput& input, const std::vector<std::string>& file_columns,
                                 const std::string& file);
  // Columns the steps will see.
  const Schema& schema() const { return schema_; }
  // The rows of `raw` that pass, with the kept columns; failing rows are
  // appended to `failing` with their source line and reason.
  Table apply(const Table& raw, std::vector<RemovedRow>& failing) const;

 private:
  std::vector<size_t> keep_;
  std::vector<Type> types_;  // per kept column
  Schema schema_;
  bool all_kept_ = true;
};

}  // namespace tamis
