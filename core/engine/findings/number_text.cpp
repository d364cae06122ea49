#include "findings/number_text.hpp"

namespace tamis {

namespace {

bool digits(std::string_view s) {
  if (s.empty()) return false;
  for (const char c : s)
    if (c < '0' || c > '9') return false;
  return true;
}

// digits{1,3} (mark digits{3})+
bool grouped(std::string_view s, char mark) {
  const size_t first = s.find(mark);
  if (first == std::string_view::npos || first == 0 || first > 3 || !digits(s.substr(0, first))) return false;
  size_t i = first;
  while (i < s.size()) {
    if (s[i] != mark || i + 4 > s.size() || !digits(s.substr(i + 1, 3))) return false;
    i += 4;
  }
  return true;
}

NumberText::Body body_of(std::string_view s) {
  if (!s.empty() && (s[0] == '+' || s[0] == '-')) s.remove_prefix(1);
  if (digits(s)) return NumberText::Body::plain;
  const size_t point = s.find('.');
  const size_t comma = s.find(',');
  if (comma == std::string_view::npos && point != std::string_view::npos && s.find('.', point + 1) == std::string_view::npos &&
      digits(s.substr(0, point)) && digits(s.substr(point + 1)))
    return NumberText::Body::plain;
  if (point == std::string_view::npos && comma != std::string_view::npos && s.find(',', comma + 1) == std::string_view::npos &&
      digits(s.substr(0, comma)) && digits(s.substr(comma + 1)) && s.size() - comma - 1 != 3)
    return NumberText::Body::decimal_comma;
  {
    const size_t last_point = s.rfind('.');
    const std::string_view whole = point != std::string_view::npos && comma != std::string_view::npos && comma < point
                                       ? s.substr(0, last_point)
                                       : s;
    const std::string_view fraction = whole.size() < s.size() ? s.substr(whole.size() + 1) : std::string_view();
    if (grouped(whole, ',') && (whole.size() == s.size() || digits(fraction))) return NumberText::Body::comma_groups;
  }
  {
    const std::string_view whole = comma != std::string_view::npos ? s.substr(0, comma) : s;
    const std::string_view fraction = comma != std::string_view::npos ? s.substr(comma + 1) : std::string_view();
    if (grouped(whole, '.') && (comma == std::string_view::npos || digits(fraction)) &&
        (comma != std::string_view::npos || s.find('.') != s.rfind('.')))
      return NumberText::Body::point_groups;
  }
  return NumberText::Body::none;
}

}  // namespace

NumberText read_number_text(std::string_view value) {
  NumberText out;
  std::string_view s = value;
  const auto strip_sign = [&](bool at_end) {
    static constexpr std::string_view kSigns[] = {"$", "€", "£", "¥"};
    for (const std::string_view sign : kSigns) {
      const bool found = at_end ? (s.size() > sign.size() && s.substr(s.size() - sign.size()) == sign)
                                : (s.size() > sign.size() && s.substr(0, sign.size()) == sign);
      if (!found) continue;
      if (out.currency.find(sign) == std::string::npos) out.currency += sign;
      s = at_end ? s.substr(0, s.size() - sign.size()) : s.substr(sign.size());
      return true;
    }
    return false;
  };
  const auto strip_space = [&](bool at_end) {
    if (s.empty()) return;
    if (at_end ? s.back() == ' ' : s.front() == ' ') {
      out.inner_space = true;
      s = at_end ? s.substr(0, s.size() - 1) : s.substr(1);
    }
  };
  if (s.size() > 1 && s.back() == '%') {
    out.percent = true;
    s.remove_suffix(1);
    strip_space(true);
  }
  if (strip_sign(false)) strip_space(false);
  else if (strip_sign(true)) strip_space(true);
  out.body = body_of(s);
  if (out.body == NumberText::Body::none) {
    out.percent = false;
    out.currency.clear();
    out.inner_space = false;
  }
  return out;
}

}  // namespace tamis
