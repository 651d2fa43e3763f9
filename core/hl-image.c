/* hl-image.c: the radiograph reference, its placement and its file.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <errno.h>
#include <fcntl.h>
#include <limits.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include <glib.h>

/* Bytes read to tell an image file's type (DICOM: "DICM" at 128). */
#define HL_IMAGE_SNIFF_BYTES 132

#include "hl-deadline.h"
#include "hl-gray-image.h"
#include "hl-i18n.h"
#include "hl-image.h"
#include "hl-measure.h"
#include "hl-text.h"

#define HL_SHA256_HEX_DIGITS 64
#define HL_READ_CHUNK 65536

/* ---- Frames ------------------------------------------------------------- */

HlVec2
hl_image_pixel_to_image_mm (const HlRadiograph *rg, double u, double v)
{
  return (HlVec2) { u * rg->pixel_spacing_mm, -v * rg->pixel_spacing_mm };
}

HlVec2
hl_image_mm_to_plan (const HlRadiograph *rg, double m, HlVec2 image_mm)
{
  return (HlVec2) { rg->origin_mm.x + image_mm.x / m, rg->origin_mm.y + image_mm.y / m };
}

HlVec2
hl_image_plan_to_image_mm (const HlRadiograph *rg, double m, HlVec2 plan)
{
  return (HlVec2) { (plan.x - rg->origin_mm.x) * m, (plan.y - rg->origin_mm.y) * m };
}

double
hl_image_plan_mm_per_pixel (const HlRadiograph *rg, double m)
{
  return rg->pixel_spacing_mm / m;
}

double
hl_image_display_magnification (const HlPlan *plan, bool *assumed)
{
  double m;
  bool is_assumed;
  if (hl_calibration_magnification (&plan->calibration, &m, &is_assumed, NULL) != HL_OK)
    {
      m = HL_MAGNIFICATION_ASSUMED;
      is_assumed = true;
    }
  if (assumed != NULL)
    *assumed = is_assumed;
  return m;
}

HlStatus
hl_image_placement (const HlPlan *plan, HlImagePlacement *out, HlError *err)
{
  if (!plan->radiograph.present)
    return hl_error_set (err, HL_ERR_INVALID, "radiograph",
                         _("The plan has no radiograph"));
  double m;
  bool assumed;
  HlStatus st = hl_calibration_magnification (&plan->calibration, &m, &assumed, err);
  if (st != HL_OK)
    return st;
  out->origin_mm = plan->radiograph.origin_mm;
  out->mm_per_pixel = hl_image_plan_mm_per_pixel (&plan->radiograph, m);
  out->magnification = m;
  out->assumed = assumed;
  return HL_OK;
}

static void
rescale_landmarks (HlPlan *plan, double factor)
{
  HlVec2 o = plan->radiograph.origin_mm;
  for (int i = 0; i < HL_LM_COUNT; i++)
    {
      HlVec2 *p = &plan->landmarks.p[i];
      p->x = o.x + (p->x - o.x) * factor;
      p->y = o.y + (p->y - o.y) * factor;
    }
  /* a template's cup centre was placed on the image like a landmark; its
   * implant sizes and the stem's seat are true lengths and stay */
  for (size_t i = 0; i < plan->n_options; i++)
    {
      HlTemplate *t = &plan->options[i].recon.tmpl;
      t->cup_x_mm = o.x + (t->cup_x_mm - o.x) * factor;
      t->cup_y_mm = o.y + (t->cup_y_mm - o.y) * factor;
    }
}

HlStatus
hl_image_apply_calibration (HlPlan *plan, const HlCalibration *cal, HlError *err)
{
  double m_new;
  HlStatus st = hl_calibration_magnification (cal, &m_new, NULL, err);
  if (st != HL_OK)
    return st;
  double m_old = hl_image_display_magnification (plan, NULL);
  plan->calibration = *cal;
  if (plan->radiograph.present)
    rescale_landmarks (plan, m_old / m_new);
  return HL_OK;
}

HlStatus
hl_image_set_pixel_spacing (HlPlan *plan, double spacing_mm, HlError *err)
{
  HlStatus st = hl_check_range (spacing_mm, HL_PIXEL_SPACING_MIN_MM, HL_PIXEL_SPACING_MAX_MM,
                          "radiograph pixel-spacing", _("The pixel spacing (mm)"), err);
  if (st != HL_OK)
    return st;
  double ratio = spacing_mm / plan->radiograph.pixel_spacing_mm;
  double m_old = hl_image_display_magnification (plan, NULL);
  HlCalibration cal = plan->calibration;
  for (int i = 0; i < 3; i++)
    {
      cal.points[i].x *= ratio;
      cal.points[i].y *= ratio;
    }
  /* A marker or two points measured at 1.2 give 2.4 at twice the spacing:
   * refused as any calibration outside the limits is (a plan holding it
   * could not be saved). */
  if (hl_calibration_magnification (&plan->calibration, NULL, NULL, NULL) == HL_OK
      && (st = hl_calibration_magnification (&cal, NULL, NULL, err)) != HL_OK)
    return st;
  plan->calibration = cal;
  double m_new = hl_image_display_magnification (plan, NULL);
  plan->radiograph.pixel_spacing_mm = spacing_mm;
  if (plan->radiograph.present)
    rescale_landmarks (plan, ratio * m_old / m_new);
  return HL_OK;
}

void
hl_image_attach (HlPlan *plan, const char *path, const char *sha256_hex,
                 double spacing_mm, int width, int height)
{
  HlRadiograph *rg = &plan->radiograph;
  hl_radiograph_init (rg);
  rg->present = true;
  snprintf (rg->path, sizeof rg->path, "%s", path);
  snprintf (rg->sha256, sizeof rg->sha256, "%s", sha256_hex ? sha256_hex : "");
  rg->pixel_spacing_mm = spacing_mm;

  /* Centre the image on what is already drawn so both stay in view. */
  double x0 = 0.0, x1 = 0.0, y0 = 0.0, y1 = 0.0;
  bool any = false;
  for (int i = 0; i < HL_LM_COUNT; i++)
    if (hl_landmarks_has (&plan->landmarks, (HlLandmarkId) i))
      {
        HlVec2 p = plan->landmarks.p[i];
        x0 = any ? fmin (x0, p.x) : p.x;
        x1 = any ? fmax (x1, p.x) : p.x;
        y0 = any ? fmin (y0, p.y) : p.y;
        y1 = any ? fmax (y1, p.y) : p.y;
        any = true;
      }
  double k = hl_image_plan_mm_per_pixel (rg, hl_image_display_magnification (plan, NULL));
  rg->origin_mm.x = 0.5 * (x0 + x1) - 0.5 * width * k;
  rg->origin_mm.y = 0.5 * (y0 + y1) + 0.5 * height * k;
}

void
hl_image_attach_file (HlPlan *plan, const char *path, const char *sha256_hex,
                      const HlSpacingChoice *sc, double typed_spacing_mm, int width,
                      int height)
{
  HlCalibration *cal = &plan->calibration;
  bool user = (cal->method == HL_CAL_MARKER || cal->method == HL_CAL_TWO_POINT)
              && hl_calibration_complete (cal);
  double spacing = typed_spacing_mm;
  if (sc->source != HL_SPACING_NONE)
    {
      spacing = sc->detector_spacing_mm;
      if (!user)
        {
          cal->method = sc->assumed ? HL_CAL_ASSUMED : HL_CAL_TYPED;
          cal->magnification = sc->assumed ? HL_MAGNIFICATION_ASSUMED : sc->magnification;
        }
    }
  hl_image_attach (plan, path, sha256_hex, spacing, width, height);
  plan->radiograph.spacing_source = sc->source;
}

HlCalSource
hl_image_calibration_source (const HlPlan *plan)
{
  const HlCalibration *cal = &plan->calibration;
  const HlRadiograph *rg = &plan->radiograph;
  if (cal->method == HL_CAL_MARKER)
    return HL_CAL_SOURCE_MARKER;
  if (cal->method == HL_CAL_TWO_POINT)
    return HL_CAL_SOURCE_KNOWN_DISTANCE;
  if (rg->present)
    switch (rg->spacing_source)
      {
      case HL_SPACING_PIXEL:
        if (cal->method == HL_CAL_TYPED && cal->magnification == 1.0)
          return HL_CAL_SOURCE_FILE_PIXEL_SPACING;
        break;
      case HL_SPACING_IMAGER_ERMF:
        if (cal->method == HL_CAL_TYPED)
          return HL_CAL_SOURCE_FILE_IMAGER_ERMF;
        break;
      case HL_SPACING_IMAGER_DEFAULT:
        if (cal->method == HL_CAL_ASSUMED)
          return HL_CAL_SOURCE_FILE_IMAGER_DEFAULT;
        break;
      case HL_SPACING_NONE:
        break;
      }
  return cal->method == HL_CAL_ASSUMED ? HL_CAL_SOURCE_TYPED_ASSUMED : HL_CAL_SOURCE_TYPED;
}

const char *
hl_cal_source_label (HlCalSource s)
{
  switch (s)
    {
    case HL_CAL_SOURCE_MARKER:
      return _("a calibration marker placed on the image");
    case HL_CAL_SOURCE_KNOWN_DISTANCE:
      return _("a known distance placed on the image");
    case HL_CAL_SOURCE_FILE_PIXEL_SPACING:
      return hl_spacing_source_label (HL_SPACING_PIXEL);
    case HL_CAL_SOURCE_FILE_IMAGER_ERMF:
      return hl_spacing_source_label (HL_SPACING_IMAGER_ERMF);
    case HL_CAL_SOURCE_FILE_IMAGER_DEFAULT:
      return hl_spacing_source_label (HL_SPACING_IMAGER_DEFAULT);
    case HL_CAL_SOURCE_TYPED:
      return _("the typed pixel spacing and magnification");
    case HL_CAL_SOURCE_TYPED_ASSUMED:
      return _("the typed pixel spacing, magnification 1.20 assumed");
    }
  return "";
}

/* ---- Files -------------------------------------------------------------- */

const char *
hl_image_check_text (HlImageCheck check)
{
  switch (check)
    {
    case HL_IMAGE_OK:
      return _("the radiograph is in place");
    case HL_IMAGE_MISSING:
      return _("the radiograph has been moved or is missing");
    case HL_IMAGE_CHANGED:
      return _("the radiograph has changed since the plan was saved");
    case HL_IMAGE_UNREADABLE:
      return _("the radiograph cannot be read");
    default:
      return "";
    }
}

HlStatus
hl_file_sha256_hex (const char *path, char hex[65], HlError *err)
{
  int fd = open (path, O_RDONLY | O_CLOEXEC | O_NOCTTY | O_NONBLOCK);
  if (fd < 0)
    return hl_error_set (err, HL_ERR_IO, path, _("Cannot open \"%s\": %s"), path,
                         strerror (errno));
  struct stat sb;
  if (fstat (fd, &sb) != 0 || !S_ISREG (sb.st_mode))
    {
      close (fd);
      return hl_error_set (err, HL_ERR_IO, path, _("\"%s\" is not a regular file"), path);
    }
  /* The size and the type first: a file that cannot be a radiograph is
   * never read through. */
  if ((long long) sb.st_size > HL_GRAY_IMAGE_MAX_FILE_BYTES)
    {
      close (fd);
      return hl_error_set (err, HL_ERR_IO, path,
                           _("The image \"%s\" is %lld MB: files over %lld MB are not "
                             "opened"), path, (long long) sb.st_size / (1024 * 1024),
                           HL_GRAY_IMAGE_MAX_FILE_BYTES / (1024 * 1024));
    }
  unsigned char head[HL_IMAGE_SNIFF_BYTES];
  ssize_t got = 0;
  while (got < (ssize_t) sizeof head)
    {
      ssize_t r = read (fd, head + got, sizeof head - (size_t) got);
      if (r < 0 && errno == EINTR)
        continue;
      if (r <= 0)
        break;
      got += r;
    }
  HlImageFormat format;
  if (!hl_image_format_sniff (head, (size_t) got, &format) || lseek (fd, 0, SEEK_SET) != 0)
    {
      close (fd);
      return hl_error_set (err, HL_ERR_PARSE, path,
                           _("\"%s\" is not a DICOM, PNG, TIFF or JPEG image"), path);
    }
  unsigned char *buf = malloc (HL_READ_CHUNK);
  if (buf == NULL)
    {
      close (fd);
      return hl_error_set (err, HL_ERR_NOMEM, path, _("Out of memory while reading \"%s\""),
                           path);
    }
  GChecksum *sum = g_checksum_new (G_CHECKSUM_SHA256);
  HlStatus st = HL_OK;
  for (;;)
    {
      ssize_t n = read (fd, buf, HL_READ_CHUNK);
      if (n < 0 && errno == EINTR)
        continue;
      if (n < 0)
        {
          st = hl_error_set (err, HL_ERR_IO, path, _("Cannot read \"%s\": %s"), path,
                             strerror (errno));
          break;
        }
      if (n == 0)
        break;
      g_checksum_update (sum, buf, (gssize) n);
      /* within the calling thread's time budget (hl-deadline.h) */
      if (hl_deadline_passed ())
        {
          st = hl_deadline_error (err, _("Reading the radiograph"));
          break;
        }
    }
  free (buf);
  close (fd);
  if (st == HL_OK)
    snprintf (hex, 65, "%s", g_checksum_get_string (sum));
  g_checksum_free (sum);
  return st;
}

HlImageCheck
hl_image_verify (const HlRadiograph *rg, char *message, size_t message_size)
{
  HlImageCheck check = HL_IMAGE_OK;
  struct stat sb;
  char hex[65];
  HlError why;

  hl_error_clear (&why);
  if (stat (rg->path, &sb) != 0)
    check = (errno == ENOENT || errno == ENOTDIR) ? HL_IMAGE_MISSING : HL_IMAGE_UNREADABLE;
  else if (!S_ISREG (sb.st_mode) || access (rg->path, R_OK) != 0)
    check = HL_IMAGE_UNREADABLE;
  else if (hl_file_sha256_hex (rg->path, hex, &why) != HL_OK)
    check = HL_IMAGE_UNREADABLE;
  else if (rg->sha256[0] != '\0' && strcmp (hex, rg->sha256) != 0)
    check = HL_IMAGE_CHANGED;

  if (message != NULL && message_size > 0)
    {
      const char *text = hl_image_check_text (check);
      /* Capitalised for a sentence on its own; why it cannot be read (too
       * large, not an image) after it. */
      int n = snprintf (message, message_size, "%c%s: \"%s\"", text[0] - ('a' - 'A'),
                        text + 1, rg->path);
      if (check == HL_IMAGE_UNREADABLE && why.message[0] != '\0' && n > 0
          && (size_t) n < message_size)
        {
          snprintf (message + n, message_size - (size_t) n, " (%s)", why.message);
          hl_utf8_trim_end (message);
        }
    }
  return check;
}

HlGrayImage *
hl_image_load_checked (const HlRadiograph *rg, HlError *err)
{
  if (!rg->present)
    {
      hl_error_set (err, HL_ERR_INVALID, "radiograph", "%s", _("The plan has no radiograph"));
      return NULL;
    }
  char message[HL_IMAGE_PATH_MAX + 128];
  HlImageCheck check = hl_image_verify (rg, message, sizeof message);
  if (check != HL_IMAGE_OK)
    {
      hl_error_set (err, check == HL_IMAGE_CHANGED ? HL_ERR_INVALID : HL_ERR_IO, rg->path,
                    "%s", message);
      return NULL;
    }
  return hl_gray_image_load (rg->path, err);
}

/* The grey range of an image: 0 .. 2^bits - 1 (65535 without one, and for
 * an image rescaled onto the whole 16-bit range). */
static double
grey_top (const HlGrayImage *img)
{
  int bits = img != NULL && img->bits > 0 && img->bits <= 16 ? img->bits : 16;
  if (img != NULL && img->value_scale != 1.0)
    bits = 16;
  return (double) ((1u << bits) - 1u);
}

/* The plan's own window or the one of its brightness and contrast; false
 * when the image's own window is the one shown. */
static bool
plan_window (const HlRadiograph *rg, const HlGrayImage *img, double *centre, double *width)
{
  if (rg->window_width > 0.0)
    {
      *centre = rg->window_centre;
      *width = rg->window_width;
      return true;
    }
  if (rg->brightness != 0.0 || rg->contrast != 1.0 || img == NULL)
    {
      hl_window_from_brightness_contrast (rg->brightness, rg->contrast, grey_top (img),
                                          centre, width);
      return true;
    }
  return false;
}

void
hl_radiograph_display_window (const HlRadiograph *rg, const HlGrayImage *img,
                              double *centre, double *width)
{
  if (!plan_window (rg, img, centre, width))
    hl_gray_image_default_window (img, centre, width, NULL);
}

void
hl_radiograph_display_window_known (const HlRadiograph *rg, const HlGrayImage *img,
                                    double image_centre, double image_width,
                                    double *centre, double *width)
{
  if (!plan_window (rg, img, centre, width))
    {
      *centre = image_centre;
      *width = image_width;
    }
}

/* The folder of `file` made absolute and free of "." and "..", links
 * followed (realpath), in out. */
static bool
folder_of (const char *file, char *out, size_t size)
{
  g_autofree char *dir = g_path_get_dirname (file);
  char real[PATH_MAX];
  if (realpath (dir, real) == NULL)
    return false;
  return (size_t) snprintf (out, size, "%s", real) < size;
}

HlStatus
hl_image_resolve_path (const char *base_file, const char *path, char *out,
                       size_t size, HlError *err)
{
  int n;
  char dir[PATH_MAX];
  if (!g_path_is_absolute (path) && base_file != NULL && folder_of (base_file, dir, sizeof dir))
    {
      g_autofree char *joined = g_build_filename (dir, path, NULL);
      n = snprintf (out, size, "%s", joined);
    }
  else
    n = snprintf (out, size, "%s", path);
  if (n < 0 || (size_t) n >= size)
    return hl_error_set (err, HL_ERR_INVALID, "radiograph path",
                         _("The radiograph's path is longer than %zu bytes"), size - 1);

  /* Without "." and ".." where the folder exists: the same image gives
   * the same path whichever plan refers to it. */
  char folder[PATH_MAX];
  if (folder_of (out, folder, sizeof folder))
    {
      g_autofree char *base = g_path_get_basename (out);
      g_autofree char *joined = g_build_filename (folder, base, NULL);
      if (strlen (joined) < size)
        snprintf (out, size, "%s", joined);
    }
  return HL_OK;
}

HlStatus
hl_image_relative_path (const char *base_file, const char *path, char *out,
                        size_t size, HlError *err)
{
  char dir[PATH_MAX], target[PATH_MAX];
  const char *slash = strrchr (path, '/');
  char tdir[PATH_MAX];
  int n;

  if (slash == NULL)
    snprintf (tdir, sizeof tdir, ".");
  else
    snprintf (tdir, sizeof tdir, "%.*s", slash == path ? 1 : (int) (slash - path), path);
  if (base_file == NULL || !folder_of (base_file, dir, sizeof dir)
      || realpath (tdir, target) == NULL)
    {
      n = snprintf (out, size, "%s", path);
      goto done;
    }

  /* Common leading folders, then one ".." for each folder of the plan's
   * left over. */
  size_t common = 0, i = 0;
  while (dir[i] != '\0' && dir[i] == target[i])
    {
      i++;
      if ((dir[i] == '/' || dir[i] == '\0') && (target[i] == '/' || target[i] == '\0'))
        common = i;
    }
  bool at_root = strcmp (dir, "/") == 0;
  if (at_root)
    common = 0;
  char rel[PATH_MAX] = "";
  size_t len = 0;
  for (const char *p = dir + common; !at_root && *p != '\0' && len + 4 < sizeof rel; p++)
    if (*p == '/')
      len += (size_t) snprintf (rel + len, sizeof rel - len, "../");
  const char *rest = target + common;
  while (*rest == '/')
    rest++;
  if (*rest != '\0' && len < sizeof rel)
    len += (size_t) snprintf (rel + len, sizeof rel - len, "%s/", rest);
  n = snprintf (out, size, "%s%s", rel, slash ? slash + 1 : path);
  if (len >= sizeof rel)
    n = -1;

done:
  if (n < 0 || (size_t) n >= size)
    return hl_error_set (err, HL_ERR_INVALID, "radiograph path",
                         _("The radiograph's path is longer than %zu bytes"), size - 1);
  return HL_OK;
}
