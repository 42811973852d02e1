// The touch UI's application: one SDL2 window with an OpenGL 3 context, Dear
// ImGui, the open project, the worker threads, the GPS client, and the screens.
//
// Input: mouse and touch events both drive one pointer (a finger is the
// pointer; two fingers pinch on the Plan), so every target works with a finger
// and nothing needs a keyboard. Events can also come from an event script
// (script.h), pushed through SDL's own queue.
#pragma once
#include <chrono>
#include <cstdint>
#include <map>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include <SDL.h>
#include <imgui.h>

#include "app/plot/plan_scene.h"
#include "app/plot/recording_canvas.h"
#include "app/ui/background.h"
#include "app/ui/gl_picture.h"
#include "app/ui/gps.h"
#include "app/ui/jobs.h"
#include "app/ui/model.h"
#include "app/ui/photos_ui.h"
#include "app/ui/soft_raster.h"
#include "app/ui/theme.h"
#include "geomath/track.h"
#include "storage/merge.h"
#include "storage/records.h"

namespace cairn::ui {

enum class Screen { Open, Logbook, Station, Pad, Net, Plan, Crosscheck, Camp, Review };
// The screen's name as the user sees it (naming sheet): "Logbook", "Station sheet", ...
const char* screen_title(Screen s);
// "logbook", "station", "pad", "net", "plan", "crosscheck", "camp", "review" (also the titles, any case).
std::optional<Screen> parse_screen(const std::string& name);

struct GuiOptions {
  std::string file;
  bool fullscreen = false, windowed = false, night = false;
  double dpi = 0;             // 0: ask the display
  int width = 0, height = 0;  // window size; 0: from the display
  std::string view;           // screen to open
  std::string screenshot;     // write a PNG of the view and exit
  int frames = 3;             // frames to draw before the screenshot
  std::string script;         // event script to run
  std::string gps = "localhost:2947";
  bool no_gps = false;
  std::string person;        // initials of the person at the tablet
  std::string station;       // station code to select
  std::string flag;          // flag to open on the Crosscheck: its rule (the first such flag)
  bool frame_stats = false;  // print how long frames took to build (CPU, without drawing) at exit
};

// ---- per-screen state ---------------------------------------------------------------

struct PadState {
  bool linear = false;
  std::string kind = "bedding";
  int notation = 0;  // planes: 0 strike/dip (RHR), 1 dip direction/dip, 2 quadrant; lines: 0 trend/plunge, 1 rake
  std::string text;  // as typed on the keypad
  int quality = 0;   // 0: not stated, else 1..5
  store::Facing facing = store::Facing::Unknown;
  std::optional<store::North> north;  // nothing: the project's default
  std::string contact;                // contact UUID or ""
  std::string host_plane;             // planar reading UUID for a rake
  std::string error;                  // from the last Record
  std::string status;                 // after a Record that worked
};

struct StationEdit {
  std::string for_station;  // UUID the buffers belong to ("" = a new station)
  std::string typing_for;   // station whose typed-position form is open ("" = closed)
  bool utm = false;         // typing easting/northing instead of lat/lon
  int field = 0;            // 0 lat/easting, 1 lon/northing, 2 elevation
  std::string a, b, elev;
  std::string notes;
  std::string photo_path, photo_caption;
  std::string error;
};

// What the Net screen draws for one set of records, check, filters and size:
// built on a worker for a large project (background.h).
struct NetPicture {
  plot::RecordingCanvas drawing;
  std::optional<RgbaImage> pixels;  // the drawing in pixels, when drawn on the worker (soft_raster.h)
  std::vector<std::string> legend;  // summary lines under the net
  // The kinds and field days present in the records (the filters' values).
  std::vector<std::pair<std::string, std::string>> kinds, days;
};

struct NetState {
  std::string kind, unit, contact, day, person;  // filters, "" = all
  int display = 0;                               // 0 poles, 1 great circles, 2 both
  bool contours = false, statistics = false, equal_angle = false;
  Background<NetPicture> build;
  std::shared_ptr<const NetPicture> rendered;  // the build the texture shows
  std::unique_ptr<GlPicture> picture;          // the drawing as a texture (when this OpenGL can)
};

// What the Plan draws for one check result, interval, selected station and
// day track (positions in UTM metres): built on a worker for a large project.
struct PlanLayers {
  plot::PlanData data;
  double convergence = 0;
  std::vector<std::string> notes;       // per contact: the interval drawn
  double spacing = 0;                   // median distance from a station to its nearest neighbour, metres
  std::vector<std::string> track_days;  // the days that have fixes
  std::string track_day;                // the day drawn ("" none)
};

// The Plan as recorded for one view and size.
struct PlanPicture {
  plot::RecordingCanvas drawing;
  std::optional<RgbaImage> pixels;  // the drawing in pixels, when drawn on the worker (soft_raster.h)
  plot::PlanView view;
  float w = 0, h = 0;
};

struct PlanState {
  bool have_view = false;
  plot::PlanView view;
  double interval = 0;                             // strike-line interval, metres (0: chosen per contact)
  std::optional<std::pair<double, double>> probe;  // map point tapped
  Background<PlanLayers> layers;
  Background<PlanPicture> drawing;
  std::shared_ptr<const PlanPicture> rendered;  // what the texture shows
  bool dragging = false;
  float pinch_distance = 0;
  std::unique_ptr<GlPicture> picture;  // the plan as a texture
  // The day track shown (app/plot/plan_track.h): "" none; the newest day until
  // the Track button chooses another.
  std::string track_day;
  bool track_chosen = false;
};

// The Crosscheck's list: a station heading (flag < 0) or a flag of the check
// result it was built from, with its review key and the line shown.
struct FlagRow {
  std::string text, key;
  long flag = -1;
};
struct FlagList {
  std::shared_ptr<const CheckResult> check;  // what `flag` indexes
  std::vector<FlagRow> rows;
  std::string summary;
  int hazards = 0;
};

struct CrosscheckState {
  int min_severity = 0;
  Background<FlagList> list;  // built once per check, project change or filter
  std::string open_key;       // review key of the open flag ("" = none)
  bool acknowledged = false;  // the open hazard flag's caution has been acknowledged
  std::string message;
};

struct CampState {
  std::string selected;  // file chosen in the list
  int kind = 0;          // what the file holds (import)
  std::string contact;   // GPX points: the contact they belong to
  std::vector<std::string> log;
  // Pick-list forms: the lithology chosen in the list, and the texts being typed.
  std::string lithology, new_lithology, unit_code, unit_name, person_initials, person_name;
  std::string list_error;
  // Open merge conflicts, read again only when the project changes.
  std::uint64_t conflicts_rev = 0;
  std::vector<store::MergeConflict> conflicts;
};

struct ReviewState {
  bool unlocked = false;
  int tab = 0;           // 0 flags, 1 days, 2 audit trail
  std::string flag_key;  // flag being reviewed
  std::string comment;
  std::string record;  // record whose audit trail is shown
  std::string message;
  // The audit trail shown, read again only when the record or the project changes.
  std::string trail_key;
  std::vector<store::AuditEntry> trail;
  std::map<std::string, std::string> devices;  // device UUID -> name
};

// One row of the Logbook: a day heading (uuid empty) or a station.
struct LogbookRow {
  std::string text, uuid, code;
};

struct LogbookState {
  std::string person, unit;  // filters, "" = all
  int flags = 0;             // 0 all, 1 with flags, 2 with hazard flags
  // The rows, built once per change of the project, the check or the filters.
  Background<std::vector<LogbookRow>> rows;
};

// One finger on the screen (pixels).
struct Finger {
  long long id = 0;
  ImVec2 pos;
};

class App {
 public:
  explicit App(GuiOptions o);
  ~App();
  int run();

  // ---- for the screens ----
  GuiOptions opts;
  std::unique_ptr<Model> model;
  Jobs jobs;     // user's long work
  Jobs checker;  // the automatic cross-check
  Jobs loader;   // the second part of an opening: the readings and contact points
  GpsClient gps;
  GpsFix fix;  // this frame's
  Screen screen = Screen::Logbook;
  std::string station;  // selected station UUID ("" = none)
  std::string reading;  // reading opened from a flag (highlighted on the Station sheet)
  PadState pad;
  StationEdit edit;
  NetState net;
  PlanState plan;
  CrosscheckState cross;
  CampState camp;
  ReviewState review;
  LogbookState logbook;
  PhotosUi photos;                // thumbnails of the session, the enlarged photo, the Camp screen's Photos form
  std::string open_error;         // Open screen
  std::string new_name;           // Open screen: name of a new project
  std::vector<Finger> fingers;    // touches now down
  ImVec2 canvas_min, canvas_max;  // the screen area below the top bar and above the navigation

  void go(Screen s);
  void notify(const std::string& message);  // a short message in the top bar
  // Starts opening a project on the job worker (the records are read there
  // too); false, with the reason, when a job is running. A failure to open
  // shows on the Open screen, or ends `cairn gui FILE` with status 1.
  bool open_project(const std::string& path, std::string* error);
  // The file being opened ("" = none), until its readings are read too.
  const std::string& opening() const { return opening_; }
  void select_station(const std::string& uuid);
  // Runs a confirmed change (Model::act) and shows its error, if any, in the top bar.
  bool act(const std::string& label, const std::function<void(store::Project&)>& f, std::string* error = nullptr);
  // Saves a station's notes: at once when the model is writable(), else as
  // soon as it is (the last change still being read back), so that text typed
  // meanwhile is not lost.
  void save_notes(const std::string& station_uuid, const std::string& notes);
  // Whether a change is being read back (Model::stale) or notes wait to be saved.
  bool reading_back() const;
  // Starts the cross-check on the worker when the project changed since the last one.
  void request_check();
  // The UUID of the person at the tablet ("" = none chosen).
  std::string person() const { return person_; }
  void set_person(const std::string& uuid);
  bool idle() const;  // no job running, the check current and what the screens derive from it built
  // Takes what the screens' builds on a worker finished (background.h), once a frame.
  void poll_derived();
  bool derived_current() const;

  // Writes a PNG of the next frame drawn.
  void request_screenshot(const std::string& path) { pending_screenshot_ = path; }
  // How many fixes this session has added to the day track (the Plan redraws it when this changes).
  long track_logged() const { return track_logged_; }
  SDL_Window* window() const { return window_; }
  float frame_width() const;
  float frame_height() const;

 private:
  bool init(std::string* error);
  void shutdown();
  void handle_event(const SDL_Event& e);
  void apply_pointer();
  void draw_frame();
  void draw_top_bar();
  void draw_navigation();
  int nav_per_row(float avail) const;  // 8 screens in one row, or 4 in two
  void draw_screen();
  bool write_screenshot(const std::string& path, std::string* error);
  // The day track: keeps this frame's GPS fix in the project when the thinning
  // rule (geomath/track.h) says so.
  void log_track();

  // The opening's steps (open_project).
  void first_part_read(const std::string& path, store::Project p, std::shared_ptr<const Records> rec);
  void opened(const std::string& path, store::Project p, std::shared_ptr<const Records> rec);
  void showing();
  void file_checked();
  void end_opening();
  void read_the_rest();
  void read_again();   // the records after a change (Model::stale)
  void keep_backup();  // the rolling backup, on the job worker
  double ms_since_start() const;

  SDL_Window* window_ = nullptr;
  std::string opening_;
  bool rest_read_ = false;                            // the opening's readings read (or failed)
  bool rest_wanted_ = false;                          // read_the_rest found the loader busy
  double stale_since_ms_ = -1;                        // when the records became stale (read_again)
  std::string read_again_failed_;                     // why reading them again failed
  std::uint64_t backup_seen_changes_ = 0;             // Model::changes() when keep_backup last looked
  bool backup_wanted_ = false;                        // a change came when the rolling backup was due
  std::map<std::string, std::string> notes_to_save_;  // station UUID -> notes (save_notes)
  void save_waiting_notes();
  std::optional<store::Project> checked_early_;  // the checked connection, come before the first part's model
  int exit_code_ = 0;
  void* gl_ = nullptr;
  bool quit_ = false;
  std::string person_;
  std::string toast_;
  double toast_until_ = 0;
  // The pointer as mouse and touch events set it (see app.cpp).
  ImVec2 pointer_{-1e9f, -1e9f};
  bool pointer_down_ = false, pointer_pressed_ = false, pointer_lift_ = false;
  long long primary_finger_ = -1;
  bool want_text_ = false;
  std::string pending_screenshot_;
  std::optional<geo::TrackFix> track_last_;  // the last fix kept in the day track (this project)
  long track_logged_ = 0;
  // CPU time of the UI thread to build each frame (events to ImGui::Render, no
  // GPU work; the check's worker thread not counted), for --frame-stats.
  std::vector<double> build_ms_;
  // Of each, the CPU time in the screen's own code (draw_screen); the rest is
  // the frame's fixed part (Dear ImGui's NewFrame and Render, the top bar and
  // the navigation), which costs the same on every screen.
  std::vector<double> screen_ms_;
  // Wall-clock milliseconds from the App's making (the file is opened after
  // it) to the end of the first frame, to the records read, and to the first
  // frame that shows a check result; for --frame-stats.
  std::chrono::steady_clock::time_point made_ = std::chrono::steady_clock::now();
  double first_frame_ms_ = -1, first_records_ms_ = -1, file_checked_ms_ = -1, first_check_ms_ = -1;
};

}  // namespace cairn::ui
