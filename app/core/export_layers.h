// The features an export writes, built once from a project and its
// cross-check and written by the GeoPackage and GeoJSON writers
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

// Throws std::runtime_error naming the record when a position cannot be projected.
LayerSet build_layers(Project& p, const ExportOptions& o, RotationFrame frame);

}  // namespace cairn::core
