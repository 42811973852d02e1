// Source: the entry point LLVMFuzzerTestOneInput as the LLVM libFuzzer documentation
// defines it; the check is that no input crashes, hangs or trips a sanitizer
// (common practice for fuzz targets).
// Shared by the libFuzzer targets (tests/fuzz/README.md): a scratch project
// with a small legend, kept in memory-backed storage when there is one, and a
// way to undo everything a target wrote so every input starts from the same file.
#pragma once
#include <unistd.h>

#include <cstdlib>
#include <filesystem>
#include <memory>
#include <stdexcept>
#include <string>

#include "storage/import.h"
#include "storage/project.h"

namespace cairn::fuzz {

// Thrown inside Project::write to roll back what the input wrote.
struct Undo {};

inline std::string scratch_dir() {
  const char* base = std::filesystem::exists("/dev/shm") ? "/dev/shm" : nullptr;
  std::string tmpl =
      (base ? std::filesystem::path(base) : std::filesystem::temp_directory_path()) / "cairn-fuzz-XXXXXX";
  if (!mkdtemp(tmpl.data())) std::abort();
  return tmpl;
}

// A project with units Pgs and Qm, contact Pgs-Qm, station S1 and planar reading f1.
inline store::Project& scratch_project() {
  static std::unique_ptr<store::Project> p;
  if (p) return *p;
  const std::string dir = scratch_dir();
  store::OpenOptions o;
  o.backups = false;
  p = std::make_unique<store::Project>(
      store::Project::create(dir + "/fuzz.cairn", store::NewProject{"fuzz", "33N", store::North::True, 2.5}, o));
  const struct {
    store::ImportKind kind;
    const char* csv;
  } legend[] = {
      {store::ImportKind::Units, "unit,name,age_rank\nPgs,grey schist,1\nQm,pale marble,2\n"},
      {store::ImportKind::Contacts, "contact,lower_unit,upper_unit,type\nPgs-Qm,Pgs,Qm,depositional\n"},
      {store::ImportKind::Stations, "station,lat,lon,elevation\nS1,46.5,14.25,1200\n"},
      {store::ImportKind::Planes, "station,kind,strike,dip,ref\nS1,fault,090,30,f1\n"},
  };
  for (const auto& l : legend)
    if (!store::import_csv(*p, l.kind, l.csv, "legend.csv").ok()) std::abort();
  return *p;
}

// Runs F in a transaction of P that is always rolled back.
template <class F>
void undone(store::Project& p, F&& f) {
  try {
    p.write([&] {
      f();
      throw Undo{};
    });
  } catch (const Undo&) {}
}

}  // namespace cairn::fuzz
