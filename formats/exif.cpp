#include "formats/exif.h"

#include <fmt/format.h>
#include <libexif/exif-data.h>
#include <libexif/exif-utils.h>

#include <cmath>
#include <cstdlib>
#include <cstring>
#include <memory>

#include "formats/iso8601.h"
#include "formats/limits.h"

namespace cairn::formats {

namespace {

struct ExifDataUnref {
  void operator()(ExifData* d) const { exif_data_unref(d); }
};
using ExifPtr = std::unique_ptr<ExifData, ExifDataUnref>;

// libexif's GPS tag numbers (exif-tag.h) are macros sharing values with IFD0 tags.
constexpr ExifTag kGpsLatRef = static_cast<ExifTag>(EXIF_TAG_GPS_LATITUDE_REF);
constexpr ExifTag kGpsLat = static_cast<ExifTag>(EXIF_TAG_GPS_LATITUDE);
constexpr ExifTag kGpsLonRef = static_cast<ExifTag>(EXIF_TAG_GPS_LONGITUDE_REF);
constexpr ExifTag kGpsLon = static_cast<ExifTag>(EXIF_TAG_GPS_LONGITUDE);
constexpr ExifTag kGpsAltRef = static_cast<ExifTag>(EXIF_TAG_GPS_ALTITUDE_REF);
constexpr ExifTag kGpsAlt = static_cast<ExifTag>(EXIF_TAG_GPS_ALTITUDE);
constexpr ExifTag kGpsVersion = static_cast<ExifTag>(EXIF_TAG_GPS_VERSION_ID);

const ExifEntry* find(ExifData* d, ExifIfd ifd, ExifTag tag) {
  return d->ifd[ifd] ? exif_content_get_entry(d->ifd[ifd], tag) : nullptr;
}

// An ASCII tag's text up to its first NUL, trailing spaces removed.
std::optional<std::string> ascii(const ExifEntry* e) {
  if (!e || e->format != EXIF_FORMAT_ASCII || !e->data) return std::nullopt;
  std::string s(reinterpret_cast<const char*>(e->data), e->size);
  if (auto nul = s.find('\0'); nul != std::string::npos) s.resize(nul);
  while (!s.empty() && s.back() == ' ') s.pop_back();
  return s;
}

bool all_digits(std::string_view s) {
  for (char c : s)
    if (c < '0' || c > '9') return false;
  return !s.empty();
}

// The N rationals of a tag, each checked: right format, enough bytes, no zero denominator.
Result<std::vector<double>> rationals(ExifData* d, const ExifEntry* e, unsigned n, const char* tag) {
  using R = Result<std::vector<double>>;
  if (e->format != EXIF_FORMAT_RATIONAL || e->components != n || !e->data || e->size < 8u * n)
    return R::failure(fmt::format("{}: expected {} rational(s)", tag, n));
  const ExifByteOrder order = exif_data_get_byte_order(d);
  std::vector<double> out;
  for (unsigned i = 0; i < n; ++i) {
    const ExifRational r = exif_get_rational(e->data + 8 * i, order);
    if (r.denominator == 0) return R::failure(fmt::format("{}: zero denominator", tag));
    out.push_back(static_cast<double>(r.numerator) / static_cast<double>(r.denominator));
  }
  return out;
}

// Degrees from degrees, minutes, seconds and a hemisphere letter.
std::optional<double> coordinate(ExifData* d, ExifTag ref_tag, ExifTag tag, char pos, char neg, double limit,
                                 const char* name, std::vector<std::string>& notes) {
  const ExifEntry* e = find(d, EXIF_IFD_GPS, tag);
  if (!e) return std::nullopt;
  const auto ref = ascii(find(d, EXIF_IFD_GPS, ref_tag));
  if (!ref || ref->size() != 1 || ((*ref)[0] != pos && (*ref)[0] != neg)) {
    notes.push_back(fmt::format("{}Ref: missing or not {} or {}; the position is not used", name, pos, neg));
    return std::nullopt;
  }
  const auto v = rationals(d, e, 3, name);
  if (!v) {
    notes.push_back(v.error());
    return std::nullopt;
  }
  const double deg = (*v)[0], min = (*v)[1], sec = (*v)[2];
  const double value = deg + min / 60 + sec / 3600;
  // Writers round 17' 59.9999" up to 17' 60" (exiftool does): 60 itself is accepted.
  if (min > 60 || sec > 60 || value > limit) {
    notes.push_back(fmt::format("{}: {} {} {} is not a {} in degrees, minutes, seconds", name, deg, min, sec,
                                limit == 90 ? "latitude" : "longitude"));
    return std::nullopt;
  }
  return (*ref)[0] == neg ? -value : value;
}

// "YYYY:MM:DD hh:mm:ss" as "YYYY-MM-DDThh:mm:ss", checked as a calendar time.
std::optional<std::string> exif_time(const std::string& s) {
  if (s.size() != 19 || s[4] != ':' || s[7] != ':' || s[10] != ' ' || s[13] != ':' || s[16] != ':') return {};
  for (size_t i : {0, 5, 8, 11, 14, 17})
    if (!all_digits(std::string_view(s).substr(i, i == 0 ? 4 : 2))) return {};
  std::string iso = s;
  iso[4] = '-';
  iso[7] = '-';
  iso[10] = 'T';
  if (!parse_iso8601(iso)) return {};
  return iso;
}

void read_time(ExifData* d, PhotoExif& out) {
  const auto t = ascii(find(d, EXIF_IFD_EXIF, EXIF_TAG_DATE_TIME_ORIGINAL));
  if (!t) return;
  const auto iso = exif_time(*t);
  if (!iso) {
    out.notes.push_back("DateTimeOriginal: '" + t->substr(0, 32) + "' is not a date and time");
    return;
  }
  out.time = *iso;
  if (const auto sub = ascii(find(d, EXIF_IFD_EXIF, EXIF_TAG_SUB_SEC_TIME_ORIGINAL))) {
    if (all_digits(*sub) && sub->size() <= 9)
      out.time += "." + *sub;
    else
      out.notes.push_back("SubSecTimeOriginal: not digits; ignored");
  }
  if (const auto off = ascii(find(d, EXIF_IFD_EXIF, EXIF_TAG_OFFSET_TIME_ORIGINAL))) {
    const std::string& o = *off;
    const bool form = o.size() == 6 && (o[0] == '+' || o[0] == '-') && all_digits(o.substr(1, 2)) && o[3] == ':' &&
                      all_digits(o.substr(4, 2));
    if (form && std::atoi(o.substr(1, 2).c_str()) <= 14 && std::atoi(o.substr(4, 2).c_str()) < 60)
      out.time += o == "+00:00" || o == "-00:00" ? "Z" : o;
    else
      out.notes.push_back("OffsetTimeOriginal: '" + o.substr(0, 16) + "' is not +hh:mm; ignored");
  }
}

void read_altitude(ExifData* d, PhotoExif& out) {
  const ExifEntry* e = find(d, EXIF_IFD_GPS, kGpsAlt);
  if (!e) return;
  const auto v = rationals(d, e, 1, "GPSAltitude");
  if (!v) {
    out.notes.push_back(v.error());
    return;
  }
  int ref = 0;  // absent: above sea level (EXIF 2.32, GPSAltitudeRef default)
  if (const ExifEntry* r = find(d, EXIF_IFD_GPS, kGpsAltRef)) {
    if (r->format != EXIF_FORMAT_BYTE || r->size < 1 || !r->data || r->data[0] > 1) {
      out.notes.push_back("GPSAltitudeRef: not 0 or 1; the altitude is not used");
      return;
    }
    ref = r->data[0];
  }
  const double alt = ref ? -(*v)[0] : (*v)[0];
  if (alt < -1000 || alt > 10000) {
    out.notes.push_back(fmt::format("GPSAltitude: {} m is not an altitude on land; not used", alt));
    return;
  }
  out.altitude = alt;
}

// ---- writing ---------------------------------------------------------------

// A new entry of FORMAT with N components in IFD (as libexif's own examples do).
ExifEntry* new_entry(ExifData* d, ExifIfd ifd, ExifTag tag, ExifFormat format, unsigned n) {
  ExifMem* mem = exif_mem_new_default();
  ExifEntry* e = exif_entry_new_mem(mem);
  const unsigned size = exif_format_get_size(format) * n;
  e->data = static_cast<unsigned char*>(exif_mem_alloc(mem, size));
  e->size = size;
  e->tag = tag;
  e->components = n;
  e->format = format;
  exif_content_add_entry(d->ifd[ifd], e);
  exif_mem_unref(mem);
  exif_entry_unref(e);
  return e;
}

void put_ascii(ExifData* d, ExifIfd ifd, ExifTag tag, const std::string& s) {
  ExifEntry* e = new_entry(d, ifd, tag, EXIF_FORMAT_ASCII, static_cast<unsigned>(s.size() + 1));
  std::memcpy(e->data, s.c_str(), s.size() + 1);
}

void put_dms(ExifData* d, ExifTag tag, double degrees) {
  ExifEntry* e = new_entry(d, EXIF_IFD_GPS, tag, EXIF_FORMAT_RATIONAL, 3);
  const double a = std::fabs(degrees);
  const auto deg = static_cast<ExifLong>(std::floor(a));
  const auto min = static_cast<ExifLong>(std::floor((a - deg) * 60));
  const double sec = (a - deg) * 3600 - min * 60.0;
  const ExifByteOrder o = exif_data_get_byte_order(d);
  exif_set_rational(e->data, o, {deg, 1});
  exif_set_rational(e->data + 8, o, {min, 1});
  exif_set_rational(e->data + 16, o, {static_cast<ExifLong>(std::lround(sec * 10000)), 10000});
}

}  // namespace

bool looks_like_jpeg(std::string_view data) {
  return data.size() >= 3 && static_cast<unsigned char>(data[0]) == 0xFF &&
         static_cast<unsigned char>(data[1]) == 0xD8 && static_cast<unsigned char>(data[2]) == 0xFF;
}

Result<PhotoExif> read_exif(std::string_view data, const std::string& name) {
  using R = Result<PhotoExif>;
  if (data.size() > kMaxPhotoBytes)
    return R::failure(name + ": the file is larger than " + size_text(kMaxPhotoBytes) +
                      ", the most Cairn reads as a photo");
  if (!looks_like_jpeg(data))
    return R::failure(name + ": not a JPEG file (it does not start with FF D8 FF); only JPEG photos are read");
  ExifPtr d(exif_data_new());
  if (!d) return R::failure(name + ": out of memory reading EXIF");
  // Read only: no repairs of the data to the specification.
  exif_data_unset_option(d.get(), EXIF_DATA_OPTION_FOLLOW_SPECIFICATION);
  exif_data_load_data(d.get(), reinterpret_cast<const unsigned char*>(data.data()),
                      static_cast<unsigned int>(data.size()));
  PhotoExif out;
  read_time(d.get(), out);
  const auto lat = coordinate(d.get(), kGpsLatRef, kGpsLat, 'N', 'S', 90, "GPSLatitude", out.notes);
  const auto lon = coordinate(d.get(), kGpsLonRef, kGpsLon, 'E', 'W', 180, "GPSLongitude", out.notes);
  if (lat && lon) {
    out.lat = lat;
    out.lon = lon;
    read_altitude(d.get(), out);
  } else if (lat || lon) {
    out.notes.push_back("GPS: only one of latitude and longitude is usable; the position is not used");
  }
  return out;
}

Result<std::string> write_exif_jpeg(std::string_view jpeg, const ExifToWrite& w) {
  using R = Result<std::string>;
  if (jpeg.size() < 4 || !looks_like_jpeg(jpeg)) return R::failure("write_exif_jpeg: not a JPEG stream");
  const auto t = parse_iso8601(w.time);
  if (!t || !t->time_of_day || t->utc_offset || t->text.size() != 19)
    return R::failure("write_exif_jpeg: '" + w.time + "' is not YYYY-MM-DDThh:mm:ss");
  std::string exif_time = t->text;
  exif_time[4] = exif_time[7] = ':';
  exif_time[10] = ' ';
  ExifPtr d(exif_data_new());
  exif_data_set_byte_order(d.get(), EXIF_BYTE_ORDER_INTEL);
  put_ascii(d.get(), EXIF_IFD_EXIF, EXIF_TAG_DATE_TIME_ORIGINAL, exif_time);
  if (w.lat && w.lon) {
    ExifEntry* v = new_entry(d.get(), EXIF_IFD_GPS, kGpsVersion, EXIF_FORMAT_BYTE, 4);
    v->data[0] = 2, v->data[1] = 3, v->data[2] = 0, v->data[3] = 0;
    put_ascii(d.get(), EXIF_IFD_GPS, kGpsLatRef, *w.lat < 0 ? "S" : "N");
    put_dms(d.get(), kGpsLat, *w.lat);
    put_ascii(d.get(), EXIF_IFD_GPS, kGpsLonRef, *w.lon < 0 ? "W" : "E");
    put_dms(d.get(), kGpsLon, *w.lon);
    if (w.altitude) {
      ExifEntry* r = new_entry(d.get(), EXIF_IFD_GPS, kGpsAltRef, EXIF_FORMAT_BYTE, 1);
      r->data[0] = *w.altitude < 0 ? 1 : 0;
      ExifEntry* a = new_entry(d.get(), EXIF_IFD_GPS, kGpsAlt, EXIF_FORMAT_RATIONAL, 1);
      exif_set_rational(a->data, EXIF_BYTE_ORDER_INTEL,
                        {static_cast<ExifLong>(std::lround(std::fabs(*w.altitude) * 100)), 100});
    }
  }
  // The tags EXIF requires (ExifVersion, resolution, ...), with libexif's defaults.
  exif_data_fix(d.get());
  unsigned char* buf = nullptr;
  unsigned int len = 0;
  exif_data_save_data(d.get(), &buf, &len);
  std::unique_ptr<unsigned char, void (*)(void*)> owned(buf, &std::free);
  if (!buf || len == 0 || len + 2 > 0xFFFF) return R::failure("write_exif_jpeg: libexif wrote no EXIF block");
  // After SOI, and after a JFIF APP0 segment when there is one.
  size_t at = 2;
  if (static_cast<unsigned char>(jpeg[2]) == 0xFF && static_cast<unsigned char>(jpeg[3]) == 0xE0 && jpeg.size() >= 6) {
    const size_t seg = (static_cast<unsigned char>(jpeg[4]) << 8 | static_cast<unsigned char>(jpeg[5]));
    if (4 + seg <= jpeg.size()) at = 4 + seg;
  }
  std::string out(jpeg.substr(0, at));
  out += '\xFF';
  out += '\xE1';
  out += static_cast<char>(((len + 2) >> 8) & 0xFF);
  out += static_cast<char>((len + 2) & 0xFF);
  out.append(reinterpret_cast<const char*>(buf), len);
  out.append(jpeg.substr(at));
  return out;
}

}  // namespace cairn::formats
