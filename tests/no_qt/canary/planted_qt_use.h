// SPDX-License-Identifier: MIT
#pragma once
// Not compiled: planted for the no_qt_headers_canary test, which must find this include.
#include <QWidget>
