#include "app/ui/gps.h"
#include "geomath/decimal.h"

#include <cmath>
#include <cstdio>

#include <gps.h>

namespace cairn::ui {

namespace {

std::optional<double> finite(double v) {
  if (std::isfinite(v)) return v;
  return std::nullopt;
}

const char* status_name(int s) {
  switch (s) {
    case STATUS_DGPS_FIX: return "DGPS";
    case STATUS_RTK_FIX: return "RTK fixed";
    case STATUS_RTK_FLT: return "RTK float";
    case STATUS_DR: return "dead reckoning";
    case STATUS_GNSSDR: return "GNSS + dead reckoning";
    case STATUS_SIM: return "simulated";
    default: return nullptr;
  }
}

}  // namespace

std::string describe(const GpsFix& f) {
  if (!f.connected) return "no GPS" + (f.error.empty() ? std::string() : " (" + f.error + ")");
  if (f.mode < 2) return "GPS: no fix yet";
  if (f.age_s >= 10) return "GPS: fix lost";
  std::string s = f.mode >= 3 ? "3D fix" : "2D fix";
  if (const char* n = status_name(f.status)) s += std::string(" (") + n + ")";
  if (f.h_accuracy) s += geo::format_decimal(" \xC2\xB1%.0f m", *f.h_accuracy);
  if (f.satellites > 0) s += ", " + std::to_string(f.satellites) + " satellites";
  return s;
}

GpsClient::~GpsClient() { stop(); }

void GpsClient::start(const std::string& host, const std::string& port) {
  stop();
  stop_.store(false);
  thread_ = std::thread([this, host, port] { run(host, port); });
}

void GpsClient::stop() {
  stop_.store(true);
  if (thread_.joinable()) thread_.join();
}

GpsFix GpsClient::fix() const {
  std::lock_guard<std::mutex> l(mu_);
  GpsFix f = fix_;
  if (at_ != std::chrono::steady_clock::time_point{})
    f.age_s = std::chrono::duration<double>(std::chrono::steady_clock::now() - at_).count();
  return f;
}

void GpsClient::run(std::string host, std::string port) {
  while (!stop_.load()) {
    gps_data_t data{};
    if (gps_open(host.c_str(), port.c_str(), &data) != 0) {
      {
        std::lock_guard<std::mutex> l(mu_);
        fix_.connected = false;
        fix_.error = "gpsd not running at " + host + ":" + port;
      }
      ++updates_;
      for (int i = 0; i < 30 && !stop_.load(); ++i) std::this_thread::sleep_for(std::chrono::milliseconds(100));
      continue;
    }
    gps_stream(&data, WATCH_ENABLE | WATCH_JSON, nullptr);
    {
      std::lock_guard<std::mutex> l(mu_);
      fix_.connected = true;
      fix_.error.clear();
    }
    ++updates_;
    bool ok = true;
    while (ok && !stop_.load()) {
      if (!gps_waiting(&data, 250000)) continue;  // 0.25 s, so stop() is quick
      if (gps_read(&data, nullptr, 0) < 0) {
        ok = false;
        break;
      }
      if (!(data.set & MODE_SET) || data.fix.mode < MODE_2D) {
        if (data.set & MODE_SET) {
          std::lock_guard<std::mutex> l(mu_);
          fix_.mode = data.fix.mode;
        }
        continue;
      }
      if (!std::isfinite(data.fix.latitude) || !std::isfinite(data.fix.longitude)) continue;
      GpsFix f;
      f.connected = true;
      f.mode = data.fix.mode;
      f.status = data.fix.status;
      f.lat = data.fix.latitude;
      f.lon = data.fix.longitude;
      if (data.fix.mode >= MODE_3D) {
        f.altitude = finite(data.fix.altMSL);
        if (!f.altitude) f.altitude = finite(data.fix.altHAE);
      }
      const auto ex = finite(data.fix.epx), ey = finite(data.fix.epy);
      if (ex && ey)
        f.h_accuracy = std::max(*ex, *ey);
      else if (auto eh = finite(data.fix.eph))
        f.h_accuracy = *eh;
      if (f.altitude) f.v_accuracy = finite(data.fix.epv);
      f.satellites = data.satellites_used;
      {
        std::lock_guard<std::mutex> l(mu_);
        // A receiver's cycle can report the position (NMEA RMC) before the altitude
        // (GGA): within a 3D fix, keep the altitude of the previous report for up to
        // two seconds rather than forget it between two sentences.
        if (f.mode >= MODE_3D && !f.altitude && fix_.altitude && fix_.mode >= MODE_3D &&
            std::chrono::steady_clock::now() - at_ < std::chrono::seconds(2)) {
          f.altitude = fix_.altitude;
          f.v_accuracy = fix_.v_accuracy;
        }
        // A 3D fix whose altitude has not come yet is, for a station, a 2D fix.
        if (f.mode >= MODE_3D && !f.altitude) f.mode = MODE_2D;
        fix_ = f;
        at_ = std::chrono::steady_clock::now();
      }
      ++updates_;
    }
    gps_stream(&data, WATCH_DISABLE, nullptr);
    gps_close(&data);
    {
      std::lock_guard<std::mutex> l(mu_);
      fix_.connected = false;
      fix_.error = "lost gpsd";
    }
    ++updates_;
  }
}

}  // namespace cairn::ui
