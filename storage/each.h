// Records one at a time, for writing a season out as it is read (`cairn list`,
// `cairn export`): the same records as storage/repository.h's list_* functions,
// in the same order, stepped from one prepared statement, so that memory does
// not grow with the number of records.
#pragma once
#include <cstddef>
#include <functional>
#include <string>
#include <unordered_map>

#include "storage/repository.h"

namespace cairn::store {

// How records with the same `created` time follow each other: in the order they
// were inserted (as list_* gives them), or by UUID (byte order; the exports' stations).
enum class Ties { Insertion, Uuid };

// F is called with each record that list_stations(p, o) (...) would return. F
// must not write to the project. An exception from F stops the listing.
void for_each_station(Project& p, const ListOptions& o, const std::function<void(const Station&)>& f,
                      Ties ties = Ties::Insertion);
void for_each_plane(Project& p, const ListOptions& o, const std::function<void(const PlanarReading&)>& f);
void for_each_line(Project& p, const ListOptions& o, const std::function<void(const LinearReading&)>& f);
void for_each_point(Project& p, const ListOptions& o, const std::function<void(const ContactPoint&)>& f);
void for_each_photo(Project& p, const ListOptions& o, const std::function<void(const Photo&)>& f);

// How many records list_stations(p, o) (...) would return, for progress figures.
size_t count_stations(Project& p, const ListOptions& o = {});
size_t count_planes(Project& p, const ListOptions& o = {});
size_t count_lines(Project& p, const ListOptions& o = {});
size_t count_points(Project& p, const ListOptions& o = {});
// How many live planar and linear readings each station has, by station UUID
// (stations without any are left out): what counting list_planes and
// list_lines by station gives, without reading the readings.
std::unordered_map<std::string, size_t> readings_per_station(Project& p);

}  // namespace cairn::store
