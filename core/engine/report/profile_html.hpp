// The profile page: one self-contained HTML document (inline CSS and SVG,
// no script, no external resource) describing a file column by column, with
// the findings first. `tamis profile FILE --html OUT.html` writes it.
#pragma once

#include <span>
#include <string>
#include <vector>

#include "csv_reader.hpp"
#include "findings/findings.hpp"
#include "profile.hpp"
#include "report/html_writer.hpp"
#include "table.hpp"

namespace tamis {

struct ProfilePageInput {
  std::string file;          // as the user named it
  const ReadReport* read = nullptr;  // how the file was read; may be null (a table from elsewhere)
  const Table* table = nullptr;      // for the histograms and length distributions
  const TableProfile* profile = nullptr;
  std::span<const Finding> findings;
  bool findings_searched = true;  // false: the page says findings were not looked for
};

// What the distribution chart of a column shows.
enum class DistributionKind { none, values, lengths };

struct Distribution {
  DistributionKind kind = DistributionKind::none;
  std::vector<html::Bin> bins;
  uint64_t counted = 0;  // values in the bins (sum of the counts)
};

// Integer, decimal and date columns (by the profile's inferred type): the
// values that read as that type, in equal-width bins (one bin per value
// when the range has at most 30 distinct integers or days; else the number
// of bins follows Sturges' rule, ceil(log2 n) + 1, at most 30 — common
// practice). Text columns: lengths in code points of the non-NULL values,
// one bin per length up to 40 distinct lengths, else equal-width bins.
// Boolean columns: none (their top values say it all).
Distribution column_distribution(const Table& table, size_t column, const ColumnProfile& profile);

std::string profile_html(const ProfilePageInput& input);

}  // namespace tamis
