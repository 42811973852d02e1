// net_probe: reads lines "trend plunge" (degrees) from stdin and prints the stereonet
// and statistics results of geomath for them, one "key value ..." per output line, so
// that tests/reference/test_statistics_numpy.py can compare them with numpy and PROJ.
//
//   net_probe fisher                    Fisher mean of the lines as axes
//   net_probe tensor                    orientation tensor, eigen analysis, Woodcock K, C
//   net_probe girdle                    best-fit great circle (pi-girdle) and beta
//   net_probe project area|angle        net point of each line
//   net_probe kamb area|angle kamb|percent NODES
//                                       counting grid: "node i j x y count value"
#include <cstdio>
#include <iostream>
#include <sstream>
#include <string>
#include <vector>

#include "geomath/density.h"
#include "geomath/statistics.h"
#include "geomath/stereonet.h"

using namespace cairn::geo;

namespace {

int usage() {
  std::cerr << "usage: net_probe fisher|tensor|girdle < lines\n"
               "       net_probe project area|angle < lines\n"
               "       net_probe kamb area|angle kamb|percent NODES < lines\n";
  return 2;
}

bool read_lines(std::vector<Line>& out) {
  std::string text;
  int row = 0;
  while (std::getline(std::cin, text)) {
    ++row;
    if (text.find_first_not_of(" \t\r") == std::string::npos) continue;
    std::istringstream in(text);
    Line l;
    if (!(in >> l.trend >> l.plunge) || l.plunge < 0 || l.plunge > 90) {
      std::cerr << "net_probe: stdin line " << row << ": expected 'trend plunge', got '" << text << "'\n";
      return false;
    }
    out.push_back(l);
  }
  return true;
}

void put(const char* key, std::initializer_list<double> values) {
  std::printf("%s", key);
  for (double v : values) std::printf(" %.17g", v);
  std::printf("\n");
}

bool parse_kind(const std::string& s, NetKind& k) {
  if (s == "area")
    k = NetKind::EqualArea;
  else if (s == "angle")
    k = NetKind::EqualAngle;
  else
    return false;
  return true;
}

}  // namespace

int main(int argc, char** argv) {
  if (argc < 2) return usage();
  const std::string mode = argv[1];
  std::vector<Line> lines;
  if (!read_lines(lines)) return 2;

  if (mode == "fisher") {
    auto f = fisher_mean(lines);
    if (!f) return std::cerr << "net_probe: " << f.error() << "\n", 1;
    put("n", {double(f->n)});
    put("resultant", {f->resultant});
    put("kappa", {f->kappa});
    if (f->alpha95) put("alpha95", {*f->alpha95});
    put("mean", {f->mean.trend, f->mean.plunge});
    put("mean_vector", {f->mean_vector.x(), f->mean_vector.y(), f->mean_vector.z()});
  } else if (mode == "tensor") {
    auto t = orientation_tensor(lines);
    if (!t) return std::cerr << "net_probe: " << t.error() << "\n", 1;
    put("eigenvalues", {t->eigenvalues[0], t->eigenvalues[1], t->eigenvalues[2]});
    for (int i = 0; i < 3; ++i) {
      const Vec3& e = t->eigenvectors[i];
      put(("vector" + std::to_string(i + 1)).c_str(), {e.x(), e.y(), e.z()});
      put(("axis" + std::to_string(i + 1)).c_str(), {t->axes[i].trend, t->axes[i].plunge});
    }
    auto w = woodcock_shape(*t);
    if (w) put("woodcock", {w->k, w->c});
  } else if (mode == "girdle") {
    auto g = fit_girdle(lines);
    if (!g) return std::cerr << "net_probe: " << g.error() << "\n", 1;
    put("beta", {g->beta.trend, g->beta.plunge});
    put("girdle", {g->girdle.strike, g->girdle.dip});
    put("beta_cone", {g->beta_cone});
  } else if (mode == "project") {
    NetKind k;
    if (argc < 3 || !parse_kind(argv[2], k)) return usage();
    for (const Line& l : lines) {
      const NetPoint p = project(k, l);
      put("point", {p[0], p[1]});
    }
  } else if (mode == "kamb") {
    NetKind k;
    if (argc < 5 || !parse_kind(argv[2], k)) return usage();
    DensityOptions opt;
    const std::string method = argv[3];
    if (method == "kamb")
      opt.method = CountingMethod::Kamb;
    else if (method == "percent")
      opt.method = CountingMethod::OnePercent;
    else
      return usage();
    opt.grid_nodes = std::atoi(argv[4]);
    auto g = density_grid(k, lines, opt);
    if (!g) return std::cerr << "net_probe: " << g.error() << "\n", 1;
    put("cone", {g->cone_half_angle});
    put("sigma", {g->sigma});
    for (int j = 0; j < g->nodes(); ++j) {
      for (int i = 0; i < g->nodes(); ++i) {
        const NetPoint p = g->node(i, j);
        put("node", {double(i), double(j), p[0], p[1], double(g->count(i, j)), g->value(i, j)});
      }
    }
  } else {
    return usage();
  }
  return 0;
}
