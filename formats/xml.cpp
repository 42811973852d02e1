#include "formats/xml.h"

#include <expat.h>

#include <algorithm>
#include <memory>

#include "formats/limits.h"

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

// Expat reports a namespaced name as URI, separator, local name.
constexpr char kSep = '\x01';

void split_name(const char* name, std::string& ns, std::string& local) {
  const std::string n = name;
  const size_t k = n.find(kSep);
  if (k == std::string::npos) {
    ns.clear();
    local = n;
  } else {
    ns = n.substr(0, k);
    local = n.substr(k + 1);
  }
}

// The tree is built without recursion: expat calls back for each start tag,
// end tag and piece of text, and `open` holds the path from the root to the
// element being read (at most kMaxXmlDepth long).
struct Builder {
  XML_Parser parser = nullptr;
  XmlElement root;
  bool have_root = false;
  std::vector<XmlElement*> open;
  std::string error;  // our own reason to stop ("" when expat's)
  int error_line = 0, error_column = 0;

  void stop(const std::string& why) {
    if (!error.empty()) return;
    error = why;
    error_line = static_cast<int>(XML_GetCurrentLineNumber(parser));
    error_column = static_cast<int>(XML_GetCurrentColumnNumber(parser)) + 1;
    XML_StopParser(parser, XML_FALSE);
  }

  static void XMLCALL start(void* data, const char* name, const char** atts) {
    auto* b = static_cast<Builder*>(data);
    if (!b->error.empty()) return;
    if (static_cast<int>(b->open.size()) >= kMaxXmlDepth)
      return b->stop("elements are nested deeper than " + std::to_string(kMaxXmlDepth) + " levels");
    XmlElement e;
    split_name(name, e.ns, e.local);
    e.line = static_cast<int>(XML_GetCurrentLineNumber(b->parser));
    e.column = static_cast<int>(XML_GetCurrentColumnNumber(b->parser)) + 1;
    int n = 0;
    for (const char** a = atts; a && *a; a += 2) {
      if (++n > kMaxXmlAttributes)
        return b->stop("<" + e.local + "> has more than " + std::to_string(kMaxXmlAttributes) + " attributes");
      XmlAttribute at;
      split_name(a[0], at.ns, at.local);
      at.value = a[1];
      e.attributes.push_back(std::move(at));
    }
    if (b->open.empty()) {
      b->root = std::move(e);
      b->have_root = true;
      b->open.push_back(&b->root);
    } else {
      XmlElement* parent = b->open.back();
      parent->children.push_back(std::move(e));
      b->open.push_back(&parent->children.back());
    }
  }

  static void XMLCALL end(void* data, const char*) {
    auto* b = static_cast<Builder*>(data);
    if (!b->open.empty()) b->open.pop_back();
  }

  static void XMLCALL text(void* data, const char* s, int len) {
    auto* b = static_cast<Builder*>(data);
    if (!b->error.empty() || b->open.empty()) return;
    std::string& t = b->open.back()->text;
    if (t.size() + static_cast<size_t>(len) > kMaxFieldBytes)
      return b->stop("the text of <" + b->open.back()->local + "> is longer than " + size_text(kMaxFieldBytes));
    t.append(s, static_cast<size_t>(len));
  }

  // A DOCTYPE (and with it any entity declaration) is refused: GPX needs
  // none, and entities are how an XML file can grow without bound.
  static void XMLCALL doctype(void* data, const char*, const char*, const char*, int) {
    static_cast<Builder*>(data)->stop("a DOCTYPE is not accepted");
  }
  static void XMLCALL entity(void* data, const char*, int, const char*, int, const char*, const char*, const char*,
                             const char*) {
    static_cast<Builder*>(data)->stop("an entity declaration is not accepted");
  }
};

}  // namespace

Result<XmlElement> parse_xml(std::string_view text, const std::string& filename) {
  auto fail = [&](int line, int column, const std::string& why) {
    return Result<XmlElement>::failure(filename + ":" + std::to_string(line) + ":" + std::to_string(column) +
                                       ": xml: " + why);
  };
  if (text.size() > kMaxImportBytes)
    return fail(1, 1, "the file is larger than " + size_text(kMaxImportBytes) + ", the most Cairn reads; split it");
  std::unique_ptr<XML_ParserStruct, void (*)(XML_Parser)> p(XML_ParserCreateNS(nullptr, kSep), &XML_ParserFree);
  if (!p) return fail(1, 1, "out of memory for the XML reader");
  Builder b;
  b.parser = p.get();
  XML_SetUserData(p.get(), &b);
  XML_SetElementHandler(p.get(), &Builder::start, &Builder::end);
  XML_SetCharacterDataHandler(p.get(), &Builder::text);
  XML_SetStartDoctypeDeclHandler(p.get(), &Builder::doctype);
  XML_SetEntityDeclHandler(p.get(), &Builder::entity);
  // Never fetch or read an external entity or DTD.
  XML_SetParamEntityParsing(p.get(), XML_PARAM_ENTITY_PARSING_NEVER);
  // Fed in pieces, as it would be from a stream.
  const size_t piece = 1 << 16;
  size_t at = 0;
  do {
    const size_t n = std::min(piece, text.size() - at);
    const bool last = at + n == text.size();
    if (XML_Parse(p.get(), text.data() + at, static_cast<int>(n), last ? XML_TRUE : XML_FALSE) != XML_STATUS_OK) {
      if (!b.error.empty()) return fail(b.error_line, b.error_column, b.error);
      return fail(static_cast<int>(XML_GetCurrentLineNumber(p.get())),
                  static_cast<int>(XML_GetCurrentColumnNumber(p.get())) + 1,
                  XML_ErrorString(XML_GetErrorCode(p.get())));
    }
    at += n;
  } while (at < text.size());
  if (!b.have_root) return fail(1, 1, "no root element");
  return std::move(b.root);
}

}  // namespace cairn::formats
