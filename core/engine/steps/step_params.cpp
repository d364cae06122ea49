#include "steps/step_params.hpp"

namespace tamis {

namespace {
// Keys every step may carry besides its own parameters (design §4).
constexpr std::string_view kCommonKeys[] = {"op", "note", "enabled"};

std::string json_kind(const nlohmann::json& v) {
  return v.is_string() ? "text" : v.is_boolean() ? "true/false" : v.is_number() ? "a number"
       : v.is_array() ? "a list" : v.is_object() ? "an object" : "null";
}
}  // namespace

StepParams::StepParams(const nlohmann::json& object, int step_index, std::string_view op, const Schema& input)
    : object_(object), step_index_(step_index), op_(op), input_(input) {
  for (auto k : kCommonKeys) known_.emplace(k);
}

Error StepParams::error(std::string_view key, std::string message) const {
  Error e = usage_error("(" + op_ + ") '" + std::string(key) + "': " + std::move(message));
  e.step = step_index_;
  return e;
}

const nlohmann::json* StepParams::find(std::string_view key) {
  known_.emplace(key);
  const auto it = object_.find(std::string(key));
  return it == object_.end() ? nullptr : &*it;
}

const nlohmann::json* StepParams::raw(std::string_view key) { return find(key); }

Result<std::string> StepParams::text(std::string_view key) {
  const auto* v = find(key);
  if (!v) return error(key, "is required (text)");
  if (!v->is_string()) return error(key, "expected text, found " + json_kind(*v));
  return v->get<std::string>();
}

Result<std::string> StepParams::text_or(std::string_view key, std::string fallback) {
  if (!object_.contains(std::string(key))) {
    known_.emplace(key);
    return fallback;
  }
  return text(key);
}

Result<std::vector<std::string>> StepParams::text_list(std::string_view key) {
  const auto* v = find(key);
  if (!v) return error(key, "is required (a list of texts)");
  if (!v->is_array()) return error(key, "expected a list of texts, found " + json_kind(*v));
  std::vector<std::string> out;
  for (const auto& item : *v) {
    if (!item.is_string()) return error(key, "expected a list of texts, found an item that is " + json_kind(item));
    out.push_back(item.get<std::string>());
  }
  return out;
}

Result<std::vector<std::string>> StepParams::text_list_or(std::string_view key, std::vector<std::string> fallback) {
  if (!object_.contains(std::string(key))) {
    known_.emplace(key);
    return fallback;
  }
  return text_list(key);
}

Result<bool> StepParams::boolean_or(std::string_view key, bool fallback) {
  const auto* v = find(key);
  if (!v) return fallback;
  if (!v->is_boolean()) return error(key, "expected true or false, found " + json_kind(*v));
  return v->get<bool>();
}

Result<int64_t> StepParams::integer_or(std::string_view key, int64_t fallback) {
  const auto* v = find(key);
  if (!v) return fallback;
  if (!v->is_number_integer()) return error(key, "expected a whole number, found " + json_kind(*v));
  return v->get<int64_t>();
}

Result<std::string> StepParams::choice(std::string_view key, std::initializer_list<std::string_view> allowed,
                                       std::optional<std::string_view> fallback) {
  std::string list;
  for (auto a : allowed) list += (list.empty() ? "" : ", ") + std::string(a);
  const auto* v = find(key);
  if (!v) {
    if (fallback) return std::string(*fallback);
    return error(key, "is required (one of " + list + ")");
  }
  if (v->is_string())
    for (auto a : allowed)
      if (v->get<std::string>() == a) return std::string(a);
  return error(key, "expected one of " + list + ", found " + v->dump());
}

Result<size_t> StepParams::column_named(std::string_view key, const std::string& name) const {
  for (size_t c = 0; c < input_.size(); ++c)
    if (input_[c].name == name) return c;
  std::string names;
  for (const auto& c : input_) names += (names.empty() ? "" : ", ") + c.name;
  return error(key, "no column named '" + name + "' (the columns here are: " + names + ")");
}

Result<size_t> StepParams::column(std::string_view key) {
  auto name = text(key);
  if (!name) return name.take_error();
  return column_named(key, *name);
}

Result<std::vector<size_t>> StepParams::columns(std::string_view key) {
  const auto* v = find(key);
  if (!v) return error(key, "is required (a list of column names, or \"*\" for all)");
  std::vector<size_t> out;
  if (v->is_string() && v->get<std::string>() == "*") {
    for (size_t c = 0; c < input_.size(); ++c) out.push_back(c);
    return out;
  }
  if (!v->is_array() || v->empty())
    return error(key, "expected a non-empty list of column names or \"*\", found " + v->dump());
  for (const auto& item : *v) {
    if (!item.is_string()) return error(key, "expected column names, found " + item.dump());
    auto c = column_named(key, item.get<std::string>());
    if (!c) return c.take_error();
    if (std::find(out.begin(), out.end(), *c) != out.end())
      return error(key, "lists the column '" + item.get<std::string>() + "' twice");
    out.push_back(*c);
  }
  return out;
}

Result<std::vector<size_t>> StepParams::columns_or_all(std::string_view key) {
  if (!object_.contains(std::string(key))) {
    known_.emplace(key);
    std::vector<size_t> all;
    for (size_t c = 0; c < input_.size(); ++c) all.push_back(c);
    return all;
  }
  return columns(key);
}

Status StepParams::finish() const {
  for (const auto& [key, value] : object_.items())
    if (!known_.count(key)) {
      std::string list;
      for (const auto& k : known_) list += (list.empty() ? "" : ", ") + k;
      return error(key, "is not a parameter of this step (known: " + list + ")");
    }
  return Ok{};
}

std::string join_names(const Schema& schema, const std::vector<size_t>& columns) {
  std::string out;
  for (size_t i = 0; i < columns.size(); ++i) {
    if (i) out += i + 1 == columns.size() ? " and " : ", ";
    out += schema[columns[i]].name;
  }
  return out;
}

}  // namespace tamis
