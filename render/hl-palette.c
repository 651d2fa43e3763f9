/* hl-palette.c
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include "hl-i18n.h"
#include "hl-palette.h"

#define RGB8(r, g, b) { (r) / 255.0, (g) / 255.0, (b) / 255.0, 1.0 }

/* Okabe & Ito 2008, Color Universal Design. */
static const HlRgba oi_orange = RGB8 (230, 159, 0);
static const HlRgba oi_sky_blue = RGB8 (86, 180, 233);
static const HlRgba oi_bluish_green = RGB8 (0, 158, 115);
static const HlRgba oi_yellow = RGB8 (240, 228, 66);
static const HlRgba oi_blue = RGB8 (0, 114, 178);
static const HlRgba oi_vermillion = RGB8 (213, 94, 0);
static const HlRgba oi_reddish_purple = RGB8 (204, 121, 167);

/* Tints behind an error message: the vermillion mixed into the background. */
static const HlRgba error_fill_light = RGB8 (251, 231, 214);
static const HlRgba error_fill_dark = RGB8 (74, 38, 16);

HlRgba
hl_palette_color (HlPaletteRole role, bool dark)
{
  switch (role)
    {
    case HL_ROLE_WEIGHT:
      return dark ? oi_sky_blue : oi_blue;
    case HL_ROLE_ABDUCTOR:
      return oi_bluish_green;
    case HL_ROLE_JOINT:
      return oi_vermillion;
    case HL_ROLE_CANE:
      return oi_reddish_purple;
    case HL_ROLE_LOAD:
      return oi_orange;
    case HL_ROLE_HANDLE:
      return oi_yellow;
    case HL_ROLE_HANDLE_OPTIONAL:
      return oi_sky_blue;
    case HL_ROLE_OPTION:
      return dark ? oi_sky_blue : oi_blue;
    case HL_ROLE_ERROR:
      return oi_vermillion;
    case HL_ROLE_ERROR_FILL:
      return dark ? error_fill_dark : error_fill_light;
    case HL_ROLE_N:
    default:
      break;
    }
  return oi_vermillion;
}

int
hl_palette_dashes (HlPaletteRole role, double dashes[])
{
  switch (role)
    {
    case HL_ROLE_WEIGHT:
      dashes[0] = 9.0;
      dashes[1] = 4.0;
      return 2;
    case HL_ROLE_CANE:
      dashes[0] = 9.0;
      dashes[1] = 3.0;
      dashes[2] = 2.0;
      dashes[3] = 3.0;
      return 4;
    case HL_ROLE_LOAD:
      dashes[0] = 2.0;
      dashes[1] = 3.0;
      return 2;
    case HL_ROLE_ABDUCTOR:
    case HL_ROLE_JOINT:
    case HL_ROLE_HANDLE:
    case HL_ROLE_HANDLE_OPTIONAL:
    case HL_ROLE_OPTION:
    case HL_ROLE_ERROR:
    case HL_ROLE_ERROR_FILL:
    case HL_ROLE_N:
    default:
      break;
    }
  return 0;
}

const char *
hl_palette_line_style_name (HlPaletteRole role)
{
  switch (role)
    {
    case HL_ROLE_WEIGHT:
      return _("dashed");
    case HL_ROLE_CANE:
      return _("dash-dot");
    case HL_ROLE_LOAD:
      return _("dotted");
    case HL_ROLE_JOINT:
      return _("solid, heavy");
    case HL_ROLE_ABDUCTOR:
    case HL_ROLE_HANDLE:
    case HL_ROLE_HANDLE_OPTIONAL:
    case HL_ROLE_OPTION:
    case HL_ROLE_ERROR:
    case HL_ROLE_ERROR_FILL:
    case HL_ROLE_N:
    default:
      break;
    }
  return _("solid");
}
