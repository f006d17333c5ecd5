// SPDX-License-Identifier: MIT
#pragma once
// Small helpers for writing stage declarations tersely. Internal to umbra_recon.
#include <string>
#include <vector>

#include "core/parameters.h"

namespace umbra::recon::detail {

/// A Real parameter: value in [min, max] `unit`, default `def`.
inline core::ParamSpec realParam(std::string name, std::string label, std::string description, std::string unit, double min,
                                 double max, double def, bool display_only = false, double step = 0) {
    core::ParamSpec p;
    p.name = std::move(name);
    p.label = std::move(label);
    p.description = std::move(description);
    p.unit = std::move(unit);
    p.kind = core::ParamKind::Real;
    p.min = min;
    p.max = max;
    p.default_number = def;
    p.display_only = display_only;
    p.step = step;
    return p;
}

/// realParam whose value 0 is a mode, not a value: `zero_means` is what a user sees for 0
/// (e.g. "automatic", "from capture"); min must be 0 or below.
inline core::ParamSpec modalRealParam(std::string name, std::string label, std::string description, std::string unit, double min,
                                      double max, std::string zero_means, double step = 0, bool display_only = false) {
    auto p = realParam(std::move(name), std::move(label), std::move(description), std::move(unit), min, max, 0, display_only, step);
    p.zero_means = std::move(zero_means);
    return p;
}

/// An Integer parameter in [min, max], default `def`.
inline core::ParamSpec intParam(std::string name, std::string label, std::string description, double min, double max, double def,
                                bool display_only = false) {
    auto p = realParam(std::move(name), std::move(label), std::move(description), "", min, max, def, display_only, 1);
    p.kind = core::ParamKind::Integer;
    return p;
}

/// An on/off parameter, default `def` (0/1).
inline core::ParamSpec flagParam(std::string name, std::string label, std::string description, bool def, bool display_only = false) {
    auto p = realParam(std::move(name), std::move(label), std::move(description), "", 0, 1, def ? 1 : 0, display_only, 1);
    p.kind = core::ParamKind::Flag;
    return p;
}

/// A Choice parameter among `choices`, default `def`.
inline core::ParamSpec choiceParam(std::string name, std::string label, std::string description, std::vector<std::string> choices,
                                   std::string def, bool display_only = false) {
    core::ParamSpec p;
    p.name = std::move(name);
    p.label = std::move(label);
    p.description = std::move(description);
    p.kind = core::ParamKind::Choice;
    p.choices = std::move(choices);
    p.default_text = std::move(def);
    p.display_only = display_only;
    return p;
}

/// A Text parameter with its own syntax, default `def`.
inline core::ParamSpec textParam(std::string name, std::string label, std::string description, std::string unit, std::string def,
                                 bool display_only = false) {
    core::ParamSpec p;
    p.name = std::move(name);
    p.label = std::move(label);
    p.description = std::move(description);
    p.unit = std::move(unit);
    p.kind = core::ParamKind::Text;
    p.default_text = std::move(def);
    p.display_only = display_only;
    return p;
}

}  // namespace umbra::recon::detail
