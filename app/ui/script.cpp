#include "app/ui/script.h"

#include <cmath>
#include <cstdlib>
#include <fstream>
#include <sstream>
#include <stdexcept>

#include "app/ui/app.h"
#include "app/ui/widgets.h"
#include "geomath/decimal.h"

namespace cairn::ui {

namespace {

std::vector<std::string> split_words(const std::string& line, bool* ok) {
  std::vector<std::string> out;
  std::string cur;
  bool in_quotes = false, have = false;
  for (size_t i = 0; i < line.size(); ++i) {
    const char c = line[i];
    if (in_quotes) {
      if (c == '\\' && i + 1 < line.size()) {
        cur += line[++i];
      } else if (c == '"') {
        in_quotes = false;
      } else {
        cur += c;
      }
    } else if (c == '"') {
      in_quotes = true;
      have = true;
    } else if (c == '#') {
      break;
    } else if (c == ' ' || c == '\t' || c == '\r') {
      if (have) out.push_back(cur);
      cur.clear();
      have = false;
    } else {
      cur += c;
      have = true;
    }
  }
  if (have) out.push_back(cur);
  *ok = !in_quotes;
  return out;
}

bool number(const std::string& s, double* v) {
  const auto parsed = geo::parse_decimal(s);
  if (parsed) *v = *parsed;
  return parsed.has_value();
}

const std::vector<std::pair<std::string, size_t>> kArity = {
    {"tap", 1},        {"tap-if", 1},     {"touch", 1},      {"tap-at", 2},    {"drag", 4},     {"pinch", 3},
    {"type", 1},       {"key", 1},        {"wait", 0},       {"wait-idle", 0}, {"wait-for", 1}, {"expect", 1},
    {"expect-not", 1}, {"expect-fit", 0}, {"screenshot", 1}, {"quit", 0}};

}  // namespace

Script Script::load(const std::string& path) {
  std::ifstream f(path);
  if (!f) throw std::runtime_error("cannot read the event script " + path);
  Script s;
  s.path_ = path;
  std::string line;
  int n = 0;
  while (std::getline(f, line)) {
    ++n;
    bool ok = true;
    auto words = split_words(line, &ok);
    if (!ok) throw std::runtime_error(path + ":" + std::to_string(n) + ": unclosed quote");
    if (words.empty()) continue;
    bool known = false;
    for (const auto& [name, arity] : kArity)
      if (words[0] == name) {
        known = true;
        if (words.size() < arity + 1)
          throw std::runtime_error(path + ":" + std::to_string(n) + ": '" + name + "' needs " + std::to_string(arity) +
                                   " argument" + (arity == 1 ? "" : "s"));
      }
    if (!known) throw std::runtime_error(path + ":" + std::to_string(n) + ": unknown command '" + words[0] + "'");
    s.commands_.push_back({n, std::move(words)});
  }
  return s;
}

bool Script::fail(const Command& c, const std::string& why) {
  failure_ = path_ + ":" + std::to_string(c.line) + ": " + why;
  return false;
}

void Script::push_later(int frames, const SDL_Event& e) { delayed_.push_back({frames, e}); }

// Some text or target label of the last frame contains s.
bool Script::on_screen(const std::string& s) {
  for (const auto& t : last_frame().texts)
    if (t.find(s) != std::string::npos) return true;
  for (const auto& t : last_frame().targets)
    if (visible_label(t.label).find(s) != std::string::npos) return true;
  return false;
}

Script::Step Script::step(App& app) {
  // Events scheduled for this frame.
  for (auto it = delayed_.begin(); it != delayed_.end();) {
    if (it->frames <= 0) {
      SDL_Event e = it->event;
      SDL_PushEvent(&e);
      it = delayed_.erase(it);
    } else {
      --it->frames;
      ++it;
    }
  }
  if (!failure_.empty()) return Step::Failed;
  if (wait_frames_ > 0) {
    --wait_frames_;
    return Step::Continue;
  }
  if (wait_idle_) {
    if (!app.idle() && SDL_GetTicks() < idle_deadline_) return Step::Continue;
    wait_idle_ = false;
  }
  if (!wait_text_.empty()) {
    if (!on_screen(wait_text_)) {
      if (SDL_GetTicks() < wait_text_deadline_) return Step::Continue;
      failure_ = path_ + ":" + std::to_string(wait_text_line_) + ": '" + wait_text_ + "' did not appear";
      return Step::Failed;
    }
    wait_text_.clear();
  }
  // A project being opened (on the job worker), or a change being read back
  // (App::read_again), is waited for: no command acts on the opening screen
  // or on records older than the file. And each command acts on a settled screen: what the
  // screens build on a worker (background.h) is there first (within a minute,
  // so that a screen that never settles still lets the script go on).
  if (!app.opening().empty() || app.reading_back()) return Step::Continue;
  if (!app.derived_current()) {
    if (settle_deadline_ == 0) settle_deadline_ = SDL_GetTicks() + 60000;
    if (SDL_GetTicks() < settle_deadline_) return Step::Continue;
  }
  settle_deadline_ = 0;
  if (done_ || next_ >= commands_.size()) return delayed_.empty() ? Step::Done : Step::Continue;
  const Command& c = commands_[next_++];
  if (!run(app, c)) return Step::Failed;
  return done_ && delayed_.empty() ? Step::Done : Step::Continue;
}

// One script command. Long on purpose: one branch per command of the script
// language (listed in script.h), each a few lines, kept together so that the
// language reads as one table.
bool Script::run(App& app, const Command& c) {
  const std::string& cmd = c.words[0];
  const Uint32 win = SDL_GetWindowID(app.window());
  int ww = 0, wh = 0;
  SDL_GetWindowSize(app.window(), &ww, &wh);

  auto mouse = [&](Uint32 type, float x, float y) {
    SDL_Event e{};
    e.type = type;
    if (type == SDL_MOUSEMOTION) {
      e.motion.windowID = win;
      e.motion.x = static_cast<int>(x);
      e.motion.y = static_cast<int>(y);
      e.motion.state = 0;
    } else {
      e.button.windowID = win;
      e.button.button = SDL_BUTTON_LEFT;
      e.button.state = type == SDL_MOUSEBUTTONDOWN ? SDL_PRESSED : SDL_RELEASED;
      e.button.clicks = 1;
      e.button.x = static_cast<int>(x);
      e.button.y = static_cast<int>(y);
    }
    return e;
  };
  auto finger = [&](Uint32 type, long long id, float x, float y) {
    SDL_Event e{};
    e.type = type;
    e.tfinger.touchId = 1;
    e.tfinger.fingerId = id;
    e.tfinger.x = x / static_cast<float>(ww);
    e.tfinger.y = y / static_cast<float>(wh);
    e.tfinger.pressure = type == SDL_FINGERUP ? 0.0f : 1.0f;
    e.tfinger.windowID = win;
    return e;
  };
  auto find_target = [&](const std::string& label, int nth, ImVec2* centre) -> bool {
    int seen = 0;
    for (const auto& t : last_frame().targets) {
      if (t.label != label && visible_label(t.label) != label) continue;
      if (++seen == nth) {
        *centre = ImVec2((t.min.x + t.max.x) / 2, (t.min.y + t.max.y) / 2);
        return true;
      }
    }
    return false;
  };

  if (cmd == "tap" || cmd == "tap-if" || cmd == "touch") {
    int nth = 1;
    if (c.words.size() > 2) nth = std::max(1, std::atoi(c.words[2].c_str()));
    ImVec2 at;
    if (!find_target(c.words[1], nth, &at)) {
      if (cmd == "tap-if") return true;
      std::string have;
      for (const auto& t : last_frame().targets) have += (have.empty() ? "" : ", ") + visible_label(t.label);
      return fail(c, "no target '" + c.words[1] + "' (number " + std::to_string(nth) + ") on screen; targets: " + have);
    }
    if (cmd != "touch") {
      SDL_Event m = mouse(SDL_MOUSEMOTION, at.x, at.y), d = mouse(SDL_MOUSEBUTTONDOWN, at.x, at.y);
      SDL_PushEvent(&m);
      SDL_PushEvent(&d);
      push_later(1, mouse(SDL_MOUSEBUTTONUP, at.x, at.y));
    } else {
      SDL_Event d = finger(SDL_FINGERDOWN, 7, at.x, at.y);
      SDL_PushEvent(&d);
      push_later(1, finger(SDL_FINGERUP, 7, at.x, at.y));
    }
    wait_frames_ = 3;
    return true;
  }
  if (cmd == "tap-at") {
    double x, y;
    if (!number(c.words[1], &x) || !number(c.words[2], &y)) return fail(c, "tap-at needs two numbers");
    SDL_Event m = mouse(SDL_MOUSEMOTION, static_cast<float>(x), static_cast<float>(y)),
              d = mouse(SDL_MOUSEBUTTONDOWN, static_cast<float>(x), static_cast<float>(y));
    SDL_PushEvent(&m);
    SDL_PushEvent(&d);
    push_later(1, mouse(SDL_MOUSEBUTTONUP, static_cast<float>(x), static_cast<float>(y)));
    wait_frames_ = 3;
    return true;
  }
  if (cmd == "drag") {
    double v[4];
    for (int i = 0; i < 4; ++i)
      if (!number(c.words[1 + i], &v[i])) return fail(c, "drag needs four numbers");
    SDL_Event d = finger(SDL_FINGERDOWN, 8, static_cast<float>(v[0]), static_cast<float>(v[1]));
    SDL_PushEvent(&d);
    for (int i = 1; i <= 8; ++i) {
      const float x = static_cast<float>(v[0] + (v[2] - v[0]) * i / 8),
                  y = static_cast<float>(v[1] + (v[3] - v[1]) * i / 8);
      push_later(i, finger(SDL_FINGERMOTION, 8, x, y));
    }
    push_later(9, finger(SDL_FINGERUP, 8, static_cast<float>(v[2]), static_cast<float>(v[3])));
    wait_frames_ = 11;
    return true;
  }
  if (cmd == "pinch") {
    double x, y, f;
    if (!number(c.words[1], &x) || !number(c.words[2], &y) || !number(c.words[3], &f) || f <= 0)
      return fail(c, "pinch needs X Y FACTOR (> 0)");
    const double r0 = 60, r1 = 60 * f;
    SDL_Event a = finger(SDL_FINGERDOWN, 11, static_cast<float>(x - r0), static_cast<float>(y));
    SDL_Event b = finger(SDL_FINGERDOWN, 12, static_cast<float>(x + r0), static_cast<float>(y));
    SDL_PushEvent(&a);
    SDL_PushEvent(&b);
    for (int i = 1; i <= 8; ++i) {
      const double r = r0 + (r1 - r0) * i / 8;
      push_later(i, finger(SDL_FINGERMOTION, 11, static_cast<float>(x - r), static_cast<float>(y)));
      push_later(i, finger(SDL_FINGERMOTION, 12, static_cast<float>(x + r), static_cast<float>(y)));
    }
    push_later(9, finger(SDL_FINGERUP, 11, static_cast<float>(x - r1), static_cast<float>(y)));
    push_later(9, finger(SDL_FINGERUP, 12, static_cast<float>(x + r1), static_cast<float>(y)));
    wait_frames_ = 11;
    return true;
  }
  if (cmd == "type") {
    // SDL_TEXTINPUT carries at most 31 bytes per event.
    const std::string& s = c.words[1];
    for (size_t i = 0; i < s.size(); i += 16) {
      SDL_Event e{};
      e.type = SDL_TEXTINPUT;
      e.text.windowID = win;
      const std::string part = s.substr(i, 16);
      std::snprintf(e.text.text, sizeof e.text.text, "%s", part.c_str());
      SDL_PushEvent(&e);
    }
    wait_frames_ = 2;
    return true;
  }
  if (cmd == "key") {
    const SDL_Keycode k = SDL_GetKeyFromName(c.words[1].c_str());
    if (k == SDLK_UNKNOWN) return fail(c, "unknown key name '" + c.words[1] + "'");
    SDL_Event e{};
    e.type = SDL_KEYDOWN;
    e.key.windowID = win;
    e.key.state = SDL_PRESSED;
    e.key.keysym.sym = k;
    e.key.keysym.scancode = SDL_GetScancodeFromKey(k);
    SDL_PushEvent(&e);
    e.type = SDL_KEYUP;
    e.key.state = SDL_RELEASED;
    push_later(1, e);
    wait_frames_ = 3;
    return true;
  }
  if (cmd == "wait") {
    wait_frames_ = c.words.size() > 1 ? std::max(1, std::atoi(c.words[1].c_str())) : 1;
    return true;
  }
  if (cmd == "wait-idle") {
    wait_idle_ = true;
    // A time, not a count of frames: frames that build nothing are quick, and
    // a loaded machine's workers slow. A script that never settles still ends.
    idle_deadline_ = SDL_GetTicks() + 120000;
    wait_frames_ = 1;
    return true;
  }
  if (cmd == "wait-for") {
    wait_text_ = c.words[1];
    const int secs = c.words.size() > 2 ? std::max(1, std::atoi(c.words[2].c_str())) : 60;
    wait_text_deadline_ = SDL_GetTicks() + static_cast<Uint32>(secs) * 1000u;
    wait_text_line_ = c.line;
    return true;
  }
  if (cmd == "expect") {
    if (!on_screen(c.words[1])) {
      std::string have;
      for (const auto& t : last_frame().texts) have += "\n  " + t;
      return fail(c, "expected '" + c.words[1] + "' on screen; the screen shows:" + have);
    }
    return true;
  }
  if (cmd == "expect-not") {
    for (const auto& t : last_frame().texts)
      if (t.find(c.words[1]) != std::string::npos)
        return fail(c, "did not expect '" + c.words[1] + "' on screen: " + t);
    return true;
  }
  if (cmd == "expect-fit") {
    const auto problems = layout_problems(last_frame(), ImGui::GetIO().DisplaySize);
    if (problems.empty()) return true;
    std::string list;
    for (const auto& p : problems) list += "\n  " + p;
    return fail(c,
                std::to_string(problems.size()) + " layout problem" + (problems.size() == 1 ? "" : "s") + ":" + list);
  }
  if (cmd == "screenshot") {
    app.request_screenshot(c.words[1]);
    wait_frames_ = 2;
    return true;
  }
  if (cmd == "quit") {
    done_ = true;
    return true;
  }
  return fail(c, "unknown command '" + cmd + "'");
}

}  // namespace cairn::ui
