// What drop_columns, rename_columns and reorder_columns share: a step that
// only rearranges a table's columns. Each output column is an input column
// (by position) under a name; no data is copied.
#pragma once

#include <string>
#include <vector>

#include "steps/step.hpp"

namespace tamis {

struct ColumnLayout {
  std::vector<size_t> sources;     // output column k is input column sources[k]
  std::vector<std::string> names;  // output column k's name
};

// The base of the three layout steps: they differ only in how they build the
// layout, describe themselves and write their parameters.
class ColumnLayoutStep : public Step {
 public:
  ColumnLayoutStep(Schema input, ColumnLayout layout) : input_(std::move(input)), layout_(std::move(layout)) {}

  Schema output_schema(const Schema& input) const final;
  Result<Table> apply(const Table& batch, StepState* state, ChangeRecord& change) const final;
  SqlSupport sql_support(Dialect) const final { return SqlSupport::exact; }

 protected:
  // {"columns": [names of the given input columns]}
  nlohmann::ordered_json column_list_parameters(const std::vector<size_t>& columns) const;

  Schema input_;
  ColumnLayout layout_;
};

}  // namespace tamis
