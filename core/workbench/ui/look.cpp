#include "look.hpp"

#include <imgui.h>

namespace tamis::ui {
namespace {

Palette current_palette;

ImVec4 rgb(unsigned hex, float alpha = 1.0f) {
  return ImVec4(static_cast<float>((hex >> 16) & 0xFF) / 255.0f, static_cast<float>((hex >> 8) & 0xFF) / 255.0f,
                static_cast<float>(hex & 0xFF) / 255.0f, alpha);
}

unsigned packed(unsigned hex, float alpha = 1.0f) { return ImGui::ColorConvertFloat4ToU32(rgb(hex, alpha)); }

// Light: warm paper background, deep teal for active things, terracotta for
// attention. Dark: blue-grey slate with the same teal lifted and amber marks.
struct ThemeColours {
  unsigned window, child, popup, frame, frame_hover, frame_active, title, title_active, menu, border,
      text, text_dim, accent, accent_hover, accent_active, header, header_hover, header_active, table_header,
      table_row, table_row_alt, table_border_strong, table_border_light, selection;
};

constexpr ThemeColours light_colours{
    0xF6F3EC, 0xFBF9F4, 0xFFFDF8, 0xE9E4D8, 0xDDD6C6, 0xD0C7B3, 0xE4DED0, 0xD5CDB9, 0xEDE8DD, 0xC9C0AE,
    0x23272B, 0x7A7468, 0x1F6F6A, 0x2A8A83, 0x175954, 0xCFE3DF, 0xB8D7D1, 0x9CC8C0, 0xE4DDCD,
    0xFBF9F4, 0xF2EEE5, 0xB8AE99, 0xDCD5C6, 0xA9D3CC};
constexpr ThemeColours dark_colours{
    0x1D2329, 0x222930, 0x252D35, 0x2E3842, 0x38444F, 0x44525F, 0x1A1F24, 0x26303A, 0x20272E, 0x3A4652,
    0xE3E6E8, 0x8C969F, 0x3FA39A, 0x4DB8AE, 0x32867F, 0x2D4A49, 0x35605D, 0x3E7470, 0x2A333C,
    0x222930, 0x262E36, 0x4A5763, 0x323C46, 0x2F6A64};

void set_colours(const ThemeColours& c, bool dark) {
  ImVec4* colours = ImGui::GetStyle().Colors;
  colours[ImGuiCol_Text] = rgb(c.text);
  colours[ImGuiCol_TextDisabled] = rgb(c.text_dim);
  colours[ImGuiCol_WindowBg] = rgb(c.window);
  colours[ImGuiCol_ChildBg] = rgb(c.child);
  colours[ImGuiCol_PopupBg] = rgb(c.popup);
  colours[ImGuiCol_Border] = rgb(c.border);
  colours[ImGuiCol_BorderShadow] = rgb(0, 0.0f);
  colours[ImGuiCol_FrameBg] = rgb(c.frame);
  colours[ImGuiCol_FrameBgHovered] = rgb(c.frame_hover);
  colours[ImGuiCol_FrameBgActive] = rgb(c.frame_active);
  colours[ImGuiCol_TitleBg] = rgb(c.title);
  colours[ImGuiCol_TitleBgActive] = rgb(c.title_active);
  colours[ImGuiCol_TitleBgCollapsed] = rgb(c.title);
  colours[ImGuiCol_MenuBarBg] = rgb(c.menu);
  colours[ImGuiCol_ScrollbarBg] = rgb(c.window);
  colours[ImGuiCol_ScrollbarGrab] = rgb(c.frame_active);
  colours[ImGuiCol_ScrollbarGrabHovered] = rgb(c.accent_hover, 0.7f);
  colours[ImGuiCol_ScrollbarGrabActive] = rgb(c.accent);
  colours[ImGuiCol_CheckMark] = rgb(c.accent);
  colours[ImGuiCol_SliderGrab] = rgb(c.accent);
  colours[ImGuiCol_SliderGrabActive] = rgb(c.accent_active);
  colours[ImGuiCol_Button] = rgb(c.frame);
  colours[ImGuiCol_ButtonHovered] = rgb(c.header_hover);
  colours[ImGuiCol_ButtonActive] = rgb(c.header_active);
  colours[ImGuiCol_Header] = rgb(c.header);
  colours[ImGuiCol_HeaderHovered] = rgb(c.header_hover);
  colours[ImGuiCol_HeaderActive] = rgb(c.header_active);
  colours[ImGuiCol_Separator] = rgb(c.border);
  colours[ImGuiCol_SeparatorHovered] = rgb(c.accent_hover);
  colours[ImGuiCol_SeparatorActive] = rgb(c.accent);
  colours[ImGuiCol_ResizeGrip] = rgb(c.border, 0.5f);
  colours[ImGuiCol_ResizeGripHovered] = rgb(c.accent_hover);
  colours[ImGuiCol_ResizeGripActive] = rgb(c.accent);
  colours[ImGuiCol_Tab] = rgb(c.frame);
  colours[ImGuiCol_TabHovered] = rgb(c.header_hover);
  colours[ImGuiCol_TabActive] = rgb(c.header_active);
  colours[ImGuiCol_TabUnfocused] = rgb(c.frame);
  colours[ImGuiCol_TabUnfocusedActive] = rgb(c.header);
  colours[ImGuiCol_PlotLines] = rgb(c.accent);
  colours[ImGuiCol_PlotLinesHovered] = rgb(c.accent_hover);
  colours[ImGuiCol_PlotHistogram] = rgb(c.accent);
  colours[ImGuiCol_PlotHistogramHovered] = rgb(c.accent_hover);
  colours[ImGuiCol_TableHeaderBg] = rgb(c.table_header);
  colours[ImGuiCol_TableBorderStrong] = rgb(c.table_border_strong);
  colours[ImGuiCol_TableBorderLight] = rgb(c.table_border_light);
  colours[ImGuiCol_TableRowBg] = rgb(c.table_row);
  colours[ImGuiCol_TableRowBgAlt] = rgb(c.table_row_alt);
  colours[ImGuiCol_TextSelectedBg] = rgb(c.selection, 0.8f);
  colours[ImGuiCol_DragDropTarget] = rgb(c.accent);
  colours[ImGuiCol_NavHighlight] = rgb(c.accent);
  colours[ImGuiCol_NavWindowingHighlight] = rgb(c.accent, 0.7f);
  colours[ImGuiCol_NavWindowingDimBg] = rgb(0x000000, 0.2f);
  colours[ImGuiCol_ModalWindowDimBg] = rgb(0x000000, dark ? 0.45f : 0.25f);

  if (dark) {
    current_palette = {packed(0xC792EA), packed(0x7F8C98), packed(0xE0A84F), packed(0x5C4A1E, 0.85f),
                       packed(0x5A2A2A, 0.8f), packed(0x3FA39A), packed(0xE0A84F), packed(0xF07C6C),
                       packed(0x7CC99A), packed(0x8C969F)};
  } else {
    current_palette = {packed(0x7A3E9D), packed(0x9A9281), packed(0xB5542F), packed(0xF6D98B, 0.9f),
                       packed(0xF2C4B8, 0.9f), packed(0x1F6F6A), packed(0xB5542F), packed(0xB0322A),
                       packed(0x2E7D4F), packed(0x7A7468)};
  }
}

}  // namespace

const Palette& palette() { return current_palette; }

void apply_theme(Theme theme, float scale) {
  ImGuiStyle& style = ImGui::GetStyle();
  style = ImGuiStyle();
  style.WindowRounding = 3.0f;
  style.ChildRounding = 3.0f;
  style.FrameRounding = 2.0f;
  style.PopupRounding = 3.0f;
  style.GrabRounding = 2.0f;
  style.TabRounding = 2.0f;
  style.ScrollbarRounding = 2.0f;
  style.WindowPadding = ImVec2(10, 9);
  style.FramePadding = ImVec2(7, 4);
  style.ItemSpacing = ImVec2(8, 6);
  style.CellPadding = ImVec2(6, 3);
  style.IndentSpacing = 16.0f;
  style.ScrollbarSize = 13.0f;
  style.WindowBorderSize = 1.0f;
  style.FrameBorderSize = 0.0f;
  style.WindowTitleAlign = ImVec2(0.0f, 0.5f);
  set_colours(theme == Theme::dark ? dark_colours : light_colours, theme == Theme::dark);
  style.ScaleAllSizes(scale);
}

void load_ui_font(float base_pixels, float scale, float framebuffer_ratio) {
  static const ImWchar ranges[] = {
      0x0020, 0x024F,  // Basic Latin, Latin-1, Latin Extended-A and -B
      0x0250, 0x02FF,  // IPA extensions, spacing modifier letters
      0x0300, 0x036F,  // combining diacritical marks (decomposed accents)
      0x0370, 0x03FF,  // Greek
      0x0400, 0x052F,  // Cyrillic and its supplement
      0x1E00, 0x1EFF,  // Latin Extended Additional
      0x2000, 0x206F,  // General Punctuation
      0x20A0, 0x20CF,  // Currency Symbols
      0x2100, 0x218F,  // Letterlike Symbols, Number Forms
      0x2190, 0x21FF,  // Arrows
      0x2200, 0x22FF,  // Mathematical Operators (the empty-set sign)
      0x2400, 0x243F,  // Control Pictures (the visible space sign)
      0x25A0, 0x25FF,  // Geometric Shapes
      0x2700, 0x27BF,  // Dingbats (check and cross marks)
      0xFFFD, 0xFFFD,  // the replacement character
      0,
  };
  ImGuiIO& io = ImGui::GetIO();
  io.Fonts->Clear();
  const std::span<const unsigned char> bytes = ui_font_regular();
  ImFontConfig config;
  config.FontDataOwnedByAtlas = false;  // the bytes are static
  config.OversampleH = 2;
  config.OversampleV = 1;
  const float ratio = framebuffer_ratio > 0 ? framebuffer_ratio : 1.0f;
  io.Fonts->AddFontFromMemoryTTF(const_cast<unsigned char*>(bytes.data()), static_cast<int>(bytes.size()),
                                 base_pixels * scale * ratio, &config, ranges);
  io.FontGlobalScale = 1.0f / ratio;
}

}  // namespace tamis::ui
