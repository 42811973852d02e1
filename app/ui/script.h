// Event scripts: a test (or a demonstration) drives the real UI by pushing SDL
// events into SDL's own queue (SDL_PushEvent), exactly as a finger, a mouse or
// a keyboard would deliver them, and checks what the screen then shows.
//
// One command per line; arguments are words or "double-quoted text"; # starts a comment.
//   tap LABEL [N]       mouse press and release on the Nth target labelled LABEL (default 1)
//   tap-if LABEL [N]    the same when such a target is on screen, else nothing
//   touch LABEL [N]     the same with a finger (SDL_FINGERDOWN / SDL_FINGERUP)
//   tap-at X Y          mouse press and release at window pixels
//   drag X0 Y0 X1 Y1    finger drag in 8 steps
//   pinch X Y FACTOR    two fingers about (X, Y) moving apart (FACTOR > 1) or together
//   type TEXT           text input (SDL_TEXTINPUT), as an on-screen keyboard sends it
//   key NAME            key press and release (SDL key names: Return, Backspace, ...)
//   wait [N]            let N frames pass (default 1)
//   wait-idle           let frames pass until no job runs and the cross-check is current
//   wait-for TEXT [S]   let frames pass until TEXT is on screen (fail after S seconds, default 60:
//                       generous, for a loaded test machine)
//   expect TEXT         fail unless some text or target label on screen contains TEXT
//   expect-not TEXT     fail if some text on screen contains TEXT
//   expect-fit          fail if a widget of the last frame lies outside the window, is cut by the
//                       edge of its region, or has a label wider than itself (widgets.h, layout_problems)
//   screenshot FILE     write a PNG of the next frame
//   quit                end (also at the end of the file)
// Labels are matched against what a target shows (the text before any "##").
// A failing command ends the program with exit status 3 and a message naming
// the script line.
#pragma once
#include <string>
#include <vector>

#include <SDL.h>

namespace cairn::ui {

class App;

class Script {
 public:
  // Reads FILE; throws std::runtime_error naming the file and line of a bad command.
  static Script load(const std::string& path);

  enum class Step { Continue, Done, Failed };
  // Called once per frame before the frame's events are polled.
  Step step(App& app);
  const std::string& failure() const { return failure_; }

 private:
  struct Command {
    int line = 0;
    std::vector<std::string> words;
  };
  struct Delayed {
    int frames = 0;
    SDL_Event event;
  };
  bool run(App& app, const Command& c);
  bool fail(const Command& c, const std::string& why);
  static bool on_screen(const std::string& s);
  void push_later(int frames, const SDL_Event& e);

  std::string path_;
  std::vector<Command> commands_;
  size_t next_ = 0;
  int wait_frames_ = 0;
  bool wait_idle_ = false;
  Uint32 idle_deadline_ = 0;       // SDL_GetTicks() time: wait-idle gives up then
  std::string wait_text_;          // wait-for: the text awaited
  Uint32 wait_text_deadline_ = 0;  // SDL_GetTicks() time
  int wait_text_line_ = 0;
  Uint32 settle_deadline_ = 0;  // SDL_GetTicks() time: until then a command waits for the screens' builds
  std::vector<Delayed> delayed_;
  std::string failure_;
  bool done_ = false;
};

}  // namespace cairn::ui
