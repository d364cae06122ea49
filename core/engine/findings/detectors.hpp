// The detectors, one per file in this folder, listed in findings.cpp. Each
// inspects ctx.table and appends its findings (with previewed fixes) to
// ctx.findings.
#pragma once

#include "findings/finding_support.hpp"

namespace tamis {

void detect_duplicate_rows(DetectorContext& ctx);
void detect_edge_white_space(DetectorContext& ctx);
void detect_inner_white_space(DetectorContext& ctx);
void detect_missing_as_text(DetectorContext& ctx);
void detect_trailing_punctuation(DetectorContext& ctx);
void detect_case_variants(DetectorContext& ctx);
void detect_decimal_comma(DetectorContext& ctx);
void detect_numbers_as_text(DetectorContext& ctx);
void detect_dates_as_text(DetectorContext& ctx);
void detect_fillable_nulls(DetectorContext& ctx);
void detect_empty_measure_rows(DetectorContext& ctx);
void detect_useless_columns(DetectorContext& ctx);

}  // namespace tamis
