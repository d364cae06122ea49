// libFuzzer target for the recipe loader: recipes are untrusted input. Any
// bytes must give a recipe or an error (never a crash, hang or exception);
// a recipe that loads must save to JSON that loads again to the same
// recipe, and compiling it against a fixed set of columns must give a
// compiled recipe or an error naming a step.
#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <string_view>

#include "recipe.hpp"

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  const std::string_view text(reinterpret_cast<const char*>(data), size);
  auto recipe = tamis::parse_recipe(text, "fuzz.json");
  if (!recipe) return 0;
  const std::string saved = tamis::recipe_to_json(*recipe);
  auto again = tamis::parse_recipe(saved, "saved.json");
  if (!again || tamis::recipe_to_json(*again) != saved) std::abort();
  const tamis::Schema columns = {{"site", tamis::Type::text, 0},
                                 {"district", tamis::Type::text, 0},
                                 {"planted_on", tamis::Type::text, 0},
                                 {"count", tamis::Type::text, 0}};
  auto compiled = tamis::compile_recipe(*recipe, columns);
  if (!compiled && !compiled.error().step) std::abort();
  return 0;
}
