// Reading a step's JSON parameters with errors that name the step, the key
// and what was expected. Every key a step reads is marked as known; finish()
// rejects any other key, so a misspelt parameter is never silently ignored.
#pragma once

#include <nlohmann/json.hpp>

#include <optional>
#include <set>
#include <string>
#include <string_view>
#include <vector>

#include "error.hpp"
#include "steps/step.hpp"

namespace tamis {

class StepParams {
 public:
  StepParams(const nlohmann::json& object, int step_index, std::string_view op, const Schema& input);

  Result<std::string> text(std::string_view key);
  Result<std::string> text_or(std::string_view key, std::string fallback);
  Result<std::vector<std::string>> text_list(std::string_view key);
  Result<std::vector<std::string>> text_list_or(std::string_view key, std::vector<std::string> fallback);
  Result<bool> boolean_or(std::string_view key, bool fallback);
  Result<int64_t> integer_or(std::string_view key, int64_t fallback);
  // One of the allowed words.
  Result<std::string> choice(std::string_view key, std::initializer_list<std::string_view> allowed,
                             std::optional<std::string_view> fallback);
  // A column of the input, by name.
  Result<size_t> column(std::string_view key);
  // A list of input columns, or "*" for all of them.
  Result<std::vector<size_t>> columns(std::string_view key);
  Result<std::vector<size_t>> columns_or_all(std::string_view key);
  // The raw JSON value (for objects such as map_values' map); nullptr when absent.
  const nlohmann::json* raw(std::string_view key);

  // An error about this step and key.
  Error error(std::string_view key, std::string message) const;
  Status finish() const;

  const Schema& input() const { return input_; }
  int step_index() const { return step_index_; }

 private:
  const nlohmann::json* find(std::string_view key);
  Result<size_t> column_named(std::string_view key, const std::string& name) const;

  const nlohmann::json& object_;
  int step_index_;
  std::string op_;
  const Schema& input_;
  std::set<std::string, std::less<>> known_;
};

// The names of the listed columns, "a, b and c", for descriptions.
std::string join_names(const Schema& schema, const std::vector<size_t>& columns);

}  // namespace tamis
