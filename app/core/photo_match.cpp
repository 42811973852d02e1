#include "app/core/photo_match.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <map>

#include "formats/iso8601.h"
#include "geomath/track.h"

namespace cairn::core {

namespace {

using std::chrono::seconds;

// A time as seconds on one line: wall clock (`utc` false) or UTC.
struct Instant {
  double wall = 0;  // seconds since 1970-01-01T00:00 of the time as written
  std::optional<double> utc;
};

std::optional<Instant> instant(std::string_view text) {
  const auto t = formats::parse_iso8601(text);
  if (!t || !t->time_of_day) return std::nullopt;
  Instant i;
  const auto day = date::sys_days(t->day).time_since_epoch();
  i.wall = std::chrono::duration<double>(day + *t->time_of_day).count();
  if (t->utc_offset) i.utc = i.wall - std::chrono::duration<double>(*t->utc_offset).count();
  return i;
}

// B minus A in seconds (rule 1).
double difference(const Instant& a, const Instant& b) {
  if (a.utc && b.utc) return *b.utc - *a.utc;
  return b.wall - a.wall;
}

struct Visit {
  const MatchStation* s;
  Instant at;
};

}  // namespace

std::string duration_text(double s) {
  const long long v = std::llround(std::fabs(s));
  if (v < 60) return fmt::format("{} s", v);
  if (v < 3600) return fmt::format("{} min {:02d} s", v / 60, v % 60);
  return fmt::format("{} h {:02d} min", v / 3600, (v % 3600) / 60);
}

Result<seconds> parse_clock_offset(std::string_view t) {
  const auto bad = [&] {
    return Result<seconds>::failure("'" + std::string(t.substr(0, 40)) +
                                    "' is not a clock offset: write +hh:mm:ss or -hh:mm:ss, e.g. +00:02:10");
  };
  if (t.size() != 9 || (t[0] != '+' && t[0] != '-') || t[3] != ':' || t[6] != ':') return bad();
  int part[3];
  for (int k = 0; k < 3; ++k) {
    const char a = t[1 + 3 * k], b = t[2 + 3 * k];
    if (a < '0' || a > '9' || b < '0' || b > '9') return bad();
    part[k] = (a - '0') * 10 + (b - '0');
  }
  if (part[1] > 59 || part[2] > 59) return bad();
  const seconds s{part[0] * 3600 + part[1] * 60 + part[2]};
  return t[0] == '-' ? -s : s;
}

std::string clock_offset_text(seconds s) {
  const long long v = std::llabs(s.count());
  return fmt::format("{}{:02d}:{:02d}:{:02d}", s.count() < 0 ? '-' : '+', v / 3600, (v % 3600) / 60, v % 60);
}

Result<seconds> clock_offset_from(std::string_view exif_time, std::string_view shown) {
  const auto e = instant(exif_time);
  if (!e) return Result<seconds>::failure("the clock photo has no EXIF time (DateTimeOriginal)");
  const auto s = instant(shown);
  if (!s)
    return Result<seconds>::failure("--shown '" + std::string(shown.substr(0, 40)) +
                                    "' is not a date and time such as 2026-07-14T10:32:05");
  const double d = std::round(s->wall - e->wall);
  if (std::fabs(d) > 100.0 * 3600) return Result<seconds>::failure("the clock offset would be over 100 hours");
  return seconds{static_cast<long long>(d)};
}

std::vector<PhotoMatch> match_photos(const std::vector<MatchStation>& stations, const std::vector<MatchPhoto>& photos,
                                     const MatchRules& rules) {
  // Each person's stations with a time of day, in time order (rule 2).
  std::map<std::string, std::vector<Visit>> by_person;
  for (const auto& s : stations) {
    if (!rules.person.empty() && s.observer != rules.person) continue;
    if (const auto at = instant(s.time)) by_person[s.observer].push_back({&s, *at});
  }
  for (auto& [who, v] : by_person)
    std::stable_sort(v.begin(), v.end(), [](const Visit& a, const Visit& b) { return difference(b.at, a.at) < 0; });
  const double lead = static_cast<double>(rules.lead.count());
  const double gap = static_cast<double>(rules.max_gap.count());

  std::vector<PhotoMatch> out;
  for (const auto& ph : photos) {
    PhotoMatch m;
    const auto raw = instant(ph.time);
    if (!raw) {
      m.reason = "no EXIF time (DateTimeOriginal)";
      out.push_back(m);
      continue;
    }
    Instant at = *raw;
    const double off = static_cast<double>(rules.clock_offset.count());
    at.wall += off;
    if (at.utc) *at.utc += off;
    // The corrected time as text, in the form the photo's EXIF had.
    const auto fixed = formats::parse_iso8601(ph.time);
    {
      const auto ms = std::chrono::milliseconds(std::llround(at.wall * 1000));
      const auto day = date::floor<date::days>(date::sys_time<std::chrono::milliseconds>(ms));
      const date::hh_mm_ss<std::chrono::milliseconds> hms(date::sys_time<std::chrono::milliseconds>(ms) - day);
      m.time = date::format("%F", date::year_month_day(day)) +
               fmt::format("T{:02d}:{:02d}:{:02d}", hms.hours().count(), hms.minutes().count(), hms.seconds().count());
      if (fixed->utc_offset) {
        const long long o = fixed->utc_offset->count();
        m.time +=
            o == 0 ? "Z" : fmt::format("{}{:02d}:{:02d}", o < 0 ? '-' : '+', std::llabs(o) / 60, std::llabs(o) % 60);
      }
    }
    struct Candidate {
      const MatchStation* s;
      double after;
      std::optional<double> distance;
    };
    std::vector<Candidate> cands;
    double nearest_gap = -1;
    std::string nearest_code;
    for (const auto& [who, visits] : by_person) {
      for (size_t i = 0; i < visits.size(); ++i) {
        const double after = difference(visits[i].at, at);
        double end = gap;
        if (i + 1 < visits.size()) end = std::min(end, difference(visits[i].at, visits[i + 1].at));
        if (after >= -lead && after < std::max(end, 0.0)) {
          Candidate c{visits[i].s, after, std::nullopt};
          if (ph.lat && ph.lon) c.distance = geo::geodesic_distance(*ph.lat, *ph.lon, c.s->lat, c.s->lon);
          cands.push_back(c);
        } else if (nearest_gap < 0 || std::fabs(after) < nearest_gap) {
          nearest_gap = std::fabs(after);
          nearest_code = visits[i].s->code + (after < 0 ? " is " + duration_text(after) + " later"
                                                        : " is " + duration_text(after) + " earlier");
        }
      }
    }
    if (cands.empty()) {
      m.reason = by_person.empty() ? "no station of this person has a time of day"
                                   : "no station's time window holds " + m.time +
                                         (nearest_code.empty() ? "" : " (nearest: " + nearest_code + ")");
      out.push_back(m);
      continue;
    }
    const Candidate* pick = nullptr;
    if (ph.lat && ph.lon) {
      pick = &*std::min_element(cands.begin(), cands.end(),
                                [](const Candidate& a, const Candidate& b) { return *a.distance < *b.distance; });
      if (*pick->distance > rules.max_distance) {
        m.reason =
            fmt::format("the station in time, {}, is {:.0f} m from the photo's position, beyond the {:.0f} m limit",
                        pick->s->code, *pick->distance, rules.max_distance);
        out.push_back(m);
        continue;
      }
    } else if (cands.size() == 1) {
      pick = &cands.front();
    } else {
      std::string codes;
      for (const auto& c : cands) codes += (codes.empty() ? "" : ", ") + c.s->code;
      m.reason = "the photo has no GPS position to choose between " + codes;
      out.push_back(m);
      continue;
    }
    m.station = pick->s->uuid;
    m.code = pick->s->code;
    m.distance = pick->distance;
    m.seconds_after = pick->after;
    out.push_back(m);
  }
  return out;
}

}  // namespace cairn::core
