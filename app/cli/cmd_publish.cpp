// `cairn publish FILE URL [--json]`: sends a project file to the survey store
// (app/survey/survey.h) in one transaction, by `cairn merge`'s rules:
// identical records skipped, newer versions replace older ones, records changed
// on both sides kept as conflicts on the server and listed here.
// Test hook: the environment variable CAIRN_PUBLISH_STALL=SECONDS makes the
// publish wait that long after writing every row and before COMMIT, printing
// "publish: about to commit" on stderr, so that a test can kill it there.
#include <unistd.h>

#include <cstdlib>
#include <ostream>
#include <stdexcept>

#include "app/cli/command.h"
#include "formats/json.h"
#include "app/cli/magnetic_source.h"
#include "app/survey/survey.h"

namespace cairn::cli {
namespace {

struct PublishArgs {
  std::string file, url;
  bool json = false;
};

int run(const PublishArgs& a, std::ostream& out, std::ostream& err) {
  const std::vector<std::string> args{a.file, a.url};
  const bool json = a.json;
  store::survey::PublishOptions o;
  o.check.local_declination = wmm_declination_or_warn(err);
  if (const char* stall = std::getenv("CAIRN_PUBLISH_STALL")) {
    const int seconds = std::atoi(stall);
    o.before_commit = [seconds, &err] {
      err << "publish: about to commit" << std::endl;
      sleep(static_cast<unsigned>(seconds));
    };
  }
  store::survey::PublishReport rep;
  try {
    rep = store::survey::publish(args[0], args[1], o);
  } catch (const store::survey::PublishRefused& e) {
    err << "cairn publish: " << e.what() << "\n";
    return 1;
  }
  if (json) {
    formats::JsonWriter j(out);
    j.begin_object();
    j.key("project").value(rep.project);
    j.key("project_uuid").value(rep.project_uuid);
    j.key("role").value(rep.role);
    j.key("changed").value(rep.changed);
    j.key("project_created").value(rep.project_created);
    j.key("tables").begin_object();
    for (const auto& [t, w] : rep.tables) {
      j.key(t).begin_object();
      j.key("written").value(w.written);
      j.key("removed").value(w.removed);
      j.end_object();
    }
    j.end_object();
    j.key("conflicts").begin_array();
    for (const auto& c : rep.merge.conflicts) {
      j.begin_object();
      j.key("id").value(c.id);
      j.key("table").value(c.table);
      j.key("record").value(c.record);
      j.key("label").value(c.label);
      j.end_object();
    }
    j.end_array();
    j.key("shared_codes").value(static_cast<int>(rep.merge.clashes.size()));
    j.key("fits").value(rep.fits);
    j.key("flags").value(rep.flags);
    j.key("warnings").begin_array();
    for (const auto& w : rep.merge.warnings) j.value(w);
    j.end_array();
    j.end_object();
    out << "\n";
    return 0;
  }
  out << "Published " << args[0] << " to project \"" << rep.project << "\" as role " << rep.role;
  if (!rep.changed) {
    out << ": nothing new, the store is unchanged\n";
    return 0;
  }
  out << (rep.project_created ? " (new project)" : "") << "\n";
  for (const auto& [t, w] : rep.tables)
    out << "  " << t << ": " << w.written << " written"
        << (w.removed ? ", " + std::to_string(w.removed) + " removed" : "") << "\n";
  out << "  latest check: " << rep.fits << " fitted contacts, " << rep.flags << " flags\n";
  if (!rep.merge.conflicts.empty()) {
    out << "\nConflicts (" << rep.merge.conflicts.size()
        << "): changed on two devices since they last shared the record. The newer version is current;\n"
           "the other is kept in the store (cairn.conflicts) for a person to decide.\n";
    for (const auto& c : rep.merge.conflicts) out << "  " << c.label << "  [" << c.table << " " << c.record << "]\n";
  }
  if (!rep.merge.clashes.empty())
    out << "\nShared codes: " << rep.merge.clashes.size() << " (both records kept; see cairn.key_clashes)\n";
  for (const auto& w : rep.merge.warnings) out << "warning: " << w << "\n";
  return 0;
}

Runner define(CLI::App& app) {
  auto a = std::make_shared<PublishArgs>();
  positional(app, "FILE", a->file, "the project file to publish");
  positional(app, "URL", a->url, "libpq connection URL of the survey store (no password in it)");
  flag(app, "--json", a->json, "print JSON");
  return [a](std::ostream& out, std::ostream& err) { return run(*a, out, err); };
}

}  // namespace

CAIRN_COMMAND(Command{"publish", "send a project file to the survey store, by merge's rules, in one transaction",
                      define});

}  // namespace cairn::cli
