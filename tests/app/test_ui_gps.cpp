// GPS in the touch UI: gpsfake (from Debian's gpsd-clients) replays an
// invented NMEA 0183 log through a real gpsd; the UI reads it with libgps,
// shows the fix, and "+ New station" makes a station at the fix in one tap;
// the fix is also kept in the project's day track.
//
// The log (tests/app/data/field.nmea, invented place) repeats three sentences
// of NMEA 0183 (NMEA 0183 standard, sentence layouts as published):
//   $GPRMC,hhmmss.ss,A,llll.llll,N,yyyyy.yyyy,W,speed,course,ddmmyy,,,A*hh
//   $GPGGA,hhmmss.ss,llll.llll,N,yyyyy.yyyy,W,quality,satellites,HDOP,altitude,M,geoid separation,M,,*hh
//   $GPGSA,A,3 (3D fix),satellite ids...,PDOP,HDOP,VDOP*hh
// Latitude is ddmm.mmmm and longitude dddmm.mmmm: 6110.9100,N is
// 61 + 10.9100/60 = 61.1818333 degrees; 13535.4000,W is -(135 + 35.4/60) =
// -135.59 degrees. GGA's altitude (1012.5 M) is above mean sea level. The
// checksum is the two hex digits of the XOR of every character between $ and *.
#include <csignal>
#include <fstream>
#include <unistd.h>

#include "storage/repository.h"
#include "storage/track.h"
#include "tests/app/ui_test_support.h"

using namespace cairn;
using cairn::ui_test::UiTest;

namespace {

const std::string kLog = std::string(CAIRN_SOURCE_DIR) + "/tests/app/data/field.nmea";

}  // namespace

TEST(NmeaLog, EverySentenceHasTheRightChecksum) {
  // NMEA 0183: "*hh", hh the XOR of the characters between "$" and "*".
  std::ifstream f(kLog);
  ASSERT_TRUE(f) << kLog;
  std::string line;
  int n = 0;
  while (std::getline(f, line)) {
    if (!line.empty() && line.back() == '\r') line.pop_back();
    if (line.empty()) continue;
    ++n;
    ASSERT_EQ(line[0], '$') << line;
    const auto star = line.find('*');
    ASSERT_NE(star, std::string::npos) << line;
    unsigned x = 0;
    for (size_t i = 1; i < star; ++i) x ^= static_cast<unsigned char>(line[i]);
    char hex[3];
    std::snprintf(hex, sizeof hex, "%02X", x);
    EXPECT_EQ(line.substr(star + 1), hex) << line;
  }
  EXPECT_EQ(n, 90);
}

TEST_F(UiTest, NewStationAtTheFixReplayedThroughGpsd) {
  ASSERT_EQ(std::system("command -v gpsfake >/dev/null 2>&1"), 0)
      << "gpsfake is missing: run scripts/install-deps.sh --test";
  const std::string path = file("gps.cairn");
  {
    store::Project p = store::Project::create(path, store::NewProject{"GPS", "8N", store::North::True, 0.0}, quiet());
    store::Person who;
    who.name = "Ada Quarry";
    who.initials = "AQ";
    store::add(p, who);
  }
  std::string s = "wait 3\n";
  s += "wait-for \"GPS: 3D fix\" 60\n";
  s += "expect \"\xC2\xB1\"\n";  // the accuracy gpsd estimates
  s += "touch \"+ New station\"\n";
  s += "wait-for \"Station S1\" 10\n";
  s += "expect \"from gps\"\n";
  // gpsfake starts its own gpsd on a pseudo-terminal; on a heavily loaded machine
  // that start-up occasionally fails before any sentence is sent. The replay is
  // then tried once more on another port; what is checked does not change.
  ui_test::GuiRun r;
  for (int attempt = 0; attempt < 2; ++attempt) {
    // gpsfake in a process group of its own, so that it and the gpsd it starts are
    // stopped together (and nothing else).
    const int port = 21000 + static_cast<int>(getpid() % 5000) + 7 * attempt;
    const pid_t child = fork();
    ASSERT_GE(child, 0);
    if (child == 0) {
      setpgid(0, 0);
      const std::string out = file("gpsfake.log");
      if (!std::freopen(out.c_str(), "w", stdout) || !std::freopen(out.c_str(), "a", stderr)) _exit(127);
      const std::string port_s = std::to_string(port);
      execlp("gpsfake", "gpsfake", "-q", "-c", "0.1", "-P", port_s.c_str(), kLog.c_str(), static_cast<char*>(nullptr));
      _exit(127);
    }
    setpgid(child, child);
    r = gui(path, s, "--gps localhost:" + std::to_string(port) + " --person AQ");
    kill(-child, SIGTERM);
    int status = 0;
    waitpid(child, &status, 0);
    if (r.status == 0 || r.err.find("'GPS: 3D fix' did not appear") == std::string::npos) break;
  }
  ASSERT_EQ(r.status, 0) << r.err << "\ngpsfake: " << ui_test::slurp(file("gpsfake.log"));

  store::Project p = store::Project::open(path, quiet());
  auto st = store::find_station(p, "S1");
  ASSERT_TRUE(st);
  EXPECT_NEAR(st->lat, 61.0 + 10.9100 / 60.0, 1e-7);      // 6110.9100,N
  EXPECT_NEAR(st->lon, -(135.0 + 35.4000 / 60.0), 1e-7);  // 13535.4000,W
  ASSERT_TRUE(st->elevation);
  EXPECT_NEAR(*st->elevation, 1012.5, 1e-6);  // GGA altitude above mean sea level
  EXPECT_EQ(st->source, store::PositionSource::Gps);
  ASSERT_TRUE(st->h_accuracy);  // gpsd's estimate from the DOPs: present and positive
  EXPECT_GT(*st->h_accuracy, 0);

  // The day track: the UI ran with a fix, so the fix is in the file (the log
  // stands still, so one fix is kept until five minutes pass: geomath/track.h).
  const auto track = store::list_track(p);
  ASSERT_FALSE(track.empty());
  EXPECT_NEAR(track.front().lat, 61.0 + 10.9100 / 60.0, 1e-7);
  EXPECT_NEAR(track.front().lon, -(135.0 + 35.4000 / 60.0), 1e-7);
  EXPECT_EQ(track.front().person, store::find_person(p, "AQ")->meta.uuid);  // the person at the tablet
}
