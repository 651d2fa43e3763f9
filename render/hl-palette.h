/* hl-palette.h: the colours of the drawing, by meaning.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The hues are the colour-blind-safe palette of Okabe & Ito 2008, "Color
 * Universal Design (CUD): how to make figures and presentations that are
 * friendly to colorblind people" (J*FLY).  Colour is never the only cue:
 * every role also has its own line style (hl_palette_dashes).  In a dark
 * theme the palette's blue, too dark on a dark background, gives way to its
 * sky blue; the other hues are the same in both themes.
 *
 * No GTK here: the command line uses these colours for figures too.
 */
#pragma once

#include <stdbool.h>

#ifdef __cplusplus
extern "C" {
#endif

typedef struct {
  double r, g, b, a;   /* 0..1 */
} HlRgba;

typedef enum {
  HL_ROLE_WEIGHT = 0,      /* superincumbent weight and its line */
  HL_ROLE_ABDUCTOR,        /* abductor pull and line of action */
  HL_ROLE_JOINT,           /* joint reaction force */
  HL_ROLE_CANE,
  HL_ROLE_LOAD,            /* hand and midline loads */
  HL_ROLE_HANDLE,          /* required landmark handles */
  HL_ROLE_HANDLE_OPTIONAL, /* optional landmark handles */
  HL_ROLE_OPTION,          /* the option's moved landmarks and cup */
  HL_ROLE_ERROR,           /* the frame and title of an error box */
  HL_ROLE_ERROR_FILL,      /* its background */
  HL_ROLE_N
} HlPaletteRole;

/* The colour of a role, opaque. */
HlRgba hl_palette_color (HlPaletteRole role, bool dark);

/* Line style of a role: fills dashes[] (lengths in px, at most
 * HL_PALETTE_DASHES_MAX) and returns how many; 0 = solid. */
#define HL_PALETTE_DASHES_MAX 4
int hl_palette_dashes (HlPaletteRole role, double dashes[]);

/* A readable name of a role's line style ("solid", "dashed"...), for the
 * legend and accessible descriptions. */
const char *hl_palette_line_style_name (HlPaletteRole role);

#ifdef __cplusplus
}
#endif
