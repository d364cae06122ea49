// The workbench's own look: the embedded font and two colour themes, scaled
// for the display.
#pragma once

#include <span>

namespace tamis::ui {

// DejaVu Sans, compiled in at build time (embed_font.cmake).
std::span<const unsigned char> ui_font_regular();

enum class Theme { light, dark };

// Colours the screens use beyond ImGui's own style slots.
struct Palette {
  unsigned null_cell;        // text colour of the NULL marker
  unsigned empty_cell;       // the empty-text marker
  unsigned edge_space;       // visible marks for leading/trailing spaces
  unsigned changed_cell_bg;  // cells the selected step changed
  unsigned removed_row_bg;
  unsigned bar;              // value-count bars in the Column panel
  unsigned bar_selected;
  unsigned error_text;
  unsigned good_text;
  unsigned muted_text;
};
const Palette& palette();

// Sets ImGui's style and colours for the theme, every size multiplied by
// scale (1 = 96 dpi).
void apply_theme(Theme theme, float scale);

// Loads the embedded font at base_pixels * scale into ImGui's atlas, with the
// Latin, Greek and Cyrillic ranges and the symbols the screens draw.
// framebuffer_ratio > 1 (e.g. macOS "Retina") rasterizes at the larger size
// and shows it at the logical size, so text stays sharp.
void load_ui_font(float base_pixels, float scale, float framebuffer_ratio);

}  // namespace tamis::ui
