/* hl-underlay.c: the radiograph under the schematic.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#define G_LOG_DOMAIN "hl-underlay"

#include <errno.h>
#include <math.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>
#include <glib/gi18n.h>
#include <gdk-pixbuf/gdk-pixbuf.h>

#include "hl-underlay.h"

/* Halved copies down to this size; below it the smallest is used. */
#define MIP_MIN_SIDE 64
#define MIP_LEVELS_MAX 16
/* Pick the smallest copy still drawn at least this much enlarged, so the
 * bilinear filter never shrinks by more than about a third (where cairo's
 * good filter switches to a slow convolution). */
#define MIP_MIN_ENLARGEMENT 0.75
#define MID_GREY 0.5
#define LUT_SIZE 256

struct _HlUnderlay {
  /* owned */
  char *path;
  cairo_surface_t *source;              /* as loaded */
  cairo_surface_t *mip[MIP_LEVELS_MAX]; /* [0] adjusted, then halvings */
  int n_mip;
  int width, height;

  /* adjustments of mip[0]; the cache is valid when adjusted */
  double brightness, contrast;
  bool invert;
  bool adjusted;
};

static const char *const known_formats[] = { "png", "jpeg", "tiff" };

static HlUnderlay *
underlay_new (cairo_surface_t *source)
{
  HlUnderlay *self = g_new0 (HlUnderlay, 1);
  self->source = source;
  self->width = cairo_image_surface_get_width (source);
  self->height = cairo_image_surface_get_height (source);
  self->contrast = 1.0;
  return self;
}

HlUnderlay *
hl_underlay_new_from_surface (cairo_surface_t *image)
{
  if (image == NULL || cairo_surface_get_type (image) != CAIRO_SURFACE_TYPE_IMAGE
      || (cairo_image_surface_get_format (image) != CAIRO_FORMAT_ARGB32
          && cairo_image_surface_get_format (image) != CAIRO_FORMAT_RGB24)
      || cairo_image_surface_get_width (image) <= 0
      || cairo_image_surface_get_height (image) <= 0)
    return NULL;
  return underlay_new (cairo_surface_reference (image));
}

/* Premultiplied ARGB32 from a pixbuf (what gdk_cairo_set_source_pixbuf
 * does, without GDK). */
static cairo_surface_t *
surface_from_pixbuf (GdkPixbuf *pixbuf)
{
  int w = gdk_pixbuf_get_width (pixbuf), h = gdk_pixbuf_get_height (pixbuf);
  int n = gdk_pixbuf_get_n_channels (pixbuf);
  bool alpha = gdk_pixbuf_get_has_alpha (pixbuf);
  int src_stride = gdk_pixbuf_get_rowstride (pixbuf);
  const guchar *src = gdk_pixbuf_read_pixels (pixbuf);
  cairo_surface_t *s = cairo_image_surface_create (CAIRO_FORMAT_ARGB32, w, h);
  if (cairo_surface_status (s) != CAIRO_STATUS_SUCCESS)
    {
      cairo_surface_destroy (s);
      return NULL;
    }
  cairo_surface_flush (s);
  unsigned char *dst = cairo_image_surface_get_data (s);
  int dst_stride = cairo_image_surface_get_stride (s);
  for (int y = 0; y < h; y++)
    {
      const guchar *p = src + (gsize) y * src_stride;
      guint32 *q = (guint32 *) (dst + (gsize) y * dst_stride);
      for (int x = 0; x < w; x++, p += n)
        {
          guint a = alpha ? p[3] : 255;
          guint r = (p[0] * a + 127) / 255, g = (p[1] * a + 127) / 255,
                b = (p[2] * a + 127) / 255;
          q[x] = (a << 24) | (r << 16) | (g << 8) | b;
        }
    }
  cairo_surface_mark_dirty (s);
  return s;
}

HlUnderlay *
hl_underlay_new_from_file (const char *path, HlError *err)
{
  struct stat sb;
  if (stat (path, &sb) != 0)
    {
      if (errno == ENOENT || errno == ENOTDIR)
        hl_error_set (err, HL_ERR_IO, path,
                      _("The image \"%s\" is not there: it has been moved or deleted"), path);
      else
        hl_error_set (err, HL_ERR_IO, path, _("Cannot open the image \"%s\": %s"), path,
                      g_strerror (errno));
      return NULL;
    }
  if (!S_ISREG (sb.st_mode))
    {
      hl_error_set (err, HL_ERR_IO, path, _("\"%s\" is not a regular file"), path);
      return NULL;
    }
  if (access (path, R_OK) != 0)
    {
      hl_error_set (err, HL_ERR_IO, path, _("Cannot read the image \"%s\": %s"), path,
                    g_strerror (errno));
      return NULL;
    }

  int w = 0, h = 0;
  GdkPixbufFormat *format = gdk_pixbuf_get_file_info (path, &w, &h);
  g_autofree char *name = format != NULL ? gdk_pixbuf_format_get_name (format) : NULL;
  bool known = false;
  for (size_t i = 0; name != NULL && i < G_N_ELEMENTS (known_formats); i++)
    known |= strcmp (name, known_formats[i]) == 0;
  if (!known)
    {
      hl_error_set (err, HL_ERR_PARSE, path,
                    _("\"%s\" is not a PNG, JPEG or TIFF image"), path);
      return NULL;
    }
  if (w <= 0 || h <= 0)
    {
      hl_error_set (err, HL_ERR_PARSE, path,
                    _("The image \"%s\" gives no size in its header: it is damaged"), path);
      return NULL;
    }
  if ((long long) w * h > HL_UNDERLAY_MAX_PIXELS)
    {
      hl_error_set (err, HL_ERR_INVALID, path,
                    _("The image \"%s\" is %d x %d pixels (%.0f megapixels), more than "
                      "the %.0f megapixels this program opens; reduce it first"),
                    path, w, h, (double) w * h / 1e6, HL_UNDERLAY_MAX_PIXELS / 1e6);
      return NULL;
    }

  g_autoptr (GError) gerr = NULL;
  g_autoptr (GdkPixbuf) raw = gdk_pixbuf_new_from_file (path, &gerr);
  if (raw == NULL)
    {
      hl_error_set (err, HL_ERR_PARSE, path, _("The image \"%s\" cannot be read: %s"),
                    path, gerr != NULL ? gerr->message : _("unknown reason"));
      return NULL;
    }
  /* Scanners store the orientation apart from the pixels. */
  g_autoptr (GdkPixbuf) pixbuf = gdk_pixbuf_apply_embedded_orientation (raw);
  cairo_surface_t *s = pixbuf != NULL ? surface_from_pixbuf (pixbuf) : NULL;
  if (s == NULL)
    {
      hl_error_set (err, HL_ERR_NOMEM, path, _("Out of memory for the image \"%s\""), path);
      return NULL;
    }
  HlUnderlay *self = underlay_new (s);
  self->path = g_strdup (path);
  return self;
}

static void
clear_cache (HlUnderlay *self)
{
  for (int i = 0; i < self->n_mip; i++)
    cairo_surface_destroy (self->mip[i]);
  self->n_mip = 0;
  self->adjusted = false;
}

void
hl_underlay_free (HlUnderlay *self)
{
  if (self == NULL)
    return;
  clear_cache (self);
  cairo_surface_destroy (self->source);
  g_free (self->path);
  g_free (self);
}

int
hl_underlay_get_width (const HlUnderlay *self)
{
  return self->width;
}

int
hl_underlay_get_height (const HlUnderlay *self)
{
  return self->height;
}

const char *
hl_underlay_get_path (const HlUnderlay *self)
{
  return self->path;
}

void
hl_underlay_set_adjust (HlUnderlay *self, double brightness, double contrast,
                        bool invert)
{
  if (self->adjusted && brightness == self->brightness && contrast == self->contrast
      && invert == self->invert)
    return;
  clear_cache (self);
  self->brightness = brightness;
  self->contrast = contrast;
  self->invert = invert;
}

double
hl_underlay_adjust_value (double v, double brightness, double contrast, bool invert)
{
  if (invert)
    v = 1.0 - v;
  v = (v - MID_GREY) * contrast + MID_GREY + brightness;
  return v < 0.0 ? 0.0 : v > 1.0 ? 1.0 : v;
}

/* The adjusted copy, through a table per channel value: premultiplied
 * colour is un-premultiplied, looked up and premultiplied again. */
static cairo_surface_t *
make_adjusted (HlUnderlay *self)
{
  guint8 lut[LUT_SIZE];
  for (int i = 0; i < LUT_SIZE; i++)
    lut[i] = (guint8) lround (255.0 * hl_underlay_adjust_value (i / 255.0, self->brightness,
                                                                self->contrast, self->invert));
  cairo_surface_t *s = cairo_image_surface_create (CAIRO_FORMAT_ARGB32, self->width,
                                                   self->height);
  if (cairo_surface_status (s) != CAIRO_STATUS_SUCCESS)
    {
      cairo_surface_destroy (s);
      return NULL;
    }
  cairo_surface_flush (self->source);
  cairo_surface_flush (s);
  bool opaque = cairo_image_surface_get_format (self->source) == CAIRO_FORMAT_RGB24;
  const unsigned char *src = cairo_image_surface_get_data (self->source);
  unsigned char *dst = cairo_image_surface_get_data (s);
  int ss = cairo_image_surface_get_stride (self->source), ds = cairo_image_surface_get_stride (s);
  for (int y = 0; y < self->height; y++)
    {
      const guint32 *p = (const guint32 *) (src + (gsize) y * ss);
      guint32 *q = (guint32 *) (dst + (gsize) y * ds);
      for (int x = 0; x < self->width; x++)
        {
          guint32 px = p[x];
          guint a = opaque ? 255 : px >> 24;
          guint c[3] = { (px >> 16) & 0xff, (px >> 8) & 0xff, px & 0xff };
          if (a == 0)
            {
              q[x] = 0;
              continue;
            }
          for (int k = 0; k < 3; k++)
            {
              guint straight = a == 255 ? c[k] : MIN (255u, (c[k] * 255 + a / 2) / a);
              guint v = lut[straight];
              c[k] = a == 255 ? v : (v * a + 127) / 255;
            }
          q[x] = (a << 24) | (c[0] << 16) | (c[1] << 8) | c[2];
        }
    }
  cairo_surface_mark_dirty (s);
  return s;
}

static cairo_surface_t *
make_half (cairo_surface_t *from)
{
  int w = MAX (1, cairo_image_surface_get_width (from) / 2);
  int h = MAX (1, cairo_image_surface_get_height (from) / 2);
  cairo_surface_t *s = cairo_image_surface_create (CAIRO_FORMAT_ARGB32, w, h);
  cairo_t *cr = cairo_create (s);
  cairo_scale (cr, (double) w / cairo_image_surface_get_width (from),
               (double) h / cairo_image_surface_get_height (from));
  cairo_set_source_surface (cr, from, 0, 0);
  cairo_pattern_set_filter (cairo_get_source (cr), CAIRO_FILTER_GOOD);
  cairo_set_operator (cr, CAIRO_OPERATOR_SOURCE);
  cairo_paint (cr);
  cairo_destroy (cr);
  return s;
}

static bool
ensure_cache (HlUnderlay *self)
{
  if (self->adjusted)
    return self->n_mip > 0;
  self->adjusted = true;
  cairo_surface_t *s = make_adjusted (self);
  if (s == NULL)
    return false;
  self->mip[self->n_mip++] = s;
  while (self->n_mip < MIP_LEVELS_MAX)
    {
      cairo_surface_t *last = self->mip[self->n_mip - 1];
      if (cairo_image_surface_get_width (last) < 2 * MIP_MIN_SIDE
          || cairo_image_surface_get_height (last) < 2 * MIP_MIN_SIDE)
        break;
      self->mip[self->n_mip++] = make_half (last);
    }
  return true;
}

HlVec2
hl_underlay_plan_to_pixel (HlVec2 origin_mm, double mm_per_px, HlVec2 plan)
{
  return (HlVec2) { (plan.x - origin_mm.x) / mm_per_px, (origin_mm.y - plan.y) / mm_per_px };
}

void
hl_underlay_draw (HlUnderlay *self, cairo_t *cr, const HlView *view,
                  HlVec2 origin_mm, double mm_per_px, double opacity)
{
  if (self == NULL || !(mm_per_px > 0.0) || !(opacity > 0.0) || !ensure_cache (self))
    return;

  /* Screen px per full-size image pixel, then the copy to draw from. */
  double k = mm_per_px * view->scale;
  int level = 0;
  while (level + 1 < self->n_mip && k * (1 << (level + 1)) <= 1.0 / MIP_MIN_ENLARGEMENT)
    level++;
  cairo_surface_t *s = self->mip[level];
  double sx = (double) self->width / cairo_image_surface_get_width (s);
  double sy = (double) self->height / cairo_image_surface_get_height (s);

  HlVec2 at = hl_view_to_screen (view, origin_mm);
  cairo_save (cr);
  cairo_translate (cr, at.x, at.y);
  cairo_scale (cr, k * sx, k * sy);
  cairo_rectangle (cr, 0, 0, cairo_image_surface_get_width (s),
                   cairo_image_surface_get_height (s));
  cairo_clip (cr);
  cairo_set_source_surface (cr, s, 0, 0);
  cairo_pattern_set_filter (cairo_get_source (cr),
                            k * sx >= HL_UNDERLAY_NEAREST_FROM ? CAIRO_FILTER_FAST
                                                               : CAIRO_FILTER_GOOD);
  cairo_pattern_set_extend (cairo_get_source (cr), CAIRO_EXTEND_PAD);
  if (opacity >= 1.0)
    cairo_paint (cr);
  else
    cairo_paint_with_alpha (cr, opacity);
  cairo_restore (cr);
}
