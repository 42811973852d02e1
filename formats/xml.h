// XML 1.0 with namespaces, read by Debian's expat (a streaming parser, fed in
// pieces), into a small tree for the GPX reader: elements, attributes,
// namespaces, character data. The encoding declared by the file is honoured
// (UTF-8, UTF-16, ISO-8859-1, US-ASCII) and any other is refused; text comes
// out as UTF-8. A DOCTYPE or entity declaration is refused (GPX needs none);
// nesting deeper than kMaxXmlDepth, more than kMaxXmlAttributes on one
// element, text longer than kMaxFieldBytes and files larger than
// kMaxImportBytes are refused (formats/limits.h).
#pragma once
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "geomath/result.h"

namespace cairn::formats {

struct XmlAttribute {
  std::string ns;     // namespace URI ("" for an unprefixed attribute)
  std::string local;  // local name
  std::string value;  // entities resolved
};

struct XmlElement {
  std::string ns;                        // namespace URI resolved from its prefix or the default namespace
  std::string local;                     // local name, without prefix
  std::vector<XmlAttribute> attributes;  // xmlns declarations left out
  std::vector<XmlElement> children;
  std::string text;          // character data directly inside the element, concatenated
  int line = 0, column = 0;  // 1-based position of the '<' of the start tag

  // The first child with this namespace and local name, or nullptr.
  const XmlElement* child(std::string_view ns, std::string_view local) const;
  // The value of an unprefixed attribute, or nullptr.
  const std::string* attribute(std::string_view local) const;
};

// Parses a whole document. Errors read "FILE:LINE:COLUMN: xml: message".
Result<XmlElement> parse_xml(std::string_view text, const std::string& filename);

}  // namespace cairn::formats
