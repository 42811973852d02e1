// Reading pad: a big keypad for strike/dip, dip direction/dip or quadrant
// notation (and trend/plunge or rake for lines), kind chips, quality, facing,
// north reference, the text parsed as it is typed with the exact error when it
// is invalid, and instant feedback: a small net with the reading and its
// contact's fitted plane, and the misfit with its verdict.
#include <algorithm>
#include <cmath>

#include "app/plot/net_scene.h"
#include "app/ui/imgui_canvas.h"
#include "app/ui/screens.h"
#include "app/ui/text_util.h"
#include "app/ui/widgets.h"
#include "geomath/notation.h"
#include "storage/pick_lists.h"
#include "storage/repository.h"

namespace cairn::ui {

namespace {

const std::vector<std::string> kPlaneKinds{"bedding", "foliation", "cleavage", "joint",
                                           "fault",   "vein",      "contact",  "slope"};
const std::vector<std::string> kLineKinds{"lineation", "fold_axis", "slickenline", "intersection"};

std::string kind_label(const std::string& k) {
  std::string s = k;
  std::replace(s.begin(), s.end(), '_', ' ');
  return s;
}

// What the typed text means, or why it means nothing.
struct Parsed {
  std::optional<geo::Plane> plane;  // as measured (north as chosen)
  std::optional<geo::Line> line;
  std::string error;
  std::string meaning;
};

Parsed parse(const PadState& pad, const Model& m) {
  Parsed r;
  if (pad.text.empty()) return r;
  if (!pad.linear) {
    const auto conv = pad.notation == 0   ? geo::PlaneConvention::StrikeDipRHR
                      : pad.notation == 1 ? geo::PlaneConvention::DipDirectionDip
                                          : geo::PlaneConvention::Unspecified;
    auto p = geo::parse_plane(pad.text, conv);
    if (!p) {
      r.error = p.error();
      return r;
    }
    r.plane = *p;
    r.meaning = "strike " + geo::format_strike_dip(*p) + " (right-hand rule), dip direction " +
                geo::format_decimal("%03.0f", p->dip_direction()) + ", " + geo::format_quadrant(*p);
  } else if (pad.notation == 1) {
    const store::PlanarReading* host = m.plane(pad.host_plane);
    if (!host) {
      r.error = "a rake is measured on a plane: choose the host plane below";
      return r;
    }
    auto l = geo::parse_rake(pad.text, geo::Plane{host->strike, host->dip});
    if (!l) {
      r.error = l.error();
      return r;
    }
    r.line = *l;
    r.meaning =
        "trend/plunge " + geo::format_trend_plunge(*l) + " on " + geo::format_strike_dip({host->strike, host->dip});
  } else {
    auto l = geo::parse_line(pad.text);
    if (!l) {
      r.error = l.error();
      return r;
    }
    r.line = *l;
    r.meaning =
        "trend " + geo::format_decimal("%03.0f", l->trend) + ", plunge " + geo::format_decimal("%.0f", l->plunge);
  }
  return r;
}

// ---- the steps of the Reading pad -------------------------------------------------

// The declination added to a magnetic reading at this station today (0 for a
// true-north reading and for a rake, which is measured on its host plane).
struct Declination {
  double degrees = 0;
  std::string note;  // shown under the north reference ("" = none)
};

Declination pad_declination(Model& m, const PadState& pad, const store::Station& st, store::North north) {
  Declination d;
  if (north != store::North::Magnetic || (pad.linear && pad.notation == 1)) return d;
  try {
    const auto v = m.project().declination_at(st.lat, st.lon, "");
    d.degrees = v.degrees;
    d.note = "declination " + geo::format_decimal("%.1f\xC2\xB0", std::abs(v.degrees)) +
             (v.degrees >= 0 ? " E" : " W") + " (" + v.source + ") will be added";
  } catch (const std::exception& e) {
    d.note = e.what();
  }
  return d;
}

// The heading, the notation chips, the text as typed (large) and what it means.
void pad_typed(App& a, const store::Station& st, const Parsed& parsed) {
  Look& lk = look();
  PadState& pad = a.pad;
  heading("Station " + st.code + ": new " + (pad.linear ? "linear" : "planar") + " reading");
  {
    std::vector<std::string> labels =
        pad.linear ? std::vector<std::string>{"trend/plunge", "rake"}
                   : std::vector<std::string>{"strike/dip (RHR)", "dip direction/dip", "quadrant"};
    ImGui::PushID("notation");
    const int hit = chip_row(labels, pad.notation);
    ImGui::PopID();
    if (hit >= 0) pad.notation = hit;
  }
  const ImVec2 p = ImGui::GetCursorScreenPos();
  const float w = ImGui::GetContentRegionAvail().x, h = lk.m.tap * 1.3f;
  ImDrawList* dl = ImGui::GetWindowDrawList();
  dl->AddRectFilled(p, ImVec2(p.x + w, p.y + h), lk.pal.panel, 4);
  dl->AddRect(p, ImVec2(p.x + w, p.y + h), parsed.error.empty() ? lk.pal.border : lk.pal.error, 4, 0, 3);
  ImGui::PushFont(lk.fonts.big);
  // A long text shows its end, where the typing happens.
  std::string shown = pad.text + "\xE2\x96\x8F";
  while (shown.size() > 4 && ImGui::CalcTextSize(shown.c_str()).x > w - 2 * lk.m.gap) {
    shown.erase(0, 1);
    while (!shown.empty() && (static_cast<unsigned char>(shown[0]) & 0xC0) == 0x80) shown.erase(0, 1);
  }
  dl->AddText(ImVec2(p.x + lk.m.gap, p.y + (h - ImGui::GetFontSize()) / 2), lk.pal.text, shown.c_str());
  ImGui::PopFont();
  ImGui::Dummy(ImVec2(w, h));
  this_frame().texts.push_back("typed: " + pad.text);
  if (!parsed.error.empty())
    error_box(parsed.error);
  else if (!parsed.meaning.empty())
    text_wrapped(parsed.meaning);
  else
    text_dim(pad.linear ? (pad.notation == 0 ? "Type trend/plunge, e.g. 120/35" : "Type the rake, e.g. 40 or 40NE")
             : pad.notation == 0 ? "Type strike/dip by the right-hand rule, e.g. 030/40"
             : pad.notation == 1 ? "Type dip direction/dip, e.g. 120/40"
                                 : "Type quadrant notation, e.g. N30E 40SE");
}

// The keypad, four keys a row across the column; a key tapped edits the text.
void pad_keys(App& a) {
  Look& lk = look();
  PadState& pad = a.pad;
  const float kw = (ImGui::GetContentRegionAvail().x - ImGui::GetStyle().ItemSpacing.x * 3) / 4;
  const std::string key = keypad(
      {"7",     "8", "9", "N", "4", "5", "6", "S", "1", "2", "3", "E", ".", "0", "/", "W", "space", "\xE2\x8C\xAB",
       "Clear", ""},
      4, kw, lk.m.tap);
  if (key == "\xE2\x8C\xAB") {
    if (!pad.text.empty()) pad.text.pop_back();
  } else if (key == "Clear") {
    pad.text.clear();
  } else if (key == "space") {
    if (!pad.text.empty() && pad.text.back() != ' ') pad.text += ' ';
  } else if (!key.empty()) {
    pad.text += key;
  }
  if (!key.empty()) {
    pad.error.clear();
    pad.status.clear();
  }
}

// Writes the typed planar reading (an audited insert); pad.status or pad.error says how it went.
void record_planar(App& a, const store::Station& st, store::North north) {
  Model& m = *a.model;
  PadState& pad = a.pad;
  store::PlanarReading r;
  r.station = st.meta.uuid;
  r.kind = store::parse_plane_kind(pad.kind).value_or(store::PlaneKind::Bedding);
  r.typed = pad.text;
  r.notation = pad.notation == 0   ? store::PlaneNotation::StrikeDip
               : pad.notation == 1 ? store::PlaneNotation::DipDirectionDip
                                   : store::PlaneNotation::Text;
  r.north = north;
  if (pad.quality > 0) r.quality = pad.quality;
  r.facing = pad.facing;
  r.contact = pad.contact;
  r.ref = m.next_ref(st.meta.uuid, false);
  r.time = now_local_iso();
  r.observer = a.person();
  std::string err;
  const std::string label = "reading " + r.ref + " " + pad.text + " at " + st.code;
  if (a.act(
          label, [&](store::Project& p) { store::add(p, r); }, &err)) {
    pad.status = "Recorded " + r.ref + ": " + geo::format_strike_dip({r.strike, r.dip}) + " " + kind_label(pad.kind);
    pad.text.clear();
  } else {
    pad.error = err;
  }
}

// The same for a linear reading (trend/plunge, or a rake on its host plane).
void record_linear(App& a, const store::Station& st, store::North north) {
  Model& m = *a.model;
  PadState& pad = a.pad;
  store::LinearReading r;
  r.station = st.meta.uuid;
  r.kind = store::parse_line_kind(pad.kind).value_or(store::LineKind::Lineation);
  r.typed = pad.text;
  r.north = north;
  if (pad.notation == 1) {
    r.host_plane = pad.host_plane;
    r.rake = 0;  // storage reads the rake from `typed`
  }
  r.ref = m.next_ref(st.meta.uuid, true);
  r.time = now_local_iso();
  r.observer = a.person();
  std::string err;
  const std::string label = "reading " + r.ref + " " + pad.text + " at " + st.code;
  if (a.act(
          label, [&](store::Project& p) { store::add(p, r); }, &err)) {
    pad.status =
        "Recorded " + r.ref + ": " + geo::format_trend_plunge({r.trend, r.plunge}) + " " + kind_label(pad.kind);
    pad.text.clear();
  } else {
    pad.error = err;
  }
}

// "Record reading" (nothing is written when the text is empty or invalid), its outcome, and the way back.
void pad_record(App& a, const store::Station& st, const Parsed& parsed, store::North north) {
  Look& lk = look();
  PadState& pad = a.pad;
  if (button("Record reading", -1, a.model->writable(), true)) {
    pad.status.clear();
    pad.error.clear();
    if (pad.text.empty())
      pad.error = "nothing typed: type the attitude on the keypad";
    else if (!parsed.error.empty())
      pad.error = parsed.error;
    else if (!pad.linear)
      record_planar(a, st, north);
    else
      record_linear(a, st, north);
  }
  if (!pad.error.empty()) error_box("Not recorded: " + pad.error);
  if (!pad.status.empty()) text_colour(lk.pal.ok, pad.status);
  if (button("Back to the Station sheet", -1)) a.go(Screen::Station);
}

// Plane or line, the kind, the contact, the north reference, quality and facing (or the host plane of a rake).
void pad_choices(App& a, const store::Station& st, store::North north, const Declination& decl) {
  Model& m = *a.model;
  PadState& pad = a.pad;
  {
    ImGui::PushID("type");
    const int hit = chip_row({"plane", "line"}, pad.linear ? 1 : 0);
    ImGui::PopID();
    if (hit >= 0 && (hit == 1) != pad.linear) {
      pad.linear = hit == 1;
      pad.kind = pad.linear ? kLineKinds[0] : kPlaneKinds[0];
      pad.notation = 0;
      pad.text.clear();
      pad.error.clear();
    }
  }
  {
    // The project's structure list decides the kinds offered (an empty list: all of them).
    std::vector<std::string> kinds;
    for (const auto& k : pad.linear ? kLineKinds : kPlaneKinds)
      if (store::allowed_by(m.structures(), k)) kinds.push_back(k);
    if (kinds.empty()) kinds = pad.linear ? kLineKinds : kPlaneKinds;  // the list names only the other type
    if (std::find(kinds.begin(), kinds.end(), pad.kind) == kinds.end()) pad.kind = kinds.front();
    std::vector<std::string> labels;
    int sel = 0;
    for (size_t i = 0; i < kinds.size(); ++i) {
      labels.push_back(kind_label(kinds[i]));
      if (kinds[i] == pad.kind) sel = static_cast<int>(i);
    }
    text_dim("Kind");
    ImGui::PushID("kind");
    const int hit = chip_row(labels, sel);
    ImGui::PopID();
    if (hit >= 0) pad.kind = kinds[static_cast<size_t>(hit)];
  }
  // The contact first: it decides the live check.
  if (!pad.linear) {
    text_dim("Contact");
    std::vector<std::string> contacts{"none"};
    int csel = 0;
    for (size_t i = 0; i < m.contacts().size(); ++i) {
      contacts.push_back(m.contacts()[i].name);
      if (m.contacts()[i].meta.uuid == pad.contact) csel = static_cast<int>(i) + 1;
    }
    ImGui::PushID("contact");
    const int c = chip_row(contacts, csel);
    ImGui::PopID();
    if (c >= 0) pad.contact = c == 0 ? "" : m.contacts()[static_cast<size_t>(c - 1)].meta.uuid;
  }
  {
    text_dim("North reference");
    ImGui::PushID("north");
    const int hit = chip_row({"true north", "magnetic north"}, north == store::North::Magnetic ? 1 : 0);
    ImGui::PopID();
    if (hit >= 0) pad.north = hit == 1 ? store::North::Magnetic : store::North::True;
  }
  if (!decl.note.empty()) text_dim(decl.note);
  if (!pad.linear) {
    text_dim("Quality");
    ImGui::PushID("quality");
    const int q = chip_row({"not stated", "1", "2", "3", "4", "5"}, pad.quality);
    ImGui::PopID();
    if (q >= 0) pad.quality = q;
    text_dim("Facing");
    ImGui::PushID("facing");
    const int f = chip_row({"unknown", "upright", "overturned"}, static_cast<int>(pad.facing));
    ImGui::PopID();
    if (f >= 0) pad.facing = static_cast<store::Facing>(f);
  } else if (pad.notation == 1) {
    text_dim("Host plane");
    std::vector<std::string> hosts;
    std::vector<std::string> ids;
    int hsel = -1;
    for (const auto* p : m.planes_of(st.meta.uuid)) {
      hosts.push_back((p->ref.empty() ? std::string() : p->ref + " ") + geo::format_strike_dip({p->strike, p->dip}));
      ids.push_back(p->meta.uuid);
      if (p->meta.uuid == pad.host_plane) hsel = static_cast<int>(ids.size()) - 1;
    }
    if (hosts.empty()) text_dim("This station has no planar reading to measure a rake on.");
    ImGui::PushID("host");
    const int h = chip_row(hosts, hsel);
    ImGui::PopID();
    if (h >= 0) pad.host_plane = ids[static_cast<size_t>(h)];
  }
}

// The live check: a small net with the reading (true north) and its contact's
// fitted plane, and the misfit with the verdict the cross-check would give.
void pad_live_check(App& a, const Parsed& parsed, double declination) {
  Model& m = *a.model;
  Look& lk = look();
  const PadState& pad = a.pad;
  std::optional<geo::Plane> reading_true;
  if (parsed.plane)
    reading_true = geo::Plane{std::fmod(parsed.plane->strike + declination + 360.0, 360.0), parsed.plane->dip};
  std::optional<geo::Line> line_true;
  if (parsed.line)
    line_true =
        geo::Line{pad.notation == 1 ? parsed.line->trend : std::fmod(parsed.line->trend + declination + 360.0, 360.0),
                  parsed.line->plunge};
  const geo::ContactFit* fit = pad.contact.empty() ? nullptr : m.fit_of(pad.contact);
  {
    plot::NetData d;
    plot::NetOptions o;
    o.planes = plot::PlaneDisplay::Both;
    o.legend = false;
    o.text_size = lk.m.font * 0.75;
    if (reading_true) d.planes.push_back({*reading_true, plot::kOkabeIto[5], plot::Shape::Circle, false});
    if (line_true) d.lines.push_back({*line_true, plot::kOkabeIto[5], plot::Shape::Triangle, false});
    if (fit) d.fits.push_back({*fit->plane, fit->fit->cone95, plot::kOkabeIto[6], fit->contact});
    const float size = std::min(ImGui::GetContentRegionAvail().x,
                                std::max(lk.m.tap * 4, ImGui::GetContentRegionAvail().y - lk.m.tap * 3.5f));
    const ImVec2 p = ImGui::GetCursorScreenPos();
    ImGuiCanvas canvas(ImGui::GetWindowDrawList(), lk.fonts.small, lk.theme);
    plot::draw_net(canvas, plot::Rect{p.x, p.y, size, size}, d, o);
    ImGui::Dummy(ImVec2(size, size));
    record_box("live net");
  }
  if (!pad.linear && pad.contact.empty()) {
    text_dim("Choose the contact this reading represents to compare it with the contact's fitted plane.");
  } else if (!pad.linear && !fit) {
    text_dim("This contact has no usable fit yet (it needs at least three mapped points).");
  } else if (fit && reading_true) {
    const geo::CheckOptions opts;
    const double misfit = geo::angle_between_planes(*reading_true, *fit->plane);
    const double tol = geo::comparison_tolerance(
        geo::reading_sigma(pad.quality > 0 ? std::optional<int>(pad.quality) : std::nullopt, opts), fit->fit->cone95,
        opts.confidence);
    const std::string head = "Misfit " + geo::format_decimal("%.1f\xC2\xB0", misfit) + " to " + fit->contact + " (" +
                             geo::format_strike_dip(*fit->plane) + ", tolerance " +
                             geo::format_decimal("%.1f\xC2\xB0", tol) + " at 99%)";
    if (misfit <= tol) {
      text_colour(lk.pal.ok, "\xE2\x9C\x93 agrees: " + head);
    } else {
      text_colour(lk.pal.error, "\xE2\x9C\x97 disagrees: " + head);
      const geo::Plane reversed{std::fmod(reading_true->strike + 180.0, 360.0), reading_true->dip};
      if (geo::angle_between_planes(reversed, *fit->plane) <= tol)
        text_wrapped("With the dip direction reversed it would agree: check the right-hand rule or the dip quadrant.");
      else
        text_wrapped("Check the reading (local structure, cross-bedding, a slumped block, or an error: re-measure).");
    }
  }
}

}  // namespace

void draw_pad(App& a) {
  if (!readings_ready(a)) return;
  Model& m = *a.model;
  Look& lk = look();
  const store::Station* st = m.station(a.station);
  if (!st) {
    text("Choose a station first: the Reading pad adds readings to the station open on the Station sheet.");
    if (button("Go to the Logbook", 0, true, true)) a.go(Screen::Logbook);
    return;
  }
  const store::North north = a.pad.north.value_or(m.info().north_default);
  const Declination decl = pad_declination(m, a.pad, *st, north);
  const Parsed parsed = parse(a.pad, m);

  // Wide screens: keypad | choices | live check; narrower: keypad | choices and
  // check; narrow (portrait): one scrolling column, everything in it.
  const float avail = ImGui::GetContentRegionAvail().x;
  const int columns = avail > lk.m.tap * 24 ? 3 : avail > lk.m.tap * 16 ? 2 : 1;
  const float left_w = columns == 3 ? avail * 0.37f : columns == 2 ? std::min(avail * 0.5f, lk.m.tap * 11.5f) : avail;
  const float mid_w = columns == 3 ? avail * 0.31f : 0;

  ImGui::BeginChild("padleft", ImVec2(left_w, 0), false);
  pad_typed(a, *st, parsed);
  pad_keys(a);
  pad_record(a, *st, parsed, north);
  if (columns == 1) {
    pad_choices(a, *st, north, decl);
    heading("Live check");
    pad_live_check(a, parse(a.pad, m), decl.degrees);
  }
  touch_scroll();
  ImGui::EndChild();
  if (columns == 1) return;

  ImGui::SameLine();
  ImGui::BeginChild("padright", ImVec2(mid_w, 0), false);
  pad_choices(a, *st, north, decl);
  if (columns == 3) {
    touch_scroll();
    ImGui::EndChild();
    ImGui::SameLine();
    ImGui::BeginChild("padcheck", ImVec2(0, 0), false);
    heading("Live check");
  }
  // Parsed again: a choice made this frame (notation, host plane) changes what the text means.
  pad_live_check(a, parse(a.pad, m), decl.degrees);
  touch_scroll();
  ImGui::EndChild();
}

}  // namespace cairn::ui
