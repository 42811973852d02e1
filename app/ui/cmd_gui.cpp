// cairn gui [FILE]: the touch UI.
#include <cstdlib>
#include <ostream>
#include <stdexcept>

#include "app/cli/command.h"
#include "app/cli/display.h"
#include "app/ui/app.h"

namespace cairn::cli {
namespace {

int parse_int(const std::string& opt, const std::string& v, int lo, int hi) {
  char* end = nullptr;
  const long n = std::strtol(v.c_str(), &end, 10);
  if (end == v.c_str() || *end || n < lo || n > hi)
    throw std::invalid_argument(opt + " must be a whole number from " + std::to_string(lo) + " to " +
                                std::to_string(hi) + ", not '" + v + "'");
  return static_cast<int>(n);
}

int run_gui(const Args& in, std::ostream& out, std::ostream& err) {
  (void)out;
  Args args = in;
  ui::GuiOptions o;
  o.fullscreen = take_flag(args, "--fullscreen");
  o.windowed = take_flag(args, "--windowed");
  o.night = take_flag(args, "--night");
  o.no_gps = take_flag(args, "--no-gps");
  o.frame_stats = take_flag(args, "--frame-stats");
  if (auto v = take_option(args, "--dpi")) o.dpi = parse_int("--dpi", *v, 50, 1000);
  if (auto v = take_option(args, "--size")) {
    const auto x = v->find('x');
    if (x == std::string::npos) throw std::invalid_argument("--size must be WIDTHxHEIGHT, e.g. 1280x800, not '" + *v + "'");
    o.width = parse_int("--size width", v->substr(0, x), 320, 8192);
    o.height = parse_int("--size height", v->substr(x + 1), 240, 8192);
  }
  if (auto v = take_option(args, "--view")) {
    if (!ui::parse_screen(*v))
      throw std::invalid_argument("--view must be one of logbook, station, pad, net, plan, crosscheck, camp, review, not '" + *v + "'");
    o.view = *v;
  }
  if (auto v = take_option(args, "--screenshot")) o.screenshot = *v;
  if (auto v = take_option(args, "--frames")) o.frames = parse_int("--frames", *v, 1, 10000);
  if (auto v = take_option(args, "--script")) o.script = *v;
  if (auto v = take_option(args, "--person")) o.person = *v;
  if (auto v = take_option(args, "--station")) o.station = *v;
  if (auto v = take_option(args, "--flag")) o.flag = *v;
  if (auto v = take_option(args, "--gps")) o.gps = *v;
  else if (!o.screenshot.empty() || !o.script.empty()) o.gps.clear();  // tests and pictures: no GPS unless asked
  reject_unknown_options(args);
  if (args.size() > 1) throw std::invalid_argument("expected at most one project file");
  if (!args.empty()) o.file = args[0];
  if (!have_display()) {
    err << "cairn gui: no display: neither DISPLAY nor WAYLAND_DISPLAY is set (run it on the tablet's screen, "
           "or under xvfb-run for pictures and tests)\n";
    return 1;
  }
  ui::App app(o);
  return app.run();
}

}  // namespace

CAIRN_COMMAND(Command{"gui",
                      "cairn gui [FILE] [--fullscreen|--windowed] [--night] [--dpi N] [--gps HOST:PORT|--no-gps] "
                      "[--person INITIALS] [--station CODE] [--view SCREEN] [--flag RULE] [--size WxH] "
                      "[--screenshot OUT.png] [--frames N] [--script EVENTS.txt] [--frame-stats]",
                      "Open the touch UI (Logbook, Station sheet, Reading pad, Net, Plan, Crosscheck, Camp, Review)",
                      run_gui});

}  // namespace cairn::cli
