// The detectors, one per file in this folder, listed in findings.cpp. Each
// inspects ctx.table and appends its findings (with previewed fixes) to
// ctx.findings.
#pragma once

#include "findings/finding_support.hpp"

namespace tamis {

Task<> detect_duplicate_rows(DetectorContext& ctx);
Task<> detect_edge_white_space(DetectorContext& ctx);
Task<> detect_inner_white_space(DetectorContext& ctx);
Task<> detect_missing_as_text(DetectorContext& ctx);
Task<> detect_trailing_punctuation(DetectorContext& ctx);
Task<> detect_case_variants(DetectorContext& ctx);
Task<> detect_decimal_comma(DetectorContext& ctx);
Task<> detect_numbers_as_text(DetectorContext& ctx);
Task<> detect_dates_as_text(DetectorContext& ctx);
Task<> detect_fillable_nulls(DetectorContext& ctx);
Task<> detect_empty_measure_rows(DetectorContext& ctx);
Task<> detect_useless_columns(DetectorContext& ctx);

}  // namespace tamis
