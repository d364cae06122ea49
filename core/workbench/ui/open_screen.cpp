#include "open_screen.hpp"

#include <imgui.h>

#include <array>

#include "data_grid.hpp"
#include "look.hpp"
#include "text_format.hpp"

namespace tamis::ui {
namespace {

constexpr size_t kPreviewRows = 20;

struct DelimiterChoice {
  char delimiter;
  const char* label;
};
constexpr std::array<DelimiterChoice, 4> delimiter_choices{
    {{',', "comma ,"}, {';', "semicolon ;"}, {'\t', "tab"}, {'|', "vertical bar |"}}};
constexpr std::array<Encoding, 5> encoding_choices{Encoding::utf8, Encoding::utf16le, Encoding::utf16be,
                                                    Encoding::windows1252, Encoding::iso8859_1};

const char* delimiter_label(char delimiter) {
  for (const DelimiterChoice& choice : delimiter_choices)
    if (choice.delimiter == delimiter) return choice.label;
  return "other";
}

void help_marker(const char* text) {
  if (ImGui::IsItemHovered()) ImGui::SetTooltip("%s", text);
}

}  // namespace

OpenScreen::OpenScreen(Platform& platform) : platform_(platform) {}

void OpenScreen::start(std::string path) {
  path_ = std::move(path);
  encoding_.reset();
  delimiter_.reset();
  header_.reset();
  skip_rows_ = 0;
  active_ = true;
  refresh_preview();
}

CsvOptions OpenScreen::options() const {
  CsvOptions options;
  options.encoding = encoding_ ? *encoding_ : detected_.encoding;
  options.delimiter = delimiter_ ? *delimiter_ : detected_.delimiter;
  options.header = (header_ ? *header_ : detected_.header) ? HeaderMode::yes : HeaderMode::no;
  options.skip_rows = static_cast<size_t>(skip_rows_);
  return options;
}

void OpenScreen::refresh_preview() {
  error_.clear();
  rows_.reset();
  columns_.clear();
  Result<std::unique_ptr<ByteSource>> source = platform_.open_for_reading(path_);
  if (!source) {
    error_ = source.error().to_string();
    return;
  }
  size_ = source.value()->size();
  CsvOptions options;
  options.encoding = encoding_;
  options.delimiter = delimiter_;
  if (header_) options.header = *header_ ? HeaderMode::yes : HeaderMode::no;
  options.skip_rows = static_cast<size_t>(skip_rows_);
  options.lenient = true;  // the preview shows what it can; the load reports the rest
  options.batch_rows = kPreviewRows;
  Result<std::unique_ptr<CsvReader>> reader = CsvReader::open(std::move(source.value()), path_, options);
  if (!reader) {
    error_ = reader.error().to_string();
    return;
  }
  columns_ = reader.value()->column_names();
  Result<std::optional<Table>> batch = reader.value()->next_batch();
  if (!batch) {
    error_ = batch.error().to_string();
  } else if (batch.value()) {
    rows_ = std::move(*batch.value());
  }
  detected_ = reader.value()->report();
}

Status OpenScreen::set_option(std::string_view key, std::string_view value) {
  if (key == "encoding") {
    std::optional<Encoding> encoding = encoding_from_name(value);
    if (!encoding) return usage_error("unknown encoding: " + std::string(value));
    encoding_ = encoding;
  } else if (key == "delimiter") {
    if (value == "tab") {
      delimiter_ = '\t';
    } else if (value.size() == 1) {
      delimiter_ = value[0];
    } else {
      return usage_error("a delimiter is one character or \"tab\"");
    }
  } else if (key == "header") {
    if (value != "yes" && value != "no") return usage_error("header is yes or no");
    header_ = value == "yes";
  } else if (key == "skip") {
    skip_rows_ = std::max(0, std::atoi(std::string(value).c_str()));
  } else {
    return usage_error("unknown read option: " + std::string(key));
  }
  refresh_preview();
  return Ok{};
}

OpenScreen::Choice OpenScreen::draw() {
  Choice choice = Choice::none;
  ImGui::Text("Open %s", path_.c_str());
  if (size_) {
    ImGui::SameLine();
    ImGui::TextDisabled("(%s)", byte_size_text(*size_).c_str());
  }
  ImGui::TextDisabled("Check how the file will be read. Nothing is loaded until you press Load.");
  ImGui::Separator();

  bool changed = false;
  const float label_width = ImGui::GetFontSize() * 11;
  if (ImGui::BeginTable("##read-options", 3, ImGuiTableFlags_SizingFixedFit)) {
    ImGui::TableSetupColumn("what", ImGuiTableColumnFlags_WidthFixed, label_width);
    ImGui::TableSetupColumn("choice", ImGuiTableColumnFlags_WidthFixed, ImGui::GetFontSize() * 12);
    ImGui::TableSetupColumn("why", ImGuiTableColumnFlags_WidthStretch);

    ImGui::TableNextRow();
    ImGui::TableNextColumn();
    ImGui::AlignTextToFramePadding();
    ImGui::TextUnformatted("Character encoding");
    ImGui::TableNextColumn();
    const Encoding shown_encoding = encoding_ ? *encoding_ : detected_.encoding;
    ImGui::SetNextItemWidth(-1);
    if (ImGui::BeginCombo("##encoding", std::string(encoding_name(shown_encoding)).c_str())) {
      for (Encoding encoding : encoding_choices) {
        if (ImGui::Selectable(std::string(encoding_name(encoding)).c_str(), encoding == shown_encoding)) {
          encoding_ = encoding;
          changed = true;
        }
      }
      ImGui::EndCombo();
    }
    help_marker("How the bytes of the file become characters. Change it when letters such as é or ß look wrong in the preview.");
    ImGui::TableNextColumn();
    ImGui::AlignTextToFramePadding();
    ImGui::TextDisabled("%s", encoding_ ? "chosen by you" : detected_.encoding_reason.c_str());

    ImGui::TableNextRow();
    ImGui::TableNextColumn();
    ImGui::AlignTextToFramePadding();
    ImGui::TextUnformatted("Field delimiter");
    ImGui::TableNextColumn();
    const char shown_delimiter = delimiter_ ? *delimiter_ : detected_.delimiter;
    ImGui::SetNextItemWidth(-1);
    if (ImGui::BeginCombo("##delimiter", delimiter_label(shown_delimiter))) {
      for (const DelimiterChoice& option : delimiter_choices) {
        if (ImGui::Selectable(option.label, option.delimiter == shown_delimiter)) {
          delimiter_ = option.delimiter;
          changed = true;
        }
      }
      ImGui::EndCombo();
    }
    help_marker("The character between fields. Change it when the preview shows everything in one column.");
    ImGui::TableNextColumn();
    ImGui::AlignTextToFramePadding();
    ImGui::TextDisabled("%s", delimiter_ ? "chosen by you" : detected_.delimiter_reason.c_str());

    ImGui::TableNextRow();
    ImGui::TableNextColumn();
    ImGui::AlignTextToFramePadding();
    ImGui::TextUnformatted("Column names");
    ImGui::TableNextColumn();
    bool header = header_ ? *header_ : detected_.header;
    if (ImGui::Checkbox("first row has them", &header)) {
      header_ = header;
      changed = true;
    }
    help_marker("Ticked: the first row names the columns. Unticked: it is data, and the columns are numbered.");
    ImGui::TableNextColumn();
    ImGui::AlignTextToFramePadding();
    ImGui::TextDisabled("%s", header_ ? "chosen by you" : detected_.header_reason.c_str());

    ImGui::TableNextRow();
    ImGui::TableNextColumn();
    ImGui::AlignTextToFramePadding();
    ImGui::TextUnformatted("Lines to skip");
    ImGui::TableNextColumn();
    ImGui::SetNextItemWidth(-1);
    if (ImGui::InputInt("##skip", &skip_rows_)) {
      skip_rows_ = std::max(0, skip_rows_);
      changed = true;
    }
    help_marker("Lines at the top of the file before the column names (titles, export notes).");
    ImGui::TableNextColumn();
    ImGui::AlignTextToFramePadding();
    ImGui::TextDisabled("lines before the first record");
    ImGui::EndTable();
  }
  if (changed) refresh_preview();

  if (!error_.empty()) warning_text(error_);
  for (const std::string& warning : detected_.warnings()) warning_text(warning);

  ImGui::Spacing();
  if (ImGui::Button("Load")) choice = Choice::load;
  help_marker("Read the whole file with these settings and profile it.");
  ImGui::SameLine();
  if (ImGui::Button("Cancel")) choice = Choice::cancel;
  help_marker("Go back without loading.");
  ImGui::SameLine();
  ImGui::TextDisabled("First %zu rows as they will be read:", kPreviewRows);

  if (rows_ && !columns_.empty()) {
    const Table& table = *rows_;
    const size_t shown_columns = std::min(table.column_count(), DataGrid::kColumnsPerWindow);
    const ImGuiTableFlags flags = ImGuiTableFlags_ScrollX | ImGuiTableFlags_ScrollY | ImGuiTableFlags_RowBg |
                                  ImGuiTableFlags_BordersInnerV | ImGuiTableFlags_BordersOuter |
                                  ImGuiTableFlags_Resizable;
    if (ImGui::BeginTable("##open-preview", static_cast<int>(shown_columns + 1), flags)) {
      ImGui::TableSetupScrollFreeze(1, 1);
      ImGui::TableSetupColumn("line", ImGuiTableColumnFlags_WidthFixed, ImGui::GetFontSize() * 3.5f);
      for (size_t c = 0; c < shown_columns; ++c) {
        std::string label = table.name(c);
        label += "##p";
        label += std::to_string(c);
        ImGui::TableSetupColumn(label.c_str(), ImGuiTableColumnFlags_WidthFixed, ImGui::GetFontSize() * 9);
      }
      ImGui::TableHeadersRow();
      for (size_t r = 0; r < table.row_count(); ++r) {
        ImGui::TableNextRow();
        ImGui::TableNextColumn();
        ImGui::TextDisabled("%llu", static_cast<unsigned long long>(table.source_line(r)));
        for (size_t c = 0; c < shown_columns; ++c) {
          ImGui::TableNextColumn();
          const Column& column = table.column(c);
          draw_value(column.is_null(r) ? std::string_view() : column.text(r), column.is_null(r));
        }
      }
      ImGui::EndTable();
    }
  }
  return choice;
}

}  // namespace tamis::ui
