// `cairn new FILE --name NAME [--utm ZONE] [--north true|magnetic] [--declination DEG] [--nearby METRES]
//  [--friction DEG] [--sliding-window DEG] [--toppling-window DEG]`: makes an empty project file.
#include <optional>
#include <ostream>
#include <stdexcept>

#include "app/cli/command.h"
#include "app/cli/project_access.h"
#include "storage/validate.h"

namespace cairn::cli {
namespace {

int run(const Args& in, std::ostream& out, std::ostream&) {
  Args args = in;
  const auto name = take_option(args, "--name");
  const auto utm = take_option(args, "--utm");
  const auto north = take_option(args, "--north");
  const auto decl = take_option(args, "--declination");
  const auto nearby = take_option(args, "--nearby");
  // The cross-check's screening settings, stored in the file (schema version 5).
  struct Setting { const char* option; double lo, hi; double store::ProjectInfo::*field; std::optional<double> value; };
  Setting settings[] = {{"--friction", 0, 89, &store::ProjectInfo::friction_angle, {}},
                        {"--sliding-window", 1, 90, &store::ProjectInfo::sliding_window, {}},
                        {"--toppling-window", 1, 90, &store::ProjectInfo::toppling_window, {}}};
  for (auto& st : settings) {
    auto v = take_option(args, st.option);
    if (!v) continue;
    st.value = store::parse_decimal(*v);
    if (!st.value || *st.value < st.lo || *st.value > st.hi)
      throw std::invalid_argument(std::string(st.option) + " '" + *v + "' must be a number of degrees from " +
                                  std::to_string(static_cast<int>(st.lo)) + " to " +
                                  std::to_string(static_cast<int>(st.hi)));
  }
  reject_unknown_options(args);
  if (args.size() != 1) throw std::invalid_argument("expected one FILE");
  if (!name || name->empty()) throw std::invalid_argument("--name NAME is required");
  store::NewProject np;
  np.name = *name;
  if (utm) np.utm_zone = *utm;
  if (north) {
    auto n = store::parse_north(*north);
    if (!n) throw std::invalid_argument("--north must be one of: " + store::names_of_north());
    np.north_default = *n;
  }
  if (decl) {
    auto d = store::parse_decimal(*decl);
    if (!d) throw std::invalid_argument("--declination '" + *decl + "' is not a number (degrees, east positive)");
    np.declination = *d;
  }
  std::optional<double> radius;
  if (nearby) {
    radius = store::parse_decimal(*nearby);
    if (!radius || *radius < 0 || *radius > 100000)
      throw std::invalid_argument("--nearby '" + *nearby + "' must be a distance from 0 to 100000 metres");
  }
  try {
    auto p = store::Project::create(args[0], np, cli_open_options(false));
    auto i = p.info();
    if (radius) i.nearby_radius = *radius;
    for (const auto& st : settings)
      if (st.value) i.*st.field = *st.value;
    p.update_info(i);
    const auto info = p.info();
    out << "created " << args[0] << ": project '" << info.name << "'"
        << (info.utm_zone.empty() ? std::string(", no UTM zone") : ", UTM zone " + info.utm_zone)
        << ", readings default to " << store::to_string(info.north_default) << " north"
        << (info.nearby_radius > 0 ? ", unnamed readings compared within " + std::to_string(static_cast<int>(info.nearby_radius)) + " m of a contact" : std::string())
        << "\n";
  } catch (const store::ValidationError& e) {
    throw std::invalid_argument(e.what());
  }
  return 0;
}

}  // namespace

CAIRN_COMMAND(Command{"new",
                      "cairn new FILE --name NAME [--utm ZONE] [--north true|magnetic] [--declination DEGREES] [--nearby METRES] "
                      "[--friction DEG] [--sliding-window DEG] [--toppling-window DEG]",
                      "make a new, empty project file (NAME.cairn)", run});

}  // namespace cairn::cli
