// SPDX-License-Identifier: MIT
// libFuzzer target: the DICOM ultrasound image reader (bytes -> parsed data set, sizes checked
// against the limits and the bytes held, every frame decoded). InputError is the expected outcome.
#include <cstdint>
#include <cstdlib>

#include "core/dicom_image.h"

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) { return umbra::core::fuzzDicomBuffer(data, size); }
