// Cross-check engine throughput: N stations with a bedding reading each, spread over
// 20 contacts of 40 points, with slope faces at every tenth station and readings
// every few minutes (so the duplicate search has work to do). Prints wall-clock
// time per run for growing N, so the growth rate can be read off: the engine is
// meant to stay near O(N log N) (the nearby searches use a grid index).
//
//   build/bench/bench_crosscheck [MAX_READINGS]   (default 50000)
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <random>

#include "geomath/angles.h"
#include "geomath/crosscheck.h"

using namespace cairn::geo;

static CheckInput make_input(int n, std::mt19937_64& rng) {
  std::uniform_real_distribution<double> u(0, 1);
  std::normal_distribution<double> g(0, 1);
  CheckInput in;
  for (int c = 0; c < 20; ++c) {
    CheckContact cc;
    cc.uuid = "C" + std::to_string(c);
    cc.name = cc.uuid;
    cc.type = "depositional";
    const Plane p{u(rng) * 360, 10 + u(rng) * 60};
    const Vec3 nrm = plane_normal_up(p);
    const double e0 = (c % 5) * 4000.0, n0 = (c / 5) * 4000.0;
    for (int i = 0; i < 40; ++i) {
      const double e = e0 + u(rng) * 2000, nn = n0 + u(rng) * 2000;
      cc.points.push_back({e, nn, 1000 - (nrm.x() * (e - e0) + nrm.y() * (nn - n0)) / nrm.z() + g(rng) * 3, 2, 3});
    }
    in.contacts.push_back(cc);
  }
  for (int i = 0; i < n; ++i) {
    CheckStation s;
    s.uuid = "S" + std::to_string(i);
    s.code = s.uuid;
    s.e = u(rng) * 20000;
    s.n = u(rng) * 16000;
    s.z = 1000 + g(rng) * 50;
    in.stations.push_back(s);
    CheckPlane r;
    r.uuid = "R" + std::to_string(i);
    r.station = s.uuid;
    r.kind = "bedding";
    r.plane = Plane{u(rng) * 360, u(rng) * 80};
    r.contact = "C" + std::to_string(i % 20);
    r.time_minutes = i * 3.0;
    in.planes.push_back(r);
    if (i % 10 == 0) {
      CheckPlane f = r;
      f.uuid = "F" + std::to_string(i);
      f.kind = "slope";
      f.contact.clear();
      f.plane = Plane{u(rng) * 360, 40 + u(rng) * 40};
      in.planes.push_back(f);
    }
  }
  return in;
}

int main(int argc, char** argv) {
  const int max_n = argc > 1 ? std::atoi(argv[1]) : 50000;
  std::mt19937_64 rng(1);
  std::printf("%10s %12s %12s\n", "readings", "seconds", "us/reading");
  for (int n = 1000; n <= max_n; n *= 2) {
    const CheckInput in = make_input(n, rng);
    const auto t0 = std::chrono::steady_clock::now();
    const CheckReport rep = run_crosscheck(in);
    const double s = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
    std::printf("%10d %12.3f %12.2f   (%zu flags)\n", n, s, 1e6 * s / n, rep.flags.size());
  }
  return 0;
}
