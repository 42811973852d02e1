// A tiny streaming JSON writer (RFC 8259) for the verbs' --json output.
//
//   JsonWriter j(out);
//   j.begin_object();
//   j.key("dip").value(10.5);
//   j.key("cone95").value(std::optional<double>{});  // null
//   j.key("points").begin_array(); ... j.end_array();
//   j.end_object();
//
// Commas are placed automatically. Strings are escaped (quote, backslash and
// control characters; other UTF-8 bytes pass through). Numbers are written
// with %.12g by default; NaN, infinities and empty optionals become null.
#pragma once
#include <cmath>
#include <cstdio>
#include <optional>
#include <ostream>
#include <string>
#include <string_view>
#include <vector>

namespace cairn::cli {

class JsonWriter {
public:
  explicit JsonWriter(std::ostream& out, int precision = 12) : out_(out), precision_(precision) {}

  JsonWriter& begin_object() { open('{'); return *this; }
  JsonWriter& end_object() { close('}'); return *this; }
  JsonWriter& begin_array() { open('['); return *this; }
  JsonWriter& end_array() { close(']'); return *this; }

  JsonWriter& key(std::string_view k) {
    separate();
    write_string(k);
    out_ << ':';
    after_key_ = true;
    return *this;
  }

  JsonWriter& value(double v) {
    separate();
    if (!std::isfinite(v)) {
      out_ << "null";
    } else {
      char buf[40];
      std::snprintf(buf, sizeof buf, "%.*g", precision_, v == 0 ? 0.0 : v);  // no "-0"
      out_ << buf;
    }
    return *this;
  }
  JsonWriter& value(int v) { separate(); out_ << v; return *this; }
  JsonWriter& value(long v) { separate(); out_ << v; return *this; }
  JsonWriter& value(long long v) { separate(); out_ << v; return *this; }
  JsonWriter& value(unsigned v) { separate(); out_ << v; return *this; }
  JsonWriter& value(unsigned long v) { separate(); out_ << v; return *this; }
  JsonWriter& value(unsigned long long v) { separate(); out_ << v; return *this; }
  JsonWriter& value(bool v) { separate(); out_ << (v ? "true" : "false"); return *this; }
  JsonWriter& value(std::string_view s) { separate(); write_string(s); return *this; }
  JsonWriter& value(const char* s) { return s ? value(std::string_view(s)) : null(); }
  JsonWriter& value(const std::string& s) { return value(std::string_view(s)); }
  template <class T>
  JsonWriter& value(const std::optional<T>& v) { return v ? value(*v) : null(); }
  JsonWriter& null() { separate(); out_ << "null"; return *this; }

  // A whole array of numbers (or anything value() takes).
  template <class T>
  JsonWriter& array(const std::vector<T>& v) {
    begin_array();
    for (const auto& x : v) value(x);
    return end_array();
  }

  static std::string escape(std::string_view s) {
    std::string r;
    r.reserve(s.size() + 2);
    for (unsigned char c : s) {
      switch (c) {
        case '"': r += "\\\""; break;
        case '\\': r += "\\\\"; break;
        case '\b': r += "\\b"; break;
        case '\f': r += "\\f"; break;
        case '\n': r += "\\n"; break;
        case '\r': r += "\\r"; break;
        case '\t': r += "\\t"; break;
        default:
          if (c < 0x20 || c == 0x7f) {
            char buf[8];
            std::snprintf(buf, sizeof buf, "\\u%04x", c);
            r += buf;
          } else {
            r += static_cast<char>(c);
          }
      }
    }
    return r;
  }

private:
  void separate() {
    if (after_key_) {
      after_key_ = false;
      return;
    }
    if (!first_.empty()) {
      if (!first_.back()) out_ << ',';
      first_.back() = false;
    }
  }
  void open(char c) {
    separate();
    out_ << c;
    first_.push_back(true);
  }
  void close(char c) {
    if (!first_.empty()) first_.pop_back();
    out_ << c;
  }
  void write_string(std::string_view s) { out_ << '"' << escape(s) << '"'; }

  std::ostream& out_;
  int precision_;
  std::vector<bool> first_;  // per open container: nothing written in it yet
  bool after_key_ = false;
};

}  // namespace cairn::cli
