// Detection of the delimiter and of a header row from the first block of a
// file. Both are heuristics (common practice, not a standard), so both are
// reported with their reason and can be overridden.
#pragma once

#include <string>
#include <string_view>
#include <vector>

namespace tamis {

// The first records of a sample, split with a simple quote-aware scanner.
// An incomplete last record is dropped unless the sample is the whole input.
std::vector<std::vector<std::string>> split_sample(std::string_view sample, char delimiter, char quote,
                                                   size_t max_records, bool whole_input);

// Among , ; tab | picks the delimiter that splits the sample's records into
// the same number (>1) of fields most consistently; ',' when none splits.
char detect_delimiter(std::string_view sample, char quote, bool whole_input, std::string& reason);

// A first row is data, not a header, if one of its values is a number or a
// date; it is a header if it is all text while some column below it holds
// numbers or dates; when every column is text it is taken as a header.
bool detect_header(std::string_view sample, char delimiter, char quote, bool whole_input,
                   std::string& reason);

}  // namespace tamis
