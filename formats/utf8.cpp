#include "formats/utf8.h"

#include <algorithm>
#include <cstdio>
#include <fmt/format.h>

#include "formats/validate.h"

namespace cairn::formats {

namespace {

// Length of the UTF-8 sequence at p (RFC 3629, section 4, the UTF8-octets
// grammar), or 0 when the bytes there are not one.
size_t sequence_length(std::string_view t, size_t i, unsigned* code) {
  const auto b = [&](size_t k) { return static_cast<unsigned char>(t[k]); };
  const unsigned c = b(i);
  if (c < 0x80) {
    *code = c;
    return 1;
  }
  size_t n = 0;
  unsigned lo = 0x80, hi = 0xBF, cp = 0;
  if (c >= 0xC2 && c <= 0xDF)
    n = 2, cp = c & 0x1F;
  else if (c == 0xE0)
    n = 3, lo = 0xA0, cp = c & 0x0F;
  else if (c >= 0xE1 && c <= 0xEC)
    n = 3, cp = c & 0x0F;
  else if (c == 0xED)
    n = 3, hi = 0x9F, cp = c & 0x0F;  // no surrogates
  else if (c >= 0xEE && c <= 0xEF)
    n = 3, cp = c & 0x0F;
  else if (c == 0xF0)
    n = 4, lo = 0x90, cp = c & 0x07;
  else if (c >= 0xF1 && c <= 0xF3)
    n = 4, cp = c & 0x07;
  else if (c == 0xF4)
    n = 4, hi = 0x8F, cp = c & 0x07;  // nothing above U+10FFFF
  else
    return 0;
  if (i + n > t.size()) return 0;
  for (size_t k = 1; k < n; ++k) {
    const unsigned x = b(i + k);
    if (x < (k == 1 ? lo : 0x80) || x > (k == 1 ? hi : 0xBF)) return 0;
    cp = (cp << 6) | (x & 0x3F);
  }
  *code = cp;
  return n;
}

bool is_control(unsigned cp, bool multiline) {
  if (cp == '\t') return false;
  if (multiline && (cp == '\n' || cp == '\r')) return false;
  return cp < 0x20 || cp == 0x7F || (cp >= 0x80 && cp <= 0x9F);
}

std::string hex2(unsigned v) { return fmt::format("{:02X}", v & 0xFF); }

std::string u4(unsigned v) { return fmt::format("U+{:04X}", v); }

std::optional<TextFault> scan(std::string_view t, bool check_controls, bool multiline) {
  TextFault f;
  for (size_t i = 0; i < t.size();) {
    unsigned cp = 0;
    const size_t n = sequence_length(t, i, &cp);
    if (n == 0) {
      f.offset = i;
      f.rule = "utf8";
      f.message = "invalid UTF-8 (byte 0x" + hex2(static_cast<unsigned char>(t[i])) + "); save the file as UTF-8";
      return f;
    }
    if (check_controls && is_control(cp, multiline)) {
      f.offset = i;
      f.rule = "control";
      f.message = "control character " + u4(cp) + " is not allowed in text";
      return f;
    }
    if (cp == '\n' || (cp == '\r' && (i + 1 >= t.size() || t[i + 1] != '\n'))) {
      ++f.line;  // LF, CRLF or a lone CR ends a line
      f.column = 1;
    } else if (cp == '\r') {
      // the CR of a CRLF: the LF ends the line
    } else {
      ++f.column;
    }
    i += n;
  }
  return std::nullopt;
}

}  // namespace

std::optional<TextFault> find_invalid_utf8(std::string_view text) { return scan(text, false, true); }

std::optional<TextFault> find_text_fault(std::string_view text, bool multiline) { return scan(text, true, multiline); }

Check check_text(std::string_view text, const std::string& what, bool multiline) {
  if (auto f = find_text_fault(text, multiline))
    return Broken{f->rule, what + ": " + f->message + " at character " + std::to_string(f->column)};
  return std::nullopt;
}

std::string terminal_safe(std::string_view t) {
  std::string out;
  out.reserve(t.size());
  for (size_t i = 0; i < t.size();) {
    unsigned cp = 0;
    const size_t n = sequence_length(t, i, &cp);
    if (n == 0) {
      out += "\\x" + hex2(static_cast<unsigned char>(t[i]));
      ++i;
      continue;
    }
    if (cp != '\n' && cp != '\t' && is_control(cp, false)) {
      if (cp < 0x80)
        out += "\\x" + hex2(cp);
      else
        out += "\\u00" + hex2(cp);
    } else {
      out.append(t.substr(i, n));
    }
    i += n;
  }
  return out;
}

bool looks_like_utf16(std::string_view t) {
  auto b = [&](size_t k) { return k < t.size() ? static_cast<unsigned char>(t[k]) : 0x100u; };
  if ((b(0) == 0xFF && b(1) == 0xFE) || (b(0) == 0xFE && b(1) == 0xFF)) return true;  // UTF-16/32 BOM
  // Text without a BOM: zero bytes among the first characters (no CSV or XML
  // written as UTF-8 has them).
  const size_t n = std::min<size_t>(t.size(), 64);
  for (size_t k = 0; k < n; ++k)
    if (t[k] == '\0') return true;
  return false;
}

}  // namespace cairn::formats
