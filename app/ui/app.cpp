#include "app/ui/app.h"

#include <algorithm>
#include <filesystem>
#include <cctype>
#include <chrono>
#include <cmath>
#include <ctime>
#include <iostream>
#include <thread>
#include <vector>

#include <SDL_opengl.h>
#include <backends/imgui_impl_opengl3.h>
#include <backends/imgui_impl_sdl.h>
#include <stb_image_write.h>

#include "app/cli/project_access.h"
#include "app/ui/screens.h"
#include "app/ui/script.h"
#include "app/ui/text_util.h"
#include "app/ui/widgets.h"
#include "formats/ids.h"
#include "storage/each.h"
#include "storage/repository.h"
#include "storage/schema.h"
#include "storage/track.h"

namespace cairn::ui {

namespace {

struct ScreenName {
  Screen screen;
  const char* key;
  const char* title;
};
const ScreenName kScreens[] = {
    {Screen::Open, "open", "Open"},
    {Screen::Logbook, "logbook", "Logbook"},
    {Screen::Station, "station", "Station sheet"},
    {Screen::Pad, "pad", "Reading pad"},
    {Screen::Net, "net", "Net"},
    {Screen::Plan, "plan", "Plan"},
    {Screen::Crosscheck, "crosscheck", "Crosscheck"},
    {Screen::Camp, "camp", "Camp"},
    {Screen::Review, "review", "Review"},
};

std::string lower(std::string s) {
  for (auto& c : s) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return s;
}

}  // namespace

const char* screen_title(Screen s) {
  for (const auto& n : kScreens)
    if (n.screen == s) return n.title;
  return "";
}

std::optional<Screen> parse_screen(const std::string& name) {
  const std::string l = lower(name);
  for (const auto& n : kScreens)
    if (l == n.key || l == lower(n.title)) return n.screen;
  if (l == "reading-pad" || l == "station-sheet") return l == "reading-pad" ? Screen::Pad : Screen::Station;
  return std::nullopt;
}

App::App(GuiOptions o) : opts(std::move(o)) {}

App::~App() { shutdown(); }

float App::frame_width() const { return ImGui::GetIO().DisplaySize.x; }
float App::frame_height() const { return ImGui::GetIO().DisplaySize.y; }

void App::go(Screen s) {
  screen = s;
  if (s == Screen::Pad) {
    pad.error.clear();
    pad.status.clear();
  }
}

void App::notify(const std::string& message) {
  toast_ = message;
  toast_until_ = ImGui::GetTime() + 6.0;
}

bool App::act(const std::string& label, const std::function<void(store::Project&)>& f, std::string* error) {
  std::string err;
  if (model->act(label, f, &err)) {
    notify("Saved: " + label);
    return true;
  }
  if (error)
    *error = err;
  else
    notify(err);
  return false;
}

bool App::reading_back() const {
  // Once reading back has failed nothing more is written this session (the
  // failure said so, and that notes left since were not saved).
  return model && read_again_failed_.empty() && (model->stale() || !notes_to_save_.empty());
}

void App::save_notes(const std::string& station_uuid, const std::string& notes) {
  if (!read_again_failed_.empty()) {
    notify("The notes were not saved: the records could not be read again after the last change (" +
           read_again_failed_ + "); open the project again");
    return;
  }
  notes_to_save_[station_uuid] = notes;
  save_waiting_notes();
}

// One station's waiting notes a frame, each on the station as it is now.
void App::save_waiting_notes() {
  if (notes_to_save_.empty() || !model || !model->writable()) return;
  const auto it = notes_to_save_.begin();
  const std::string uuid = it->first, notes = it->second;
  notes_to_save_.erase(it);
  const store::Station* s = model->station(uuid);
  if (!s || s->notes == notes) return;
  store::Station u = *s;
  u.notes = notes;
  act("notes of " + s->code, [&](store::Project& p) { store::update(p, u); });
}

void App::select_station(const std::string& uuid) {
  station = uuid;
  reading.clear();
  edit = StationEdit{};
  pad = PadState{};
}

void App::set_person(const std::string& uuid) {
  person_ = uuid;
  if (model) model->project().set_person(uuid);
}

void App::log_track() {
  if (!model || model->project().read_only() || !fix.has_position()) return;
  const geo::TrackFix f{static_cast<double>(SDL_GetTicks()) / 1000.0, fix.lat, fix.lon};
  if (!geo::keep_fix(track_last_, f)) return;
  track_last_ = f;  // also after a failure: no retry every frame
  try {
    store::add_track_point(model->project(),
                           {person_, formats::utc_now(), fix.lat, fix.lon, fix.altitude, fix.h_accuracy});
    ++track_logged_;
  } catch (const std::exception& e) {
    notify(std::string("The day track was not saved: ") + e.what());
  }
}

// The file is opened on two workers, so that the window shows at once and the
// stations soon after (draw_opening says what is being read):
//  - the loader opens it read-only, without the integrity check, and reads the
//    first part of the records (Records::read_first). The screens show them with
//    every control that writes off (the connection is read-only) until the
//    checked connection takes over (Model::checked);
//  - the job worker then opens it for writing, which runs SQLite's integrity
//    check (2.4 s for a season's 874 MB), and makes the session's backup, while
//    the loader reads the readings. A file that fails the check is read-only
//    with its problem said, as it would have been anyway. What is shown is read
//    defensively either way; nothing is written before the check.
// A file the loader cannot read so (an older schema, which the writable opening
// migrates first; a damaged file) is read by the job worker after its check.
bool App::open_project(const std::string& path, std::string* error) {
  if (jobs.busy()) {
    if (error) *error = "wait for " + jobs.name() + " to end";
    return false;
  }
  if (reading_back()) {  // notes waiting for it would be lost
    if (error) *error = "the last change is still being read back; open the project in a moment";
    return false;
  }
  track_last_.reset();
  opening_ = path;
  rest_read_ = false;
  checked_early_.reset();
  stale_since_ms_ = -1;
  read_again_failed_.clear();
  screen = Screen::Logbook;
  const bool from_command_line = path == opts.file && !model;
  // 0: the loader is reading the first part; 1: it has (its completion makes
  // the model); 2: it could not (the job worker reads it after its check).
  auto first = std::make_shared<std::atomic<int>>(0);
  const std::string name = std::filesystem::path(path).filename().string();
  const bool early = loader.start("Reading " + name, [this, path, first](JobProgress& pr) -> std::function<void()> {
    try {
      pr.set(0.1f, "reading stations");
      // Checked by the job worker's opening next, before anything is written.
      auto p = std::make_shared<store::Project>(open_for_worker(path));
      if (p->schema_version() != store::kSchemaVersion) throw std::runtime_error("an older schema");
      auto rec = Records::read_first(*p, [path] {
        store::Project q = open_for_worker(path);
        return store::readings_per_station(q);
      });
      first->store(1);
      return [this, path, p, rec] { first_part_read(path, std::move(*p), rec); };
    } catch (const std::exception&) {
      first->store(2);  // not said: the job worker's opening says why, or reads it
      return [] {};
    }
  });
  if (!early) first->store(2);
  jobs.start("Opening " + name, [this, path, first, from_command_line](JobProgress& pr) -> std::function<void()> {
    try {
      // The first part is read first: on two cores, with the UI drawing, the
      // check beside it made it take twice as long (1.5 s for a season).
      while (first->load() == 0) std::this_thread::sleep_for(std::chrono::milliseconds(5));
      pr.set(0.02f, "checking the file before it can be changed");
      store::OpenOptions oo = cli::cli_open_options(false);
      oo.rolling_backups = false;  // made on the job worker (keep_backup)
      auto p = std::make_shared<store::Project>(store::Project::open(path, oo));
      // The session's backup, of the file as it is before anything can be
      // changed, made here on the worker: on the first change it would have
      // held that frame for as long as copying the file takes (1.4 s for a
      // season's). Identical to the newest backup, it is not kept twice. If it
      // fails, the top bar says so until a backup is made, and the first change
      // tries again, as without this.
      if (!p->read_only() && oo.backups) {
        pr.set(0.5f, "keeping a backup before the first change");
        try {
          p->backup_now();
        } catch (const std::exception& e) {
          p->backup_failed(e.what());
        }
      }
      std::shared_ptr<const Records> rec;
      if (first->load() == 2) {
        pr.set(0.6f, "reading stations");
        rec = Records::read_first(*p);
      }
      return [this, path, p, rec] { opened(path, std::move(*p), rec); };
    } catch (const std::exception& e) {
      const std::string why = e.what();
      return [this, why, path, from_command_line] {
        opening_.clear();
        checked_early_.reset();
        if (model && model->path() == path && model->checking()) model.reset();  // shown before the check
        if (from_command_line) {  // as before the window: `cairn gui FILE` ends, saying why
          std::cerr << "cairn gui: " << why << "\n";
          exit_code_ = 1;
          quit_ = true;
        }
        open_error = why;
        screen = Screen::Open;
      };
    }
  });
  return true;
}

// The loader's first part, read while the file's check runs: shown at once.
void App::first_part_read(const std::string& path, store::Project p, std::shared_ptr<const Records> rec) {
  if (opening_ != path) return;  // the opening failed meanwhile
  model = std::make_unique<Model>(std::move(p), std::move(rec), true);
  showing();
  if (checked_early_) {  // the check ended first
    model->checked(std::move(*checked_early_));
    checked_early_.reset();
    file_checked();
  }
}

// The job worker's end: the checked connection, with the first part when the
// loader could not read it (else nullptr).
void App::opened(const std::string& path, store::Project p, std::shared_ptr<const Records> rec) {
  if (rec) {
    model = std::make_unique<Model>(std::move(p), std::move(rec));
    showing();
    file_checked();
  } else if (model && model->path() == path && model->checking()) {
    model->checked(std::move(p));
    file_checked();
  } else {
    checked_early_ = std::move(p);  // the loader's completion has not run yet
  }
}

// A new model is on screen: its readings are read next, and what the command
// line chose is selected.
void App::showing() {
  read_the_rest();
  if (first_records_ms_ < 0) first_records_ms_ = ms_since_start();
  if (!opts.person.empty())
    if (auto who = store::find_person(model->project(), opts.person)) set_person(who->meta.uuid);
  if (!opts.station.empty())
    if (auto s = store::find_station(model->project(), opts.station)) select_station(s->meta.uuid);
}

// The model's connection is the checked one: what it found is said, the person
// is set on it and the cross-check starts (not before, so that it never reads
// a file whose check has not ended, nor competes with the check for the cores).
void App::file_checked() {
  if (file_checked_ms_ < 0) file_checked_ms_ = ms_since_start();
  if (!model->project().problem().empty()) notify(model->project().problem());
  if (!person_.empty()) model->project().set_person(person_);
  request_check();
  end_opening();
}

// The opening ends when the readings are read (or could not be) and the file checked.
void App::end_opening() {
  if (rest_read_ && model && !model->checking()) opening_.clear();
}

double App::ms_since_start() const {
  return std::chrono::duration<double, std::milli>(std::chrono::steady_clock::now() - made_).count();
}

// The second part of an opening: the readings and contact points, read
// through a connection of the loader's own while the first screen shows
// (Records::read_first gave it the stations).
void App::read_the_rest() {
  rest_wanted_ = false;
  if (model->complete()) {
    rest_read_ = true;
    end_opening();
    return;
  }
  const std::string path = model->path();
  const std::uint64_t rev = model->revision();
  const bool started =
      loader.start("Loading the readings", [this, path, rev](JobProgress& pr) -> std::function<void()> {
        try {
          store::Project p = open_for_worker(path);
          auto rec = Records::read(p, [&](float f, const std::string& what) { pr.set(f, what); });
          return [this, rec, rev, path] {
            if (model) model->completed(rec, rev);
            if (opening_ == path) rest_read_ = true;
            end_opening();
          };
        } catch (const std::exception& e) {
          const std::string why = e.what();
          return [this, why, path] {
            if (opening_ == path) rest_read_ = true;
            notify("The readings of " + path + " could not be loaded: " + why);
            end_opening();
          };
        }
      });
  // The loader is still reading for a project opened before: asked again once it is free.
  rest_wanted_ = !started;
}

// After a change: the records read again on the loader, through a read-only
// connection of its own, while the screens show the last ones (no frame waits
// for a season's records); Model::refreshed takes them if no change came since.
void App::read_again() {
  const std::string path = model->path();
  const std::uint64_t changes = model->changes();
  if (stale_since_ms_ < 0) stale_since_ms_ = ms_since_start();
  loader.start("Reading the records again", [this, path, changes](JobProgress& pr) -> std::function<void()> {
    try {
      store::Project p = open_for_worker(path);
      auto rec = Records::read(p, [&](float f, const std::string& what) { pr.set(f, what); });
      return [this, rec, changes, path] {
        if (!model || model->path() != path) return;
        model->refreshed(rec, changes);
        if (!model->stale()) stale_since_ms_ = -1;
      };
    } catch (const std::exception& e) {
      const std::string why = e.what();
      return [this, why, path] {
        // The change is in the file; only reading it back failed. The screens
        // keep the last records, and nothing more can be written this session.
        if (model && model->path() == path) read_again_failed_ = why;
        notify("The records of " + path + " could not be read again after the change: " + why +
               "; it is saved, but nothing more can be changed until the project is opened again" +
               (notes_to_save_.empty() ? std::string() : " (the notes left since were not saved)"));
      };
    }
  });
}

// The rolling backup (storage/project.h): after a change that comes
// backup_interval_s or more after the last backup, a copy of the file as
// committed, made on the job worker through a read-only connection of its own
// (SQLite's backup API copies one consistent state), not in the frame that
// saved the change (a season's file takes over a second to copy).
void App::keep_backup() {
  if (!model) return;
  if (model->changes() != backup_seen_changes_) {
    backup_seen_changes_ = model->changes();
    if (!model->project().read_only() && model->project().backup_due()) backup_wanted_ = true;
  }
  if (!backup_wanted_ || jobs.busy()) return;
  backup_wanted_ = false;
  const std::string path = model->path();
  jobs.start("Keeping a backup of " + std::filesystem::path(path).filename().string(),
             [this, path](JobProgress& pr) -> std::function<void()> {
               std::string error;
               try {
                 pr.set(0.1f, "copying the file");
                 store::Project p = open_for_worker(path);
                 p.backup_now();
               } catch (const std::exception& e) {
                 error = e.what();
               }
               return [this, path, error] {
                 if (!model || model->path() != path) return;
                 model->project().backup_made();  // failed or not: tried again after the interval
                 if (!error.empty()) model->project().backup_failed(error);  // said in the top bar
               };
             });
}

void App::request_check() {
  if (!model || model->checking() || checker.busy() || model->check_is_current()) return;
  if (model->check() && !model->check()->error.empty() && model->check()->revision == model->revision()) return;
  const std::string path = model->path();
  const std::uint64_t rev = model->revision();
  checker.start("Checking readings against contact fits", [this, path, rev](JobProgress& pr) {
    auto r = std::make_shared<CheckResult>(
        run_check_on_file(path, rev, [&](float f, const std::string& s) { pr.set(f, s); }));
    // The model it was started for may have been replaced by another opening since.
    return std::function<void()>([this, path, r] {
      if (model && model->path() == path) model->set_check(r);
    });
  });
}

void App::poll_derived() {
  logbook.rows.poll();
  net.build.poll();
  plan.layers.poll();
  plan.drawing.poll();
  cross.list.poll();
}

bool App::derived_current() const {
  return logbook.rows.current() && net.build.current() && plan.layers.current() && plan.drawing.current() &&
         cross.list.current();
}

bool App::idle() const {
  if (jobs.busy() || loader.busy() || checker.busy() || !derived_current()) return false;
  if (reading_back()) return false;
  return !model || model->check_is_current() || (model->check() && !model->check()->error.empty());
}

// Longer than a screen: SDL, the window, OpenGL and Dear ImGui come up in this
// order, and each step needs the one before it (the density sets the sizes the
// window and the fonts are made with).
bool App::init(std::string* error) {
  mark_ui_thread();
  SDL_SetHint(SDL_HINT_VIDEO_X11_NET_WM_BYPASS_COMPOSITOR, "0");
  if (SDL_Init(SDL_INIT_VIDEO | SDL_INIT_TIMER) != 0) {
    *error = std::string(
                 "cannot open the display (on Linux DISPLAY or WAYLAND_DISPLAY must name one; "
                 "use xvfb-run for pictures and tests): ") +
             SDL_GetError();
    return false;
  }
  SDL_GL_SetAttribute(SDL_GL_DOUBLEBUFFER, 1);
  SDL_GL_SetAttribute(SDL_GL_DEPTH_SIZE, 0);
  SDL_GL_SetAttribute(SDL_GL_STENCIL_SIZE, 8);

  // The display's density sets the tap size; X servers that do not know the
  // screen's size report nonsense, so anything outside 50..1000 dpi means 96.
  double dpi = opts.dpi;
  float ddpi = 0, hdpi = 0, vdpi = 0;
  if (dpi <= 0 && SDL_GetDisplayDPI(0, &ddpi, &hdpi, &vdpi) == 0) dpi = hdpi > 0 ? hdpi : ddpi;
  if (!(dpi >= 50 && dpi <= 1000)) dpi = 96;

  SDL_DisplayMode dm{};
  SDL_GetDesktopDisplayMode(0, &dm);
  const bool automatic = opts.screenshot.empty() && opts.script.empty();
  // Tablet-sized: a touch screen of at most 13.5 inches across (common tablet
  // sizes run 8 to 13 inches; no published source).
  const double diagonal_in = dm.w > 0 ? std::hypot(dm.w, dm.h) / dpi : 99;
  const bool tablet = SDL_GetNumTouchDevices() > 0 && diagonal_in <= 13.5;
  const bool full = opts.fullscreen || (automatic && !opts.windowed && tablet);
  int w = opts.width, h = opts.height;
  if (w <= 0 || h <= 0) {
    w = dm.w > 0 ? std::min(1280, dm.w * 9 / 10) : 1280;
    h = dm.h > 0 ? std::min(800, dm.h * 9 / 10) : 800;
  }
  Uint32 flags = SDL_WINDOW_OPENGL | SDL_WINDOW_RESIZABLE | SDL_WINDOW_ALLOW_HIGHDPI;
  if (full) flags |= SDL_WINDOW_FULLSCREEN_DESKTOP;
  window_ = SDL_CreateWindow("Cairn", SDL_WINDOWPOS_CENTERED, SDL_WINDOWPOS_CENTERED, w, h, flags);
  if (!window_) {
    *error = std::string("cannot open a window: ") + SDL_GetError();
    return false;
  }
  // OpenGL 3.2 core first: from 3.2 Dear ImGui's renderer can draw lists of more
  // than 65 536 vertices (glDrawElementsBaseVertex), which a net of 50 000 poles
  // needs; else 3.0.
  const char* glsl = "#version 150";
  SDL_GL_SetAttribute(SDL_GL_CONTEXT_FLAGS, SDL_GL_CONTEXT_FORWARD_COMPATIBLE_FLAG);
  SDL_GL_SetAttribute(SDL_GL_CONTEXT_PROFILE_MASK, SDL_GL_CONTEXT_PROFILE_CORE);
  SDL_GL_SetAttribute(SDL_GL_CONTEXT_MAJOR_VERSION, 3);
  SDL_GL_SetAttribute(SDL_GL_CONTEXT_MINOR_VERSION, 2);
  gl_ = SDL_GL_CreateContext(window_);
  if (!gl_) {
    glsl = "#version 130";
    SDL_GL_SetAttribute(SDL_GL_CONTEXT_FLAGS, 0);
    SDL_GL_SetAttribute(SDL_GL_CONTEXT_PROFILE_MASK, 0);
    SDL_GL_SetAttribute(SDL_GL_CONTEXT_MINOR_VERSION, 0);
    gl_ = SDL_GL_CreateContext(window_);
  }
  if (!gl_) {
    *error = std::string("cannot create an OpenGL 3 context: ") + SDL_GetError();
    return false;
  }
  SDL_GL_MakeCurrent(window_, gl_);
  SDL_GL_SetSwapInterval(automatic ? 1 : 0);

  IMGUI_CHECKVERSION();
  ImGui::CreateContext();
  ImGuiIO& io = ImGui::GetIO();
  io.IniFilename = nullptr;  // no layout file: the screens are fixed
  io.ConfigWindowsMoveFromTitleBarOnly = true;
  io.ConfigInputTextCursorBlink = false;
  ImGui_ImplSDL2_InitForOpenGL(window_, gl_);
  ImGui_ImplOpenGL3_Init(glsl);

  Look& lk = look();
  lk.m = metrics_for_dpi(dpi);
  lk.theme = opts.night ? ThemeKind::Night : ThemeKind::Outdoor;
  try {
    lk.fonts = load_fonts(lk.m);
  } catch (const std::exception& e) {
    *error = e.what();
    return false;
  }
  lk.pal = apply_theme(lk.theme, lk.m);
  // Dear ImGui's drag threshold: a finger wobbles more than a mouse.
  io.MouseDragThreshold = lk.m.tap * 0.2f;

  if (!opts.file.empty()) {
    std::string err;
    if (!open_project(opts.file, &err)) {
      *error = err;
      return false;
    }
  } else {
    screen = Screen::Open;
  }
  if (!opts.view.empty()) {
    if (auto s = parse_screen(opts.view)) screen = *s;
  }
  if (!opts.no_gps && !opts.gps.empty()) {
    const auto colon = opts.gps.rfind(':');
    gps.start(colon == std::string::npos ? opts.gps : opts.gps.substr(0, colon),
              colon == std::string::npos ? "2947" : opts.gps.substr(colon + 1));
  }
  return true;
}

void App::shutdown() {
  gps.stop();
  jobs.join();
  loader.join();
  checker.join();
  // A build still running reads Dear ImGui's font atlas (soft_raster.h): it ends
  // before the context goes (a screenshot's last frame can start one).
  logbook.rows.wait();
  net.build.wait();
  plan.layers.wait();
  plan.drawing.wait();
  cross.list.wait();
  photos.textures.clear();  // while the OpenGL context is still there
  if (ImGui::GetCurrentContext()) {
    ImGui_ImplOpenGL3_Shutdown();
    ImGui_ImplSDL2_Shutdown();
    ImGui::DestroyContext();
  }
  if (gl_) SDL_GL_DeleteContext(gl_);
  gl_ = nullptr;
  if (window_) SDL_DestroyWindow(window_);
  window_ = nullptr;
  SDL_Quit();
}

// Mouse and touch drive one pointer. Touch events carry normalised positions;
// the mouse events SDL makes from touches (which == SDL_TOUCH_MOUSEID) are
// skipped so that a finger counts once. Dear ImGui 1.86's SDL backend reads the
// mouse from SDL's state, so the pointer is written into ImGui after it (apply_pointer).
void App::handle_event(const SDL_Event& e) {
  ImGui_ImplSDL2_ProcessEvent(&e);
  int ww = 1, wh = 1;
  SDL_GetWindowSize(window_, &ww, &wh);
  switch (e.type) {
    case SDL_QUIT: quit_ = true; break;
    case SDL_WINDOWEVENT:
      if (e.window.event == SDL_WINDOWEVENT_CLOSE && e.window.windowID == SDL_GetWindowID(window_)) quit_ = true;
      break;
    case SDL_MOUSEMOTION:
      if (e.motion.which == SDL_TOUCH_MOUSEID) break;
      pointer_ = ImVec2(static_cast<float>(e.motion.x), static_cast<float>(e.motion.y));
      break;
    case SDL_MOUSEBUTTONDOWN:
    case SDL_MOUSEBUTTONUP:
      if (e.button.which == SDL_TOUCH_MOUSEID || e.button.button != SDL_BUTTON_LEFT) break;
      pointer_ = ImVec2(static_cast<float>(e.button.x), static_cast<float>(e.button.y));
      pointer_down_ = e.type == SDL_MOUSEBUTTONDOWN;
      if (pointer_down_) pointer_pressed_ = true;
      break;
    case SDL_FINGERDOWN:
    case SDL_FINGERMOTION:
    case SDL_FINGERUP: {
      const ImVec2 at(e.tfinger.x * static_cast<float>(ww), e.tfinger.y * static_cast<float>(wh));
      const long long id = static_cast<long long>(e.tfinger.fingerId);
      auto it = std::find_if(fingers.begin(), fingers.end(), [&](const Finger& f) { return f.id == id; });
      if (e.type == SDL_FINGERUP) {
        if (it != fingers.end()) fingers.erase(it);
      } else if (it == fingers.end()) {
        fingers.push_back({id, at});
      } else {
        it->pos = at;
      }
      if (e.type == SDL_FINGERDOWN && fingers.size() == 1) {
        primary_finger_ = id;
        pointer_ = at;
        pointer_down_ = true;
        pointer_pressed_ = true;
      } else if (e.type == SDL_FINGERDOWN && fingers.size() >= 2) {
        // A second finger makes it a gesture: the first finger's press is not a tap.
        pointer_down_ = false;
        primary_finger_ = -1;
      } else if (id == primary_finger_) {
        pointer_ = at;
        if (e.type == SDL_FINGERUP) {
          pointer_down_ = false;
          pointer_lift_ = true;
          primary_finger_ = -1;
        }
      }
      break;
    }
    default: break;
  }
}

void App::apply_pointer() {
  ImGuiIO& io = ImGui::GetIO();
  io.MousePos = pointer_;
  // A press and release within one frame still counts as a press this frame.
  io.MouseDown[0] = pointer_down_ || pointer_pressed_;
  pointer_pressed_ = false;
  if (pointer_lift_ && !pointer_down_) {
    // After a finger lifts (and the release frame is drawn) nothing stays "hovered".
    pointer_lift_ = false;
    pointer_ = ImVec2(-1e9f, -1e9f);
  }
}

bool App::write_screenshot(const std::string& path, std::string* error) {
  int w = 0, h = 0;
  SDL_GL_GetDrawableSize(window_, &w, &h);
  std::vector<unsigned char> px(static_cast<size_t>(w) * h * 4), flipped(px.size());
  glPixelStorei(GL_PACK_ALIGNMENT, 1);
  glReadBuffer(GL_BACK);
  glReadPixels(0, 0, w, h, GL_RGBA, GL_UNSIGNED_BYTE, px.data());
  // OpenGL's rows run bottom to top; PNG's top to bottom.
  const size_t row = static_cast<size_t>(w) * 4;
  for (int y = 0; y < h; ++y)
    std::copy(px.begin() + static_cast<long>(row * (h - 1 - y)), px.begin() + static_cast<long>(row * (h - y)),
              flipped.begin() + static_cast<long>(row * y));
  for (size_t i = 3; i < flipped.size(); i += 4) flipped[i] = 255;
  if (!stbi_write_png(path.c_str(), w, h, 4, flipped.data(), static_cast<int>(row))) {
    *error = "cannot write the screenshot " + path;
    return false;
  }
  return true;
}

void App::draw_top_bar() {
  Look& lk = look();
  const float tap = lk.m.tap;
  ImGui::PushFont(lk.fonts.bold);
  ImGui::AlignTextToFramePadding();
  text(model ? model->name() : std::string("Cairn"));
  ImGui::PopFont();
  if (model) {
    const store::Person* who = model->person(person_);
    const std::string me = who ? "Person: " + who->initials : std::string("Person: choose");
    same_line_if_fits(label_width(me));
    if (button(me + "##person")) ImGui::OpenPopup("person");
    if (ImGui::BeginPopup("person")) {
      text("Who is using this tablet?");
      for (const auto& pp : model->people()) {
        ImGui::PushID(pp.meta.uuid.c_str());
        if (button(pp.initials + "  " + pp.name, tap * 6)) {
          set_person(pp.meta.uuid);
          ImGui::CloseCurrentPopup();
        }
        ImGui::PopID();
      }
      if (model->people().empty()) text_dim("No people in this project yet (add them with cairn import).");
      ImGui::EndPopup();
    }
    // Hazard flags are announced on every screen.
    int hazards = 0;
    if (auto c = model->check())
      for (const auto& f : c->report.flags)
        if (f.severity == geo::Severity::Hazard) ++hazards;
    if (hazards > 0) {
      const std::string label = "\xE2\x96\xB2 " + std::to_string(hazards) + " hazard" + (hazards == 1 ? "" : "s");
      same_line_if_fits(label_width(label));
      ImGui::PushStyleColor(ImGuiCol_Button, ImGui::ColorConvertU32ToFloat4(lk.pal.caution_bg));
      ImGui::PushStyleColor(ImGuiCol_ButtonHovered, ImGui::ColorConvertU32ToFloat4(lk.pal.caution_bg));
      ImGui::PushStyleColor(ImGuiCol_Text, ImGui::ColorConvertU32ToFloat4(lk.pal.caution_text));
      if (button(label + "##hazards")) go(Screen::Crosscheck);
      ImGui::PopStyleColor(3);
    }
    // A failed backup is shown for as long as there is no newer one (a toast
    // would be gone before a mapper looked up from the outcrop); tapped, why.
    if (const std::string& why = model->project().backup_error(); !why.empty()) {
      const std::string label = "\xE2\x96\xB2 No backup";
      same_line_if_fits(label_width(label));
      ImGui::PushStyleColor(ImGuiCol_Button, ImGui::ColorConvertU32ToFloat4(lk.pal.error_bg));
      ImGui::PushStyleColor(ImGuiCol_ButtonHovered, ImGui::ColorConvertU32ToFloat4(lk.pal.error_bg));
      ImGui::PushStyleColor(ImGuiCol_Text, ImGui::ColorConvertU32ToFloat4(lk.pal.error));
      if (button(label + "##backup"))
        notify("No backup of this file could be made: " + why +
               ". Changes are still saved in the file; another backup is tried after a later change.");
      ImGui::PopStyleColor(3);
    }
    const std::string g = describe(fix);
    const std::string gps_text = fix.has_position()          ? "GPS: " + g
                                 : g.rfind("no GPS", 0) == 0 ? "no GPS: type positions"
                                                             : g;
    same_line_if_fits(ImGui::CalcTextSize(gps_text.c_str()).x);
    ImGui::AlignTextToFramePadding();
    text_colour(fix.has_position() ? lk.pal.ok : lk.pal.text_dim, gps_text);
  }
  // Right side: undo and the theme.
  const std::string theme_label = lk.theme == ThemeKind::Outdoor ? "Night" : "Day";
  const std::string undo_label = model && model->can_undo() ? "Undo: " + model->undo_label() : std::string("Undo");
  float right_w = label_width(theme_label) + ImGui::GetStyle().ItemSpacing.x;
  float undo_w = std::min(label_width(undo_label), tap * 7);
  right_w += undo_w;
  // At the right end of the line, or of a line of their own when there is no room.
  same_line_if_fits(right_w);
  ImGui::SetCursorPosX(std::max(ImGui::GetCursorPosX(), ImGui::GetWindowContentRegionMax().x - right_w));
  if (button(undo_label + "##undo", undo_w, model && model->can_undo() && model->writable())) {
    std::string err;
    const std::string what = model->undo_label();
    if (model->undo(&err))
      notify("Undone: " + what);
    else
      notify(err);
  }
  ImGui::SameLine();
  if (button(theme_label + "##theme")) {
    lk.theme = lk.theme == ThemeKind::Outdoor ? ThemeKind::Night : ThemeKind::Outdoor;
    lk.pal = apply_theme(lk.theme, lk.m);
    net.build.invalidate();
    plan.drawing.invalidate();
  }
  if (!toast_.empty() && ImGui::GetTime() < toast_until_) text_colour(lk.pal.text, toast_);
  // A change is read back on the loader (read_again): said when it takes long
  // enough to see (a season's records take seconds), while the controls that
  // write are off.
  if (model && model->stale() && loader.busy() && stale_since_ms_ >= 0 && ms_since_start() - stale_since_ms_ > 300)
    progress(loader.progress().fraction(), "Saved; reading the records again before the next change");
  if (jobs.busy() && (opening_.empty() || model))  // the opening screen shows its own
    progress(jobs.progress().fraction(), jobs.name() + ": " + jobs.progress().message());
}

int App::nav_per_row(float avail) const {
  const float sp = ImGui::GetStyle().ItemSpacing.x;
  float widest = 0;
  for (Screen s : {Screen::Logbook, Screen::Station, Screen::Pad, Screen::Net, Screen::Plan, Screen::Crosscheck,
                   Screen::Camp, Screen::Review})
    widest = std::max(widest, label_width(screen_title(s)));
  if ((widest + sp) * 8 <= avail + sp) return 8;
  // Landscape screens keep one row (the height is short there) when the titles
  // fit on two lines in the small font, as draw_navigation squeezes them.
  const ImVec2 display = ImGui::GetIO().DisplaySize;
  if (display.x <= display.y) return 4;
  float widest_squeezed = 0;
  ImGui::PushFont(look().fonts.small);
  for (Screen s : {Screen::Logbook, Screen::Station, Screen::Pad, Screen::Net, Screen::Plan, Screen::Crosscheck,
                   Screen::Camp, Screen::Review}) {
    std::string title = screen_title(s);
    const auto sp_at = title.find(' ');
    if (sp_at != std::string::npos) title[sp_at] = '\n';
    widest_squeezed = std::max(widest_squeezed, ImGui::CalcTextSize(title.c_str()).x + look().m.gap * 0.5f);
  }
  ImGui::PopFont();
  return (widest_squeezed + sp) * 8 <= avail + sp ? 8 : 4;
}

void App::draw_navigation() {
  Look& lk = look();
  const Screen order[] = {Screen::Logbook, Screen::Station,    Screen::Pad,  Screen::Net,
                          Screen::Plan,    Screen::Crosscheck, Screen::Camp, Screen::Review};
  const float avail = ImGui::GetContentRegionAvail().x;
  const float sp = ImGui::GetStyle().ItemSpacing.x;
  const int per_row = nav_per_row(avail);
  const float w = (avail - sp * static_cast<float>(per_row - 1)) / static_cast<float>(per_row);
  for (int i = 0; i < 8; ++i) {
    if (i % per_row != 0) ImGui::SameLine();
    const bool here = screen == order[i];
    // A title too wide for its button goes on two lines in the small font.
    std::string title = screen_title(order[i]);
    const bool squeeze = label_width(title) > w;
    if (squeeze) {
      const auto sp_at = title.find(' ');
      if (sp_at != std::string::npos) title[sp_at] = '\n';
      ImGui::PushFont(lk.fonts.small);
      ImGui::PushStyleVar(ImGuiStyleVar_FramePadding, ImVec2(lk.m.gap * 0.25f, 0));
    }
    if (chip(title + "##" + screen_title(order[i]), here, model != nullptr, w, false)) go(order[i]);
    also_label(screen_title(order[i]));
    if (squeeze) {
      ImGui::PopStyleVar();
      ImGui::PopFont();
    }
    if (here) {
      // The current screen is marked by a bar under it as well as by colour.
      const ImVec2 a = ImGui::GetItemRectMin(), b = ImGui::GetItemRectMax();
      ImGui::GetWindowDrawList()->AddRectFilled(ImVec2(a.x + 4, b.y - 6), ImVec2(b.x - 4, b.y - 2), lk.pal.accent_text);
    }
  }
}

void App::draw_screen() {
  if (!model && !opening_.empty()) {
    draw_opening(*this, opening_);
    return;
  }
  if (!model) {
    draw_open(*this);
    return;
  }
  switch (screen) {
    case Screen::Open: draw_open(*this); break;
    case Screen::Logbook: draw_logbook(*this); break;
    case Screen::Station: draw_station(*this); break;
    case Screen::Pad: draw_pad(*this); break;
    case Screen::Net: draw_net_screen(*this); break;
    case Screen::Plan: draw_plan_screen(*this); break;
    case Screen::Crosscheck: draw_crosscheck(*this); break;
    case Screen::Camp: draw_camp(*this); break;
    case Screen::Review: draw_review(*this); break;
  }
}

namespace {
// CPU milliseconds of the calling thread (POSIX clock_gettime, CLOCK_THREAD_CPUTIME_ID).
double thread_cpu_ms() {
  timespec ts{};
  clock_gettime(CLOCK_THREAD_CPUTIME_ID, &ts);
  return static_cast<double>(ts.tv_sec) * 1e3 + static_cast<double>(ts.tv_nsec) / 1e6;
}
}  // namespace

void App::draw_frame() {
  const double t0 = thread_cpu_ms();
  ImGui_ImplOpenGL3_NewFrame();
  ImGui_ImplSDL2_NewFrame();
  apply_pointer();
  ImGui::NewFrame();

  ImGuiIO& io = ImGui::GetIO();
  ImGui::SetNextWindowPos(ImVec2(0, 0));
  ImGui::SetNextWindowSize(io.DisplaySize);
  ImGui::Begin("Cairn", nullptr,
               ImGuiWindowFlags_NoDecoration | ImGuiWindowFlags_NoMove | ImGuiWindowFlags_NoResize |
                   ImGuiWindowFlags_NoSavedSettings | ImGuiWindowFlags_NoBringToFrontOnFocus |
                   ImGuiWindowFlags_NoScrollWithMouse);
  draw_top_bar();
  ImGui::Separator();
  // The navigation's height: one or two rows of tap-high chips, and the separator above them.
  const float nav_rows = nav_per_row(ImGui::GetContentRegionAvail().x) == 8 ? 1.0f : 2.0f;
  const ImGuiStyle& st = ImGui::GetStyle();
  const float nav_h = look().m.tap * nav_rows + st.ItemSpacing.y * (nav_rows + 1) + 2 + st.WindowPadding.y;
  const float body_h = std::max(look().m.tap, ImGui::GetContentRegionAvail().y - nav_h);
  canvas_min = ImGui::GetCursorScreenPos();
  // The screen scrolls (a finger drag) when its content is taller than the body,
  // e.g. at 2x density on a small tablet; its lists keep at least a few rows.
  ImGui::BeginChild("screen", ImVec2(0, body_h), false, ImGuiWindowFlags_NoScrollWithMouse);
  canvas_max = ImVec2(canvas_min.x + ImGui::GetWindowWidth(), canvas_min.y + body_h);
  const double screen_t0 = thread_cpu_ms();
  try {
    draw_screen();
  } catch (const std::exception& e) {
    error_box(std::string("This screen failed: ") + e.what());
  }
  screen_ms_.push_back(thread_cpu_ms() - screen_t0);
  touch_scroll();
  ImGui::EndChild();
  ImGui::Separator();
  draw_navigation();
  ImGui::End();

  ImGui::Render();
  build_ms_.push_back(thread_cpu_ms() - t0);
  const double since_made = std::chrono::duration<double, std::milli>(std::chrono::steady_clock::now() - made_).count();
  if (first_frame_ms_ < 0) first_frame_ms_ = since_made;
  if (first_check_ms_ < 0 && model && model->check()) first_check_ms_ = since_made;
  int fw = 0, fh = 0;
  SDL_GL_GetDrawableSize(window_, &fw, &fh);
  glViewport(0, 0, fw, fh);
  const ImVec4 bg = ImGui::ColorConvertU32ToFloat4(look().pal.background);
  glClearColor(bg.x, bg.y, bg.z, 1.0f);
  glClear(GL_COLOR_BUFFER_BIT);
  ImGui_ImplOpenGL3_RenderDrawData(ImGui::GetDrawData());
  if (!pending_screenshot_.empty()) {
    std::string err;
    if (!write_screenshot(pending_screenshot_, &err)) std::cerr << "cairn gui: " << err << "\n";
    pending_screenshot_.clear();
  }
  SDL_GL_SwapWindow(window_);
  finish_frame_record();

  // On a tablet the system's on-screen keyboard comes up for text fields only.
  if (io.WantTextInput != want_text_) {
    want_text_ = io.WantTextInput;
    if (want_text_)
      SDL_StartTextInput();
    else
      SDL_StopTextInput();
  }
}

int App::run() {
  std::string err;
  if (!init(&err)) {
    std::cerr << "cairn gui: " << err << "\n";
    return 1;
  }
  std::optional<Script> script;
  if (!opts.script.empty()) {
    try {
      script = Script::load(opts.script);
    } catch (const std::exception& e) {
      std::cerr << "cairn gui: " << e.what() << "\n";
      return 2;
    }
  }
  int& code = exit_code_;
  const bool shot_only = !opts.screenshot.empty() && !script;
  const bool interactive = !script && !shot_only;
  int frame = 0;
  const Uint32 started = SDL_GetTicks();
  unsigned long gps_seen = 0;
  while (!quit_) {
    const Uint64 frame_began = SDL_GetPerformanceCounter();
    if (script) {
      const auto st = script->step(*this);
      if (st == Script::Step::Failed) {
        std::cerr << "cairn gui: " << script->failure() << "\n";
        exit_code_ = 3;
        break;
      }
      if (st == Script::Step::Done) {
        if (!opts.screenshot.empty()) {
          pending_screenshot_ = opts.screenshot;
          draw_frame();
        }
        break;
      }
    }
    SDL_Event e;
    // Interactive: sleep until something happens (a tablet's battery), but wake
    // for running jobs, new GPS fixes and the message timer.
    const bool animate = jobs.busy() || loader.busy() || checker.busy() || !derived_current() ||
                         gps.updates() != gps_seen || (!toast_.empty() && ImGui::GetTime() < toast_until_ + 0.1) ||
                         frame < 3;
    if (interactive && !animate) {
      if (SDL_WaitEventTimeout(&e, 500)) handle_event(e);
    }
    while (SDL_PollEvent(&e)) handle_event(e);
    gps_seen = gps.updates();
    jobs.poll();
    checker.poll();
    loader.poll();
    if (rest_wanted_ && model && !loader.busy()) read_the_rest();
    if (model && model->stale() && !loader.busy() && read_again_failed_.empty()) read_again();
    save_waiting_notes();
    keep_backup();
    poll_derived();
    fix = gps.fix();
    log_track();
    request_check();
    draw_frame();
    ++frame;
    // A screenshot waits for the screen to settle (the opening, the check, the
    // builds on workers), for two minutes at most; meanwhile the loop leaves
    // the workers the processor instead of drawing frames as fast as it can.
    if (shot_only && !idle() && frame >= opts.frames) SDL_Delay(2);
    // --frame-stats measures what a user would see. There the display's vertical
    // sync (swap interval 1) lets one frame through every 1/60 s and the loader
    // and the check have the processor in between; a screenshot run has swap
    // interval 0 and would draw without pause, taking a core from them. So its
    // frames are paced the same way.
    if (shot_only && opts.frame_stats) {
      constexpr double kDisplayFrameMs = 1000.0 / 60;
      const double spent = static_cast<double>(SDL_GetPerformanceCounter() - frame_began) * 1000.0 /
                           static_cast<double>(SDL_GetPerformanceFrequency());
      if (spent < kDisplayFrameMs) SDL_Delay(static_cast<Uint32>(kDisplayFrameMs - spent));
    }
    if (shot_only && ((frame >= opts.frames && idle()) || SDL_GetTicks() - started > 120000)) {
      pending_screenshot_ = opts.screenshot;
      draw_frame();
      break;
    }
  }
  if (opts.frame_stats && build_ms_.size() > 2) {
    // The first frames build the caches; the last ones show what a frame costs.
    const size_t n = std::min<size_t>(50, build_ms_.size() / 2);
    std::vector<double> v(build_ms_.end() - static_cast<long>(n), build_ms_.end());
    std::sort(v.begin(), v.end());
    double sum = 0;
    for (double x : v) sum += x;
    std::cerr << "frame build (CPU, last " << v.size() << " frames): mean " << sum / static_cast<double>(v.size())
              << " ms, median " << v[v.size() / 2] << " ms, max " << v.back() << " ms\n";
    // Every frame, the first ones too (they read the records and build the caches).
    const auto worst_at = std::max_element(build_ms_.begin(), build_ms_.end());
    const double worst = *worst_at;
    const auto slow = std::count_if(build_ms_.begin(), build_ms_.end(), [](double x) { return x > 8.0; });
    // The first frame also sets up OpenGL (Dear ImGui's shaders, the font texture): once a session.
    const auto worst_later_at = std::max_element(build_ms_.begin() + 1, build_ms_.end());
    const double worst_later = worst_later_at == build_ms_.end() ? 0.0 : *worst_later_at;
    std::cerr << "all " << build_ms_.size() << " frames: slowest " << worst << " ms (frame "
              << worst_at - build_ms_.begin() + 1 << "), " << slow
              << " over 8 ms, after the first (OpenGL set-up) slowest " << worst_later << " ms (frame "
              << worst_later_at - build_ms_.begin() + 1 << "); first frame shown after " << first_frame_ms_
              << " ms, the records after " << first_records_ms_ << " ms, the file checked after " << file_checked_ms_
              << " ms, the check's result after " << first_check_ms_ << " ms (wall clock from start)\n";
    // Where the slowest frames spent their time: a frame whose screen code is
    // cheap but whose fixed part (normally a few hundredths of a millisecond)
    // took milliseconds was slowed by the machine, not by the screen.
    std::vector<double> fixed(build_ms_.size());
    for (size_t i = 0; i < build_ms_.size(); ++i) fixed[i] = build_ms_[i] - screen_ms_[i];
    const size_t later_i = static_cast<size_t>(worst_later_at - build_ms_.begin());
    const auto screen_worst_at = std::max_element(screen_ms_.begin() + 1, screen_ms_.end());
    std::vector<double> sorted(build_ms_.begin() + 1, build_ms_.end()), sorted_fixed(fixed.begin() + 1, fixed.end());
    std::sort(sorted.begin(), sorted.end());
    std::sort(sorted_fixed.begin(), sorted_fixed.end());
    std::cerr << "after the first: 99% of frames within " << sorted[sorted.size() * 99 / 100]
              << " ms; the slowest spent " << screen_ms_[later_i] << " ms in the screen's code and " << fixed[later_i]
              << " ms in the frame's fixed part (median " << sorted_fixed[sorted_fixed.size() / 2]
              << " ms); the screen's code at most " << *screen_worst_at << " ms (frame "
              << screen_worst_at - screen_ms_.begin() + 1 << ")\n";
  }
  return code;
}

}  // namespace cairn::ui
