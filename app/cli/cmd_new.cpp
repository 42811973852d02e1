// `cairn new FILE --name NAME [--utm ZONE] [--north true|magnetic] [--declination DEG] [--nearby METRES]
//  [--friction DEG] [--sliding-window DEG] [--toppling-window DEG]`: makes an empty project file.
#include <optional>
#include <ostream>
#include <stdexcept>

#include "app/cli/command.h"
#include "app/cli/project_access.h"
#include "formats/validate.h"

namespace cairn::cli {

using namespace cairn::formats;  // file formats and value rules (formats/)
namespace {

struct NewArgs {
  std::string file;
  std::optional<std::string> name, utm, north, decl, nearby;
  std::optional<double> friction, sliding, toppling;
};

int run(const NewArgs& a, std::ostream& out, std::ostream&) {
  const std::vector<std::string> args{a.file};
  const auto& name = a.name;
  const auto& utm = a.utm;
  const auto& north = a.north;
  const auto& decl = a.decl;
  const auto& nearby = a.nearby;
  // The cross-check's screening settings, stored in the file (schema version 5).
  struct Setting {
    double store::ProjectInfo::*field;
    std::optional<double> value;
  };
  const Setting settings[] = {{&store::ProjectInfo::friction_angle, a.friction},
                              {&store::ProjectInfo::sliding_window, a.sliding},
                              {&store::ProjectInfo::toppling_window, a.toppling}};
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
    auto d = formats::parse_decimal(*decl);
    if (!d) throw std::invalid_argument("--declination '" + *decl + "' is not a number (degrees, east positive)");
    np.declination = *d;
  }
  std::optional<double> radius;
  if (nearby) {
    radius = formats::parse_decimal(*nearby);
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
        << (info.nearby_radius > 0 ? ", unnamed readings compared within " +
                                         std::to_string(static_cast<int>(info.nearby_radius)) + " m of a contact"
                                   : std::string())
        << "\n";
  } catch (const store::ValidationError& e) {
    throw std::invalid_argument(e.what());
  }
  return 0;
}

Runner define(CLI::App& app) {
  auto a = std::make_shared<NewArgs>();
  positional(app, "FILE", a->file, "the project file to make (NAME.cairn)");
  option(app, "--name", a->name, "the project's name (required)")->required();
  option(app, "--utm", a->utm, "the working UTM zone, e.g. 33N (default: from the first position)");
  option(app, "--north", a->north, "the north readings are taken against by default: true or magnetic");
  option(app, "--declination", a->decl, "the project's declination in degrees, east positive");
  option(app, "--nearby", a->nearby,
         "compare readings that name no contact with the nearest contact within this many metres (0: off)");
  number(app, "--friction", a->friction, 0, 89, "friction angle in degrees for the slope screening");
  number(app, "--sliding-window", a->sliding, 1, 90, "planar sliding window in degrees");
  number(app, "--toppling-window", a->toppling, 1, 90, "toppling window in degrees");
  return [a](std::ostream& out, std::ostream& err) { return run(*a, out, err); };
}

}  // namespace

CAIRN_COMMAND(Command{"new", "make a new, empty project file (NAME.cairn)", define});

}  // namespace cairn::cli
