#include "storage/pick_lists.h"

#include <algorithm>

#include "storage/project.h"
#include "storage/records.h"
#include "storage/repository.h"
#include "storage/sqlite.h"

namespace cairn::store {

std::string_view to_string(PickList l) {
  switch (l) {
    case PickList::Unit: return "unit";
    case PickList::Lithology: return "lithology";
    case PickList::Structure: return "structure";
    case PickList::Person: return "person";
  }
  return "unit";
}

std::optional<PickList> parse_pick_list(std::string_view s) {
  for (PickList l : {PickList::Unit, PickList::Lithology, PickList::Structure, PickList::Person})
    if (to_string(l) == s) return l;
  return std::nullopt;
}

std::vector<std::string> pick_list(Project& p, PickList l) {
  std::vector<std::string> out;
  if (l == PickList::Unit) {
    for (const auto& u : list_units(p)) out.push_back(u.code);
  } else if (l == PickList::Person) {
    for (const auto& who : list_people(p)) out.push_back(who.initials);
  } else {
    Stmt s(p.db(), "SELECT code FROM pick_lists WHERE list = ? ORDER BY position, code");
    s.bind(1, to_string(l));
    while (s.step()) out.push_back(s.text(0));
  }
  return out;
}

namespace {

void check_code(PickList l, const std::string& code) {
  if (l == PickList::Unit || l == PickList::Person)
    throw ValidationError("list", "pick-list",
                          std::string(to_string(l)) + "s are records: add them as records, not as codes");
  if (l == PickList::Structure) {
    if (!parse_plane_kind(code) && !parse_line_kind(code))
      throw ValidationError(
          "code", "pick-list",
          "structure kind '" + code + "' is not one of: " + names_of_plane_kind() + ", " + names_of_line_kind());
    return;
  }
  if (code.empty() || code.size() > 64)
    throw ValidationError("code", "pick-list", "a lithology is 1 to 64 characters, not " + std::to_string(code.size()));
  for (unsigned char c : code)
    if (c < 0x20 || c == 0x7F)
      throw ValidationError("code", "pick-list", "a lithology may not hold control characters");
}

}  // namespace

void add_pick(Project& p, PickList l, const std::string& code) {
  check_code(l, code);
  p.write([&] {
    Stmt have(p.db(), "SELECT 1 FROM pick_lists WHERE list = ? AND code = ?");
    have.bind(1, to_string(l)).bind(2, code);
    if (have.step())
      throw ValidationError("code", "duplicate", std::string(to_string(l)) + " '" + code + "' is already in the list");
    Stmt s(p.db(),
           "INSERT INTO pick_lists (list, code, position) "
           "VALUES (?1, ?2, (SELECT COALESCE(MAX(position), 0) + 1 FROM pick_lists WHERE list = ?1))");
    s.bind(1, to_string(l)).bind(2, code);
    s.run();
  });
}

void remove_pick(Project& p, PickList l, const std::string& code) {
  p.write([&] {
    Stmt s(p.db(), "DELETE FROM pick_lists WHERE list = ? AND code = ?");
    s.bind(1, to_string(l)).bind(2, code);
    s.run();
  });
}

bool allowed_by(const std::vector<std::string>& list, const std::string& code) {
  return list.empty() || std::find(list.begin(), list.end(), code) != list.end();
}

std::string not_in_list(PickList l, const std::string& code, const std::vector<std::string>& list) {
  const std::string what = l == PickList::Structure ? "structure kind"
                           : l == PickList::Person  ? "person"
                                                    : std::string(to_string(l));
  std::string names;
  for (const auto& c : list) names += (names.empty() ? "" : ", ") + c;
  return what + " '" + code + "' is not in the project's " + std::string(to_string(l)) + " list (" +
         (names.empty() ? std::string("the list is empty") : names) + ")";
}

}  // namespace cairn::store
