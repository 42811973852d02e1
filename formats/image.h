// Photo pictures for thumbnails: a JPEG decoded with Debian's stb_image
// (libstb-dev), scaled with stb_image_resize and written again as JPEG with
// stb_image_write. Files are untrusted: size and pixel count are bounded
// before anything is decoded.
#pragma once
#include <string>
#include <string_view>
#include <vector>

#include "geomath/result.h"

namespace cairn::formats {

// Most pixels of a photo Cairn decodes (100 megapixels; a camera has 12 to 50).
constexpr long long kMaxPhotoPixels = 100'000'000;

struct Picture {
  int width = 0, height = 0;
  std::vector<unsigned char> rgb;  // width * height * 3 bytes, rows top to bottom
};

// The picture of a JPEG file's bytes; fails naming NAME for a file that is not
// a JPEG, too large, or cannot be decoded.
Result<Picture> decode_jpeg(std::string_view data, const std::string& name);
// The picture scaled so that its longer side is at most MAX_SIDE pixels (kept
// as it is when already smaller); the aspect ratio is kept.
Picture scale_to_fit(const Picture& p, int max_side);
// A baseline JPEG of P at QUALITY (1..100).
std::string encode_jpeg(const Picture& p, int quality = 80);

}  // namespace cairn::formats
