/* hl-analysis.h: everything beyond the single answer (model.md section 7).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * One include for the programs: capacity presets, the root finder, the
 * inverse questions, sweeps, and Monte Carlo uncertainty.
 */
#pragma once

#include "hl-capacity.h"
#include "hl-inverse.h"
#include "hl-root.h"
#include "hl-sweep.h"
#include "hl-uncertainty.h"
