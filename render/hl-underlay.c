/* hl-underlay.c: the radiograph under the schematic.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#define G_LOG_DOMAIN "hl-underlay"

#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <string.h>
#include <glib.h>
#include <glib/gi18n.h>

#include "hl-image.h"
#include "hl-underlay.h"

/* Halved copies down to this size; below it the smallest is used. */
#define MIP_MIN_SIDE 64
#define MIP_LEVELS_MAX 16
/* Pick the smallest copy still drawn at least this much enlarged, so the
 * bilinear filter never shrinks by more than about a third (where cairo's
 * good filter switches to a slow convolution). */
#define MIP_MIN_ENLARGEMENT 0.75
#define LUT_SIZE 65536
#define REGION_MARGIN_MIN 16     /* level pixels windowed beyond the visible part */
/* ITU-R BT.601 luma weights for the grey of a colour surface (common
 * practice). */
#define LUMA_R 0.299
#define LUMA_G 0.587
#define LUMA_B 0.114

typedef struct {
  uint16_t *px;            /* level 0: the image's own pixels (not owned) */
  int w, h;
  cairo_surface_t *shown;  /* windowed, RGB24; NULL until drawn */
  bool valid;              /* shown has the current window in [vx0, vx1) x [vy0, vy1) */
  int vx0, vy0, vx1, vy1;
} Level;

struct _HlUnderlay {
  char *path;
  HlGrayImage *img;        /* owned */
  Level level[MIP_LEVELS_MAX];
  int n_levels;
  int width, height;

  double centre, window;   /* the window in held values */
  double default_centre, default_window;  /* the image's own (preset or automatic) */
  bool invert;
  bool lut_valid;
  uint8_t lut[LUT_SIZE];
};

/* 2 x 2 means of the level above (an odd last row or column dropped). */
static bool
make_levels (HlUnderlay *self)
{
  self->level[0] = (Level) { self->img->pixels, self->width, self->height, NULL, false };
  self->n_levels = 1;
  while (self->n_levels < MIP_LEVELS_MAX)
    {
      const Level *up = &self->level[self->n_levels - 1];
      if (up->w < 2 * MIP_MIN_SIDE || up->h < 2 * MIP_MIN_SIDE)
        break;
      int w = up->w / 2, h = up->h / 2;
      uint16_t *px = g_try_malloc ((gsize) w * h * sizeof *px);
      if (px == NULL)
        return false;
      for (int y = 0; y < h; y++)
        {
          const uint16_t *a = up->px + (gsize) (2 * y) * up->w;
          const uint16_t *b = a + up->w;
          uint16_t *q = px + (gsize) y * w;
          for (int x = 0; x < w; x++)
            q[x] = (uint16_t) (((uint32_t) a[2 * x] + a[2 * x + 1] + b[2 * x] + b[2 * x + 1]
                                + 2) / 4);
        }
      self->level[self->n_levels++] = (Level) { px, w, h, NULL, false };
    }
  return true;
}

HlUnderlay *
hl_underlay_new_from_gray (HlGrayImage *img)
{
  if (img == NULL)
    return NULL;
  HlUnderlay *self = g_new0 (HlUnderlay, 1);
  self->img = img;
  self->width = img->width;
  self->height = img->height;
  double c, w;
  hl_gray_image_default_window (img, &c, &w, NULL);
  self->centre = self->default_centre = c;
  self->window = self->default_window = w;
  if (!make_levels (self))
    {
      hl_underlay_free (self);
      return NULL;
    }
  return self;
}

HlUnderlay *
hl_underlay_copy (const HlUnderlay *src)
{
  if (src == NULL)
    return NULL;
  HlGrayImage *img = hl_gray_image_alloc (src->img->format, src->width, src->height);
  if (img == NULL)
    return NULL;
  uint16_t *px = img->pixels;
  *img = *src->img;
  img->pixels = px;
  memcpy (px, src->img->pixels, (size_t) src->width * (size_t) src->height * sizeof *px);
  HlUnderlay *self = g_new0 (HlUnderlay, 1);
  self->img = img;
  self->width = src->width;
  self->height = src->height;
  self->path = g_strdup (src->path);
  self->centre = src->centre;
  self->window = src->window;
  self->default_centre = src->default_centre;
  self->default_window = src->default_window;
  self->invert = src->invert;
  if (!make_levels (self))
    {
      hl_underlay_free (self);
      return NULL;
    }
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
  int w = cairo_image_surface_get_width (image), h = cairo_image_surface_get_height (image);
  HlGrayImage *img = hl_gray_image_alloc (HL_IMAGE_FORMAT_PNG, w, h);
  if (img == NULL)
    return NULL;
  img->bits = 8;
  snprintf (img->photometric, sizeof img->photometric, "RGB");
  cairo_surface_flush (image);
  const unsigned char *src = cairo_image_surface_get_data (image);
  int stride = cairo_image_surface_get_stride (image);
  for (int y = 0; y < h; y++)
    {
      const guint32 *p = (const guint32 *) (src + (gsize) y * stride);
      for (int x = 0; x < w; x++)
        img->pixels[(gsize) y * w + x] =
          (uint16_t) lround (LUMA_R * ((p[x] >> 16) & 0xff) + LUMA_G * ((p[x] >> 8) & 0xff)
                             + LUMA_B * (p[x] & 0xff));
    }
  return hl_underlay_new_from_gray (img);
}

HlUnderlay *
hl_underlay_new_from_file (const char *path, HlError *err)
{
  HlGrayImage *img = hl_gray_image_load (path, err);
  if (img == NULL)
    return NULL;
  HlUnderlay *self = hl_underlay_new_from_gray (img);
  if (self == NULL)
    {
      hl_error_set (err, HL_ERR_NOMEM, path, _("Out of memory for the image \"%s\""), path);
      return NULL;
    }
  self->path = g_strdup (path);
  return self;
}

static void
invalidate (HlUnderlay *self)
{
  self->lut_valid = false;
  for (int i = 0; i < self->n_levels; i++)
    self->level[i].valid = false;
}

void
hl_underlay_free (HlUnderlay *self)
{
  if (self == NULL)
    return;
  for (int i = 0; i < self->n_levels; i++)
    {
      if (self->level[i].shown != NULL)
        cairo_surface_destroy (self->level[i].shown);
      if (i > 0)
        g_free (self->level[i].px);
    }
  hl_gray_image_free (self->img);
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

const HlGrayImage *
hl_underlay_get_image (const HlUnderlay *self)
{
  return self->img;
}

void
hl_underlay_set_window (HlUnderlay *self, double centre, double width, bool invert)
{
  if (!(width > 0.0) || !isfinite (centre))
    return;
  if (self->lut_valid && centre == self->centre && width == self->window
      && invert == self->invert)
    return;
  self->centre = centre;
  self->window = width;
  self->invert = invert;
  invalidate (self);
}

void
hl_underlay_get_default_window (const HlUnderlay *self, double *centre, double *width)
{
  *centre = self->default_centre;
  *width = self->default_window;
}

double
hl_underlay_window_value (double v, double centre, double width, bool invert)
{
  /* DICOM PS3.3 C.11.2.1.2.1, output range 0..1: below c - 0.5 - (w-1)/2
   * black, above c - 0.5 + (w-1)/2 white, linear between. */
  double y;
  if (width <= 1.0)
    y = v <= centre - 0.5 ? 0.0 : 1.0;
  else
    {
      y = (v - (centre - 0.5)) / (width - 1.0) + 0.5;
      y = y < 0.0 ? 0.0 : y > 1.0 ? 1.0 : y;
    }
  return invert ? 1.0 - y : y;
}

static void
make_lut (HlUnderlay *self)
{
  for (int i = 0; i < LUT_SIZE; i++)
    self->lut[i] = (uint8_t) lround (255.0 * hl_underlay_window_value (i, self->centre,
                                                                        self->window,
                                                                        self->invert));
  self->lut_valid = true;
}

/* The windowed copy of one level: the pixels in [x0, x1) x [y0, y1) (level
 * pixels) hold the current window when it returns.  Only what is asked
 * for, with a margin, is redone, so a window drag over a zoomed-in view
 * redoes the visible part, not the whole image. */
static cairo_surface_t *
shown_level (HlUnderlay *self, int i, int x0, int y0, int x1, int y1)
{
  Level *l = &self->level[i];
  x0 = MAX (x0, 0);
  y0 = MAX (y0, 0);
  x1 = MIN (x1, l->w);
  y1 = MIN (y1, l->h);
  if (l->valid && x0 >= l->vx0 && y0 >= l->vy0 && x1 <= l->vx1 && y1 <= l->vy1)
    return l->shown;
  if (!self->lut_valid)
    make_lut (self);
  if (l->shown == NULL)
    {
      l->shown = cairo_image_surface_create (CAIRO_FORMAT_RGB24, l->w, l->h);
      if (cairo_surface_status (l->shown) != CAIRO_STATUS_SUCCESS)
        {
          cairo_surface_destroy (l->shown);
          l->shown = NULL;
          return NULL;
        }
    }
  /* A margin of a quarter of the asked size on each side (at least
   * REGION_MARGIN_MIN) covers the filter's reach and a pan's next frames. */
  int mx = MAX ((x1 - x0) / 4, REGION_MARGIN_MIN), my = MAX ((y1 - y0) / 4, REGION_MARGIN_MIN);
  x0 = MAX (x0 - mx, 0);
  y0 = MAX (y0 - my, 0);
  x1 = MIN (x1 + mx, l->w);
  y1 = MIN (y1 + my, l->h);
  cairo_surface_flush (l->shown);
  unsigned char *dst = cairo_image_surface_get_data (l->shown);
  int stride = cairo_image_surface_get_stride (l->shown);
  const uint8_t *lut = self->lut;
  for (int y = y0; y < y1; y++)
    {
      const uint16_t *p = l->px + (gsize) y * l->w;
      guint32 *q = (guint32 *) (dst + (gsize) y * stride);
      for (int x = x0; x < x1; x++)
        q[x] = 0xff000000u | (guint32) lut[p[x]] * 0x010101u;
    }
  cairo_surface_mark_dirty_rectangle (l->shown, x0, y0, x1 - x0, y1 - y0);
  l->valid = true;
  l->vx0 = x0;
  l->vy0 = y0;
  l->vx1 = x1;
  l->vy1 = y1;
  return l->shown;
}

HlVec2
hl_underlay_plan_to_pixel (HlVec2 origin_mm, double mm_per_px, HlVec2 plan)
{
  return (HlVec2) { (plan.x - origin_mm.x) / mm_per_px, (origin_mm.y - plan.y) / mm_per_px };
}

/* As hl_underlay_draw, the copy chosen for `detail` device px per unit. */
static void
draw_detail (HlUnderlay *self, cairo_t *cr, const HlView *view, HlVec2 origin_mm,
             double mm_per_px, double opacity, double detail)
{
  if (self == NULL || !(mm_per_px > 0.0) || !(opacity > 0.0))
    return;

  /* Screen px per full-size image pixel, then the copy to draw from. */
  double k = mm_per_px * view->scale;
  double kd = k * (detail > 0.0 && isfinite (detail) ? detail : 1.0);
  int level = 0;
  while (level + 1 < self->n_levels && kd * (1 << (level + 1)) <= 1.0 / MIP_MIN_ENLARGEMENT)
    level++;
  const Level *l = &self->level[level];
  double sx = (double) self->width / l->w;
  double sy = (double) self->height / l->h;

  HlVec2 at = hl_view_to_screen (view, origin_mm);
  cairo_save (cr);
  cairo_translate (cr, at.x, at.y);
  cairo_scale (cr, k * sx, k * sy);
  cairo_rectangle (cr, 0, 0, l->w, l->h);
  cairo_clip (cr);
  /* The visible part, in level pixels. */
  double cx0, cy0, cx1, cy1;
  cairo_clip_extents (cr, &cx0, &cy0, &cx1, &cy1);
  if (!(cx1 > cx0 && cy1 > cy0))
    {
      cairo_restore (cr);
      return;
    }
  cairo_surface_t *s = shown_level (self, level, (int) floor (cx0) - 1, (int) floor (cy0) - 1,
                                    (int) ceil (cx1) + 1, (int) ceil (cy1) + 1);
  if (s == NULL)
    {
      cairo_restore (cr);
      return;
    }
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

void
hl_underlay_draw (HlUnderlay *self, cairo_t *cr, const HlView *view,
                  HlVec2 origin_mm, double mm_per_px, double opacity)
{
  draw_detail (self, cr, view, origin_mm, mm_per_px, opacity, 1.0);
}

HlUnderlay *
hl_underlay_for_plan (const HlPlan *plan, HlError *err)
{
  const HlRadiograph *rg = &plan->radiograph;
  /* An image the calibration cannot place is not read at all. */
  HlImagePlacement placement;
  if (rg->present && hl_image_placement (plan, &placement, err) != HL_OK)
    return NULL;
  HlGrayImage *img = hl_image_load_checked (rg, err);
  if (img == NULL)
    return NULL;
  double centre, width;
  hl_radiograph_display_window (rg, img, &centre, &width);
  HlUnderlay *self = hl_underlay_new_from_gray (img);
  if (self == NULL)
    {
      hl_error_set (err, HL_ERR_NOMEM, rg->path, _("Out of memory for the image \"%s\""),
                    rg->path);
      return NULL;
    }
  self->path = g_strdup (rg->path);
  hl_underlay_set_window (self, centre, width, rg->invert);
  return self;
}

bool
hl_underlay_draw_plan (HlUnderlay *self, cairo_t *cr, const HlPlan *plan,
                       const HlView *view, double detail)
{
  HlImagePlacement placement;
  if (self == NULL || hl_image_placement (plan, &placement, NULL) != HL_OK)
    return false;
  draw_detail (self, cr, view, placement.origin_mm, placement.mm_per_pixel,
               plan->radiograph.opacity, detail);
  return true;
}
