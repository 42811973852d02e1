// cairn gui [FILE]: the touch UI.
#include <cmath>
#include <cstdlib>
#include <ostream>
#include <stdexcept>

#include "app/cli/command.h"
#include "app/cli/display.h"
#include "app/ui/app.h"
#include "geomath/decimal.h"

namespace cairn::cli {
namespace {

int parse_int(const std::string& opt, const std::string& v, int lo, int hi) {
  const auto d = geo::parse_decimal(v);
  if (!d || *d != std::floor(*d) || *d < lo || *d > hi)
    throw std::invalid_argument(opt + " must be a whole number from " + std::to_string(lo) + " to " +
                                std::to_string(hi) + ", not '" + v + "'");
  return static_cast<int>(*d);
}

struct GuiArgs {
  std::string file;
  ui::GuiOptions o;
  std::optional<std::string> dpi, size, view, screenshot, frames, script, person, station, flag, gps;
};

int run_gui(const GuiArgs& a, std::ostream& out, std::ostream& err) {
  (void)out;
  ui::GuiOptions o = a.o;
  if (a.dpi) o.dpi = parse_int("--dpi", *a.dpi, 50, 1000);
  if (const auto& v = a.size) {
    const auto x = v->find('x');
    if (x == std::string::npos)
      throw std::invalid_argument("--size must be WIDTHxHEIGHT, e.g. 1280x800, not '" + *v + "'");
    o.width = parse_int("--size width", v->substr(0, x), 320, 8192);
    o.height = parse_int("--size height", v->substr(x + 1), 240, 8192);
  }
  if (a.view) o.view = *a.view;
  if (a.screenshot) o.screenshot = *a.screenshot;
  if (a.frames) o.frames = parse_int("--frames", *a.frames, 1, 10000);
  if (a.script) o.script = *a.script;
  if (a.person) o.person = *a.person;
  if (a.station) o.station = *a.station;
  if (a.flag) o.flag = *a.flag;
  if (a.gps)
    o.gps = *a.gps;
  else if (!o.screenshot.empty() || !o.script.empty())
    o.gps.clear();  // tests and pictures: no GPS unless asked
  o.file = a.file;
  if (!have_display()) {
    err << "cairn gui: no display: neither DISPLAY nor WAYLAND_DISPLAY is set (run it on the tablet's screen, "
           "or under xvfb-run for pictures and tests)\n";
    return 1;
  }
  ui::App app(o);
  return app.run();
}

Runner define(CLI::App& app) {
  auto a = std::make_shared<GuiArgs>();
  positional(app, "FILE", a->file, "the project file to open", false);
  auto* full = flag(app, "--fullscreen", a->o.fullscreen, "fill the screen");
  flag(app, "--windowed", a->o.windowed, "open in a window")->excludes(full);
  flag(app, "--night", a->o.night, "start with the night theme");
  auto* nogps = flag(app, "--no-gps", a->o.no_gps, "do not connect to gpsd");
  option(app, "--gps", a->gps, "gpsd to connect to, HOST:PORT (default localhost:2947)")->excludes(nogps);
  flag(app, "--frame-stats", a->o.frame_stats,
       "print the CPU time of each frame's build on exit (with --screenshot: frames paced at 60 a second, as a display "
       "paces them)");
  option(app, "--dpi", a->dpi, "screen density in dots per inch, 50 to 1000 (default: from the display)");
  option(app, "--size", a->size, "window size WIDTHxHEIGHT, e.g. 1280x800");
  choice(app, "--view", a->view, {"logbook", "station", "pad", "net", "plan", "crosscheck", "camp", "review"},
         "the screen to open");
  option(app, "--person", a->person, "the mapper's initials");
  option(app, "--station", a->station, "the station to open");
  option(app, "--flag", a->flag, "the flag rule to open on the Crosscheck");
  option(app, "--screenshot", a->screenshot, "write the screen to this PNG and quit");
  option(app, "--frames", a->frames, "frames to draw before the screenshot, 1 to 10000");
  option(app, "--script", a->script, "replay a file of UI events (tests)");
  return [a](std::ostream& out, std::ostream& err) { return run_gui(*a, out, err); };
}

}  // namespace

CAIRN_COMMAND(Command{
    "gui", "open the touch UI (Logbook, Station sheet, Reading pad, Net, Plan, Crosscheck, Camp, Review)", define});

}  // namespace cairn::cli
