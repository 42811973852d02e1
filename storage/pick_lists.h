// Pick-lists: the project's lists of the codes a mapper chooses from instead of
// typing them at the outcrop: units, lithologies, structure kinds and people.
// Units and people are records (tables `units` and `people`), so their lists
// are those records' codes and initials; lithologies and structure kinds are
// kept in the table `pick_lists` (storage/SCHEMA.md). Imports refuse a code
// that is not in its list, naming the list in the message.
#pragma once
#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace cairn::store {

class Project;

enum class PickList { Unit, Lithology, Structure, Person };

std::string_view to_string(PickList l);  // "unit", "lithology", "structure", "person"
std::optional<PickList> parse_pick_list(std::string_view s);

// The codes of a list, in the list's order: unit codes by age rank, people's
// initials by name, lithologies and structure kinds in the order they were added.
std::vector<std::string> pick_list(Project& p, PickList l);

// Adds a code to the lithology or structure list (units and people are added as
// records). A structure kind must be a planar or linear reading kind; a
// lithology is 1..64 characters of printable text. Throws ValidationError (the
// code is named) and writes nothing when the code is invalid or already listed.
void add_pick(Project& p, PickList l, const std::string& code);
// Removes a code from the lithology or structure list (nothing when absent).
void remove_pick(Project& p, PickList l, const std::string& code);

// Whether CODE may be used: it is in the list, or the list is empty (an empty
// list does not restrict; a new project's lithology and structure lists are empty).
bool allowed_by(const std::vector<std::string>& list, const std::string& code);

// "structure kind 'scarp' is not in the project's structure list (bedding, joint)".
std::string not_in_list(PickList l, const std::string& code, const std::vector<std::string>& list);

}  // namespace cairn::store
