/* hl-image.h: the patient's radiograph under the plan, by reference.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * A plan never holds pixels.  It holds a reference to an image file (its
 * path and SHA-256 digest), the image's pixel spacing and where the image
 * lies in the plan frame, and how it is shown.  The file name is the
 * user's: files should be anonymised before they are referenced.
 *
 * Frames and units:
 *  - pixel (u, v): column and row from the image's top-left corner, v down;
 *  - image mm: millimetres measured on the radiograph, before correction
 *    for magnification: (u * s, -v * s) with s the pixel spacing in image
 *    mm per pixel, so that y is superior as in the plan frame;
 *  - plan mm (hl-plan.h): true anatomical millimetres,
 *        plan = origin + image_mm / M
 *    with M the calibration's magnification (hl_calibration_magnification)
 *    and origin the plan-frame position of the image's top-left corner.
 *    At true scale one pixel is s / M plan mm wide.
 *
 * Recalibrating changes M; the landmarks were placed on pixels, so they
 * are rescaled about the image origin by M_old / M_new and stay on the
 * same pixels (hl_image_apply_calibration).
 */
#pragma once

#include "hl-gray-image.h"
#include "hl-image-ref.h"
#include "hl-plan.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Pixel <-> image mm <-> plan mm, as in the header comment. */
HlVec2 hl_image_pixel_to_image_mm (const HlRadiograph *rg, double u, double v);
HlVec2 hl_image_mm_to_plan (const HlRadiograph *rg, double m, HlVec2 image_mm);
HlVec2 hl_image_plan_to_image_mm (const HlRadiograph *rg, double m, HlVec2 plan);
/* Plan mm per pixel at true scale: s / M. */
double hl_image_plan_mm_per_pixel (const HlRadiograph *rg, double m);

/* Where the image lands for a plan: its origin and plan mm per pixel with
 * the plan's calibration. */
typedef struct {
  HlVec2 origin_mm;
  double mm_per_pixel;
  double magnification;
  bool assumed;           /* M is the assumed 1.20, not calibrated */
} HlImagePlacement;

/* Fails when the plan has no image or its calibration gives no
 * magnification (too few points, collinear, out of range). */
HlStatus hl_image_placement (const HlPlan *plan, HlImagePlacement *out,
                             HlError *err);

/* Replaces the plan's calibration with `cal`.  With an image, every
 * landmark is rescaled about the image origin by M_old / M_new so that it
 * stays on its pixel; without one, nothing else moves.  When the old
 * calibration gives no magnification (a marker half placed) the assumed
 * 1.20 stands for M_old, as the image was drawn with it.  Fails, leaving
 * the plan as it was, when `cal` gives no magnification. */
HlStatus hl_image_apply_calibration (HlPlan *plan, const HlCalibration *cal,
                                     HlError *err);

/* The magnification the image is drawn with: the calibration's, or the
 * assumed 1.20 while the calibration gives none.  Never fails. */
double hl_image_display_magnification (const HlPlan *plan, bool *assumed);

/* Changes the pixel spacing.  Calibration points are image mm, so they
 * scale with it; landmarks are rescaled about the image origin so that
 * each stays on its pixel.  A spacing that would take the magnification of
 * a calibration that gives one outside 1.0-1.5 is refused with the
 * calibration's message, and nothing changes. */
HlStatus hl_image_set_pixel_spacing (HlPlan *plan, double spacing_mm,
                                     HlError *err);

/* Places an image of width x height pixels into the plan: spacing
 * `spacing_mm`, display defaults, centred on the placed landmarks (or the
 * plan origin when none are placed) at the current magnification. */
void hl_image_attach (HlPlan *plan, const char *path, const char *sha256_hex,
                      double spacing_mm, int width, int height);

/* Places an image read from a file (hl-gray-image.h): its spacing and
 * calibration from the file when it gives them (sc->source not NONE) and
 * the plan's calibration is not a marker or known distance placed by the
 * user, which comes first: calibrated Pixel Spacing gives a typed M of 1,
 * the file's magnification factor a typed M of that factor, the default
 * the assumed 1.20.  Without a spacing in the file, `typed_spacing_mm`.
 * Then as hl_image_attach. */
void hl_image_attach_file (HlPlan *plan, const char *path, const char *sha256_hex,
                           const HlSpacingChoice *sc, double typed_spacing_mm,
                           int width, int height);

/* Which calibration a plan's image is drawn with, first that applies:
 * a marker or a known distance placed by the user; the file's calibrated
 * pixel spacing, detector spacing and magnification factor, or detector
 * spacing with 1.20 assumed (while the calibration is still the one the
 * file gave); a typed spacing with a typed or assumed magnification. */
typedef enum {
  HL_CAL_SOURCE_MARKER = 0,
  HL_CAL_SOURCE_KNOWN_DISTANCE,
  HL_CAL_SOURCE_FILE_PIXEL_SPACING,
  HL_CAL_SOURCE_FILE_IMAGER_ERMF,
  HL_CAL_SOURCE_FILE_IMAGER_DEFAULT,
  HL_CAL_SOURCE_TYPED,
  HL_CAL_SOURCE_TYPED_ASSUMED,
} HlCalSource;

HlCalSource hl_image_calibration_source (const HlPlan *plan);
/* Plain words for the window and the report (translated). */
const char *hl_cal_source_label (HlCalSource s);

/* ---- Files ------------------------------------------------------------ */

typedef enum {
  HL_IMAGE_OK = 0,
  HL_IMAGE_MISSING,     /* "moved or missing" */
  HL_IMAGE_CHANGED,     /* "changed since the plan was saved" */
  HL_IMAGE_UNREADABLE,  /* exists but cannot be read */
} HlImageCheck;

/* Plain words for a check result. */
const char *hl_image_check_text (HlImageCheck check);

/* SHA-256 of a radiograph file as hex.  HL_ERR_IO with the reason when it
 * cannot be read; regular files only.  Before anything is hashed the size
 * and the type are checked: a file over HL_GRAY_IMAGE_MAX_FILE_BYTES
 * (512 MB) is refused (HL_ERR_IO), and so is one whose first bytes are not
 * a DICOM, PNG, TIFF or JPEG image (HL_ERR_PARSE). */
HlStatus hl_file_sha256_hex (const char *path, char hex[65], HlError *err);

/* Checks that the referenced file exists and its digest matches (a
 * reference without a digest only has to exist).  `message` (which may be
 * NULL) gets one sentence naming the file. */
HlImageCheck hl_image_verify (const HlRadiograph *rg, char *message,
                              size_t message_size);

/* The plan's radiograph read for an export (a figure, the report, print):
 * the file is checked first (hl_image_verify), so that an image moved,
 * missing or changed since the plan was saved is never drawn under the
 * plan's landmarks.  NULL with err naming the file and saying which when
 * the plan has none, the file is missing, changed or unreadable, or it
 * cannot be decoded (hl_gray_image_load). */
HlGrayImage *hl_image_load_checked (const HlRadiograph *rg, HlError *err);

/* The window (centre and width in held values) the plan shows the image
 * with: the plan's own window; else what the brightness and contrast of
 * an older plan showed; else the image's preset or the automatic window
 * (hl_gray_image_default_window).  `img` may be NULL while the image is
 * not read: then the 16-bit range stands for the image's. */
void hl_radiograph_display_window (const HlRadiograph *rg, const HlGrayImage *img,
                                   double *centre, double *width);
/* The same with the image's own window (hl_gray_image_default_window: the
 * automatic one is a histogram of every pixel) already worked out, for a
 * view that shows the image on every edit. */
void hl_radiograph_display_window_known (const HlRadiograph *rg,
                                         const HlGrayImage *img,
                                         double image_centre, double image_width,
                                         double *centre, double *width);

/* `path` resolved against the folder of `base_file` (the plan file) when
 * relative; absolute paths are copied.  Fails when it does not fit. */
HlStatus hl_image_resolve_path (const char *base_file, const char *path,
                                char *out, size_t size, HlError *err);
/* `path` written relative to the folder of `base_file` when both can be
 * made absolute (".." steps where needed); else copied as it is. */
HlStatus hl_image_relative_path (const char *base_file, const char *path,
                                 char *out, size_t size, HlError *err);

#ifdef __cplusplus
}
#endif
