#include "steps/row_key.hpp"

#include <algorithm>
#include <cstdlib>
#include <cstring>
#include <new>

#define XXH_INLINE_ALL
#include <unicode/uchar.h>
#include <unicode/unistr.h>
#include <xxhash.h>

#ifdef __EMSCRIPTEN__
#include <emscripten.h>
#endif

#include "steps/typed_support.hpp"
#include "utf8.hpp"

namespace tamis {

namespace {

enum KeyTag : char { kNullTag = 0, kTextTag = 1, kNumberTag = 2 };
constexpr size_t kRecordHeader = sizeof(uint64_t) + sizeof(uint32_t);
constexpr uint64_t kRecordAlign = 8;
constexpr uint64_t kMaxStore = (uint64_t{1} << 32) * kRecordAlign - kRecordAlign;
constexpr char kPadding[kRecordAlign] = {};
// Records bound for the temporary file are collected and written this many
// bytes at a time (fewer when the memory budget is smaller).
constexpr size_t kSpillWriteBytes = 256 << 10;

uint32_t slot_hash(uint64_t slot) { return static_cast<uint32_t>(slot >> 32); }
uint64_t slot_record(uint64_t slot) { return ((slot & 0xFFFFFFFFu) - 1) * kRecordAlign; }

// Unicode full case folding (CaseFolding.txt statuses C and F), by ICU;
// among ASCII characters it folds exactly A-Z.
void fold_case_into(std::string_view v, std::string& out) {
  out.assign(v);
  bool ascii = true;
  for (char& ch : out) {
    ascii &= static_cast<unsigned char>(ch) < 0x80;
    if (ch >= 'A' && ch <= 'Z') ch = static_cast<char>(ch - 'A' + 'a');
  }
  if (ascii) return;
  out.clear();
  icu::UnicodeString::fromUTF8(icu::StringPiece(v.data(), static_cast<int32_t>(v.size())))
      .foldCase(U_FOLD_CASE_DEFAULT)
      .toUTF8String(out);
}

template <class T>
void append_raw(std::string& out, T value) {
  char bytes[sizeof(T)];
  std::memcpy(bytes, &value, sizeof(T));
  out.append(bytes, sizeof(T));
}

// Text lengths in keys: LEB128, one byte below 128.
size_t read_length(std::string_view key, size_t& at) {
  size_t n = 0;
  for (int shift = 0;; shift += 7) {
    const auto byte = static_cast<unsigned char>(key[at++]);
    n |= static_cast<size_t>(byte & 0x7F) << shift;
    if (byte < 0x80) return n;
  }
}

template <class T>
T read_raw(const char* p) {
  T value;
  std::memcpy(&value, p, sizeof(T));
  return value;
}

}  // namespace

RowKeys::RowKeys(const Table& batch, std::span<const size_t> columns, KeyCompare compare) {
  const size_t rows = batch.row_count();
  ends_.reserve(rows);
  has_null_.assign(rows, 0);
  std::vector<ColumnCursor> cursors;
  std::vector<bool> is_text;
  size_t estimate = 0;  // enough unless case folding lengthens text or a value passes 127 bytes
  for (const size_t c : columns) {
    const Column& column = batch.column(c);
    cursors.emplace_back(column);
    is_text.push_back(column.type() == Type::text);
    if (!is_text.back()) estimate += rows * (1 + sizeof(int64_t));
    else
      for (size_t k = 0; k < column.chunk_count(); ++k)
        estimate += column.chunk(k).rows * 2 + column.chunk(k).text_bytes();
  }
  // Written through a raw buffer: this loop runs for every cell compared.
  reserve(estimate);
  std::string folded;
  for (size_t r = 0; r < rows; ++r) {
    for (size_t j = 0; j < cursors.size(); ++j) {
      ColumnCursor& cell = cursors[j];
      if (cell.is_null()) {
        reserve(size_ + 1);
        bytes_[size_++] = kNullTag;
        has_null_[r] = 1;
      } else if (is_text[j]) {
        std::string_view v = cell.text();
        if (compare == KeyCompare::trimmed) v = utf8::trim_white_space(v);
        if (compare == KeyCompare::casefold) {
          fold_case_into(v, folded);
          v = folded;
        }
        reserve(size_ + 1 + 10 + v.size());
        bytes_[size_++] = kTextTag;
        for (size_t n = v.size();; n >>= 7) {
          if (n < 0x80) {
            bytes_[size_++] = static_cast<char>(n);
            break;
          }
          bytes_[size_++] = static_cast<char>((n & 0x7F) | 0x80);
        }
        std::memcpy(bytes_.get() + size_, v.data(), v.size());
        size_ += v.size();
      } else {
        reserve(size_ + 1 + sizeof(int64_t));
        bytes_[size_++] = kNumberTag;
        const int64_t number = cell.number();
        std::memcpy(bytes_.get() + size_, &number, sizeof(int64_t));
        size_ += sizeof(int64_t);
      }
      cell.next();
    }
    ends_.push_back(size_);
  }
}

void RowKeys::reserve(size_t bytes) {
  if (bytes <= capacity_) return;
  const size_t capacity = std::max(bytes, capacity_ * 2);
  std::unique_ptr<char[]> bigger(new char[capacity]);
  if (size_) std::memcpy(bigger.get(), bytes_.get(), size_);
  bytes_ = std::move(bigger);
  capacity_ = capacity;
}

KeyCell single_key_cell(std::string_view key) {
  KeyCell cell;
  if (key[0] == kNullTag) cell.is_null = true;
  else if (key[0] == kTextTag) {
    size_t at = 1;
    const size_t length = read_length(key, at);
    cell.text = key.substr(at, length);
  }
  else cell.number = read_raw<int64_t>(key.data() + 1);
  return cell;
}

namespace {
// Describes the value at key[at] and moves at past it.
void describe_at(std::string_view key, size_t& at, Type type, int scale, std::string& out) {
  const char tag = key[at++];
  if (tag == kNullTag) {
    out += "NULL";
  } else if (tag == kTextTag) {
    const size_t length = read_length(key, at);
    out += quoted_value(key.substr(at, length));
    at += length;
  } else {
    append_canonical_value(type, scale, read_raw<int64_t>(key.data() + at), out);
    at += sizeof(int64_t);
  }
}
}  // namespace

std::string describe_value(std::string_view key, Type type, int scale) {
  std::string out;
  size_t at = 0;
  describe_at(key, at, type, scale, out);
  return out;
}

std::string describe_key(std::string_view key, const Schema& schema, std::span<const size_t> columns) {
  std::string out;
  size_t at = 0;
  for (const size_t c : columns) {
    if (!out.empty()) out += ", ";
    out += schema[c].name + "=";
    describe_at(key, at, schema[c].type, schema[c].scale, out);
  }
  return out;
}

uint64_t default_key_hash(std::string_view key) { return XXH3_64bits(key.data(), key.size()); }

// The browser page is built without a file system (-sFILESYSTEM=0, so the
// Emscripten runtime has no FS object): a temporary file there would write to
// nowhere. Its tables are in memory already, and the page's check on opening
// a file counts the keys, so they stay in memory too.
static bool can_make_temporary_files() {
#ifdef __EMSCRIPTEN__
  return EM_ASM_INT({ return typeof FS !== 'undefined' ? 1 : 0; }) != 0;
#else
  return true;
#endif
}

RowIndexTuning default_row_index_tuning() {
  RowIndexTuning tuning;
  if (!can_make_temporary_files()) tuning.memory_budget = SIZE_MAX;
  if (const char* budget = std::getenv("TAMIS_DEDUPLICATE_MEMORY")) {
    char* end = nullptr;
    const unsigned long long bytes = std::strtoull(budget, &end, 10);
    if (end != budget && *end == '\0') tuning.memory_budget = static_cast<size_t>(bytes);
  }
  return tuning;
}

RowIndex::SlotTable RowIndex::empty_slots(size_t count) {
  SlotTable slots(static_cast<Slot*>(std::calloc(count, sizeof(Slot))));
  if (!slots) throw std::bad_alloc();
  return slots;
}

RowIndex::RowIndex(RowIndexTuning tuning) : tuning_(tuning), slots_(empty_slots(1024)), slot_count_(1024) {}

RowIndex::~RowIndex() {
  if (spill_) std::fclose(spill_);
}

Status RowIndex::seek(uint64_t offset) {
  if (std::fseek(spill_, static_cast<long>(offset), SEEK_SET) != 0)
    return io_error("", "cannot seek in the temporary file of kept rows");
  return Ok{};
}

size_t RowIndex::spill_write_bytes() const { return std::min(kSpillWriteBytes, tuning_.memory_budget); }

Status RowIndex::flush_spill() {
  if (pending_.empty()) return Ok{};
  if (Status s = seek(flushed_); !s) return s;
  if (std::fwrite(pending_.data(), 1, pending_.size(), spill_) != pending_.size())
    return io_error("", "cannot write the temporary file of kept rows (disk full?)");
  flushed_ += pending_.size();
  pending_.clear();
  return Ok{};
}

Result<bool> RowIndex::stored_key_equals(uint64_t record, std::string_view key, uint64_t& line) {
  const char* p = nullptr;
  if (!spill_ || record < spill_base_) {
    p = memory_.data() + record;
  } else if (const uint64_t at = record - spill_base_; at >= flushed_) {
    p = pending_.data() + (at - flushed_);
  } else {
    // One read of the header and as many bytes as the key has: a record of
    // another length differs anyway (and may end the file sooner).
    if (Status s = seek(at); !s) return s.take_error();
    scratch_.resize(kRecordHeader + key.size());
    const size_t got = std::fread(scratch_.data(), 1, scratch_.size(), spill_);
    if (got < kRecordHeader) return io_error("", "cannot read back the temporary file of kept rows");
    p = scratch_.data();
    if (read_raw<uint32_t>(p + sizeof(uint64_t)) == key.size() && got != scratch_.size())
      return io_error("", "cannot read back the temporary file of kept rows");
  }
  line = read_raw<uint64_t>(p);
  const auto length = read_raw<uint32_t>(p + sizeof(uint64_t));
  return length == key.size() && std::memcmp(p + kRecordHeader, key.data(), length) == 0;
}

Result<uint64_t> RowIndex::store(std::string_view key, uint64_t line) {
  const size_t unpadded = kRecordHeader + key.size();
  const size_t size = (unpadded + kRecordAlign - 1) / kRecordAlign * kRecordAlign;
  const uint64_t used = spill_ ? spill_base_ + flushed_ + pending_.size() : memory_.size();
  if (used + size > kMaxStore)
    return usage_error("too many distinct rows to remember: their values pass 32 GiB");
  std::string* into = &memory_;
  if (spill_ || memory_.size() + size > tuning_.memory_budget) {
    if (!spill_) {
      spill_ = std::tmpfile();
      if (!spill_) return io_error("", "cannot create a temporary file for the kept rows (memory budget reached)");
      // Writes go through pending_ and reads are single record reads, so
      // stdio's own buffer would only add copies.
      std::setvbuf(spill_, nullptr, _IONBF, 0);
      spill_base_ = memory_.size();
      pending_.reserve(spill_write_bytes());
    }
    if (pending_.size() + size > spill_write_bytes())
      if (Status s = flush_spill(); !s) return s.take_error();
    into = &pending_;
  } else if (memory_.size() + size > memory_.capacity()) {
    memory_.reserve(std::min(tuning_.memory_budget, std::max(memory_.capacity() * 2, memory_.size() + size)));
  }
  const uint64_t record = into == &memory_ ? memory_.size() : spill_base_ + flushed_ + pending_.size();
  append_raw(*into, line);
  append_raw(*into, static_cast<uint32_t>(key.size()));
  into->append(key);
  into->append(kPadding, size - unpadded);
  return record;
}

Status RowIndex::set_line(uint64_t record, uint64_t line) {
  if (!spill_ || record < spill_base_) {
    std::memcpy(memory_.data() + record, &line, sizeof(uint64_t));
    return Ok{};
  }
  const uint64_t at = record - spill_base_;
  if (at >= flushed_) {
    std::memcpy(pending_.data() + (at - flushed_), &line, sizeof(uint64_t));
    return Ok{};
  }
  if (Status s = seek(at); !s) return s;
  if (std::fwrite(&line, 1, sizeof(uint64_t), spill_) != sizeof(uint64_t))
    return io_error("", "cannot write the temporary file of kept rows (disk full?)");
  return Ok{};
}

void RowIndex::grow() {
  const size_t count = slot_count_ * 2;
  SlotTable bigger = empty_slots(count);
  const size_t mask = count - 1;
  for (size_t k = 0; k < slot_count_; ++k) {
    const Slot s = slots_[k];
    if (!s) continue;
    size_t i = slot_hash(s) & mask;
    while (bigger[i]) i = (i + 1) & mask;
    bigger[i] = s;
  }
  slots_ = std::move(bigger);
  slot_count_ = count;
}

Result<std::pair<size_t, std::optional<RowIndex::Entry>>> RowIndex::probe(std::string_view key, uint32_t hash) {
  const size_t mask = slot_count_ - 1;
  for (size_t i = hash & mask;; i = (i + 1) & mask) {
    const Slot s = slots_[i];
    if (!s) return std::pair<size_t, std::optional<Entry>>{i, std::nullopt};
    if (slot_hash(s) != hash) continue;
    uint64_t line = 0;
    auto same = stored_key_equals(slot_record(s), key, line);
    if (!same) return same.take_error();
    if (*same) return std::pair<size_t, std::optional<Entry>>{i, Entry{slot_record(s), line}};
    ++collisions_;
  }
}

void RowIndex::prefetch(uint64_t hash) const {
  __builtin_prefetch(&slots_[(hash >> 32) & (slot_count_ - 1)]);
}

Result<std::optional<RowIndex::Entry>> RowIndex::find(std::string_view key, uint64_t hash) {
  auto found = probe(key, static_cast<uint32_t>(hash >> 32));
  if (!found) return found.take_error();
  return found->second;
}

Result<std::pair<RowIndex::Entry, bool>> RowIndex::insert(std::string_view key, uint64_t full_hash, uint64_t line) {
  if ((count_ + 1) * 4 > slot_count_ * 3) grow();
  const auto hash = static_cast<uint32_t>(full_hash >> 32);
  auto found = probe(key, hash);
  if (!found) return found.take_error();
  if (found->second) return std::pair<Entry, bool>{*found->second, false};
  auto record = store(key, line);
  if (!record) return record.take_error();
  slots_[found->first] = uint64_t{hash} << 32 | (*record / kRecordAlign + 1);
  ++count_;
  return std::pair<Entry, bool>{Entry{*record, line}, true};
}

}  // namespace tamis
