#include "geomath/contour.h"

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <unordered_map>

namespace cairn::geo {

namespace {

struct Segment {
  std::int64_t edge[2];  // ids of the cell edges its two ends lie on
  NetPoint pt[2];
};

}  // namespace

// Marching squares, then chaining the segments into lines; longer than a
// screen because both passes share the edge numbering set up at the top.
std::vector<NetPolyline> contour_lines(const ScalarGrid& g, double level) {
  std::vector<NetPolyline> out;
  if (g.nx < 2 || g.ny < 2 || g.values.size() != static_cast<std::size_t>(g.nx) * static_cast<std::size_t>(g.ny)) {
    return out;
  }
  // Edge ids: the horizontal edge from node (i, j) to (i+1, j) is 2 * node,
  // the vertical edge from (i, j) to (i, j+1) is 2 * node + 1.
  auto node = [&](int i, int j) { return static_cast<std::int64_t>(j) * g.nx + i; };
  auto crossing = [&](int ia, int ja, int ib, int jb) {
    const double va = g.at(ia, ja), vb = g.at(ib, jb);
    const double t = (level - va) / (vb - va);  // va and vb lie on opposite sides of level
    return NetPoint{g.x0 + (ia + t * (ib - ia)) * g.dx, g.y0 + (ja + t * (jb - ja)) * g.dy};
  };

  std::vector<Segment> segs;
  for (int j = 0; j + 1 < g.ny; ++j) {
    for (int i = 0; i + 1 < g.nx; ++i) {
      const double v00 = g.at(i, j), v10 = g.at(i + 1, j), v11 = g.at(i + 1, j + 1), v01 = g.at(i, j + 1);
      // A cell with a missing corner (NaN, e.g. a terrain's nodata) has no contour.
      if (std::isnan(v00) || std::isnan(v10) || std::isnan(v11) || std::isnan(v01)) continue;
      const bool a00 = v00 >= level, a10 = v10 >= level, a11 = v11 >= level, a01 = v01 >= level;
      // The four edges of the cell and whether the contour crosses each.
      struct Edge {
        bool crossed;
        std::int64_t id;
        int ia, ja, ib, jb;
      };
      const Edge bottom{a00 != a10, 2 * node(i, j), i, j, i + 1, j};
      const Edge right{a10 != a11, 2 * node(i + 1, j) + 1, i + 1, j, i + 1, j + 1};
      const Edge top{a01 != a11, 2 * node(i, j + 1), i, j + 1, i + 1, j + 1};
      const Edge left{a00 != a01, 2 * node(i, j) + 1, i, j, i, j + 1};
      auto add = [&](const Edge& e, const Edge& f) {
        segs.push_back(Segment{{e.id, f.id}, {crossing(e.ia, e.ja, e.ib, e.jb), crossing(f.ia, f.ja, f.ib, f.jb)}});
      };
      const int crossed = bottom.crossed + right.crossed + top.crossed + left.crossed;
      if (crossed == 2) {
        const Edge* ends[2];
        int k = 0;
        for (const Edge* e : {&bottom, &right, &top, &left}) {
          if (e->crossed) ends[k++] = e;
        }
        add(*ends[0], *ends[1]);
      } else if (crossed == 4) {
        // Saddle: diagonal corners agree. The centre value decides which pair joins.
        const bool centre = (v00 + v10 + v11 + v01) / 4.0 >= level;
        if (centre == a00) {
          add(bottom, right);  // cut off corner (i+1, j)
          add(top, left);      // cut off corner (i, j+1)
        } else {
          add(bottom, left);  // cut off corner (i, j)
          add(top, right);    // cut off corner (i+1, j+1)
        }
      }
    }
  }

  // Chain the segments through their shared edges (each edge point joins at most two).
  std::unordered_map<std::int64_t, std::vector<std::size_t>> at_edge;
  for (std::size_t s = 0; s < segs.size(); ++s) {
    at_edge[segs[s].edge[0]].push_back(s);
    at_edge[segs[s].edge[1]].push_back(s);
  }
  std::vector<bool> used(segs.size(), false);
  auto other_segment = [&](std::int64_t edge, std::size_t s) -> std::ptrdiff_t {
    for (std::size_t t : at_edge[edge]) {
      if (t != s && !used[t]) return static_cast<std::ptrdiff_t>(t);
    }
    return -1;
  };
  // Walk from segment s, entering through its end `from`, until the chain ends.
  auto walk = [&](std::size_t s, int from) {
    NetPolyline pl;
    pl.pts.push_back(segs[s].pt[from]);
    const std::int64_t start_edge = segs[s].edge[from];
    while (true) {
      used[s] = true;
      const int to = 1 - from;
      pl.pts.push_back(segs[s].pt[to]);
      const std::int64_t e = segs[s].edge[to];
      if (e == start_edge) break;  // closed loop
      const std::ptrdiff_t next = other_segment(e, s);
      if (next < 0) break;
      s = static_cast<std::size_t>(next);
      from = segs[s].edge[0] == e ? 0 : 1;
    }
    return pl;
  };
  // Open chains first (they start at an edge point with one segment: the grid border),
  // then the loops.
  for (std::size_t s = 0; s < segs.size(); ++s) {
    if (used[s]) continue;
    for (int end = 0; end < 2; ++end) {
      if (at_edge[segs[s].edge[end]].size() == 1) {
        out.push_back(walk(s, end));
        break;
      }
    }
  }
  for (std::size_t s = 0; s < segs.size(); ++s) {
    if (!used[s]) out.push_back(walk(s, 0));
  }
  return out;
}

std::vector<NetPolyline> clip_to_disk(const std::vector<NetPolyline>& lines, double radius) {
  std::vector<NetPolyline> out;
  const double r2 = radius * radius;
  for (const NetPolyline& in : lines) {
    if (in.pts.empty()) continue;
    NetPolyline cur;
    auto flush = [&] {
      if (cur.pts.size() >= 2) out.push_back(std::move(cur));
      cur = NetPolyline{};
    };
    if (in.pts.size() == 1) {
      const auto& p = in.pts[0];
      if (p[0] * p[0] + p[1] * p[1] <= r2) out.push_back(in);
      continue;
    }
    // A closed polyline that leaves the disk is walked from a point outside, so that
    // the piece running through its start and end comes out as one.
    std::vector<NetPoint> pts = in.pts;
    if (in.closed()) {
      pts.pop_back();
      for (std::size_t k = 0; k < pts.size(); ++k) {
        const auto& p = pts[k];
        if (p[0] * p[0] + p[1] * p[1] > r2) {
          std::rotate(pts.begin(), pts.begin() + static_cast<std::ptrdiff_t>(k), pts.end());
          break;
        }
      }
      pts.push_back(pts.front());
    }
    for (std::size_t k = 0; k + 1 < pts.size(); ++k) {
      const NetPoint p = pts[k], q = pts[k + 1];
      const double dx = q[0] - p[0], dy = q[1] - p[1];
      // |p + s (q - p)|^2 = radius^2:  a s^2 + b s + c = 0
      const double a = dx * dx + dy * dy, b = 2.0 * (p[0] * dx + p[1] * dy), c = p[0] * p[0] + p[1] * p[1] - r2;
      double lo, hi;
      if (a == 0.0) {
        if (c > 0.0) {
          flush();
          continue;
        }
        lo = 0.0, hi = 1.0;
      } else {
        const double disc = b * b - 4.0 * a * c;
        if (disc < 0.0) {
          flush();
          continue;
        }
        const double sq = std::sqrt(disc);
        lo = c <= 0.0 ? 0.0 : std::max(0.0, (-b - sq) / (2.0 * a));
        hi = std::min(1.0, (-b + sq) / (2.0 * a));
        if (c <= 0.0 && q[0] * q[0] + q[1] * q[1] <= r2) hi = 1.0;
        if (lo > hi) {
          flush();
          continue;
        }
      }
      auto at = [&](double s) { return NetPoint{p[0] + s * dx, p[1] + s * dy}; };
      if (lo > 0.0 || cur.pts.empty()) {
        flush();
        cur.pts.push_back(at(lo));
      }
      cur.pts.push_back(hi == 1.0 ? q : at(hi));
      if (hi < 1.0) flush();
    }
    flush();
  }
  return out;
}

}  // namespace cairn::geo
