// Text that enters a project or leaves the program: UTF-8 validation
// (RFC 3629, section 4: no overlong forms, no surrogates, nothing above
// U+10FFFF), control characters, and escaping for terminals and spreadsheets.
#pragma once
#include <cstddef>
#include <optional>
#include <string>
#include <string_view>

#include "formats/validate.h"

namespace cairn::formats {

// Where a text goes wrong: byte offset, 1-based line and column (columns count
// characters, not bytes), and what is wrong there.
struct TextFault {
  size_t offset = 0;
  int line = 1, column = 1;
  std::string rule;     // "utf8" or "control"
  std::string message;  // "invalid UTF-8 (byte 0xE9)", "control character U+001B"
};

// The first byte where TEXT is not UTF-8, with its line and column; nothing when it all is.
std::optional<TextFault> find_invalid_utf8(std::string_view text);
// The first fault of TEXT as one value: invalid UTF-8, or a control character
// (C0 other than tab, line feed and carriage return when `multiline`, DEL, C1).
std::optional<TextFault> find_text_fault(std::string_view text, bool multiline);

// Rules "utf8" and "control" for one value: WHAT names it ("notes").
Check check_text(std::string_view text, const std::string& what, bool multiline = false);

// Text safe to print on a terminal: control characters (C0, DEL, C1) are
// written as \xNN or \u00NN and invalid bytes as \xNN, so a file cannot send
// escape sequences to the terminal. Valid printable UTF-8 is kept.
std::string terminal_safe(std::string_view text);

// True when TEXT is UTF-16 or UTF-32 (a byte-order mark, or zero bytes among the
// first characters): the readers then say to save the file as UTF-8.
bool looks_like_utf16(std::string_view text);

}  // namespace cairn::formats
