/* hl-fuzz-image.c: fuzz target for the image entry point (hl_gray_image_load).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The input is written to a private temporary file and opened as an
 * image: DICOM (through GDCM), PNG, TIFF or JPEG, recognised by content.
 * Properties: a refusal comes with a status and a message; an accepted
 * image has a size within the limits and pixels, a calibration choice that
 * succeeds (the reader refuses a bad one), a finite window of positive
 * width, and no note longer than its buffer.  Seeds: tests/fuzz/corpus/image
 * (small synthetic files: tests/fuzz/make-image-seeds.sh), kept findings in
 * tests/fuzz/regressions/image.
 */
#include "config.h"

#include <math.h>
#include <string.h>
#include <unistd.h>

#include "hl-fuzz.h"
#include "hl-gray-image.h"

static char tmp_path[64];

static void
remove_tmp (void)
{
  if (tmp_path[0] != '\0')
    unlink (tmp_path);
}

static const char *
input_file (const uint8_t *data, size_t size)
{
  if (tmp_path[0] == '\0')
    {
      snprintf (tmp_path, sizeof tmp_path, "/tmp/hl-fuzz-image-XXXXXX");
      int fd = mkstemp (tmp_path);
      HL_FUZZ_CHECK (fd >= 0, "no temporary file");
      close (fd);
      atexit (remove_tmp);   /* one file a process, gone when it ends */
    }
  FILE *f = fopen (tmp_path, "wb");
  HL_FUZZ_CHECK (f != NULL, "cannot write %s", tmp_path);
  HL_FUZZ_CHECK (fwrite (data, 1, size, f) == size, "short write");
  fclose (f);
  return tmp_path;
}

int
LLVMFuzzerTestOneInput (const uint8_t *data, size_t size)
{
  const char *path = input_file (data, size);
  HlError err = { 0 };
  HlGrayImage *img = hl_gray_image_load (path, &err);
  if (img == NULL)
    {
      HL_FUZZ_CHECK (err.status != HL_OK, "refused with HL_OK");
      HL_FUZZ_CHECK (err.message[0] != '\0', "refused without a message");
      return 0;
    }
  HL_FUZZ_CHECK (img->width > 0 && img->height > 0, "size %d x %d", img->width, img->height);
  HL_FUZZ_CHECK ((long long) img->width * img->height <= HL_GRAY_IMAGE_MAX_PIXELS,
                 "over the pixel limit");
  HL_FUZZ_CHECK (img->pixels != NULL, "no pixels");
  HL_FUZZ_CHECK (img->bits >= 1 && img->bits <= 16, "bits %d", img->bits);
  HL_FUZZ_CHECK (img->frames >= 1, "frames %d", img->frames);
  HL_FUZZ_CHECK (memchr (img->note, '\0', sizeof img->note) != NULL, "note not terminated");
  HL_FUZZ_CHECK (memchr (img->photometric, '\0', sizeof img->photometric) != NULL,
                 "photometric not terminated");
  HlSpacingChoice sc;
  HL_FUZZ_CHECK (hl_spacing_choose (&img->spacing, &sc, NULL) == HL_OK,
                 "an accepted image with a calibration that fails");
  HL_FUZZ_CHECK (sc.source == HL_SPACING_NONE || (isfinite (sc.mm_per_pixel)
                                                  && sc.mm_per_pixel > 0),
                 "mm per pixel %g", sc.mm_per_pixel);
  double c, w;
  hl_gray_image_default_window (img, &c, &w, NULL);
  HL_FUZZ_CHECK (isfinite (c) && isfinite (w) && w > 0, "window %g %g", c, w);
  /* Touch every pixel: a short buffer shows under AddressSanitizer. */
  unsigned long sum = 0;
  for (size_t i = 0; i < (size_t) img->width * img->height; i++)
    sum += img->pixels[i];
  (void) sum;
  hl_gray_image_free (img);
  return 0;
}
