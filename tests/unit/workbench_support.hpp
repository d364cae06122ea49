// Helpers shared by the workbench suites: documents made from CSV text, and an
// exact table comparison that covers types, scales, NULLs and typed values.
#pragma once

#include <doctest/doctest.h>

#include <string>

#include "document.hpp"
#include "load.hpp"
#include "unit_support.hpp"

namespace tamis::test {

inline workbench::LoadedFile loaded(std::string csv, std::string name = "test.csv") {
  auto file = workbench::load_file(memory_source(std::move(csv)), std::move(name));
  REQUIRE_MESSAGE(file.ok(), (file.ok() ? std::string() : file.error().to_string()));
  return std::move(file).value();
}

inline std::unique_ptr<workbench::Document> document_of(std::string csv) {
  return std::make_unique<workbench::Document>(loaded(std::move(csv)));
}

inline std::string read_repo_file(const std::string& relative) {
  auto source = open_file_source(std::string(TAMIS_SOURCE_DIR) + "/" + relative);
  REQUIRE_MESSAGE(source.ok(), relative);
  std::string text;
  char buffer[1 << 16];
  for (;;) {
    auto n = (*source)->read(buffer, sizeof buffer);
    REQUIRE(n.ok());
    if (*n == 0) break;
    text.append(buffer, *n);
  }
  return text;
}

// Empty when both tables are the same in every respect the engine keeps:
// names, types, scales, source lines, NULLs, text and typed values.
inline std::string exact_difference(const Table& a, const Table& b) {
  if (a.names() != b.names()) return "the column names differ";
  if (a.row_count() != b.row_count())
    return "row counts differ: " + std::to_string(a.row_count()) + " vs " + std::to_string(b.row_count());
  for (size_t c = 0; c < a.column_count(); ++c)
    if (a.column(c).type() != b.column(c).type() || a.column(c).scale() != b.column(c).scale())
      return "column " + a.name(c) + " has another type or scale";
  for (size_t r = 0; r < a.row_count(); ++r) {
    const std::string where = "row " + std::to_string(r);
    if (a.source_line(r) != b.source_line(r)) return where + ": another source line";
    for (size_t c = 0; c < a.column_count(); ++c) {
      const Column& x = a.column(c);
      const Column& y = b.column(c);
      if (x.is_null(r) != y.is_null(r)) return where + " column " + a.name(c) + ": NULL in only one table";
      if (x.is_null(r)) continue;
      if (x.type() == Type::text ? x.text(r) != y.text(r) : x.number(r) != y.number(r))
        return where + " column " + a.name(c) + " differs";
    }
  }
  return "";
}

}  // namespace tamis::test
