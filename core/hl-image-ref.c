/* hl-image-ref.c: the radiograph reference's defaults and range checks.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <string.h>

#include "hl-i18n.h"
#include "hl-image-ref.h"

#define HL_SHA256_HEX_DIGITS 64

void
hl_radiograph_init (HlRadiograph *rg)
{
  memset (rg, 0, sizeof *rg);
  rg->pixel_spacing_mm = HL_PIXEL_SPACING_DEFAULT_MM;
  rg->contrast = 1.0;
  rg->opacity = 1.0;
  rg->schematic_visible = true;
}

HlStatus
hl_check_range (double v, double lo, double hi, const char *field,
                const char *what, HlError *err)
{
  if (!isfinite (v) || v < lo || v > hi)
    return hl_error_set (err, HL_ERR_INVALID, field,
                         _("%s is %g: it must lie between %g and %g"), what, v, lo, hi);
  return HL_OK;
}

HlStatus
hl_radiograph_check (const HlRadiograph *rg, HlError *err)
{
  HlStatus st;

  if (!rg->present)
    return HL_OK;
  size_t len = strnlen (rg->path, sizeof rg->path);
  if (len == 0 || len == sizeof rg->path)
    return hl_error_set (err, HL_ERR_INVALID, "radiograph path",
                         _("The radiograph has no file name, or one longer than %d bytes"),
                         HL_IMAGE_PATH_MAX - 1);
  for (size_t i = 0; i < len; i++)
    if ((unsigned char) rg->path[i] < 0x20)
      return hl_error_set (err, HL_ERR_INVALID, "radiograph path",
                           _("The radiograph's file name holds a control character"));
  size_t hex_len = strnlen (rg->sha256, sizeof rg->sha256);
  if (hex_len != 0 && hex_len != HL_SHA256_HEX_DIGITS)
    return hl_error_set (err, HL_ERR_INVALID, "radiograph sha256",
                         _("The radiograph digest must be 64 hexadecimal digits"));
  for (size_t i = 0; i < hex_len; i++)
    if (!strchr ("0123456789abcdef", rg->sha256[i]))
      return hl_error_set (err, HL_ERR_INVALID, "radiograph sha256",
                           _("The radiograph digest must be 64 lower-case hexadecimal digits"));
  if ((st = hl_check_range (rg->pixel_spacing_mm, HL_PIXEL_SPACING_MIN_MM, HL_PIXEL_SPACING_MAX_MM,
                      "radiograph pixel-spacing", _("The pixel spacing (mm)"), err))
      || (st = hl_check_range (rg->origin_mm.x, -HL_COORD_MAX_MM, HL_COORD_MAX_MM,
                         "radiograph origin", _("The image origin x (mm)"), err))
      || (st = hl_check_range (rg->origin_mm.y, -HL_COORD_MAX_MM, HL_COORD_MAX_MM,
                         "radiograph origin", _("The image origin y (mm)"), err))
      || (st = hl_check_range (rg->brightness, HL_IMAGE_BRIGHTNESS_MIN, HL_IMAGE_BRIGHTNESS_MAX,
                         "radiograph brightness", _("The brightness"), err))
      || (st = hl_check_range (rg->contrast, HL_IMAGE_CONTRAST_MIN, HL_IMAGE_CONTRAST_MAX,
                         "radiograph contrast", _("The contrast"), err))
      || (st = hl_check_range (rg->opacity, 0.0, 1.0, "radiograph opacity",
                         _("The opacity"), err)))
    return st;
  if (rg->window_width != 0.0
      && ((st = hl_check_range (rg->window_width, HL_IMAGE_WINDOW_WIDTH_MIN,
                                HL_IMAGE_WINDOW_WIDTH_MAX, "radiograph window-width",
                                _("The window width"), err))
          || (st = hl_check_range (rg->window_centre, HL_IMAGE_WINDOW_CENTRE_MIN,
                                   HL_IMAGE_WINDOW_CENTRE_MAX, "radiograph window-centre",
                                   _("The window centre"), err))))
    return st;
  if ((unsigned) rg->spacing_source > HL_SPACING_IMAGER_DEFAULT)
    return hl_error_set (err, HL_ERR_INVALID, "radiograph spacing-source",
                         _("The radiograph's spacing source is not known"));
  return HL_OK;
}
