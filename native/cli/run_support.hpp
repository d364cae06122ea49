// What the CLI's commands share beyond the engine's input check, rejects
// and rejects cap (input_check.hpp, run_rejects.hpp, run_report.hpp): the
// guard against writing over what a command reads.
#pragma once

#include <string>

namespace tamis::cli {

// True when both paths name the same existing file.
bool same_file(const std::string& a, const std::string& b);

}  // namespace tamis::cli
