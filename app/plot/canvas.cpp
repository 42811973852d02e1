#include "app/plot/canvas.h"

#include <cctype>

namespace cairn::plot {

// Okabe, M. & Ito, K. (2008) Color Universal Design: black, orange, sky blue,
// bluish green, yellow, blue, vermillion, reddish purple.
const Rgba kOkabeIto[8] = {{0, 0, 0, 255},      {230, 159, 0, 255}, {86, 180, 233, 255}, {0, 158, 115, 255},
                           {240, 228, 66, 255}, {0, 114, 178, 255}, {213, 94, 0, 255},   {204, 121, 167, 255}};

std::optional<Rgba> parse_hex_colour(const std::string& hex) {
  if (hex.size() != 7 || hex[0] != '#') return std::nullopt;
  auto nib = [](char c) -> int {
    if (std::isdigit(static_cast<unsigned char>(c))) return c - '0';
    c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
    if (c >= 'a' && c <= 'f') return c - 'a' + 10;
    return -1;
  };
  int v[6];
  for (int i = 0; i < 6; ++i)
    if ((v[i] = nib(hex[1 + i])) < 0) return std::nullopt;
  return Rgba{static_cast<std::uint8_t>(v[0] * 16 + v[1]), static_cast<std::uint8_t>(v[2] * 16 + v[3]),
              static_cast<std::uint8_t>(v[4] * 16 + v[5]), 255};
}

}  // namespace cairn::plot
