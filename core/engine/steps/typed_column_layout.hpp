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

Schema layout_schema(const ColumnLayout& layout, const Schema& input);
Table layout_table(const ColumnLayout& layout, const Table& batch, ChangeRecord& change);

}  // namespace tamis
