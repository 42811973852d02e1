// The features an export writes, made from a project and its cross-check and
// streamed to the GeoPackage and GeoJSON writers
// (app/core/export.h describes the layers and the symbol rotation).
#pragma once
#include <cstdint>
#include <optional>
#include <string>
#include <variant>
#include <vector>

#include "geomath/geodesy.h"
#include "app/core/export.h"
#include "formats/layers.h"

namespace cairn::core {

using store::Project;

using formats::Feature;
using formats::FieldDef;
using formats::FieldType;
using formats::FieldValue;
using formats::Layer;
using formats::LayerSet;
using formats::RotationFrame;

using formats::LayerSink;

// Sends the layers to SINK feature by feature as the records are read: only
// the cross-check's input and results, the small tables and each live
// station's place and code are held, never a layer's features (except the few
// of fitted_contacts, predicted_traces, trace_bands and day_tracks). Calls
// o.progress, when set, every 1000 features. Throws std::runtime_error naming
// the record when a position cannot be projected.
void stream_layers(Project& p, const ExportOptions& o, RotationFrame frame, LayerSink& sink);
// Passes everything on to TO, counting each layer's features into SUMMARY
// (and setting its EPSG code from the zone).
class CountingSink final : public LayerSink {
 public:
  CountingSink(LayerSink& to, ExportSummary& summary) : to_(to), summary_(summary) {}
  void begin(const geo::UtmZone& zone) override;
  void begin_layer(const Layer& l) override;
  void feature(Feature&& f) override;
  void end_layer() override { to_.end_layer(); }

 private:
  LayerSink& to_;
  ExportSummary& summary_;
};

// The same layers held whole (the survey store's publish).
LayerSet build_layers(Project& p, const ExportOptions& o, RotationFrame frame);

}  // namespace cairn::core
