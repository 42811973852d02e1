// JSON (RFC 8259) in and out, through one library: nlohmann/json (Debian's
// nlohmann-json3-dev) escapes strings and parses; libfmt formats numbers.
//
// Writing is streamed, so an output of any size never sits in memory whole:
//
//   JsonWriter j(out);
//   j.begin_object();
//   j.key("dip").value(10.5);
//   j.key("cone95").value(std::optional<double>{});  // null
//   j.key("points").begin_array(); ... j.end_array();
//   j.end_object();
//
// Commas are placed automatically. Strings are escaped as RFC 8259 section 7
// requires (quote, backslash, control characters), and text that is not valid
// UTF-8 has each bad byte replaced by U+FFFD, so the output is always valid
// UTF-8 (RFC 8259 section 8.1) whatever a file carried. Numbers are written with
// %.12g by default (locale-independent); NaN, infinities and empty optionals
// become null.
#pragma once
#include <map>
#include <optional>
#include <ostream>
#include <string>
#include <string_view>
#include <vector>

namespace cairn::formats {

class JsonWriter {
 public:
  explicit JsonWriter(std::ostream& out, int precision = 12) : out_(out), precision_(precision) {}

  JsonWriter& begin_object() {
    open('{');
    return *this;
  }
  JsonWriter& end_object() {
    close('}');
    return *this;
  }
  JsonWriter& begin_array() {
    open('[');
    return *this;
  }
  JsonWriter& end_array() {
    close(']');
    return *this;
  }

  JsonWriter& key(std::string_view k);
  JsonWriter& value(double v);
  JsonWriter& value(int v) { return raw(std::to_string(v)); }
  JsonWriter& value(long v) { return raw(std::to_string(v)); }
  JsonWriter& value(long long v) { return raw(std::to_string(v)); }
  JsonWriter& value(unsigned v) { return raw(std::to_string(v)); }
  JsonWriter& value(unsigned long v) { return raw(std::to_string(v)); }
  JsonWriter& value(unsigned long long v) { return raw(std::to_string(v)); }
  JsonWriter& value(bool v) { return raw(v ? "true" : "false"); }
  JsonWriter& value(std::string_view s) { return raw(quote(s)); }
  JsonWriter& value(const char* s) { return s ? value(std::string_view(s)) : null(); }
  JsonWriter& value(const std::string& s) { return value(std::string_view(s)); }
  template <class T>
  JsonWriter& value(const std::optional<T>& v) {
    return v ? value(*v) : null();
  }
  JsonWriter& null() { return raw("null"); }

  // A whole array of numbers (or anything value() takes).
  template <class T>
  JsonWriter& array(const std::vector<T>& v) {
    begin_array();
    for (const auto& x : v) value(x);
    return end_array();
  }

  // S as the inside of a JSON string (no surrounding quotes).
  static std::string escape(std::string_view s);
  // S as a JSON string, quotes included.
  static std::string quote(std::string_view s);
  // V as a JSON number with PRECISION significant digits; "null" when not finite.
  static std::string number(double v, int precision = 12);

 private:
  JsonWriter& raw(std::string_view text);
  void separate();
  void open(char c);
  void close(char c);

  std::ostream& out_;
  int precision_;
  std::vector<bool> first_;  // per open container: nothing written in it yet
  bool after_key_ = false;
};

// The members of a flat JSON object (as SQLite's json_object writes an audit
// row) as name -> value text: strings unescaped, numbers as written, null and
// nested values as "". Empty for text that is not one JSON object, or longer
// than MAX_BYTES.
std::map<std::string, std::string> flat_json_object(std::string_view text, size_t max_bytes = 1 << 20);

}  // namespace cairn::formats
