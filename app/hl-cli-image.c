/* hl-cli-image.c: what hiplever reads from an image file.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 *   hiplever-cli image FILE
 *
 * One "key: value" line each, in this order (a contract with scripts):
 * format, width, height, bits, photometric, mm_per_pixel (6 significant
 * digits, "none" when the file gives no spacing), spacing_source,
 * window_centre, window_width; then magnification, magnification_assumed,
 * detector_spacing_mm, window_source, frames, burned_in_annotation and
 * note.  Nothing identifying is ever printed: the reader keeps none.
 */
#include "config.h"

#include "hl-cli.h"
#include "hl-gray-image.h"
#include "hl-i18n.h"

const HlCliOption hl_cli_image_options[] = {
  { NULL },
};

int
hl_cli_image (const HlCliCommand *cmd, const HlCliArgs *args)
{
  (void) cmd;
  const char *path = args->operands[0];
  HlError err = { 0 };
  HlGrayImage *img = hl_gray_image_load (path, &err);
  if (img == NULL)
    {
      hl_cli_report_error (path, NULL, &err);
      return HL_CLI_EXIT_INVALID;
    }
  HlSpacingChoice sc;
  /* hl_gray_image_load has checked the spacing: this cannot fail. */
  if (hl_spacing_choose (&img->spacing, &sc, &err) != HL_OK)
    {
      hl_cli_report_error (path, NULL, &err);
      hl_gray_image_free (img);
      return HL_CLI_EXIT_INVALID;
    }
  double centre, width;
  bool from_file;
  hl_gray_image_default_window (img, &centre, &width, &from_file);

  fprintf (stdout, "format: %s\n", hl_image_format_name (img->format));
  fprintf (stdout, "width: %d\n", img->width);
  fprintf (stdout, "height: %d\n", img->height);
  fprintf (stdout, "bits: %d\n", img->bits);
  fprintf (stdout, "photometric: %s\n", img->photometric);
  if (sc.source == HL_SPACING_NONE)
    fprintf (stdout, "mm_per_pixel: none\n");
  else
    fprintf (stdout, "mm_per_pixel: %.6g\n", sc.mm_per_pixel);
  fprintf (stdout, "spacing_source: %s\n", hl_spacing_source_name (sc.source));
  fprintf (stdout, "window_centre: %.6g\n", centre);
  fprintf (stdout, "window_width: %.6g\n", width);
  if (sc.source != HL_SPACING_NONE)
    {
      fprintf (stdout, "magnification: %.6g\n", sc.magnification);
      fprintf (stdout, "magnification_assumed: %s\n", sc.assumed ? "yes" : "no");
      fprintf (stdout, "detector_spacing_mm: %.6g\n", sc.detector_spacing_mm);
    }
  fprintf (stdout, "window_source: %s\n", from_file ? "file" : "auto");
  fprintf (stdout, "frames: %d\n", img->frames);
  fprintf (stdout, "burned_in_annotation: %s\n",
           img->burned_in_annotation ? "yes" : "no");
  if (img->note[0] != '\0')
    fprintf (stdout, "note: %s\n", img->note);
  hl_gray_image_free (img);
  return HL_CLI_EXIT_OK;
}
