/* hl-ui-types.h: forward typedefs and small types the widgets share.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Included instead of another widget's header where only the name of a
 * type is needed, so the includes of ui/ stay free of circles.
 */
#pragma once

#include <glib.h>
#include "hl-solve.h"

G_BEGIN_DECLS

typedef struct _HlDocument HlDocument;
typedef struct _HlWindow HlWindow;

/* One solved column: native (index 0) or option index - 1. */
typedef struct {
  HlStatus status;
  HlError error;
  HlResult result;
} HlSolved;

G_END_DECLS
