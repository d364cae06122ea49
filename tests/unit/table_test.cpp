// The columnar table (design §3): validation, copy-on-write sharing of
// columns and chunks, random access across chunks, NULL as validity bits, and
// memory accounting that counts a shared chunk once.
#include <doctest/doctest.h>

#include <memory>
#include <string>
#include <vector>

#include "table.hpp"

using namespace tamis;

namespace {

std::shared_ptr<const ColumnChunk> text_chunk(const std::vector<std::string>& values) {
  TextChunkBuilder builder;
  for (const auto& v : values) builder.append(v);
  return builder.finish();
}

std::shared_ptr<const ColumnChunk> number_chunk(const std::vector<int64_t>& values) {
  auto chunk = std::make_shared<ColumnChunk>();
  chunk->rows = values.size();
  chunk->numbers = values;
  return chunk;
}

ColumnPtr text_column(const std::vector<std::vector<std::string>>& chunks) {
  auto column = std::make_shared<Column>(Type::text);
  for (const auto& values : chunks) column->append_chunk(text_chunk(values));
  return column;
}

ColumnPtr line_column(int64_t first, size_t rows) {
  std::vector<int64_t> lines;
  for (size_t i = 0; i < rows; ++i) lines.push_back(first + static_cast<int64_t>(i));
  auto column = std::make_shared<Column>(Type::integer);
  column->append_chunk(number_chunk(lines));
  return column;
}

// prefix followed by n; written with += because GCC 12 at -O3 reports a
// spurious -Wrestrict on "literal" + std::string.
std::string numbered(const char* prefix, size_t n) {
  std::string s = prefix;
  s += std::to_string(n);
  return s;
}

Table make(std::vector<std::string> names, std::vector<ColumnPtr> columns, ColumnPtr lines) {
  auto table = Table::make(std::move(names), std::move(columns), std::move(lines));
  REQUIRE(table.ok());
  return std::move(table).value();
}

}  // namespace

TEST_SUITE("unit_table") {

TEST_CASE("unit_table: make checks one name per column and equal lengths") {
  const ColumnPtr two = text_column({{"a", "b"}});
  const ColumnPtr three = text_column({{"a", "b", "c"}});
  CHECK(Table::make({"x", "y"}, {two, two}, line_column(2, 2)).ok());
  auto missing_name = Table::make({"x"}, {two, two}, line_column(2, 2));
  REQUIRE(!missing_name.ok());
  CHECK(missing_name.error().kind == ErrorKind::usage);
  CHECK(!Table::make({"x", "y"}, {two, three}, line_column(2, 2)).ok());
  CHECK(!Table::make({"x"}, {two}, line_column(2, 3)).ok());

  const Table t = make({"x", "y"}, {two, two}, line_column(2, 2));
  CHECK(t.row_count() == 2);
  CHECK(t.column_count() == 2);
  CHECK(t.find("y") == std::optional<size_t>(1));
  CHECK(!t.find("z").has_value());
  CHECK(t.source_line(1) == 3);
}

TEST_CASE("unit_table: type names round trip") {
  for (const Type type : {Type::text, Type::integer, Type::decimal, Type::date, Type::boolean})
    CHECK(type_from_name(type_name(type)) == std::optional<Type>(type));
  CHECK(!type_from_name("float").has_value());
}

TEST_CASE("unit_table: with_column shares every other column") {
  const Table before = make({"a", "b", "c"}, {text_column({{"1"}}), text_column({{"2"}}), text_column({{"3"}})},
                            line_column(2, 1));
  const ColumnPtr replacement = text_column({{"two"}});
  const Table after = before.with_column(1, replacement);
  CHECK(after.column_ptr(0).get() == before.column_ptr(0).get());
  CHECK(after.column_ptr(2).get() == before.column_ptr(2).get());
  CHECK(after.source_lines_ptr().get() == before.source_lines_ptr().get());
  CHECK(after.column_ptr(1).get() == replacement.get());
  CHECK(after.column(1).text(0) == "two");
  // The old version is untouched (undo relies on it).
  CHECK(before.column(1).text(0) == "2");
  CHECK(after.names() == before.names());
}

TEST_CASE("unit_table: append concatenates chunks without copying them") {
  const Table first = make({"a", "n"}, {text_column({{"x", "y"}}), text_column({{"1", "2"}})}, line_column(2, 2));
  const Table second = make({"a", "n"}, {text_column({{"z"}}), text_column({{"3"}})}, line_column(4, 1));
  Table whole;
  REQUIRE(whole.append(first).ok());
  REQUIRE(whole.append(second).ok());
  CHECK(whole.row_count() == 3);
  REQUIRE(whole.column(0).chunk_count() == 2);
  CHECK(whole.column(0).chunk_ptr(0).get() == first.column(0).chunk_ptr(0).get());
  CHECK(whole.column(0).chunk_ptr(1).get() == second.column(0).chunk_ptr(0).get());
  CHECK(whole.column(1).chunk_ptr(1).get() == second.column(1).chunk_ptr(0).get());
  CHECK(whole.source_lines().chunk_ptr(1).get() == second.source_lines().chunk_ptr(0).get());
  CHECK(whole.column(0).text(2) == "z");
  CHECK(whole.source_line(2) == 4);
  // The appended-to table's earlier version keeps its own length.
  CHECK(first.row_count() == 2);
  CHECK(first.column(0).chunk_count() == 1);

  const Table other_names = make({"a", "m"}, {text_column({{"z"}}), text_column({{"3"}})}, line_column(4, 1));
  const Status refused = whole.append(other_names);
  CHECK(!refused.ok());
  CHECK(whole.row_count() == 3);
}

TEST_CASE("unit_table: random access across chunk boundaries, empty chunks included") {
  const ColumnPtr column = text_column({{"r0", "r1", "r2"}, {}, {"r3", "r4"}, {"r5", "r6", "r7", "r8"}});
  REQUIRE(column->size() == 9);
  CHECK(column->chunk_count() == 4);
  CHECK(column->chunk_start(2) == 3);
  for (size_t row = 0; row < 9; ++row) {
    CAPTURE(row);
    CHECK(column->text(row) == numbered("r", row));
    CHECK(!column->is_null(row));
  }
  auto numbers = std::make_shared<Column>(Type::integer);
  numbers->append_chunk(number_chunk({10}));
  numbers->append_chunk(number_chunk({}));
  numbers->append_chunk(number_chunk({}));
  numbers->append_chunk(number_chunk({11, 12}));
  for (size_t row = 0; row < 3; ++row) CHECK(numbers->number(row) == 10 + static_cast<int64_t>(row));
}

TEST_CASE("unit_table: NULL is a validity bit, not the empty string") {
  TextChunkBuilder builder;
  // NULLs on both sides of the 64-row boundary of the bitmap words.
  const auto null_row = [](size_t row) { return row == 0 || row == 63 || row == 64 || row == 129; };
  for (size_t row = 0; row < 131; ++row) {
    if (null_row(row)) builder.append_null();
    else if (row % 10 == 0) builder.append("");
    else builder.append(numbered("v", row));
  }
  CHECK(builder.rows() == 131);
  const auto chunk = builder.finish();
  CHECK(chunk->rows == 131);
  CHECK(chunk->has_nulls());
  for (size_t row = 0; row < 131; ++row) {
    CAPTURE(row);
    const bool expected_null = null_row(row);
    CHECK(chunk->is_null(row) == expected_null);
    if (!expected_null) CHECK(chunk->text(row) == (row % 10 == 0 ? std::string() : numbered("v", row)));
  }
  // Through a Column, in a second chunk.
  auto column = std::make_shared<Column>(Type::text);
  column->append_chunk(text_chunk({"a", ""}));
  column->append_chunk(chunk);
  CHECK(!column->is_null(1));
  CHECK(column->text(1) == "");
  CHECK(column->is_null(2));
  CHECK(column->is_null(2 + 64));
  CHECK(!column->is_null(2 + 65));

  // A chunk without NULLs carries no bitmap, and the builder starts afresh
  // after finish().
  TextChunkBuilder plain;
  plain.append("x");
  plain.append_null();
  const auto with_null = plain.finish();
  plain.append("y");
  const auto without = plain.finish();
  CHECK(with_null->is_null(1));
  CHECK(!without->has_nulls());
  CHECK(without->rows == 1);
  CHECK(without->text(0) == "y");
}

TEST_CASE("unit_table: append_rows copies runs of rows, NULLs included, after rows already built") {
  TextChunkBuilder source;
  for (const char* v : {"oak", "", "ash", "elm", "yew"}) source.append(v);
  source.append_null();
  source.append("fir");
  const auto from = source.finish();
  TextChunkBuilder builder;
  builder.append("first");
  builder.append_rows(*from, 1, 3);
  builder.append_null();
  builder.append_rows(*from, 4, 7);
  builder.append_rows(*from, 2, 2);
  builder.append("last");
  const auto chunk = builder.finish();
  REQUIRE(chunk->rows == 8);
  const std::vector<std::string> texts = {"first", "", "ash", "", "yew", "", "fir", "last"};
  const std::vector<bool> nulls = {false, false, false, true, false, true, false, false};
  for (size_t i = 0; i < chunk->rows; ++i) {
    CAPTURE(i);
    CHECK(chunk->is_null(i) == nulls[i]);
    if (!nulls[i]) CHECK(chunk->text(i) == texts[i]);
  }
}

TEST_CASE("unit_table: memory_bytes counts a shared chunk once") {
  const ColumnPtr column = text_column({{std::string(1000, 'a'), std::string(3000, 'b')}});
  const ColumnPtr lines = line_column(2, 2);
  const Table single = make({"a"}, {column}, lines);
  const Table twice = make({"a", "b"}, {column, column}, lines);
  CHECK(column->memory_bytes() >= 4000);
  CHECK(single.memory_bytes() == column->memory_bytes() + lines->memory_bytes());
  CHECK(twice.memory_bytes() == single.memory_bytes());

  // Appending a table to a copy of itself adds no new chunks, only references.
  Table doubled = single;
  REQUIRE(doubled.append(single).ok());
  CHECK(doubled.row_count() == 4);
  CHECK(doubled.memory_bytes() == single.memory_bytes());

  // A new version that replaces one column costs only that column.
  const ColumnPtr replacement = text_column({{"c", "d"}});
  const Table replaced = twice.with_column(1, replacement);
  CHECK(replaced.memory_bytes() == twice.memory_bytes() + replacement->memory_bytes());
}

}  // TEST_SUITE

namespace {

// The values of a chunk as read through its public accessors; "<NULL>" for NULL.
std::vector<std::string> read_back(const ColumnChunk& chunk) {
  std::vector<std::string> values;
  for (size_t i = 0; i < chunk.rows; ++i) values.push_back(chunk.is_null(i) ? "<NULL>" : std::string(chunk.text(i)));
  return values;
}

std::vector<std::string> numbered_values(size_t rows, const char* prefix) {
  std::vector<std::string> values;
  for (size_t i = 0; i < rows; ++i) values.push_back(numbered(prefix, i));
  return values;
}

}  // namespace

TEST_CASE("unit_table: a few replaced cells make a delta that reads like the whole chunk") {
  const auto base = text_chunk(numbered_values(200, "v"));
  TextDeltaBuilder builder(base);
  builder.replace(0, "first");
  builder.replace_with_null(63);
  builder.replace(64, "");
  builder.replace(199, "last");
  const auto delta = builder.finish();
  REQUIRE(delta->is_delta());
  CHECK(delta->base == base);
  std::vector<std::string> expected = numbered_values(200, "v");
  expected[0] = "first";
  expected[63] = "<NULL>";
  expected[64] = "";
  expected[199] = "last";
  CHECK(read_back(*delta) == expected);
  CHECK(delta->has_nulls());
  CHECK_FALSE(base->has_nulls());
  // Four changed rows of 200 cost a bitmap and their own bytes, not a copy.
  CHECK(delta->memory_bytes() * 10 < base->memory_bytes());
}

TEST_CASE("unit_table: no replaced cell gives the input back, more than half replaced gives a whole chunk") {
  const auto base = text_chunk(numbered_values(10, "v"));
  CHECK(TextDeltaBuilder(base).finish() == base);
  TextDeltaBuilder half(base), more(base);
  for (size_t i = 0; i < 5; ++i) half.replace(i, "x");
  for (size_t i = 0; i < 6; ++i) more.replace(i, "x");
  CHECK(half.finish()->is_delta());
  const auto whole = more.finish();
  CHECK_FALSE(whole->is_delta());
  CHECK(read_back(*whole) == std::vector<std::string>{"x", "x", "x", "x", "x", "x", "v6", "v7", "v8", "v9"});
}

TEST_CASE("unit_table: a delta over a delta is merged over the first base") {
  TextChunkBuilder with_null;
  for (const auto& v : numbered_values(130, "v")) with_null.append(v);
  with_null.append_null();
  const auto base = with_null.finish();  // 131 rows, the last one NULL
  TextDeltaBuilder first(base);
  first.replace(2, "a2");
  first.replace_with_null(70);
  first.replace(128, "a128");
  const auto once = first.finish();
  TextDeltaBuilder second(once);
  second.replace(2, "b2");     // replaced again
  second.replace(70, "b70");   // a NULL made by the first delta, filled
  second.replace(100, "b100");
  second.replace(130, "b130");  // a NULL of the base, filled
  const auto twice = second.finish();
  REQUIRE(twice->is_delta());
  CHECK(twice->base == base);
  std::vector<std::string> expected = numbered_values(130, "v");
  expected.push_back("b130");
  expected[2] = "b2";
  expected[70] = "b70";
  expected[100] = "b100";
  expected[128] = "a128";
  CHECK(read_back(*twice) == expected);
  // has_nulls() is a quick test that may say yes: the base's NULL row is no longer read.
  CHECK(twice->has_nulls());
  // Appending rows of a delta copies values, never the delta's own arrays.
  TextChunkBuilder copy;
  copy.append_rows(*twice, 1, 4);
  copy.append_rows(*twice, 127, 131);
  CHECK(read_back(*copy.finish()) == std::vector<std::string>{"v1", "b2", "v3", "v127", "a128", "v129", "b130"});
}

TEST_CASE("unit_table: memory_bytes counts a delta's base once") {
  const auto base = text_chunk(numbered_values(1000, "value "));
  TextDeltaBuilder builder(base);
  builder.replace(10, "changed");
  const auto delta = builder.finish();
  auto before = std::make_shared<Column>(Type::text);
  before->append_chunk(base);
  auto after = std::make_shared<Column>(Type::text);
  after->append_chunk(delta);
  const ColumnPtr lines = line_column(2, 1000);
  const Table one = make({"a"}, {before}, lines);
  const Table both = make({"a", "b"}, {before, after}, lines);
  CHECK(after->memory_bytes() == delta->memory_bytes() + base->memory_bytes());
  CHECK(both.memory_bytes() == one.memory_bytes() + delta->memory_bytes());
}

TEST_CASE("unit_table: a chunk of repeated values keeps each once and reads the same") {
  TextChunkBuilder builder;
  const std::vector<std::string> names = {"Rowan", "Ginkgo", "", "Hornbeam"};
  for (size_t i = 0; i < 400; ++i) {
    if (i % 7 == 3) builder.append_null();
    else builder.append(names[i % names.size()]);
  }
  const auto plain = builder.finish();
  const auto shared = shared_repeated_values(plain);
  REQUIRE(shared != plain);
  CHECK(shared->layout == TextLayout::dictionary);
  CHECK(read_back(*shared) == read_back(*plain));
  CHECK(shared->text(3).empty());  // a NULL row reads as empty text, as in a plain chunk
  CHECK(shared->memory_bytes() * 2 < plain->memory_bytes());
  // A delta over a dictionary, and rows copied out of both.
  TextDeltaBuilder delta(shared);
  delta.replace(1, "Field maple");
  delta.replace_with_null(2);
  const auto changed = delta.finish();
  REQUIRE(changed->is_delta());
  std::vector<std::string> expected = read_back(*plain);
  expected[1] = "Field maple";
  expected[2] = "<NULL>";
  CHECK(read_back(*changed) == expected);
  TextChunkBuilder copy;
  copy.append_rows(*shared, 0, 5);
  copy.append_rows(*changed, 0, 3);
  CHECK(read_back(*copy.finish()) ==
        std::vector<std::string>{"Rowan", "Ginkgo", "", "<NULL>", "Rowan", "Rowan", "Field maple", "<NULL>"});
}

TEST_CASE("unit_table: a chunk of mostly distinct values stays plain") {
  const auto distinct = text_chunk(numbered_values(100, "tree "));
  CHECK(shared_repeated_values(distinct) == distinct);
  const auto tiny = text_chunk({"one"});
  CHECK(shared_repeated_values(tiny) == tiny);
}
