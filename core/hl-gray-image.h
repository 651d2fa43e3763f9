/* hl-gray-image.h: every radiograph as 16-bit grey, and the calibration a
 * file carries.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * One entry point, hl_gray_image_load(), reads DICOM, PNG, TIFF and JPEG
 * files, recognised by their content whatever their name.  Every image is
 * held as 16-bit grey, bone white: a higher value is whiter (MONOCHROME1
 * files are turned over, colour is converted to grey), with the DICOM
 * rescale slope and intercept applied.
 *
 * Limits checked before work is done: a file over HL_GRAY_IMAGE_MAX_FILE_BYTES
 * is refused before it is read, an image over HL_GRAY_IMAGE_MAX_PIXELS
 * before it is decoded.
 *
 * Nothing identifying is read into the result: only the technical
 * elements listed in hl-dicom.cpp (size, bits, photometric, rescale,
 * window, spacing, magnification, burned-in annotation, frames).
 */
#pragma once

#include <stdbool.h>
#include <stdint.h>

#include "hl-image-ref.h"
#include "hl-types.h"

#ifdef __cplusplus
extern "C" {
#endif

#define HL_GRAY_IMAGE_MAX_FILE_BYTES (512LL * 1024 * 1024)   /* 512 MB */
#define HL_GRAY_IMAGE_MAX_PIXELS 100000000LL                 /* 100 megapixels */
#define HL_GRAY_IMAGE_MAX_SIDE 65535                          /* pixels */
#define HL_GRAY_IMAGE_NOTE_MAX 256

typedef enum {
  HL_IMAGE_FORMAT_DICOM = 0,
  HL_IMAGE_FORMAT_PNG,
  HL_IMAGE_FORMAT_TIFF,
  HL_IMAGE_FORMAT_JPEG,
} HlImageFormat;

/* The spacing elements of a file, as read (DICOM only; all false for the
 * other formats).  Spacings are mm; row and column spacing must agree. */
typedef struct {
  bool has_pixel_spacing;         /* (0028,0030) */
  double pixel_spacing_mm;
  bool pixel_spacing_calibrated;  /* (0028,0A02) present */
  bool has_imager_spacing;        /* (0018,1164) */
  double imager_spacing_mm;
  bool has_magnification;         /* (0018,1114) */
  double magnification;
} HlFileSpacing;

/* The calibration chosen from a file's spacing elements. */
typedef struct {
  HlSpacingSource source;
  double detector_spacing_mm;   /* image mm per pixel, before magnification */
  double magnification;         /* M: 1 for calibrated Pixel Spacing */
  double mm_per_pixel;          /* true mm per pixel: detector / M */
  bool assumed;                 /* M is the default 1.20 */
} HlSpacingChoice;

typedef struct {
  HlImageFormat format;
  int width;
  int height;
  uint16_t *pixels;          /* width * height, row by row, bone white */
  int bits;                  /* bits stored in the file (8, 12, 16 ...) */
  char photometric[24];      /* as in the file: MONOCHROME1, MONOCHROME2, RGB ... */
  /* Held value h stands for the file's (rescaled) value
   * value_offset + value_scale * h (before turning MONOCHROME1 over). */
  double value_offset;
  double value_scale;
  bool turned_over;          /* MONOCHROME1 shown bone-white */
  bool has_file_window;      /* the file's first window preset, in held values */
  double file_window_centre;
  double file_window_width;
  HlFileSpacing spacing;
  bool burned_in_annotation; /* (0028,0301) YES */
  int frames;                /* frames in the file; the first is held */
  bool colour_converted;
  char note[HL_GRAY_IMAGE_NOTE_MAX];  /* "" or plain words for the window */
} HlGrayImage;

/* Reads an image file into a new HlGrayImage.  NULL on failure with err
 * naming the file and the problem: missing, unreadable, too large, not an
 * image of a known kind, truncated, undecodable, zero or absurd
 * dimensions, a spacing that is 0, negative or not a number, a
 * magnification outside HL_MAGNIFICATION_MIN..MAX. */
HlGrayImage *hl_gray_image_load (const char *path, HlError *err);
void hl_gray_image_free (HlGrayImage *img);

/* Plain name of a format: "dicom", "png", "tiff", "jpeg". */
const char *hl_image_format_name (HlImageFormat f);
/* Which format the first bytes of a file show; false when none.  DICOM is
 * "DICM" at byte 128. */
bool hl_image_format_sniff (const unsigned char *head, size_t n,
                            HlImageFormat *out);

/* True when this build reads DICOM files. */
bool hl_dicom_available (void);

/* Window from the histogram: the 0.5 and 99.5 percentiles of the held
 * values (width at least 1). */
void hl_gray_image_auto_window (const HlGrayImage *img, double *centre,
                                double *width);
/* The file's preset when there is one, else the automatic window.
 * *from_file (may be NULL) says which. */
void hl_gray_image_default_window (const HlGrayImage *img, double *centre,
                                   double *width, bool *from_file);

/* The calibration precedence of a file's elements:
 *  1. Pixel Spacing declared calibrated (M = 1);
 *  2. Imager Pixel Spacing / Estimated Radiographic Magnification Factor;
 *  3. Imager Pixel Spacing / HL_MAGNIFICATION_ASSUMED, said to be assumed;
 *  a Pixel Spacing without calibration type is detector spacing and stands
 *  for Imager Pixel Spacing in 2 and 3 where that is absent;
 *  4. none (source HL_SPACING_NONE, spacing 0).
 * A marker or known distance placed by the user comes before all of
 * these, a typed spacing after them (hl-image.h).  Fails with a message
 * naming the element on a spacing that is not finite or outside
 * HL_PIXEL_SPACING_MIN_MM..MAX, or a magnification outside
 * HL_MAGNIFICATION_MIN..MAX. */
HlStatus hl_spacing_choose (const HlFileSpacing *in, HlSpacingChoice *out,
                            HlError *err);
/* The window that shows what brightness and contrast showed (plans from
 * before the window): over the held values 0..top. */
void hl_window_from_brightness_contrast (double brightness, double contrast,
                                         double top, double *centre, double *width);

/* "pixel-spacing", "imager-spacing-ermf", "imager-spacing-default", "none"
 * (the contract of `hiplever-cli image`). */
const char *hl_spacing_source_name (HlSpacingSource s);
/* Parses a name above; false when unknown. */
bool hl_spacing_source_from_name (const char *name, HlSpacingSource *out);
/* Plain words for the window and the report (translated). */
const char *hl_spacing_source_label (HlSpacingSource s);

/* ---- For the readers ---------------------------------------------------- */

/* The DICOM reader (hl-dicom.cpp over GDCM, or hl-dicom-none.c in a build
 * without it), called by hl_gray_image_load() after the file's size and
 * its "DICM" preamble have been checked: the first frame, technical
 * elements only; *out is a new image on success. */
HlStatus hl_dicom_read (const char *path, HlGrayImage **out, HlError *err);

/* A zeroed image of w x h with its pixel buffer; NULL when out of memory. */
HlGrayImage *hl_gray_image_alloc (HlImageFormat f, int w, int h);
/* Checks w and h against zero and the limits; message names `path`. */
HlStatus hl_gray_image_check_size (const char *path, long long w, long long h,
                                   HlError *err);

#ifdef __cplusplus
}
#endif
