// A small, strict XML 1.0 reader (W3C XML 1.0, Fifth Edition, and
// "Namespaces in XML 1.0"), enough for GPX files from handheld receivers:
// elements, attributes, namespaces, character data, CDATA sections, comments,
// processing instructions, the five predefined entities and character
// references. A DOCTYPE is refused (GPX needs none). UTF-8 only.
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
  std::string ns;     // namespace URI resolved from its prefix or the default namespace
  std::string local;  // local name, without prefix
  std::vector<XmlAttribute> attributes;  // xmlns declarations left out
  std::vector<XmlElement> children;
  std::string text;  // character data directly inside the element, concatenated
  int line = 0, column = 0;  // 1-based position of the '<' of the start tag

  // The first child with this namespace and local name, or nullptr.
  const XmlElement* child(std::string_view ns, std::string_view local) const;
  // The value of an unprefixed attribute, or nullptr.
  const std::string* attribute(std::string_view local) const;
};

// Parses a whole document. Errors read "FILE:LINE:COLUMN: message".
Result<XmlElement> parse_xml(std::string_view text, const std::string& filename);

}  // namespace cairn::formats
