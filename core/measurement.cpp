// SPDX-License-Identifier: MIT
#include "core/measurement.h"

#include "core/error.h"

namespace umbra::core {

size_t pointCount(MeasurementKind kind) {
    switch (kind) {
    case MeasurementKind::Caliper: return 2;
    case MeasurementKind::DepthMarker: return 1;
    case MeasurementKind::ExtentBox: return 2;
    case MeasurementKind::Ellipse: return 3;
    }
    return 0;
}
std::vector<Quantity> evaluate(const Measurement&, const UncertaintyModel&) { return {}; }
double ellipseCircumferenceRamanujan(double, double) { return 0; }
std::string kindName(MeasurementKind) { return {}; }
std::optional<MeasurementKind> kindFromName(const std::string&) { return std::nullopt; }
std::string formatQuantity(const Quantity&) { return {}; }
std::string formatQuantities(const std::vector<Quantity>&) { return {}; }
std::string quantityTooltip(const Quantity&, const UncertaintyModel&) { return {}; }
std::string nextMeasurementId(const std::vector<std::string>&) { return "M1"; }

}  // namespace umbra::core
