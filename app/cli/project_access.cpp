#include "app/cli/project_access.h"

#include <fstream>
#include <ostream>
#include <sstream>
#include <stdexcept>

#include "app/cli/magnetic_source.h"

namespace cairn::cli {

store::DeclinationProvider wmm_declination() {
  return [](double lat, double lon, double year) {
    const auto& model = wmm();
    // Height 0 m: the declination changes by far less than a compass can read
    // over the few kilometres of relief a field area has.
    return store::Declination{model.evaluate(lat, lon, 0.0, year).declination, model.name()};
  };
}

store::OpenOptions cli_open_options(bool read_only) {
  store::OpenOptions o;
  o.read_only = read_only;
  o.declination = wmm_declination();
  return o;
}

store::Project open_project(const std::string& file, bool read_only, std::ostream& err) {
  auto p = store::Project::open(file, cli_open_options(read_only));
  if (!p.problem().empty()) err << "warning: " << p.problem() << "\n";
  if (!p.backup_error().empty()) err << "warning: backup failed: " << p.backup_error() << "\n";
  return p;
}

std::string read_text_file(const std::string& path) {
  std::ifstream f(path, std::ios::binary);
  if (!f) throw std::runtime_error("cannot read " + path);
  std::stringstream ss;
  ss << f.rdbuf();
  return ss.str();
}

}  // namespace cairn::cli
