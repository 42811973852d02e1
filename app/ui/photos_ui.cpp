#include "app/ui/photos_ui.h"

#include <fmt/format.h>

#include <SDL.h>
#include <SDL_opengl.h>

#include <algorithm>
#include <cstdint>
#include <filesystem>

#include <imgui.h>
#include <imgui_stdlib.h>

#include "app/cli/project_access.h"
#include "app/core/photo_thumbs.h"
#include "app/ui/app.h"
#include "app/ui/widgets.h"

namespace cairn::ui {

namespace fs = std::filesystem;

namespace {

ImTextureID texture_id(unsigned t) { return reinterpret_cast<ImTextureID>(static_cast<intptr_t>(t)); }

// Draws P fitted in a box of W x H at the cursor and advances the cursor; a
// placeholder with the reason when there is no picture.
void draw_picture(const PhotoTexture& p, float w, float h) {
  Look& lk = look();
  const ImVec2 at = ImGui::GetCursorScreenPos();
  ImDrawList* dl = ImGui::GetWindowDrawList();
  dl->AddRectFilled(at, ImVec2(at.x + w, at.y + h), lk.pal.panel);
  if (p.texture && p.width > 0 && p.height > 0) {
    const float f = std::min(w / static_cast<float>(p.width), h / static_cast<float>(p.height));
    const float pw = p.width * f, ph = p.height * f;
    const ImVec2 a(at.x + (w - pw) / 2, at.y + (h - ph) / 2);
    dl->AddImage(texture_id(p.texture), a, ImVec2(a.x + pw, a.y + ph));
  }
  ImGui::Dummy(ImVec2(w, h));
}

}  // namespace

const PhotoTexture& PhotoTextures::get(const std::string& project_path, const store::Photo& photo, int side) {
  const std::string key = project_path + "|" + photo.meta.uuid + "|" + photo.sha256 + "|" + std::to_string(side);
  auto it = map_.find(key);
  if (it != map_.end()) return it->second;
  PhotoTexture t;
  const auto thumb = core::load_thumbnail(project_path, photo, side);
  if (!thumb) {
    t.problem = thumb.error();
  } else {
    const formats::Picture& pic = thumb->picture;
    t.width = pic.width;
    t.height = pic.height;
    t.content_matches = thumb->content_matches;
    GLint align = 4;
    glGetIntegerv(GL_UNPACK_ALIGNMENT, &align);
    glPixelStorei(GL_UNPACK_ALIGNMENT, 1);  // rows of 3-byte pixels
    glGenTextures(1, &t.texture);
    glBindTexture(GL_TEXTURE_2D, t.texture);
    glTexParameteri(GL_TEXTURE_2D, GL_TEXTURE_MIN_FILTER, GL_LINEAR);
    glTexParameteri(GL_TEXTURE_2D, GL_TEXTURE_MAG_FILTER, GL_LINEAR);
    glTexParameteri(GL_TEXTURE_2D, GL_TEXTURE_WRAP_S, GL_CLAMP_TO_EDGE);
    glTexParameteri(GL_TEXTURE_2D, GL_TEXTURE_WRAP_T, GL_CLAMP_TO_EDGE);
    glTexImage2D(GL_TEXTURE_2D, 0, GL_RGB, pic.width, pic.height, 0, GL_RGB, GL_UNSIGNED_BYTE, pic.rgb.data());
    glPixelStorei(GL_UNPACK_ALIGNMENT, align);
  }
  return map_.emplace(key, std::move(t)).first->second;
}

void PhotoTextures::clear() {
  for (auto& [k, t] : map_)
    if (t.texture) glDeleteTextures(1, &t.texture);
  map_.clear();
}

void station_thumbnails(App& a, const store::Station& s) {
  Model& m = *a.model;
  Look& lk = look();
  const auto photos = m.photos_of(s.meta.uuid);
  if (photos.empty()) {
    text_dim("No photos yet.");
    return;
  }
  const float h = lk.m.tap * 2.2f, w = h * 4 / 3;
  for (size_t i = 0; i < photos.size(); ++i) {
    const store::Photo& ph = *photos[i];
    if (i > 0) same_line_if_fits(w);
    ImGui::BeginGroup();
    const PhotoTexture& t = a.photos.textures.get(m.path(), ph, core::kThumbnailSide);
    const ImVec2 at = ImGui::GetCursorScreenPos();
    draw_picture(t, w, h);
    const std::string label = "photo " + ph.path;
    this_frame().targets.push_back({label, at, ImVec2(at.x + w, at.y + h), true});
    record_box(label);
    ImGui::SetCursorScreenPos(at);
    ImGui::PushID(ph.meta.uuid.c_str());
    if (ImGui::InvisibleButton("##thumb", ImVec2(w, h))) a.photos.open = ph.meta.uuid;
    ImGui::PopID();
    const std::string name = fs::path(ph.path).filename().string();
    text_dim(fit_to_width(t.problem.empty() ? name : "missing: " + name, w));
    ImGui::EndGroup();
  }
}

void photo_overlay(App& a) {
  if (a.photos.open.empty()) return;
  Model& m = *a.model;
  Look& lk = look();
  const store::Photo* ph = nullptr;
  for (const auto& p : m.photos())
    if (p.meta.uuid == a.photos.open) ph = &p;
  if (!ph) {
    a.photos.open.clear();
    return;
  }
  const ImVec2 min = a.canvas_min, max = a.canvas_max;
  ImGui::SetNextWindowPos(min);
  ImGui::SetNextWindowSize(ImVec2(max.x - min.x, max.y - min.y));
  ImGui::SetNextWindowFocus();
  ImGui::PushStyleColor(ImGuiCol_WindowBg, lk.pal.background);
  ImGui::Begin("##photo-overlay", nullptr,
               ImGuiWindowFlags_NoDecoration | ImGuiWindowFlags_NoMove | ImGuiWindowFlags_NoSavedSettings);
  if (button("Close photo", -1, true, true)) a.photos.open.clear();
  const store::Station* st = m.station(ph->station);
  text_wrapped((st ? st->code + "   " : std::string()) + ph->path + (ph->time.empty() ? "" : "   " + ph->time) +
               (ph->caption.empty() ? "" : "   " + ph->caption));
  const float w = ImGui::GetContentRegionAvail().x, h = std::max(lk.m.tap, ImGui::GetContentRegionAvail().y);
  const int side = std::clamp(static_cast<int>(std::max(w, h)), core::kThumbnailSide, 2048);
  const PhotoTexture& t = a.photos.textures.get(m.path(), *ph, side);
  if (!t.problem.empty()) error_box(t.problem);
  if (!t.content_matches) error_box("This file is not the one recorded (its SHA-256 differs).");
  draw_picture(t, w, std::max(lk.m.tap, ImGui::GetContentRegionAvail().y));
  record_box("enlarged photo");
  ImGui::End();
  ImGui::PopStyleColor();
}

void camp_photos(App& a) {
  Model& m = *a.model;
  Look& lk = look();
  PhotosUi& ps = a.photos;
  const bool busy = a.jobs.busy();
  const bool writable = m.writable();
  heading("Photos");
  text_wrapped("Match a folder of photos (beside the project) to their stations by EXIF time and GPS position.");
  if (ps.person.empty())
    if (const store::Person* me = m.person(a.person())) ps.person = me->initials;
  const float field_w = std::min(ImGui::GetContentRegionAvail().x, lk.m.tap * 7);
  const struct {
    const char* label;
    const char* hint;
    std::string* value;
  } fields[] = {{"photo folder", "folder, e.g. photos", &ps.folder},
                {"clock offset", "camera clock offset, e.g. +00:02:10", &ps.clock_offset},
                {"photo person", "initials, e.g. RO", &ps.person}};
  for (const auto& f : fields) {
    ImGui::SetNextItemWidth(field_w);
    ImGui::InputTextWithHint((std::string("##") + f.label).c_str(), f.hint, f.value);
    this_frame().targets.push_back({f.label, ImGui::GetItemRectMin(), ImGui::GetItemRectMax(), true});
    record_box(f.label);
  }
  if (button("Find stations for photos", -1, !busy, false)) {
    ps.error.clear();
    ps.plan.reset();
    ps.lines.clear();
    core::PhotoPlanOptions o;
    o.person = ps.person;
    if (!ps.clock_offset.empty()) {
      const auto off = core::parse_clock_offset(ps.clock_offset);
      if (!off)
        ps.error = off.error();
      else
        o.clock_offset = *off;
    }
    if (ps.error.empty()) {
      const std::string project = m.path();
      const fs::path folder = fs::path(ps.folder).is_absolute()
                                  ? fs::path(ps.folder)
                                  : fs::absolute(fs::path(project)).parent_path() / ps.folder;
      PhotosUi* state = &ps;
      a.jobs.start("Photos", [project, folder, o, state](JobProgress& pr) {
        pr.set(-1.0f, "reading the photos in " + folder.filename().string());
        store::OpenOptions oo = cli::cli_open_options(true);
        oo.backups = false;
        store::Project p = store::Project::open(project, oo);
        auto plan = std::make_shared<Result<core::PhotoPlan>>(core::plan_photos(p, folder.string(), o));
        return std::function<void()>([state, plan] {
          if (!*plan) {
            state->error = plan->error();
            return;
          }
          state->plan = plan->value();
          for (const auto& x : state->plan->photos) {
            std::string l = x.path;
            if (x.status == core::PhotoStatus::Match)
              l += " -> " + x.match.code +
                   (x.match.distance ? fmt::format(", {:.0f} m", *x.match.distance) : std::string(", no GPS")) + ", " +
                   (x.match.seconds_after < 0 ? "-" : "+") + core::duration_text(x.match.seconds_after);
            else if (x.status == core::PhotoStatus::Recorded)
              l += ": already recorded";
            else
              l += ": not matched: " + x.match.reason;
            state->lines.push_back(l);
          }
        });
      });
    }
  }
  if (!ps.error.empty()) error_box(ps.error);
  // The confirmation above the list, so that it stays on screen however many photos there are.
  if (ps.plan) {
    const int n = ps.plan->count(core::PhotoStatus::Match);
    if (button("Record " + std::to_string(n) + " photos", -1, writable && !busy && n > 0, true)) {
      const std::string project = m.path();
      const core::PhotoPlan plan = *ps.plan;
      Model* model = &m;
      PhotosUi* state = &ps;
      a.jobs.start("Photos", [project, plan, model, state](JobProgress& pr) {
        pr.set(-1.0f, "recording the photo references");
        store::Project p = store::Project::open(project, cli::cli_open_options(false));
        const store::PhotoBatch b = core::record_photos(p, plan);
        const std::string said = fmt::format("recorded {} photos, {} already there", b.added, b.skipped.size());
        return std::function<void()>([model, state, said] {
          model->reload();
          state->plan.reset();
          state->lines = {said};
        });
      });
    }
  }
  for (const auto& l : ps.lines) text_wrapped(l);
}

}  // namespace cairn::ui
