// Live positions from gpsd (the GPS service daemon) through its client
// library libgps, read on a thread of their own. When gpsd does not run, or
// has no fix, the UI falls back to typed coordinates.
//
// Accuracy: gpsd's epx/epy/epv are the receiver's (or gpsd's own) error
// estimates in metres; gps.h says of them "try for 1-sigma if we can", so
// Cairn stores them as the 1-sigma accuracies its records ask for and shows
// them as "±" values. When gpsd gives no per-axis estimate (an NMEA receiver
// without GST sentences) its horizontal estimate eph is used, which gps.h calls
// "maybe 50%, maybe 95%": larger than a 1-sigma value, so such points weigh less
// in a fit rather than more.
#pragma once
#include <atomic>
#include <chrono>
#include <mutex>
#include <optional>
#include <string>
#include <thread>

namespace cairn::ui {

struct GpsFix {
  bool connected = false;  // talking to gpsd
  int mode = 0;            // 0 not seen, 1 no fix, 2 2D, 3 3D (gpsd's MODE_*)
  int status = 0;          // gpsd's STATUS_*: 1 GPS, 2 DGPS, 3 RTK fixed, 4 RTK float, ...
  double lat = 0, lon = 0;
  std::optional<double> altitude;    // metres above mean sea level (or the ellipsoid when gpsd gives no MSL)
  std::optional<double> h_accuracy;  // metres, larger of epx and epy (else eph)
  std::optional<double> v_accuracy;  // metres, epv
  int satellites = 0;                // used in the solution
  double age_s = 1e9;                // seconds since the fix arrived
  std::string error;                 // why there is no connection

  bool has_position() const { return connected && mode >= 2 && age_s < 10; }
};

// "3D fix (DGPS) ±3 m, 9 satellites", "no fix", "no GPS (gpsd not running)".
std::string describe(const GpsFix& f);

class GpsClient {
 public:
  ~GpsClient();
  // Connects to gpsd at host:port on a thread, reconnecting every few seconds.
  void start(const std::string& host, const std::string& port);
  void stop();
  bool running() const { return thread_.joinable(); }
  GpsFix fix() const;
  // Bumped on every new fix (the UI redraws when it changes).
  unsigned long updates() const { return updates_.load(); }

 private:
  void run(std::string host, std::string port);
  std::thread thread_;
  std::atomic<bool> stop_{false};
  std::atomic<unsigned long> updates_{0};
  mutable std::mutex mu_;
  GpsFix fix_;
  std::chrono::steady_clock::time_point at_{};
};

}  // namespace cairn::ui
