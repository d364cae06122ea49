#include "recipe.hpp"

#include <algorithm>
#include <set>

#include "byte_io.hpp"
#include "scalars.hpp"
#include "steps/registry.hpp"

namespace tamis {

namespace {

using json = nlohmann::json;

// Reads the keys of one JSON object, rejecting unknown ones by name.
class Section {
 public:
  Section(const json& object, std::string where, const std::string& file)
      : object_(object), where_(std::move(where)), file_(file) {}

  Error error(std::string_view key, std::string message) const {
    std::string text = where_;
    if (!key.empty()) text.append(".").append(key);
    text.append(": ").append(message);
    Error e = usage_error(std::move(text));
    e.file = file_;
    return e;
  }
  const json* get(std::string_view key) {
    known_.emplace(key);
    const auto it = object_.find(std::string(key));
    return it == object_.end() ? nullptr : &*it;
  }
  Result<std::optional<std::string>> text(std::string_view key) {
    const json* v = get(key);
    if (!v) return std::optional<std::string>{};
    if (!v->is_string()) return error(key, "expected text, found " + v->dump());
    return std::optional<std::string>(v->get<std::string>());
  }
  Result<std::optional<char>> character(std::string_view key) {
    auto t = text(key);
    if (!t) return t.take_error();
    if (!*t) return std::optional<char>{};
    if ((*t)->size() != 1) return error(key, "expected exactly one character, found \"" + **t + "\"");
    return std::optional<char>((**t)[0]);
  }
  Status finish() const {
    for (const auto& [key, value] : object_.items())
      if (!known_.count(key)) {
        std::string list;
        for (const auto& k : known_) list += (list.empty() ? "" : ", ") + k;
        return error(key, "unknown key (known: " + list + ")");
      }
    return Ok{};
  }

 private:
  const json& object_;
  std::string where_;
  const std::string& file_;
  std::set<std::string, std::less<>> known_;
};

Status parse_input(const json& object, const std::string& file, RecipeInput& in) {
  if (!object.is_object()) return Section(object, "input", file).error("", "expected an object");
  Section s(object, "input", file);
  auto format = s.text("format");
  if (!format) return format.take_error();
  if (*format) {
    if (**format != "csv" && **format != "tsv") return s.error("format", "expected csv or tsv");
    in.format = **format;
  }
  auto delimiter = s.character("delimiter");
  if (!delimiter) return delimiter.take_error();
  in.delimiter = in.format == "tsv" && !*delimiter ? std::optional<char>('\t') : *delimiter;
  auto quote = s.character("quoteChar");
  if (!quote) return quote.take_error();
  if (*quote) in.quote = **quote;
  if (const json* d = s.get("doubleQuote"); d && !(d->is_boolean() && d->get<bool>()))
    return s.error("doubleQuote", "only true is supported (quotes inside quoted fields are doubled, RFC 4180)");
  auto encoding = s.text("encoding");
  if (!encoding) return encoding.take_error();
  if (*encoding) {
    if (!encoding_from_name(**encoding))
      return s.error("encoding", "unknown encoding \"" + **encoding +
                                     "\" (known: utf-8, utf-16le, utf-16be, windows-1252, iso-8859-1)");
    in.encoding = **encoding;
  }
  if (const json* h = s.get("header")) {
    if (!h->is_boolean()) return s.error("header", "expected true or false");
    in.header = h->get<bool>();
  }
  if (const json* k = s.get("skipRows")) {
    if (!k->is_number_unsigned()) return s.error("skipRows", "expected a whole number >= 0");
    in.skip_rows = k->get<size_t>();
  }
  if (const json* lt = s.get("lineTerminators")) {
    if (!lt->is_array()) return s.error("lineTerminators", "expected a list");
    for (const auto& t : *lt)
      if (!t.is_string() || (t != "\n" && t != "\r\n" && t != "\r"))
        return s.error("lineTerminators", "tamis always accepts LF, CRLF and CR; other terminators are not supported");
  }
  if (const json* cols = s.get("columns")) {
    if (!cols->is_array()) return s.error("columns", "expected a list of {\"name\", \"type\"} objects");
    for (size_t i = 0; i < cols->size(); ++i) {
      Section c((*cols)[i], "input.columns[" + std::to_string(i) + "]", file);
      if (!(*cols)[i].is_object()) return c.error("", "expected an object with name and type");
      auto name = c.text("name");
      if (!name) return name.take_error();
      if (!*name) return c.error("name", "is required");
      auto type = c.text("type");
      if (!type) return type.take_error();
      InputColumn column{**name, Type::text};
      if (*type) {
        auto t = type_from_name(**type);
        if (!t) return c.error("type", "expected text, integer, decimal, date or boolean");
        column.type = *t;
      }
      if (Status st = c.finish(); !st) return st;
      in.columns.push_back(std::move(column));
    }
  }
  auto unknown = s.text("unknown_columns");
  if (!unknown) return unknown.take_error();
  if (*unknown) {
    if (**unknown != "fail" && **unknown != "ignore") return s.error("unknown_columns", "expected fail or ignore");
    in.unknown_columns = **unknown;
  }
  if (const json* m = s.get("max_rejects")) {
    if (m->is_number_unsigned()) in.max_rejects = std::to_string(m->get<uint64_t>());
    else if (m->is_string()) in.max_rejects = m->get<std::string>();
    else return s.error("max_rejects", "expected a count or a percentage such as \"0.5%\"");
  }
  return s.finish();
}

Status parse_output(const json& object, const std::string& file, RecipeOutput& out) {
  Section s(object, "output", file);
  if (!object.is_object()) return s.error("", "expected an object");
  auto format = s.text("format");
  if (!format) return format.take_error();
  if (*format) {
    if (**format != "csv" && **format != "tsv") return s.error("format", "expected csv or tsv");
    out.format = **format;
  }
  auto null_marker = s.text("null");
  if (!null_marker) return null_marker.take_error();
  if (*null_marker) out.null_marker = **null_marker;
  auto date_format = s.text("date_format");
  if (!date_format) return date_format.take_error();
  if (*date_format) out.date_format = **date_format;
  return s.finish();
}

// nlohmann reports a byte offset; people want a line and column.
Error syntax_error(std::string_view text, size_t byte, const std::string& what, const std::string& file) {
  uint64_t line = 1, column = 1;
  for (size_t i = 0; i < byte && i < text.size(); ++i) {
    if (text[i] == '\n') ++line, column = 1;
    else ++column;
  }
  Error e = input_error(file, line, "not valid JSON: " + what);
  e.kind = ErrorKind::usage;
  e.column = column;
  return e;
}

}  // namespace

Result<Recipe> load_recipe_file(const std::string& path) {
  auto source = open_file_source(path);
  if (!source) return source.take_error();
  std::string text;
  char buffer[1 << 16];
  for (;;) {
    auto n = (*source)->read(buffer, sizeof buffer);
    if (!n) return n.take_error();
    if (*n == 0) break;
    text.append(buffer, *n);
  }
  return parse_recipe(text, path == "-" ? "<stdin>" : path);
}

Result<Recipe> parse_recipe(std::string_view text, const std::string& file) {
  json doc;
  try {
    doc = json::parse(text);
  } catch (const json::parse_error& e) {
    std::string what = e.what();
    if (const size_t p = what.find(": "); p != std::string::npos) what = what.substr(p + 2);
    return syntax_error(text, e.byte == 0 ? 0 : e.byte - 1, what, file);
  } catch (const json::out_of_range& e) {
    // A number too large for a double (1e400) comes as out_of_range, with no position.
    std::string what = e.what();
    if (const size_t p = what.find("] "); p != std::string::npos) what = what.substr(p + 2);
    Error error = usage_error("not valid JSON: " + what);
    error.file = file;
    return error;
  }
  Recipe r;
  Section top(doc, "recipe", file);
  if (!doc.is_object()) return top.error("", "expected a JSON object");
  const json* version = top.get("tamis_recipe");
  if (!version) return top.error("tamis_recipe", "is required (the format version, 1)");
  if (!version->is_number_integer() || *version != 1)
    return top.error("tamis_recipe", "this tamis reads recipe version 1, found " + version->dump());
  auto title = top.text("title");
  if (!title) return title.take_error();
  r.title = title->value_or("");
  if (const json* in = top.get("input"))
    if (Status s = parse_input(*in, file, r.input); !s) return s.take_error();
  if (const json* out = top.get("output"))
    if (Status s = parse_output(*out, file, r.output); !s) return s.take_error();
  const json* steps = top.get("steps");
  if (!steps || !steps->is_array()) return top.error("steps", "is required (a list of steps)");
  for (size_t i = 0; i < steps->size(); ++i) {
    const json& s = (*steps)[i];
    auto fail = [&](std::string message) {
      Error e = usage_error(std::move(message));
      e.file = file;
      e.step = static_cast<int>(i);
      return e;
    };
    if (!s.is_object() || !s.contains("op") || !s["op"].is_string())
      return fail("expected an object with \"op\", found " + s.dump());
    RecipeStep step{s["op"].get<std::string>(), true, "", s};
    if (s.contains("enabled")) {
      if (!s["enabled"].is_boolean()) return fail("'enabled': expected true or false");
      step.enabled = s["enabled"].get<bool>();
    }
    if (s.contains("note")) {
      if (!s["note"].is_string()) return fail("'note': expected text");
      step.note = s["note"].get<std::string>();
    }
    r.steps.push_back(std::move(step));
  }
  if (Status s = top.finish(); !s) return s.take_error();
  return r;
}

std::string recipe_to_json(const Recipe& r) {
  nlohmann::ordered_json doc;
  doc["tamis_recipe"] = 1;
  if (!r.title.empty()) doc["title"] = r.title;
  nlohmann::ordered_json in;
  in["format"] = r.input.format;
  if (r.input.delimiter) in["delimiter"] = std::string(1, *r.input.delimiter);
  in["quoteChar"] = std::string(1, r.input.quote);
  if (r.input.encoding) in["encoding"] = *r.input.encoding;
  if (r.input.header) in["header"] = *r.input.header;
  if (r.input.skip_rows) in["skipRows"] = r.input.skip_rows;
  if (!r.input.columns.empty()) {
    in["columns"] = nlohmann::ordered_json::array();
    for (const auto& c : r.input.columns) in["columns"].push_back({{"name", c.name}, {"type", type_name(c.type)}});
  }
  in["unknown_columns"] = r.input.unknown_columns;
  if (r.input.max_rejects) in["max_rejects"] = *r.input.max_rejects;
  doc["input"] = in;
  doc["steps"] = nlohmann::ordered_json::array();
  for (const auto& s : r.steps) doc["steps"].push_back(nlohmann::ordered_json::parse(s.definition.dump()));
  doc["output"] = {{"format", r.output.format}, {"null", r.output.null_marker}, {"date_format", r.output.date_format}};
  return doc.dump(2) + "\n";
}

Result<CsvOptions> reading_options(const RecipeInput& input) {
  CsvOptions o;
  o.delimiter = input.delimiter;
  o.quote = input.quote;
  if (input.encoding) o.encoding = encoding_from_name(*input.encoding);
  if (input.header) o.header = *input.header ? HeaderMode::yes : HeaderMode::no;
  o.skip_rows = input.skip_rows;
  return o;
}

Result<std::vector<size_t>> check_input_columns(const RecipeInput& input, const std::vector<std::string>& names,
                                                const std::string& file) {
  std::vector<size_t> keep;
  if (input.columns.empty()) {
    for (size_t c = 0; c < names.size(); ++c) keep.push_back(c);
    return keep;
  }
  std::vector<std::string> missing;
  for (const auto& expected : input.columns) {
    const auto it = std::find(names.begin(), names.end(), expected.name);
    if (it == names.end()) missing.push_back(expected.name);
  }
  std::vector<std::string> extra;
  for (size_t c = 0; c < names.size(); ++c) {
    const bool expected = std::any_of(input.columns.begin(), input.columns.end(),
                                      [&](const InputColumn& e) { return e.name == names[c]; });
    if (expected) keep.push_back(c);
    else extra.push_back(names[c]);
  }
  auto list = [](const std::vector<std::string>& v) {
    std::string out;
    for (const auto& s : v) out += (out.empty() ? "'" : ", '") + s + "'";
    return out;
  };
  if (!missing.empty())
    return input_error(file, 1, "the file lacks column(s) " + list(missing) + " that the recipe expects" +
                                    (extra.empty() ? "" : "; it has " + list(extra) + " instead (renamed?)"));
  if (!extra.empty() && input.unknown_columns == "fail")
    return input_error(file, 1, "the file has column(s) " + list(extra) +
                                    " that the recipe does not expect (set input.unknown_columns to \"ignore\" "
                                    "to drop them)");
  return keep;
}

bool fits_declared_type(Type type, std::string_view value, const DateFormat& iso) {
  if (value.empty()) return true;
  switch (type) {
    case Type::text: return true;
    case Type::integer: return number_shape(value) == NumberShape::integer;
    case Type::decimal: return number_shape(value) != NumberShape::not_a_number;
    case Type::date: return iso.parse(value).has_value();
    case Type::boolean: return parse_boolean(value).has_value();
  }
  return true;
}

Schema schema_of(const Table& table) {
  Schema s;
  for (size_t c = 0; c < table.column_count(); ++c)
    s.push_back({table.name(c), table.column(c).type(), table.column(c).scale()});
  return s;
}

Result<CompiledRecipe> compile_recipe(const Recipe& recipe, const Schema& input) {
  CompiledRecipe out;
  out.input = input;
  Schema schema = input;
  for (size_t i = 0; i < recipe.steps.size(); ++i) {
    if (!recipe.steps[i].enabled) continue;
    auto step = parse_step(recipe.steps[i].definition, static_cast<int>(i), schema);
    if (!step) return step.take_error();
    schema = (*step)->output_schema(schema);
    out.steps.push_back({static_cast<int>(i), std::move(*step), recipe.steps[i].note});
  }
  out.output = schema;
  return out;
}

RecipeRun::RecipeRun(const CompiledRecipe& recipe)
    : recipe_(recipe), changes_(recipe.steps.size()), scratch_changes_(recipe.steps.size()) {
  for (size_t j = 0; j < recipe.steps.size(); ++j) {
    states_.push_back(recipe.steps[j].step->start());
    pass_states_.push_back(recipe.steps[j].step->start());
    if (recipe.steps[j].step->needs_first_pass()) observe_at_.push_back(j);
  }
}

Result<Table> RecipeRun::run_steps(size_t end, const Table& batch, std::vector<std::unique_ptr<StepState>>& states,
                                   std::vector<ChangeRecord>& changes) {
  Table t = batch;
  for (size_t j = 0; j < end; ++j) {
    const Step& step = *recipe_.steps[j].step;
    // A step that needed a first pass has finished observing by now and uses
    // its one real state in every later pass.
    StepState* state = step.needs_first_pass() ? states_[j].get() : states[j].get();
    auto next = step.apply(t, state, changes[j]);
    if (!next) {
      Error e = next.take_error();
      if (!e.step) e.step = recipe_.steps[j].index;
      return e;
    }
    t = std::move(*next);
  }
  return t;
}

Status RecipeRun::observe(size_t pass, const Table& batch) {
  const size_t at = observe_at_[pass];
  auto t = run_steps(at, batch, pass_states_, scratch_changes_);
  if (!t) return t.take_error();
  // Rows rejected while observing are rejected again, and counted, in the last pass.
  for (ChangeRecord& c : scratch_changes_) c.take_rejected();
  return recipe_.steps[at].step->observe(*t, states_[at].get());
}

void RecipeRun::end_pass(size_t) {
  for (size_t j = 0; j < recipe_.steps.size(); ++j) {
    pass_states_[j] = recipe_.steps[j].step->start();
    scratch_changes_[j] = ChangeRecord{};
  }
}

Result<Table> RecipeRun::apply(const Table& batch) {
  return run_steps(recipe_.steps.size(), batch, states_, changes_);
}

Result<Table> RecipeRun::apply_step(size_t j, const Table& batch) {
  auto next = recipe_.steps[j].step->apply(batch, states_[j].get(), changes_[j]);
  if (!next) {
    Error e = next.take_error();
    if (!e.step) e.step = recipe_.steps[j].index;
    return e;
  }
  return next;
}

void RecipeRun::take_rejected(size_t j, std::vector<Rejected>& into) {
  for (RemovedRow& row : changes_[j].take_rejected()) into.push_back({recipe_.steps[j].index, std::move(row)});
}

std::vector<RecipeRun::Rejected> RecipeRun::take_rejected() {
  std::vector<Rejected> out;
  for (size_t j = 0; j < changes_.size(); ++j) take_rejected(j, out);
  std::stable_sort(out.begin(), out.end(), [](const Rejected& a, const Rejected& b) { return a.row.line < b.row.line; });
  return out;
}

Status RecipeRun::finish() {
  for (size_t j = 0; j < recipe_.steps.size(); ++j)
    if (Status s = recipe_.steps[j].step->finish(states_[j].get(), changes_[j]); !s) {
      Error e = s.take_error();
      if (!e.step) e.step = recipe_.steps[j].index;
      return e;
    }
  return Ok{};
}

Result<Table> apply_recipe(const CompiledRecipe& recipe, const Table& table, std::vector<ChangeRecord>* changes) {
  RecipeRun run(recipe);
  for (size_t pass = 0; pass + 1 < run.passes(); ++pass) {
    if (Status s = run.observe(pass, table); !s) return s.take_error();
    run.end_pass(pass);
  }
  auto out = run.apply(table);
  if (!out) return out.take_error();
  if (Status s = run.finish(); !s) return s.take_error();
  if (changes) *changes = run.changes();
  return out;
}

}  // namespace tamis
