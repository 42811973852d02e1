#include "storage/records.h"

#include <array>
#include <utility>

namespace cairn::store {

namespace {

template <class E, size_t N>
using Names = std::array<std::pair<E, std::string_view>, N>;

constexpr Names<North, 2> kNorth{{{North::True, "true"}, {North::Magnetic, "magnetic"}}};
constexpr Names<ContactType, 4> kContactType{{{ContactType::Depositional, "depositional"},
                                              {ContactType::Unconformity, "unconformity"},
                                              {ContactType::Fault, "fault"},
                                              {ContactType::Intrusive, "intrusive"}}};
constexpr Names<PositionSource, 4> kPositionSource{{{PositionSource::Gps, "gps"},
                                                    {PositionSource::Map, "map"},
                                                    {PositionSource::Manual, "manual"},
                                                    {PositionSource::Dem, "dem"}}};
constexpr Names<PointSource, 3> kPointSource{
    {{PointSource::Gps, "gps"}, {PointSource::Map, "map"}, {PointSource::Dem, "dem"}}};
constexpr Names<PlaneKind, 8> kPlaneKind{{{PlaneKind::Bedding, "bedding"},
                                          {PlaneKind::Foliation, "foliation"},
                                          {PlaneKind::Cleavage, "cleavage"},
                                          {PlaneKind::Joint, "joint"},
                                          {PlaneKind::Fault, "fault"},
                                          {PlaneKind::Vein, "vein"},
                                          {PlaneKind::Contact, "contact"},
                                          {PlaneKind::Slope, "slope"}}};
constexpr Names<LineKind, 4> kLineKind{{{LineKind::Lineation, "lineation"},
                                        {LineKind::FoldAxis, "fold_axis"},
                                        {LineKind::Slickenline, "slickenline"},
                                        {LineKind::Intersection, "intersection"}}};
constexpr Names<Facing, 3> kFacing{
    {{Facing::Unknown, "unknown"}, {Facing::Upright, "upright"}, {Facing::Overturned, "overturned"}}};
constexpr Names<PlaneNotation, 3> kNotation{{{PlaneNotation::StrikeDip, "strike_dip"},
                                             {PlaneNotation::DipDirectionDip, "dip_direction_dip"},
                                             {PlaneNotation::Text, "text"}}};

template <class E, size_t N>
std::string_view name_of(const Names<E, N>& t, E v) {
  for (const auto& [e, n] : t)
    if (e == v) return n;
  return "?";
}

template <class E, size_t N>
std::optional<E> value_of(const Names<E, N>& t, std::string_view s) {
  for (const auto& [e, n] : t)
    if (n == s) return e;
  return std::nullopt;
}

template <class E, size_t N>
std::string list_of(const Names<E, N>& t) {
  std::string out;
  for (const auto& [e, n] : t) {
    if (!out.empty()) out += ", ";
    out += n;
  }
  return out;
}

}  // namespace

std::string_view to_string(North v) { return name_of(kNorth, v); }
std::string_view to_string(ContactType v) { return name_of(kContactType, v); }
std::string_view to_string(PositionSource v) { return name_of(kPositionSource, v); }
std::string_view to_string(PointSource v) { return name_of(kPointSource, v); }
std::string_view to_string(PlaneKind v) { return name_of(kPlaneKind, v); }
std::string_view to_string(LineKind v) { return name_of(kLineKind, v); }
std::string_view to_string(Facing v) { return name_of(kFacing, v); }
std::string_view to_string(PlaneNotation v) { return name_of(kNotation, v); }

std::optional<North> parse_north(std::string_view s) { return value_of(kNorth, s); }
std::optional<ContactType> parse_contact_type(std::string_view s) { return value_of(kContactType, s); }
std::optional<PositionSource> parse_position_source(std::string_view s) { return value_of(kPositionSource, s); }
std::optional<PointSource> parse_point_source(std::string_view s) { return value_of(kPointSource, s); }
std::optional<PlaneKind> parse_plane_kind(std::string_view s) { return value_of(kPlaneKind, s); }
std::optional<LineKind> parse_line_kind(std::string_view s) { return value_of(kLineKind, s); }
std::optional<Facing> parse_facing(std::string_view s) { return value_of(kFacing, s); }
std::optional<PlaneNotation> parse_plane_notation(std::string_view s) { return value_of(kNotation, s); }

std::string names_of_north() { return list_of(kNorth); }
std::string names_of_contact_type() { return list_of(kContactType); }
std::string names_of_position_source() { return list_of(kPositionSource); }
std::string names_of_point_source() { return list_of(kPointSource); }
std::string names_of_plane_kind() { return list_of(kPlaneKind); }
std::string names_of_line_kind() { return list_of(kLineKind); }
std::string names_of_facing() { return list_of(kFacing); }

}  // namespace cairn::store
