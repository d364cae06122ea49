// libFuzzer target: any bytes given to the CSV reader must either read or
// fail with an Error, never crash, hang or read out of bounds. The first
// input byte picks the options so the fuzzer explores dialects and modes;
// batches of 1-3 rows force the streaming paths, and every cell read back
// must be well-formed UTF-8 (the reader's promise to every later step).
#include <cstddef>
#include <cstdint>
#include <string>

#include "csv_reader.hpp"
#include "utf8.hpp"

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  if (size == 0) return 0;
  const uint8_t mode = data[0];
  tamis::CsvOptions options;
  options.lenient = mode & 1;
  options.batch_rows = 1 + (mode >> 1 & 3);
  if (mode & 8) options.delimiter = ';';
  if (mode & 16) options.header = tamis::HeaderMode::no;
  if (mode & 32) options.encoding = tamis::Encoding::windows1252;
  if (mode & 64) options.encoding = tamis::Encoding::utf16le;
  std::string bytes(reinterpret_cast<const char*>(data) + 1, size - 1);
  auto reader = tamis::CsvReader::open(tamis::memory_source(std::move(bytes)), "fuzz", options,
                                       [](const tamis::RejectedRecord&) { return tamis::Status(tamis::Ok{}); });
  if (!reader) return 0;
  for (;;) {
    auto batch = (*reader)->next_batch();
    if (!batch || !batch->has_value()) break;
    const tamis::Table& t = **batch;
    for (size_t c = 0; c < t.column_count(); ++c)
      for (size_t r = 0; r < t.row_count(); ++r)
        if (tamis::utf8::first_invalid(t.column(c).text(r)) != std::string_view::npos) __builtin_trap();
  }
  return 0;
}
