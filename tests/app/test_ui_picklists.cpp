// Pick-lists on the Camp screen: structure kinds listed by tapping their chips,
// a lithology added by name, a unit and a person added as records; the
// Reading pad then offers only the listed kinds. Checked in the project file
// through storage afterwards.
//
// Source: outside sources are named beside the checks: the structure kinds are the
// trade's terms (bedding, joint, fault: structural geology textbooks, e.g.
// Ragan, "Structural Geology"); the rule that the pad offers only the listed
// kinds is the ("so no mapper types a unit code at the outcrop").
#include "storage/pick_lists.h"
#include "storage/repository.h"
#include "tests/app/ui_test_support.h"

using namespace cairn;
using cairn::ui_test::UiTest;

namespace {

void make_project(const std::string& path) {
  store::OpenOptions o;
  o.backups = false;
  store::Project p = store::Project::create(path, store::NewProject{"Lists", "8N", store::North::True, 0.0}, o);
  store::Person who;
  who.name = "Ada Quarry";
  who.initials = "AQ";
  store::add(p, who);
  store::Station s;
  s.code = "S1";
  s.lat = 61.18;
  s.lon = -135.59;
  store::add(p, s);
}

}  // namespace

TEST_F(UiTest, PickListsAreEditedOnTheCampScreenAndTheReadingPadOffersOnlyTheListedKinds) {
  const std::string path = file("lists.cairn");
  make_project(path);
  std::string s = "wait 3\nwait-idle\ntap \"Camp\"\nwait 2\n";
  s += "tap \"joint\"\nwait 2\ntap \"bedding\"\nwait 2\n";
  s += "tap \"new lithology\"\ntype \"quartz sandstone\"\nwait 2\ntap \"Add lithology\"\nwait 2\n";
  s += "drag 1000 650 1000 200\nwait 5\nwait-for \"Add unit\"\n";  // a finger scrolls the Camp's right column up
  s +=
      "tap \"unit code\"\ntype \"Kls\"\ntap \"unit name\"\ntype \"grey limestone\"\nwait 2\ntap \"Add unit\"\nwait 2\n";
  s += "tap \"initials\"\ntype \"BX\"\ntap \"person name\"\ntype \"Bo Xu\"\nwait 2\ntap \"Add person\"\nwait 2\n";
  s += "expect \"Units, oldest first: Kls\"\nexpect \"People: AQ, BX\"\n";
  const auto r = gui(path, s);
  ASSERT_EQ(r.status, 0) << r.err;
  {
    store::Project p = store::Project::open(path, quiet());
    EXPECT_EQ(store::pick_list(p, store::PickList::Structure), (std::vector<std::string>{"joint", "bedding"}));
    EXPECT_EQ(store::pick_list(p, store::PickList::Lithology), std::vector<std::string>{"quartz sandstone"});
    ASSERT_TRUE(store::find_unit(p, "Kls"));
    EXPECT_EQ(store::find_unit(p, "Kls")->name, "grey limestone");
    ASSERT_TRUE(store::find_person(p, "BX"));
  }
  // The Reading pad offers bedding and joint, and no fault.
  const auto pad =
      gui(path, "wait 3\ntap \"bedding\"\ntap \"joint\"\ntap \"fault\"\n", "--view pad --station S1 --person AQ");
  EXPECT_EQ(pad.status, 3);
  EXPECT_NE(pad.err.find("no target 'fault'"), std::string::npos) << pad.err;
}
