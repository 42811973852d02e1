// Pick-lists: the project's lists of units, lithologies, structure kinds and
// people, and imports that refuse a code not in its list, naming the list, and
// write nothing.
//
// Outside sources beside the checks: the structure kinds are the trade's terms
// (bedding, foliation, joint, lineation ...: structural geology textbooks, e.g.
// Ragan, "Structural Geology"); the refusal rule is the issue's ("imports refuse
// codes not in the list with the list in the message"); the CSV files follow
// RFC 4180. SQLite's own "PRAGMA user_version" names the schema version.
#include <gtest/gtest.h>

#include "storage/import.h"
#include "storage/pick_lists.h"
#include "storage/repository.h"
#include "storage/schema.h"
#include "storage/sqlite.h"
#include "storage_test_util.h"

using namespace cairn::store;
using cairn::store::testing::quiet;
using cairn::store::testing::TempDir;

namespace {

struct Camp {
  TempDir dir;
  Project p;
  Camp() : p(Project::create(dir.file("camp.cairn"), NewProject{"camp", "33N", North::True, 0}, quiet())) {
    Unit u;
    u.code = "Kls";
    u.name = "grey limestone";
    u.age_rank = 1;
    add(p, u);
    Person who;
    who.name = "Ada Quarry";
    who.initials = "AQ";
    add(p, who);
    Station s;
    s.code = "S1";
    s.lat = 46.5;
    s.lon = 14.2;
    add(p, s);
  }
  int64_t planes() { return p.db().query_int("SELECT count(*) FROM planes"); }
};

}  // namespace

TEST(PickLists, ANewProjectHasTheTableAndEmptyListsThatDoNotRestrict) {
  Camp c;
  EXPECT_EQ(c.p.db().query_int("PRAGMA user_version"), kSchemaVersion);  // SQLite: the schema version
  EXPECT_TRUE(pick_list(c.p, PickList::Structure).empty());
  EXPECT_TRUE(pick_list(c.p, PickList::Lithology).empty());
  EXPECT_EQ(pick_list(c.p, PickList::Unit), std::vector<std::string>{"Kls"});
  EXPECT_EQ(pick_list(c.p, PickList::Person), std::vector<std::string>{"AQ"});
  const ImportReport r = import_csv(c.p, ImportKind::Planes, "station,kind,strike,dip\nS1,joint,120,85\n", "p.csv");
  EXPECT_TRUE(r.ok());
  EXPECT_EQ(c.planes(), 1);
}

TEST(PickLists, StructureKindsAndLithologiesAreAddedInOrderAndValidated) {
  Camp c;
  add_pick(c.p, PickList::Structure, "bedding");
  add_pick(c.p, PickList::Structure, "lineation");
  add_pick(c.p, PickList::Lithology, "sandstone, cross-bedded");
  EXPECT_EQ(pick_list(c.p, PickList::Structure), (std::vector<std::string>{"bedding", "lineation"}));
  EXPECT_EQ(pick_list(c.p, PickList::Lithology), std::vector<std::string>{"sandstone, cross-bedded"});
  EXPECT_THROW(add_pick(c.p, PickList::Structure, "scarp"), ValidationError);    // not a structure kind
  EXPECT_THROW(add_pick(c.p, PickList::Structure, "bedding"), ValidationError);  // already listed
  EXPECT_THROW(add_pick(c.p, PickList::Lithology, ""), ValidationError);
  EXPECT_THROW(add_pick(c.p, PickList::Lithology, "tab\there"), ValidationError);
  EXPECT_THROW(add_pick(c.p, PickList::Unit, "Qm"), ValidationError);  // units are records
  EXPECT_EQ(pick_list(c.p, PickList::Structure).size(), 2u);           // nothing written by a refusal
  remove_pick(c.p, PickList::Structure, "bedding");
  EXPECT_EQ(pick_list(c.p, PickList::Structure), std::vector<std::string>{"lineation"});
}

TEST(PickLists, AnImportRefusesAStructureKindNotInTheListAndNamesTheList) {
  Camp c;
  add_pick(c.p, PickList::Structure, "bedding");
  add_pick(c.p, PickList::Structure, "foliation");
  const ImportReport r =
      import_csv(c.p, ImportKind::Planes, "station,kind,strike,dip\nS1,bedding,030,40\nS1,joint,120,85\n", "p.csv");
  const std::vector<std::string> expected{
      "p.csv:3:2: pick-list: structure kind 'joint' is not in the project's structure list (bedding, foliation)"};
  EXPECT_EQ(r.errors, expected);
  EXPECT_EQ(c.planes(), 0) << "a good row of a refused file must not be written";
  const ImportReport lines =
      import_csv(c.p, ImportKind::Lines, "station,kind,trend,plunge\nS1,lineation,120,35\n", "l.csv");
  ASSERT_EQ(lines.errors.size(), 1u);
  EXPECT_NE(
      lines.errors[0].find("structure kind 'lineation' is not in the project's structure list (bedding, foliation)"),
      std::string::npos);
}

TEST(PickLists, AnImportRefusesAUnitOrAnObserverNotInTheListAndNamesTheList) {
  Camp c;
  const ImportReport units = import_csv(c.p, ImportKind::Stations, "station,lat,lon,unit\nS2,46.5,14.2,Zz\n", "s.csv");
  EXPECT_EQ(units.errors,
            std::vector<std::string>{"s.csv:2:4: unknown-unit: unit 'Zz' is not in the project's unit list (Kls)"});
  const ImportReport who =
      import_csv(c.p, ImportKind::Stations, "station,lat,lon,observer\nS2,46.5,14.2,BX\n", "s.csv");
  EXPECT_EQ(who.errors,
            std::vector<std::string>{"s.csv:2:4: pick-list: person 'BX' is not in the project's person list (AQ)"});
  EXPECT_FALSE(find_station(c.p, "S2"));
  EXPECT_FALSE(find_person(c.p, "BX"));
  // A listed observer is taken.
  const ImportReport ok = import_csv(c.p, ImportKind::Stations, "station,lat,lon,observer\nS2,46.5,14.2,AQ\n", "s.csv");
  EXPECT_TRUE(ok.ok());
  EXPECT_TRUE(find_station(c.p, "S2"));
}
