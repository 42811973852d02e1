// The day track on the Plan (app/plot/plan_scene.h, plan_track.h), read back
// through a RecordingCanvas: a dashed line through the fixes in time order, the
// last fix marked with an open square and the person's initials.
//
// Source: the dash pattern is the project's own choice (6 line widths of line,
// 3 of gap, the pattern carried across vertices: common practice for a dashed
// path, no published source); the expected dashes below are worked by hand
// from it. The projection to UTM is checked elsewhere against PROJ
// (tests/reference/test_utm_pyproj.py); here a plan in metres is given directly.
#include <gtest/gtest.h>

#include <vector>

#include "app/plot/plan_scene.h"
#include "app/plot/recording_canvas.h"

using namespace cairn::plot;

namespace {

PlanOptions bare() {
  PlanOptions o;
  o.line_width = 1;
  o.scale_bar = false;
  o.north_arrow = false;
  return o;
}

}  // namespace

TEST(PlanTrack, ADayTrackIsDashedAlongItsFixesAndMarkedAtTheLastOne) {
  // Scale 1 canvas unit per metre, the map point (0, 0) at the rect's centre
  // (200, 100). The walk: 27 m east, then 18 m north: canvas (200,100) ->
  // (227,100) -> (227,82). Dash 6, gap 3 (period 9), by hand:
  //   leg 1 (27 long): dashes 200-206, 209-215, 218-224, then 3 of gap ends at 227;
  //   leg 2 (18 long, y from 100 to 82): dashes 100-94, 91-85, then gap 85-82.
  PlanData d;
  d.tracks.push_back({{{0, 0}, {27, 0}, {27, 18}}, kInk, 1, "MT"});
  RecordingCanvas rec;
  const Rect r{0, 0, 400, 200};
  draw_plan(rec, r, d, PlanView{0, 0, 1}, bare());
  std::vector<std::vector<Pt>> dashes;
  const DrawOp* square = nullptr;
  const DrawOp* label = nullptr;
  for (const auto& op : rec.ops()) {
    if (op.kind == DrawOp::Polyline) dashes.push_back(op.pts);
    if (op.kind == DrawOp::Marker && op.shape == Shape::Square) square = &op;
    if (op.kind == DrawOp::Text && op.text == "MT") label = &op;
  }
  const std::vector<std::vector<Pt>> want{{{200, 100}, {206, 100}},
                                          {{209, 100}, {215, 100}},
                                          {{218, 100}, {224, 100}},
                                          {{227, 100}, {227, 94}},
                                          {{227, 91}, {227, 85}}};
  ASSERT_EQ(dashes.size(), want.size());
  for (size_t i = 0; i < want.size(); ++i) {
    ASSERT_EQ(dashes[i].size(), 2u);
    for (size_t k = 0; k < 2; ++k) {
      EXPECT_NEAR(dashes[i][k].x, want[i][k].x, 1e-9) << "dash " << i;
      EXPECT_NEAR(dashes[i][k].y, want[i][k].y, 1e-9) << "dash " << i;
    }
  }
  ASSERT_NE(square, nullptr);
  EXPECT_FALSE(square->filled);
  EXPECT_NEAR(square->pts[0].x, 227, 1e-9);  // the last fix
  EXPECT_NEAR(square->pts[0].y, 82, 1e-9);
  ASSERT_NE(label, nullptr);
  EXPECT_GT(label->pts[0].x, 227);  // beside it
}

TEST(PlanTrack, ATrackWhollyOffThePlanDrawsNothing) {
  PlanData d;
  d.tracks.push_back({{{5000, 5000}, {5100, 5000}}, kInk, 1, "MT"});
  RecordingCanvas rec;
  draw_plan(rec, Rect{0, 0, 400, 200}, d, PlanView{0, 0, 1}, bare());
  for (const auto& op : rec.ops()) {
    EXPECT_NE(op.kind, DrawOp::Polyline);
    EXPECT_NE(op.kind, DrawOp::Marker);
  }
}
