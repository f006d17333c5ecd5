// SPDX-License-Identifier: MIT
#include "reconstruction/view_mode.h"

#include <algorithm>
#include <cmath>

#include "core/error.h"

namespace umbra::recon {

bool ViewMode::usesShear() const {
    return std::count(tx.begin(), tx.end(), Wave::T) + std::count(rx.begin(), rx.end(), Wave::T) > 0;
}

const std::vector<std::string>& viewModeNames() {
    static const std::vector<std::string> names = {"L-L",   "T-T",  "L-T",  "T-L",   "LL-L", "L-LL", "LL-LL",
                                                   "TT-T",  "T-TT", "TT-TT", "LT-T", "T-LT", "TL-T", "T-TL"};
    return names;
}

ViewMode parseViewMode(const std::string& name) {
    const auto dash = name.find('-');
    auto legs = [&](const std::string& s) {
        std::vector<Wave> v;
        for (char c : s) {
            if (c == 'L' || c == 'l') v.push_back(Wave::L);
            else if (c == 'T' || c == 't') v.push_back(Wave::T);
            else v.clear(), v.resize(3);  // invalid letter: marks the side bad
        }
        return v;
    };
    ViewMode m;
    if (dash != std::string::npos && name.find('-', dash + 1) == std::string::npos) {
        m.tx = legs(name.substr(0, dash));
        m.rx = legs(name.substr(dash + 1));
        if (!m.tx.empty() && m.tx.size() <= 2 && !m.rx.empty() && m.rx.size() <= 2) {
            m.name.clear();
            for (auto w : m.tx) m.name += w == Wave::L ? 'L' : 'T';
            m.name += '-';
            for (auto w : m.rx) m.name += w == Wave::L ? 'L' : 'T';
            return m;
        }
    }
    throw core::SettingError("delay_model.mode = '" + name +
                             "': not a view; write the transmit legs, a dash and the receive legs, one or two letters L or T each "
                             "(e.g. L-L, T-T, TT-T)");
}

namespace {
std::string legWords(const std::vector<Wave>& legs) {
    auto wave = [](Wave w) { return std::string(w == Wave::L ? "longitudinal" : "shear"); };
    if (legs.size() == 1) return wave(legs[0]) + " direct";
    if (legs[0] == legs[1]) return wave(legs[0]) + " via the back wall";
    return wave(legs[0]) + ", converted to " + wave(legs[1]) + " at the back wall";
}
}  // namespace

std::string describeViewMode(const ViewMode& m) { return "transmit " + legWords(m.tx) + ", receive " + legWords(m.rx); }

double viewShearSpeed(const core::CaptureHeader& h, double recipe_shear_m_s) {
    if (recipe_shear_m_s > 0) return recipe_shear_m_s;
    return h.medium.shear_speed_m_s.value_or(0.0);
}

void checkViewMode(const core::CaptureHeader& h, const ViewMode& m, double recipe_shear_m_s) {
    if (m.usesShear() && !(viewShearSpeed(h, recipe_shear_m_s) > 0))
        throw core::SettingError("delay_model.mode = " + m.name +
                                 ": the mode has a shear (T) leg but the capture records no shear speed (/medium@shear_speed_m_s); "
                                 "set delay_model.shear_speed_m_s");
    if (m.usesBackWall() && !(h.medium.thickness_m && *h.medium.thickness_m > 0))
        throw core::SettingError("delay_model.mode = " + m.name +
                                 ": the mode skips off the back wall but the capture records no thickness (/medium@thickness_m)");
    const bool plain = m.name == "L-L" && !h.medium.wedge;
    if (!plain && h.transmit.kind != core::TransmitKind::SingleElement)
        throw core::SettingError("delay_model.mode = " + m.name + (h.medium.wedge ? " through a wedge" : "") +
                                 ": views other than direct L-L on contact need a full-matrix capture (single_element transmits); "
                                 "this capture has " + core::toString(h.transmit.kind) + " transmits");
}

std::vector<std::string> validViewModes(const core::CaptureHeader& h) {
    std::vector<std::string> out;
    for (const auto& n : viewModeNames()) {
        try {
            checkViewMode(h, parseViewMode(n));
            out.push_back(n);
        } catch (const core::SettingError&) {
        }
    }
    return out;
}

}  // namespace umbra::recon
