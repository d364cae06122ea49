#include "run_support.hpp"

#include <filesystem>

namespace tamis::cli {

bool same_file(const std::string& a, const std::string& b) {
  std::error_code ec;
  return a != "-" && b != "-" && std::filesystem::exists(a, ec) && std::filesystem::exists(b, ec) &&
         std::filesystem::equivalent(a, b, ec);
}

}  // namespace tamis::cli
