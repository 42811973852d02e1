#include "formats/json.h"

#include <fmt/format.h>

#include <cmath>
#include <nlohmann/json.hpp>

namespace cairn::formats {

std::string JsonWriter::quote(std::string_view s) {
  // nlohmann's serializer escapes as RFC 8259 section 7 asks; error_handler
  // "replace" turns each invalid UTF-8 byte into U+FFFD instead of throwing.
  return nlohmann::json(std::string(s)).dump(-1, ' ', false, nlohmann::json::error_handler_t::replace);
}

std::string JsonWriter::escape(std::string_view s) {
  const std::string q = quote(s);
  return q.substr(1, q.size() - 2);
}

std::string JsonWriter::number(double v, int precision) {
  if (!std::isfinite(v)) return "null";
  // libfmt is locale-independent unless asked ('L'); "-0" is written as 0.
  return fmt::format("{:.{}g}", v == 0 ? 0.0 : v, precision);
}

JsonWriter& JsonWriter::key(std::string_view k) {
  separate();
  out_ << quote(k) << ':';
  after_key_ = true;
  return *this;
}

JsonWriter& JsonWriter::value(double v) { return raw(number(v, precision_)); }

JsonWriter& JsonWriter::raw(std::string_view text) {
  separate();
  out_ << text;
  return *this;
}

void JsonWriter::separate() {
  if (after_key_) {
    after_key_ = false;
    return;
  }
  if (!first_.empty()) {
    if (!first_.back()) out_ << ',';
    first_.back() = false;
  }
}

void JsonWriter::open(char c) {
  separate();
  out_ << c;
  first_.push_back(true);
}

void JsonWriter::close(char c) {
  if (!first_.empty()) first_.pop_back();
  out_ << c;
}

std::map<std::string, std::string> flat_json_object(std::string_view text, size_t max_bytes) {
  std::map<std::string, std::string> out;
  if (text.size() > max_bytes) return out;
  const auto j = nlohmann::json::parse(text.begin(), text.end(), nullptr, /*allow_exceptions=*/false);
  if (!j.is_object()) return out;
  for (const auto& [k, v] : j.items()) {
    if (v.is_string())
      out[k] = v.get<std::string>();
    else if (v.is_number() || v.is_boolean())
      out[k] = v.dump();
    else
      out[k] = "";
  }
  return out;
}

}  // namespace cairn::formats
