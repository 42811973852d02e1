// cairn report FILE -o report.html: the evening report, one self-contained HTML
// file (see report_html.h). The report holds what it draws (the stations, the
// readings in a compact form, the points counted, the cross-check and the
// thumbnails) until the page is written; past 2 s a
// progress line on stderr counts the records read (app/core/progress.h: on a
// terminal or with --progress).
#include <cerrno>
#include <cstdio>
#include <cstring>
#include <ctime>
#include <filesystem>
#include <fstream>
#include <ostream>
#include <stdexcept>

#include "app/cli/command.h"
#include "app/cli/magnetic_source.h"
#include "app/cli/report_html.h"
#include "app/core/photo_thumbs.h"
#include "app/plot/plan_track.h"
#include "formats/atomic_file.h"
#include "geomath/crosscheck.h"
#include "app/core/check_input.h"
#include "app/core/export.h"
#include "app/core/progress.h"
#include "storage/each.h"
#include "formats/layers.h"
#include "storage/terrain.h"
#include "storage/project.h"
#include "storage/repository.h"

namespace fs = std::filesystem;

namespace cairn::cli {
namespace {

std::string utc_now(const char* format) {
  const std::time_t t = std::time(nullptr);
  std::tm tm{};
  gmtime_r(&t, &tm);
  char buf[64];
  std::strftime(buf, sizeof buf, format, &tm);
  return buf;
}

std::string date_part(const std::string& iso) {
  if (iso.size() < 10 || iso[4] != '-' || iso[7] != '-') return "";
  return iso.substr(0, 10);
}

// The model's declination at the data's mean position over its date range.
DeclinationSummary summarise_declination(const geo::MagneticModel& m, const ReportData& d) {
  DeclinationSummary s;
  s.model = m.name();
  if (d.positions == 0) throw std::runtime_error("no stations or contact points to place it");
  s.lat = d.lat_sum / static_cast<double>(d.positions), s.lon = d.lon_sum / static_cast<double>(d.positions);
  std::string lo, hi;
  auto take_day = [&](const std::string& day) {
    if (day.empty()) return;
    if (lo.empty() || day < lo) lo = day;
    if (hi.empty() || day > hi) hi = day;
  };
  for (const auto& r : d.stations) take_day(date_part(r.time));
  for (const auto& r : d.planes) take_day(r.day);
  for (const auto& r : d.lines) take_day(r.day);
  take_day(d.points.first_day);
  take_day(d.points.last_day);
  if (lo.empty()) {
    s.dates_from_data = false;
    lo = hi = utc_now("%Y-%m-%d");
  }
  s.first_date = lo, s.last_date = hi;
  const auto y0 = core::decimal_year_of(lo), y1 = core::decimal_year_of(hi);
  if (!y0 || !y1) throw std::runtime_error("cannot read the dates " + lo + " and " + hi);
  s.first = m.evaluate(s.lat, s.lon, 0.0, *y0).declination;
  s.last = m.evaluate(s.lat, s.lon, 0.0, *y1).declination;
  s.in_validity = m.in_validity(*y0) && m.in_validity(*y1);
  s.valid_from = m.valid_from(), s.valid_to = m.valid_to();
  return s;
}

struct ReportArgs {
  std::string file;
  std::optional<std::string> output, net;
  bool show_progress = false;
};

int run_report(const ReportArgs& a, std::ostream& out, std::ostream& err) {
  const std::vector<std::string> args{a.file};
  const auto& output = a.output;
  const geo::NetKind net =
      a.net.value_or("equal-area") == "equal-angle" ? geo::NetKind::EqualAngle : geo::NetKind::EqualArea;
  if (!output || output->empty()) throw std::invalid_argument("-o REPORT.html is required");
  {
    std::error_code ec;
    if (*output == args[0] || (fs::exists(*output, ec) && fs::equivalent(*output, args[0], ec)))
      throw std::invalid_argument("the report would overwrite the project file " + args[0]);
  }

  store::OpenOptions oo;
  oo.read_only = true;
  oo.backups = false;
  store::Project p = store::Project::open(args[0], oo);
  if (!p.problem().empty()) err << "warning: " << p.problem() << "\n";

  // Rows: the records read, then one for the check and one for the page.
  core::ProgressLine line(err, "report", a.show_progress);
  const size_t total =
      store::count_stations(p) + store::count_planes(p) + store::count_lines(p) + store::count_points(p) + 2;
  size_t done = 0;
  auto step = [&](size_t rows) { line.update(done += rows, total); };

  ReportData d;
  const geo::MagneticModel* model = nullptr;
  try {
    model = &wmm();
  } catch (const std::exception& e) {
    d.declination_problem = std::string("no magnetic model (") + e.what() + ")";
    err << "warning: no magnetic model (" << e.what() << "); declination-suspect is not checked\n";
  }
  core::LocalDeclination decl;
  if (model) decl = wmm_declination(nullptr);
  // The check first: what it needs only while it runs is given back before
  // the records are read, so the two do not add up.
  d.check = core::load_check_input(p, decl);
  d.result = geo::run_crosscheck(d.check.input);
  step(1);

  d.file = fs::path(args[0]).filename().string();
  d.generated = utc_now("%Y-%m-%d %H:%M UTC");
  d.net = net;
  d.info = p.info();
  d.people = store::list_people(p);
  d.units = store::list_units(p);
  d.contacts = store::list_contacts(p);
  d.stations = store::list_stations(p);
  for (const auto& st : d.stations) d.lat_sum += st.lat, d.lon_sum += st.lon, ++d.positions;
  step(d.stations.size());
  // The readings kept as the report needs them and the points only counted,
  // one record at a time (storage/each.h): whole records of a season took
  // most of the report's memory.
  {
    const ReportIndexer ix(d);
    auto tick = [&](size_t& n) {
      if (++n % 4096 == 0) step(4096);
    };
    size_t n = 0;
    store::for_each_plane(p, {}, [&](const store::PlanarReading& r) { d.planes.push_back(ix.plane(r)), tick(n); });
    store::for_each_line(p, {}, [&](const store::LinearReading& r) { d.lines.push_back(ix.line(r)), tick(n); });
    store::for_each_point(p, {}, [&](const store::ContactPoint& r) { ReportIndexer::count(d, r), tick(n); });
    step(n % 4096);
  }

  if (model) {
    try {
      d.declination = summarise_declination(*model, d);
    } catch (const std::exception& e) {
      d.declination_problem = e.what();
    }
  }
  if (const auto t = store::terrain_info(p); t && t->epsg == formats::utm_epsg(d.check.zone)) {
    d.terrain = store::load_terrain(p);
    d.terrain_sigma = t->vertical_accuracy;
  }

  for (const auto& ph : store::list_photos(p)) {
    ReportPhoto rp{ph, "", "", true};
    if (const auto t = core::load_thumbnail(args[0], ph)) {
      rp.thumbnail_jpeg = formats::encode_jpeg(t->picture, 75);
      rp.content_matches = t->content_matches;
    } else {
      rp.problem = t.error();
    }
    d.photos.push_back(std::move(rp));
  }
  d.track_day = plot::newest_track_day(p);
  d.tracks = plot::day_track_paths(p, d.check.zone, d.track_day);

  // Written into the temporary file as it is made, then moved into place.
  formats::replace_file_atomically(*output, [&](const std::string& tmp) {
    std::ofstream f(tmp, std::ios::binary | std::ios::trunc);
    if (!f) throw std::runtime_error("cannot open it for writing");
    write_report_html(f, d);
    f.close();
    if (!f) throw std::runtime_error("the write failed (is the disk full?)");
  });
  line.finish(done + 1, total);
  out << "wrote " << *output << ": " << d.stations.size() << " stations, " << d.result.fits.size() << " contacts, "
      << d.result.flags.size() << " flags\n";
  return 0;
}

Runner define(CLI::App& app) {
  auto a = std::make_shared<ReportArgs>();
  positional(app, "FILE", a->file, "the project file");
  option(app, "-o,--output", a->output, "the HTML file to write (required)")->required();
  flag(app, "--progress", a->show_progress,
       "a progress line on stderr past 2 s even when stderr is not a terminal (CAIRN_PROGRESS_AFTER=SECONDS "
       "changes the 2 s)");
  choice(app, "--net", a->net, {"equal-area", "equal-angle"}, "the stereonet projection (default: equal-area)");
  return [a](std::ostream& out, std::ostream& err) { return run_report(*a, out, err); };
}

}  // namespace

CAIRN_COMMAND(Command{
    "report", "write the evening report: one self-contained HTML file with summary, flags, plan and nets", define});

}  // namespace cairn::cli
