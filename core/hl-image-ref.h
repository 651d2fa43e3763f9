/* hl-image-ref.h: the radiograph reference a plan holds (hl-image.h).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Apart from hl-image.h so that hl-plan.h can hold one without including
 * the functions that take a plan.
 */
#pragma once

#include <stdbool.h>
#include "hl-types.h"

#ifdef __cplusplus
extern "C" {
#endif

#define HL_IMAGE_PATH_MAX 1024   /* bytes, including the terminating NUL */

/* Assumption: a typical digital radiograph detector pitch, 0.1 mm per
 * pixel at the detector (from memory, not a published figure).  Type the
 * value of the actual detector where it is known. */
#define HL_PIXEL_SPACING_DEFAULT_MM 0.1
#define HL_PIXEL_SPACING_MIN_MM 0.01
#define HL_PIXEL_SPACING_MAX_MM 2.0

/* Display adjustments: brightness adds, contrast multiplies about mid-grey,
 * invert swaps black and white, opacity blends over the background. */
#define HL_IMAGE_BRIGHTNESS_MIN (-1.0)
#define HL_IMAGE_BRIGHTNESS_MAX 1.0
#define HL_IMAGE_CONTRAST_MIN 0.1
#define HL_IMAGE_CONTRAST_MAX 5.0

/* Window of the grey values (centre and width in the image's held 16-bit
 * values, hl-gray-image.h): the width 0 stands for "not set", and the
 * image's own preset or the automatic window is shown. */
#define HL_IMAGE_WINDOW_WIDTH_MIN 1.0
#define HL_IMAGE_WINDOW_WIDTH_MAX 131072.0
#define HL_IMAGE_WINDOW_CENTRE_MIN (-65536.0)
#define HL_IMAGE_WINDOW_CENTRE_MAX 131072.0

/* Where an image's mm per pixel comes from (hl-gray-image.h has the
 * precedence).  In a plan, HL_SPACING_NONE means the spacing is typed (or
 * the default). */
typedef enum {
  HL_SPACING_NONE = 0,          /* the file gives none: type it or calibrate */
  HL_SPACING_PIXEL,             /* Pixel Spacing declared calibrated */
  HL_SPACING_IMAGER_ERMF,       /* detector spacing / the file's magnification */
  HL_SPACING_IMAGER_DEFAULT,    /* detector spacing / 1.20, an assumption */
} HlSpacingSource;

/* The radiograph of a plan. */
typedef struct {
  bool present;                    /* false: no image; the rest is unused */
  char path[HL_IMAGE_PATH_MAX];    /* as stored: absolute after loading a plan
                                    * file, relative to the plan's folder in
                                    * the file itself */
  char sha256[65];                 /* 64 lower-case hex digits, or "" */
  double pixel_spacing_mm;         /* image mm per pixel */
  HlVec2 origin_mm;                /* plan frame, top-left corner of the image */
  double brightness;               /* -1..1, 0 = as is (plans before the window) */
  double contrast;                 /* 0.1..5, 1 = as is (plans before the window) */
  double window_centre;            /* held grey values, when window_width > 0 */
  double window_width;             /* 0: not set (brightness and contrast, or
                                    * the image's own window) */
  HlSpacingSource spacing_source;  /* where pixel_spacing_mm came from */
  bool invert;
  double opacity;                  /* 0..1 */
  bool schematic_visible;          /* draw the schematic bones over it */
} HlRadiograph;

/* No image, the display defaults in place. */
void hl_radiograph_init (HlRadiograph *rg);

/* Range checks: a path with no NUL or control bytes, a digest of 64 hex
 * digits or none, spacing, origin and adjustments in range. */
HlStatus hl_radiograph_check (const HlRadiograph *rg, HlError *err);

/* HL_OK when v is finite and within [lo, hi]; else HL_ERR_INVALID naming
 * `field`, with "WHAT is V: it must lie between LO and HI". */
HlStatus hl_check_range (double v, double lo, double hi, const char *field,
                         const char *what, HlError *err);

#ifdef __cplusplus
}
#endif
