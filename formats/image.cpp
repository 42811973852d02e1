#include "formats/image.h"

#include <stb_image.h>
#include <stb_image_resize.h>
#include <stb_image_write.h>

#include <algorithm>
#include <cmath>
#include <memory>

#include "formats/exif.h"
#include "formats/limits.h"

namespace cairn::formats {

Result<Picture> decode_jpeg(std::string_view data, const std::string& name) {
  using R = Result<Picture>;
  if (data.size() > kMaxPhotoBytes)
    return R::failure(name + ": the file is larger than " + size_text(kMaxPhotoBytes) +
                      ", the most Cairn reads as a photo");
  if (!looks_like_jpeg(data)) return R::failure(name + ": not a JPEG file; only JPEG photos are shown");
  const auto* bytes = reinterpret_cast<const stbi_uc*>(data.data());
  const int len = static_cast<int>(data.size());
  int w = 0, h = 0, n = 0;
  if (!stbi_info_from_memory(bytes, len, &w, &h, &n) || w <= 0 || h <= 0)
    return R::failure(name + ": the JPEG cannot be read (" + std::string(stbi_failure_reason()) + ")");
  if (static_cast<long long>(w) * h > kMaxPhotoPixels)
    return R::failure(name + ": the picture has more than 100 megapixels, the most Cairn decodes");
  std::unique_ptr<stbi_uc, void (*)(void*)> px(stbi_load_from_memory(bytes, len, &w, &h, &n, 3), &stbi_image_free);
  if (!px) return R::failure(name + ": the JPEG cannot be decoded (" + std::string(stbi_failure_reason()) + ")");
  Picture p;
  p.width = w;
  p.height = h;
  p.rgb.assign(px.get(), px.get() + static_cast<size_t>(w) * h * 3);
  return p;
}

Picture scale_to_fit(const Picture& p, int max_side) {
  const int longer = std::max(p.width, p.height);
  if (longer <= max_side || max_side <= 0) return p;
  const double f = static_cast<double>(max_side) / longer;
  Picture out;
  out.width = std::max(1, static_cast<int>(std::lround(p.width * f)));
  out.height = std::max(1, static_cast<int>(std::lround(p.height * f)));
  out.rgb.resize(static_cast<size_t>(out.width) * out.height * 3);
  stbir_resize_uint8(p.rgb.data(), p.width, p.height, 0, out.rgb.data(), out.width, out.height, 0, 3);
  return out;
}

std::string encode_jpeg(const Picture& p, int quality) {
  std::string out;
  stbi_write_jpg_to_func(
      [](void* ctx, void* data, int size) { static_cast<std::string*>(ctx)->append(static_cast<char*>(data), size); },
      &out, p.width, p.height, 3, p.rgb.data(), std::clamp(quality, 1, 100));
  return out;
}

}  // namespace cairn::formats
