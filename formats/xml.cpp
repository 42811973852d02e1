#include "formats/xml.h"

#include <cstdint>
#include <map>
#include <stdexcept>

namespace cairn::formats {

const XmlElement* XmlElement::child(std::string_view n, std::string_view l) const {
  for (const auto& c : children)
    if (c.ns == n && c.local == l) return &c;
  return nullptr;
}

const std::string* XmlElement::attribute(std::string_view l) const {
  for (const auto& a : attributes)
    if (a.ns.empty() && a.local == l) return &a.value;
  return nullptr;
}

namespace {

const std::string kXmlNs = "http://www.w3.org/XML/1998/namespace";

struct Error : std::runtime_error {
  int line, column;
  Error(int l, int c, const std::string& m) : std::runtime_error(m), line(l), column(c) {}
};

class Reader {
public:
  explicit Reader(std::string_view s) : s_(s) {}

  XmlElement document() {
    if (s_.substr(0, 3) == "\xEF\xBB\xBF") advance(3);  // byte-order mark
    misc();
    if (at_end() || peek() != '<') fail("expected the root element");
    std::vector<std::map<std::string, std::string>> scopes;
    scopes.push_back({{"xml", kXmlNs}});
    XmlElement root = element(scopes);
    misc();
    if (!at_end()) fail("content after the root element");
    return root;
  }

private:
  std::string_view s_;
  size_t i_ = 0;
  int line_ = 1, col_ = 1;

  bool at_end() const { return i_ >= s_.size(); }
  char peek(size_t k = 0) const { return i_ + k < s_.size() ? s_[i_ + k] : '\0'; }
  bool starts(std::string_view t) const { return s_.substr(i_, t.size()) == t; }
  void advance(size_t n = 1) {
    for (size_t k = 0; k < n && i_ < s_.size(); ++k, ++i_) {
      if (s_[i_] == '\n') {
        ++line_;
        col_ = 1;
      } else if ((static_cast<unsigned char>(s_[i_]) & 0xC0) != 0x80) {
        ++col_;  // count characters, not UTF-8 continuation bytes
      }
    }
  }
  [[noreturn]] void fail(const std::string& m) const { throw Error(line_, col_, m); }
  static bool space(char c) { return c == ' ' || c == '\t' || c == '\r' || c == '\n'; }
  void skip_space() {
    while (!at_end() && space(peek())) advance();
  }
  static bool name_char(char c) {
    return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9') || c == '_' || c == '-' ||
           c == '.' || c == ':' || (static_cast<unsigned char>(c) >= 0x80);
  }
  std::string name() {
    const size_t b = i_;
    if (at_end() || !name_char(peek()) || peek() == '-' || peek() == '.' || (peek() >= '0' && peek() <= '9'))
      fail("expected a name");
    while (!at_end() && name_char(peek())) advance();
    return std::string(s_.substr(b, i_ - b));
  }
  void expect(std::string_view t, const char* what) {
    if (!starts(t)) fail(std::string("expected ") + what);
    advance(t.size());
  }
  // Skips until `end` (inclusive); fails naming `what` if the text ends first.
  std::string_view until(std::string_view end, const char* what) {
    const size_t p = s_.find(end, i_);
    if (p == std::string_view::npos) fail(std::string(what) + " is not closed");
    std::string_view body = s_.substr(i_, p - i_);
    advance(p - i_ + end.size());
    return body;
  }
  // Comments, processing instructions (including the XML declaration) and blanks.
  void misc() {
    for (;;) {
      skip_space();
      if (starts("<!--")) {
        advance(4);
        until("-->", "a comment");
      } else if (starts("<?")) {
        advance(2);
        until("?>", "a processing instruction");
      } else if (starts("<!DOCTYPE")) {
        fail("a DOCTYPE is not accepted");
      } else {
        return;
      }
    }
  }
  static void utf8(std::string& out, uint32_t cp) {
    if (cp < 0x80) {
      out += static_cast<char>(cp);
    } else if (cp < 0x800) {
      out += static_cast<char>(0xC0 | (cp >> 6));
      out += static_cast<char>(0x80 | (cp & 0x3F));
    } else if (cp < 0x10000) {
      out += static_cast<char>(0xE0 | (cp >> 12));
      out += static_cast<char>(0x80 | ((cp >> 6) & 0x3F));
      out += static_cast<char>(0x80 | (cp & 0x3F));
    } else {
      out += static_cast<char>(0xF0 | (cp >> 18));
      out += static_cast<char>(0x80 | ((cp >> 12) & 0x3F));
      out += static_cast<char>(0x80 | ((cp >> 6) & 0x3F));
      out += static_cast<char>(0x80 | (cp & 0x3F));
    }
  }
  // At '&': appends the referenced character.
  void reference(std::string& out) {
    advance();
    const size_t semi = s_.find(';', i_);
    if (semi == std::string_view::npos || semi - i_ > 10) fail("an entity reference is not closed by ';'");
    const std::string ref(s_.substr(i_, semi - i_));
    if (ref == "lt") out += '<';
    else if (ref == "gt") out += '>';
    else if (ref == "amp") out += '&';
    else if (ref == "quot") out += '"';
    else if (ref == "apos") out += '\'';
    else if (ref.size() > 1 && ref[0] == '#') {
      uint32_t cp = 0;
      const bool hex = ref[1] == 'x';
      const std::string digits = ref.substr(hex ? 2 : 1);
      if (digits.empty()) fail("empty character reference");
      for (char c : digits) {
        int d;
        if (c >= '0' && c <= '9') d = c - '0';
        else if (hex && c >= 'a' && c <= 'f') d = c - 'a' + 10;
        else if (hex && c >= 'A' && c <= 'F') d = c - 'A' + 10;
        else fail("bad character reference &" + ref + ";");
        cp = cp * (hex ? 16 : 10) + static_cast<uint32_t>(d);
        if (cp > 0x10FFFF) fail("character reference &" + ref + "; is beyond Unicode");
      }
      if (cp == 0 || (cp >= 0xD800 && cp <= 0xDFFF)) fail("character reference &" + ref + "; is not a character");
      utf8(out, cp);
    } else {
      fail("unknown entity &" + ref + "; (XML knows only lt, gt, amp, quot, apos)");
    }
    advance(semi - i_ + 1);
  }
  std::string attribute_value() {
    const char q = peek();
    if (q != '"' && q != '\'') fail("expected a quoted attribute value");
    advance();
    std::string v;
    for (;;) {
      if (at_end()) fail("an attribute value is not closed");
      const char c = peek();
      if (c == q) break;
      if (c == '<') fail("'<' inside an attribute value");
      if (c == '&') {
        reference(v);
        continue;
      }
      v += space(c) ? ' ' : c;  // attribute-value normalisation (XML 1.0, 3.3.3)
      advance();
    }
    advance();
    return v;
  }
  static void split(const std::string& qname, std::string& prefix, std::string& local) {
    const size_t c = qname.find(':');
    if (c == std::string::npos) {
      prefix.clear();
      local = qname;
    } else {
      prefix = qname.substr(0, c);
      local = qname.substr(c + 1);
    }
  }
  std::string resolve(const std::vector<std::map<std::string, std::string>>& scopes, const std::string& prefix,
                      int line, int col) const {
    for (auto it = scopes.rbegin(); it != scopes.rend(); ++it) {
      auto f = it->find(prefix);
      if (f != it->end()) return f->second;
    }
    if (prefix.empty()) return "";
    throw Error(line, col, "namespace prefix '" + prefix + "' is not declared");
  }

  XmlElement element(std::vector<std::map<std::string, std::string>>& scopes) {
    XmlElement e;
    e.line = line_;
    e.column = col_;
    expect("<", "'<'");
    const std::string qname = name();
    std::vector<std::pair<std::string, std::string>> raw;  // qualified name, value
    std::map<std::string, std::string> scope;
    bool empty = false;
    for (;;) {
      const bool had_space = !at_end() && space(peek());
      skip_space();
      if (starts("/>")) {
        advance(2);
        empty = true;
        break;
      }
      if (starts(">")) {
        advance();
        break;
      }
      if (!had_space) fail("expected a space, '>' or '/>' in the tag of <" + qname + ">");
      const std::string an = name();
      skip_space();
      expect("=", "'=' after an attribute name");
      skip_space();
      std::string v = attribute_value();
      for (const auto& r : raw)
        if (r.first == an) fail("attribute '" + an + "' appears twice");
      if (an == "xmlns") scope[""] = v;
      else if (an.rfind("xmlns:", 0) == 0) scope[an.substr(6)] = v;
      else raw.emplace_back(an, std::move(v));
    }
    scopes.push_back(scope);
    std::string prefix;
    split(qname, prefix, e.local);
    e.ns = resolve(scopes, prefix, e.line, e.column);
    for (auto& [an, v] : raw) {
      std::string ap, al;
      split(an, ap, al);
      // Unprefixed attributes are in no namespace (Namespaces in XML 1.0, section 6.2).
      e.attributes.push_back({ap.empty() ? "" : resolve(scopes, ap, e.line, e.column), al, std::move(v)});
    }
    if (!empty) content(e, qname, scopes);
    scopes.pop_back();
    return e;
  }

  void content(XmlElement& e, const std::string& qname, std::vector<std::map<std::string, std::string>>& scopes) {
    for (;;) {
      if (at_end()) fail("<" + qname + "> is not closed");
      if (starts("</")) {
        const int l = line_, c = col_;
        advance(2);
        const std::string end = name();
        if (end != qname) throw Error(l, c, "</" + end + "> closes <" + qname + ">");
        skip_space();
        expect(">", "'>'");
        return;
      }
      if (starts("<!--")) {
        advance(4);
        until("-->", "a comment");
      } else if (starts("<![CDATA[")) {
        advance(9);
        e.text += std::string(until("]]>", "a CDATA section"));
      } else if (starts("<?")) {
        advance(2);
        until("?>", "a processing instruction");
      } else if (peek() == '<') {
        e.children.push_back(element(scopes));
      } else if (peek() == '&') {
        reference(e.text);
      } else {
        if (peek() != '\r') e.text += peek();
        advance();
      }
    }
  }
};

}  // namespace

Result<XmlElement> parse_xml(std::string_view text, const std::string& filename) {
  try {
    return Reader(text).document();
  } catch (const Error& e) {
    return Result<XmlElement>::failure(filename + ":" + std::to_string(e.line) + ":" + std::to_string(e.column) +
                                       ": xml: " + e.what());
  }
}

}  // namespace cairn::formats
