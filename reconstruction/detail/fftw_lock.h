// SPDX-License-Identifier: MIT
#pragma once
// FFTW's planner is not thread-safe: every plan creation/destruction in umbra_recon takes
// this lock. Executing plans needs no lock.
#include <mutex>

namespace umbra::recon::detail {
inline std::mutex& fftwPlannerMutex() {
    static std::mutex m;
    return m;
}
}  // namespace umbra::recon::detail
