/* hl-version.h: program and model versions, and the clinical caution.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#ifdef __cplusplus
extern "C" {
#endif

/* The program version (from meson). */
const char *hl_program_version (void);

/* The version of the mechanical model: bumped whenever a change to the core
 * can change a number it computes. */
#define HL_MODEL_VERSION "1.0"

/* The caution shown in the window and written into every export.  One line
 * and the full text. */
const char *hl_caution_short (void);
const char *hl_caution_text (void);

#ifdef __cplusplus
}
#endif
