/* test-radiograph.c: planning on a radiograph, on synthetic images.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The tests draw their own radiographs with cairo at a known magnification:
 * a disc for the calibration marker, discs for the femoral heads, bands
 * for the femoral shafts, small triangles for the teardrops and lesser
 * trochanters, for a right and a left hip.  Each landmark is then found
 * again from the pixels alone (weighted centroids inside a window around
 * where it was drawn), taken through pixel -> image mm -> plan mm with the
 * calibration, and the measures are checked against the drawn geometry,
 * worked out by hand below (a level inter-teardrop line).
 *
 * The image files are PNGs written here and read back through the loader.
 */
#include "config.h"

#include <check.h>
#include <errno.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "hl-image.h"
#include "hl-measure.h"
#include "hl-plan-io.h"
#include "hl-underlay.h"

/* Tolerances the brief sets: magnification within 0.5%, measures within
 * 0.5 mm. */
#define TOL_MAGNIFICATION_REL 0.005
#define TOL_MEASURE_MM 0.5
#define TOL_EXACT 1e-9
/* The grey of pure red: ITU-R BT.601 luma weight. */
#define LUMA_RED 0.299

/* The synthetic radiograph: high-entropy values of our own. */
#define SYN_MAGNIFICATION 1.173
#define SYN_SPACING_MM 0.143      /* image mm per pixel */
#define SYN_WIDTH 2800
#define SYN_HEIGHT 2600
#define SYN_MARKER_DIAMETER_MM 25.0
#define SYN_HEAD_RADIUS_MM 23.5
#define SYN_SHAFT_HALF_WIDTH_MM 4.0
#define SYN_TRIANGLE_MM 6.0
/* Where the true plan-frame origin lies on the image, pixels. */
#define SYN_CENTRE_U 1400.0
#define SYN_CENTRE_V 950.0
#define SYN_FIND_WINDOW_MM 14.0

typedef struct {
  const char *name;
  HlSide side;
  /* true geometry, plan frame mm: operated and other hip */
  HlVec2 hip, hip_other;
  HlVec2 teardrop, teardrop_other;   /* the same y: a level line */
  HlVec2 lt, lt_other;
  HlVec2 shaft_p, shaft_d, shaft_p_other, shaft_d_other;
  HlVec2 marker;
} SynCase;

static const SynCase syn_cases[] = {
  { "right hip", HL_SIDE_RIGHT,
    { -96.3, 2.1 }, { 94.8, -1.7 },
    { -61.4, -17.6 }, { 63.2, -17.6 },
    { -114.6, -57.9 }, { 113.1, -61.3 },
    { -131.2, -80.4 }, { -122.7, -181.5 }, { 130.6, -79.2 }, { 125.3, -180.1 },
    { 150.7, 95.2 } },
  { "left hip", HL_SIDE_LEFT,
    { 97.2, 0.8 }, { -93.9, 3.3 },
    { 60.9, -18.4 }, { -62.7, -18.4 },
    { 116.3, -60.2 }, { -112.4, -56.8 },
    { 133.4, -78.8 }, { 121.9, -182.6 }, { -129.5, -81.0 }, { -124.1, -179.3 },
    { -152.3, 96.4 } },
};

#define N_OF(a) (sizeof (a) / sizeof (a)[0])

/* True plan mm -> pixel of the synthetic image. */
static HlVec2
syn_pixel (HlVec2 p)
{
  return (HlVec2) { SYN_CENTRE_U + p.x * SYN_MAGNIFICATION / SYN_SPACING_MM,
                    SYN_CENTRE_V - p.y * SYN_MAGNIFICATION / SYN_SPACING_MM };
}

static double
syn_px (double mm)
{
  return mm * SYN_MAGNIFICATION / SYN_SPACING_MM;
}

static void
draw_disc (cairo_t *cr, HlVec2 centre, double radius_mm)
{
  HlVec2 c = syn_pixel (centre);
  cairo_new_path (cr);
  cairo_arc (cr, c.x, c.y, syn_px (radius_mm), 0, 2 * M_PI);
  cairo_fill (cr);
}

/* A triangle whose centroid is the landmark. */
static void
draw_triangle (cairo_t *cr, HlVec2 at)
{
  HlVec2 c = syn_pixel (at);
  double r = syn_px (SYN_TRIANGLE_MM);
  cairo_new_path (cr);
  for (int i = 0; i < 3; i++)
    {
      double a = M_PI / 2 + i * 2 * M_PI / 3;
      cairo_line_to (cr, c.x + r * cos (a), c.y - r * sin (a));
    }
  cairo_close_path (cr);
  cairo_fill (cr);
}

/* A band along the shaft axis, running past both points. */
static void
draw_shaft (cairo_t *cr, HlVec2 p, HlVec2 d)
{
  HlVec2 a = syn_pixel (p), b = syn_pixel (d);
  double dx = b.x - a.x, dy = b.y - a.y, len = hypot (dx, dy);
  double ux = dx / len, uy = dy / len;
  double ext = 0.4 * len;
  cairo_new_path (cr);
  cairo_set_line_width (cr, 2.0 * syn_px (SYN_SHAFT_HALF_WIDTH_MM));
  cairo_set_line_cap (cr, CAIRO_LINE_CAP_BUTT);
  cairo_move_to (cr, a.x - ux * ext, a.y - uy * ext);
  cairo_line_to (cr, b.x + ux * ext, b.y + uy * ext);
  cairo_stroke (cr);
}

/* Channels: red for discs, green for shafts, blue for triangles. */
static cairo_surface_t *
draw_radiograph (const SynCase *c)
{
  cairo_surface_t *s = cairo_image_surface_create (CAIRO_FORMAT_RGB24, SYN_WIDTH, SYN_HEIGHT);
  cairo_t *cr = cairo_create (s);
  cairo_set_source_rgb (cr, 0, 0, 0);
  cairo_paint (cr);
  cairo_set_operator (cr, CAIRO_OPERATOR_ADD);
  cairo_set_source_rgb (cr, 1, 0, 0);
  draw_disc (cr, c->marker, SYN_MARKER_DIAMETER_MM / 2);
  draw_disc (cr, c->hip, SYN_HEAD_RADIUS_MM);
  draw_disc (cr, c->hip_other, SYN_HEAD_RADIUS_MM);
  cairo_set_source_rgb (cr, 0, 1, 0);
  draw_shaft (cr, c->shaft_p, c->shaft_d);
  draw_shaft (cr, c->shaft_p_other, c->shaft_d_other);
  cairo_set_source_rgb (cr, 0, 0, 1);
  draw_triangle (cr, c->teardrop);
  draw_triangle (cr, c->teardrop_other);
  draw_triangle (cr, c->lt);
  draw_triangle (cr, c->lt_other);
  cairo_destroy (cr);
  cairo_surface_flush (s);
  return s;
}

/* ---- Finding shapes in the pixels ----------------------------------------- */

typedef struct {
  const unsigned char *data;
  int stride, width, height;
} Pixels;

static double
channel (const Pixels *px, int u, int v, int ch)
{
  uint32_t p = ((const uint32_t *) (px->data + (size_t) v * px->stride))[u];
  return ((p >> (16 - 8 * ch)) & 0xff) / 255.0;
}

/* Weighted centroid (pixel centres at +0.5) and weighted area of channel
 * `ch` in a window around `near` (pixels). */
static void
centroid (const Pixels *px, int ch, HlVec2 near, double half_px, HlVec2 *at, double *area)
{
  double sw = 0, su = 0, sv = 0;
  int u0 = (int) fmax (0, near.x - half_px), u1 = (int) fmin (px->width - 1, near.x + half_px);
  int v0 = (int) fmax (0, near.y - half_px), v1 = (int) fmin (px->height - 1, near.y + half_px);
  for (int v = v0; v <= v1; v++)
    for (int u = u0; u <= u1; u++)
      {
        double w = channel (px, u, v, ch);
        sw += w;
        su += w * (u + 0.5);
        sv += w * (v + 0.5);
      }
  ck_assert_msg (sw > 0, "nothing found near pixel %.0f,%.0f", near.x, near.y);
  *at = (HlVec2) { su / sw, sv / sw };
  if (area != NULL)
    *area = sw;
}

/* The centre of the shaft band on pixel row v: a weighted mean along the
 * row. */
static HlVec2
band_centre_on_row (const Pixels *px, double near_u, int v, double half_px)
{
  double sw = 0, su = 0;
  ck_assert_msg (v >= 0 && v < px->height, "row %d is off the image", v);
  for (int u = (int) fmax (0, near_u - half_px); u <= (int) fmin (px->width - 1, near_u + half_px); u++)
    {
      double w = channel (px, u, v, 1);
      sw += w;
      su += w * (u + 0.5);
    }
  ck_assert_msg (sw > 0, "no shaft on row %d", v);
  return (HlVec2) { su / sw, v + 0.5 };
}

/* ---- Expected measures, by hand ---------------------------------------- */

/* With the teardrops level: acetabular offset is the horizontal distance
 * from the hip centre to the teardrop, hip centre height the vertical one,
 * leg length the drop from the teardrop line to the lesser trochanter,
 * femoral offset the perpendicular distance from the hip centre to the
 * shaft line. */
static void
expected_side (HlVec2 hip, HlVec2 td, HlVec2 lt, HlVec2 sp, HlVec2 sd, HlSideMeasures *m)
{
  m->acetabular_offset_mm = fabs (hip.x - td.x);
  m->hip_centre_height_mm = hip.y - td.y;
  m->leg_length_mm = td.y - lt.y;
  double dx = sd.x - sp.x, dy = sd.y - sp.y;
  m->femoral_offset_mm = fabs (dx * (hip.y - sp.y) - dy * (hip.x - sp.x)) / hypot (dx, dy);
  m->global_offset_mm = m->acetabular_offset_mm + m->femoral_offset_mm;
}

static char tmpdir[256];

static void
make_tmpdir (void)
{
  snprintf (tmpdir, sizeof tmpdir, "/tmp/hl-test-radiograph-XXXXXX");
  ck_assert_ptr_nonnull (mkdtemp (tmpdir));
}

static void
remove_tmpdir (void)
{
  char cmd[320];
  snprintf (cmd, sizeof cmd, "rm -rf '%s'", tmpdir);
  ck_assert_int_eq (system (cmd), 0);
}

static void
set_found (HlPlan *plan, HlLandmarkId id, const HlRadiograph *rg, double m, HlVec2 pixel)
{
  HlVec2 img = hl_image_pixel_to_image_mm (rg, pixel.x, pixel.y);
  HlVec2 p = hl_image_mm_to_plan (rg, m, img);
  hl_landmarks_set (&plan->landmarks, id, p.x, p.y);
}

static void
check_measure (const char *what, double got, double want, double tol)
{
  ck_assert_msg (isfinite (got) && fabs (got - want) <= tol, "%s: %.3f, drawn %.3f", what,
                 got, want);
}

/* The whole workflow: draw, save, load, place the landmarks at the assumed
 * magnification (as a user does before calibrating), calibrate on the
 * marker, and measure. */
START_TEST (test_synthetic_radiograph)
{
  const SynCase *c = &syn_cases[_i];
  make_tmpdir ();
  char path[320];
  snprintf (path, sizeof path, "%s/synthetic.png", tmpdir);
  cairo_surface_t *drawn = draw_radiograph (c);
  ck_assert_int_eq (cairo_surface_write_to_png (drawn, path), CAIRO_STATUS_SUCCESS);
  cairo_surface_destroy (drawn);

  HlError err;
  hl_error_clear (&err);
  HlUnderlay *ul = hl_underlay_new_from_file (path, &err);
  ck_assert_msg (ul != NULL, "%s", err.message);
  ck_assert_int_eq (hl_underlay_get_width (ul), SYN_WIDTH);
  ck_assert_int_eq (hl_underlay_get_height (ul), SYN_HEIGHT);

  /* The pixels as read back from the file. */
  cairo_surface_t *read = cairo_image_surface_create_from_png (path);
  ck_assert_int_eq (cairo_surface_status (read), CAIRO_STATUS_SUCCESS);
  Pixels px = { cairo_image_surface_get_data (read), cairo_image_surface_get_stride (read),
                SYN_WIDTH, SYN_HEIGHT };
  double win = syn_px (SYN_FIND_WINDOW_MM) + syn_px (SYN_HEAD_RADIUS_MM);

  HlPlan *plan = hl_plan_new ();
  ck_assert_ptr_nonnull (plan);
  memset (&plan->landmarks, 0, sizeof plan->landmarks);
  plan->side = c->side;
  char hex[65];
  ck_assert_int_eq (hl_file_sha256_hex (path, hex, &err), HL_OK);
  hl_image_attach (plan, path, hex, SYN_SPACING_MM, SYN_WIDTH, SYN_HEIGHT);
  const HlRadiograph *rg = &plan->radiograph;
  bool assumed;
  double m0 = hl_image_display_magnification (plan, &assumed);
  ck_assert (assumed);
  ck_assert_double_eq_tol (m0, HL_MAGNIFICATION_ASSUMED, TOL_EXACT);

  HlVec2 at;
  double area;
  centroid (&px, 0, syn_pixel (c->hip), win, &at, NULL);
  set_found (plan, HL_LM_HIP_CENTRE, rg, m0, at);
  centroid (&px, 0, syn_pixel (c->hip_other), win, &at, NULL);
  set_found (plan, HL_LM_HIP_CENTRE_OTHER, rg, m0, at);
  double tri_win = syn_px (SYN_TRIANGLE_MM) * 1.5;
  centroid (&px, 2, syn_pixel (c->teardrop), tri_win, &at, NULL);
  set_found (plan, HL_LM_TEARDROP, rg, m0, at);
  centroid (&px, 2, syn_pixel (c->teardrop_other), tri_win, &at, NULL);
  set_found (plan, HL_LM_TEARDROP_OTHER, rg, m0, at);
  centroid (&px, 2, syn_pixel (c->lt), tri_win, &at, NULL);
  set_found (plan, HL_LM_LESSER_TROCHANTER, rg, m0, at);
  centroid (&px, 2, syn_pixel (c->lt_other), tri_win, &at, NULL);
  set_found (plan, HL_LM_LESSER_TROCHANTER_OTHER, rg, m0, at);
  const struct { HlLandmarkId id; HlVec2 p; } shafts[] = {
    { HL_LM_SHAFT_PROXIMAL, c->shaft_p }, { HL_LM_SHAFT_DISTAL, c->shaft_d },
    { HL_LM_SHAFT_PROXIMAL_OTHER, c->shaft_p_other }, { HL_LM_SHAFT_DISTAL_OTHER, c->shaft_d_other },
  };
  for (size_t i = 0; i < N_OF (shafts); i++)
    {
      HlVec2 near = syn_pixel (shafts[i].p);
      set_found (plan, shafts[i].id, rg, m0,
                 band_centre_on_row (&px, near.x, (int) near.y, syn_px (3 * SYN_SHAFT_HALF_WIDTH_MM)));
    }
  /* The midline halfway between the teardrops, for the side check. */
  HlVec2 td = plan->landmarks.p[HL_LM_TEARDROP], tdo = plan->landmarks.p[HL_LM_TEARDROP_OTHER];
  hl_landmarks_set (&plan->landmarks, HL_LM_MIDLINE, 0.5 * (td.x + tdo.x), td.y - 20.0);

  /* Calibrate: the marker's centre and radius from its pixels (area of a
   * disc), three edge points in image mm. */
  centroid (&px, 0, syn_pixel (c->marker), syn_px (SYN_MARKER_DIAMETER_MM), &at, &area);
  double r_px = sqrt (area / M_PI);
  HlCalibration cal = plan->calibration;
  cal.method = HL_CAL_MARKER;
  cal.marker_diameter_mm = SYN_MARKER_DIAMETER_MM;
  cal.n_points = 3;
  for (int i = 0; i < 3; i++)
    {
      double a = 0.37 + i * 2.0 * M_PI / 3.0;
      cal.points[i] = hl_image_pixel_to_image_mm (rg, at.x + r_px * cos (a), at.y + r_px * sin (a));
    }
  HlVec2 hip_pixel_before = hl_underlay_plan_to_pixel (
    rg->origin_mm, hl_image_plan_mm_per_pixel (rg, m0), plan->landmarks.p[HL_LM_HIP_CENTRE]);
  ck_assert_int_eq (hl_image_apply_calibration (plan, &cal, &err), HL_OK);
  double m = hl_image_display_magnification (plan, &assumed);
  ck_assert (!assumed);
  ck_assert_msg (fabs (m / SYN_MAGNIFICATION - 1.0) <= TOL_MAGNIFICATION_REL,
                 "%s: magnification %.5f, drawn at %.5f", c->name, m, SYN_MAGNIFICATION);

  /* Recalibrating kept the landmarks on their pixels. */
  HlVec2 hip_pixel_after = hl_underlay_plan_to_pixel (
    rg->origin_mm, hl_image_plan_mm_per_pixel (rg, m), plan->landmarks.p[HL_LM_HIP_CENTRE]);
  ck_assert_double_eq_tol (hip_pixel_after.x, hip_pixel_before.x, 1e-6);
  ck_assert_double_eq_tol (hip_pixel_after.y, hip_pixel_before.y, 1e-6);

  HlMeasures ms;
  hl_measure (&plan->landmarks, plan->side, &ms);
  HlSideMeasures want, want_other;
  expected_side (c->hip, c->teardrop, c->lt, c->shaft_p, c->shaft_d, &want);
  expected_side (c->hip_other, c->teardrop_other, c->lt_other, c->shaft_p_other,
                 c->shaft_d_other, &want_other);
  check_measure ("acetabular offset", ms.operated.acetabular_offset_mm, want.acetabular_offset_mm, TOL_MEASURE_MM);
  check_measure ("femoral offset", ms.operated.femoral_offset_mm, want.femoral_offset_mm, TOL_MEASURE_MM);
  check_measure ("global offset", ms.operated.global_offset_mm, want.global_offset_mm, TOL_MEASURE_MM);
  check_measure ("hip centre height", ms.operated.hip_centre_height_mm, want.hip_centre_height_mm, TOL_MEASURE_MM);
  check_measure ("leg length", ms.operated.leg_length_mm, want.leg_length_mm, TOL_MEASURE_MM);
  check_measure ("other acetabular offset", ms.other.acetabular_offset_mm, want_other.acetabular_offset_mm, TOL_MEASURE_MM);
  check_measure ("other femoral offset", ms.other.femoral_offset_mm, want_other.femoral_offset_mm, TOL_MEASURE_MM);
  check_measure ("other global offset", ms.other.global_offset_mm, want_other.global_offset_mm, TOL_MEASURE_MM);
  check_measure ("other hip centre height", ms.other.hip_centre_height_mm, want_other.hip_centre_height_mm, TOL_MEASURE_MM);
  check_measure ("other leg length", ms.other.leg_length_mm, want_other.leg_length_mm, TOL_MEASURE_MM);
  check_measure ("leg length difference", ms.leg_length_difference_mm,
                 want.leg_length_mm - want_other.leg_length_mm, TOL_MEASURE_MM);
  check_measure ("global offset difference", ms.global_offset_difference_mm,
                 want.global_offset_mm - want_other.global_offset_mm, TOL_MEASURE_MM);
  ck_assert_msg (!ms.side_contradiction, "%s: a side contradiction where there is none", c->name);

  /* The other side chosen by mistake: the warning. */
  plan->side = c->side == HL_SIDE_RIGHT ? HL_SIDE_LEFT : HL_SIDE_RIGHT;
  hl_measure (&plan->landmarks, plan->side, &ms);
  ck_assert_msg (ms.side_contradiction, "%s: no side contradiction with the wrong side", c->name);
  plan->side = c->side;

  /* The abductors, needed before a plan can be saved, lateral to the hip
   * (model.md section 2 proportions). */
  double lat = c->side == HL_SIDE_RIGHT ? -1.0 : 1.0;
  HlVec2 hc = plan->landmarks.p[HL_LM_HIP_CENTRE];
  hl_landmarks_set (&plan->landmarks, HL_LM_ABDUCTOR_INSERTION, hc.x + lat * 58.5, hc.y - 8.5);
  hl_landmarks_set (&plan->landmarks, HL_LM_ABDUCTOR_ORIGIN, hc.x + lat * 21.5, hc.y + 88.5);

  /* The plan saved beside the image keeps a relative path and reads back
   * with the image found unchanged. */
  char plan_path[320];
  snprintf (plan_path, sizeof plan_path, "%s/case.hlplan", tmpdir);
  ck_assert_msg (hl_plan_save_file (plan, plan_path, &err) == HL_OK, "%s", err.message);
  HlPlan *back = NULL;
  ck_assert_msg (hl_plan_load_file (plan_path, &back, &err) == HL_OK, "%s", err.message);
  ck_assert_int_eq (hl_image_verify (&back->radiograph, NULL, 0), HL_IMAGE_OK);
  ck_assert_str_eq (back->radiograph.path, plan->radiograph.path);

  /* Drawn on screen, the hip centre's pixel is under the hip centre: the
   * grey of red (a disc, luma 0.299, ITU-R BT.601), and inverted 0.701. */
  HlImagePlacement pl;
  ck_assert_int_eq (hl_image_placement (plan, &pl, &err), HL_OK);
  cairo_surface_t *screen = cairo_image_surface_create (CAIRO_FORMAT_RGB24, 400, 300);
  HlView view = { 0.9, 200.0, 150.0 };
  view.tx -= plan->landmarks.p[HL_LM_HIP_CENTRE].x * view.scale;
  view.ty += plan->landmarks.p[HL_LM_HIP_CENTRE].y * view.scale;
  for (int inverted = 0; inverted < 2; inverted++)
    {
      cairo_t *cr = cairo_create (screen);
      cairo_set_source_rgb (cr, 1, 1, 1);
      cairo_paint (cr);
      hl_underlay_set_window (ul, 128.0, 256.0, inverted);   /* 0..255 as is */
      hl_underlay_draw (ul, cr, &view, pl.origin_mm, pl.mm_per_pixel, 1.0);
      cairo_destroy (cr);
      cairo_surface_flush (screen);
      Pixels sp = { cairo_image_surface_get_data (screen), cairo_image_surface_get_stride (screen), 400, 300 };
      double red = channel (&sp, 200, 150, 0), green = channel (&sp, 200, 150, 1);
      double grey = inverted ? 1.0 - LUMA_RED : LUMA_RED;
      ck_assert_msg (fabs (red - grey) < 0.01 && fabs (green - grey) < 0.01,
                     "hip centre pixel %.3f %.3f, not %.3f", red, green, grey);
    }
  cairo_surface_destroy (screen);

  hl_plan_free (back);
  hl_plan_free (plan);
  cairo_surface_destroy (read);
  hl_underlay_free (ul);
  remove_tmpdir ();
}
END_TEST

/* ---- Display: the window ------------------------------------------------ */

/* DICOM PS3.3 (NEMA), section C.11.2.1.2.1, the linear VOI window
 * function, output 0..1; values worked by hand. */
static const struct {
  double v, centre, width;
  bool invert;
  double want;
} window_cases[] = {
  { 1000, 1000.5, 201, false, 0.5 },
  { 1100, 1000.5, 201, false, 1.0 },
  { 900, 1000.5, 201, false, 0.0 },
  { 950, 1000.5, 201, false, 0.25 },
  { 950, 1000.5, 201, true, 0.75 },
  { 65535, 1000.5, 201, false, 1.0 },   /* clamped */
  { 0, 1000.5, 201, true, 1.0 },
  { 10, 10.5, 1, false, 0.0 },          /* width 1: a threshold */
  { 11, 10.5, 1, false, 1.0 },
};

START_TEST (test_window_value)
{
  ck_assert_double_eq_tol (hl_underlay_window_value (window_cases[_i].v, window_cases[_i].centre,
                                                     window_cases[_i].width,
                                                     window_cases[_i].invert),
                           window_cases[_i].want, TOL_EXACT);
}
END_TEST

/* A plan from before the window: its brightness and contrast (shown value
 * (v - 1/2) k + 1/2 + b over 0..1) become a window that shows the same. */
static const struct { double brightness, contrast; } old_adjust[] = {
  { 0.0, 1.0 }, { 0.1, 1.0 }, { 0.0, 2.0 }, { 0.0, 2.5 }, { 0.3, 1.0 }, { -0.4, 4.7 },
};

START_TEST (test_brightness_contrast_window)
{
  double b = old_adjust[_i].brightness, k = old_adjust[_i].contrast, c, w;
  hl_window_from_brightness_contrast (b, k, 255.0, &c, &w);
  for (int v = 0; v <= 255; v++)
    {
      double old = (v / 255.0 - 0.5) * k + 0.5 + b;
      old = old < 0.0 ? 0.0 : old > 1.0 ? 1.0 : old;
      ck_assert_double_eq_tol (hl_underlay_window_value (v, c, w, false), old, 1e-9);
    }
}
END_TEST

/* The window shown with the image's own window worked out once (the
 * underlay keeps it) is the window the plan's rule gives: the plan's own
 * window, an older plan's brightness and contrast, else the image's. */
START_TEST (test_known_default_window)
{
  cairo_surface_t *s = cairo_image_surface_create (CAIRO_FORMAT_RGB24, 64, 48);
  cairo_t *cr = cairo_create (s);
  cairo_pattern_t *ramp = cairo_pattern_create_linear (0, 0, 64, 0);
  cairo_pattern_add_color_stop_rgb (ramp, 0.0, 0.2, 0.2, 0.2);
  cairo_pattern_add_color_stop_rgb (ramp, 1.0, 0.7, 0.7, 0.7);
  cairo_set_source (cr, ramp);
  cairo_paint (cr);
  cairo_pattern_destroy (ramp);
  cairo_destroy (cr);
  HlUnderlay *ul = hl_underlay_new_from_surface (s);
  cairo_surface_destroy (s);
  ck_assert_ptr_nonnull (ul);
  const HlGrayImage *img = hl_underlay_get_image (ul);
  double dc, dw, kc, kw, c, w;
  hl_underlay_get_default_window (ul, &kc, &kw);
  hl_gray_image_default_window (img, &dc, &dw, NULL);
  ck_assert_double_eq (kc, dc);
  ck_assert_double_eq (kw, dw);
  /* A ramp from 51 to 178 of 255: not the whole range. */
  ck_assert_double_lt (kw, 200.0);

  HlRadiograph rg;
  for (int k = 0; k < 3; k++)
    {
      hl_radiograph_init (&rg);
      if (k == 1)
        {
          rg.window_centre = 90.0;
          rg.window_width = 40.0;
        }
      else if (k == 2)
        {
          rg.brightness = 0.1;
          rg.contrast = 1.5;
        }
      hl_radiograph_display_window (&rg, img, &c, &w);
      hl_radiograph_display_window_known (&rg, img, kc, kw, &dc, &dw);
      ck_assert_double_eq (dc, c);
      ck_assert_double_eq (dw, w);
    }
  hl_underlay_free (ul);
}
END_TEST

/* ---- Bad image files ------------------------------------------------------- */

static uint32_t
crc32_of (const unsigned char *p, size_t n)
{
  uint32_t c = 0xffffffffu;
  for (size_t i = 0; i < n; i++)
    {
      c ^= p[i];
      for (int k = 0; k < 8; k++)
        c = (c >> 1) ^ (0xedb88320u & (0u - (c & 1u)));
    }
  return c ^ 0xffffffffu;
}

static void
put_be32 (unsigned char *p, uint32_t v)
{
  p[0] = v >> 24;
  p[1] = v >> 16;
  p[2] = v >> 8;
  p[3] = v;
}

/* A PNG signature and an IHDR claiming width x height, then a few bytes
 * of nothing: the pixels are never there. */
static void
write_png_header_only (const char *path, uint32_t width, uint32_t height)
{
  static const unsigned char sig[8] = { 0x89, 'P', 'N', 'G', '\r', '\n', 0x1a, '\n' };
  unsigned char chunk[4 + 4 + 13 + 4];
  put_be32 (chunk, 13);
  memcpy (chunk + 4, "IHDR", 4);
  put_be32 (chunk + 8, width);
  put_be32 (chunk + 12, height);
  chunk[16] = 8;   /* bit depth */
  chunk[17] = 0;   /* grey */
  chunk[18] = chunk[19] = chunk[20] = 0;
  put_be32 (chunk + 21, crc32_of (chunk + 4, 4 + 13));
  FILE *f = fopen (path, "wb");
  ck_assert_ptr_nonnull (f);
  fwrite (sig, 1, sizeof sig, f);
  fwrite (chunk, 1, sizeof chunk, f);
  fwrite ("\0\0\0\0IDAT", 1, 8, f);
  fclose (f);
}

static void
write_text (const char *path, const char *text)
{
  FILE *f = fopen (path, "wb");
  ck_assert_ptr_nonnull (f);
  fputs (text, f);
  fclose (f);
}

typedef enum { BAD_MISSING, BAD_FOLDER, BAD_TEXT, BAD_HUGE, BAD_TRUNCATED, BAD_NO_PERMISSION } BadKind;

static const struct {
  BadKind kind;
  const char *name;
  HlStatus status;
  const char *words;    /* what the message must say */
} bad_images[] = {
  { BAD_MISSING, "gone.png", HL_ERR_IO, "moved or deleted" },
  { BAD_FOLDER, "folder.png", HL_ERR_IO, "not a regular file" },
  { BAD_TEXT, "notes.png", HL_ERR_PARSE, "not a DICOM, PNG, TIFF or JPEG image" },
  { BAD_HUGE, "huge.png", HL_ERR_INVALID, "12000 x 9000 pixels: more than 100 megapixels" },
  { BAD_TRUNCATED, "cut.png", HL_ERR_PARSE, "truncated or damaged" },
  { BAD_NO_PERMISSION, "locked.png", HL_ERR_IO, "Cannot read the image" },
};

START_TEST (test_bad_image)
{
  make_tmpdir ();
  char path[320];
  snprintf (path, sizeof path, "%s/%s", tmpdir, bad_images[_i].name);
  switch (bad_images[_i].kind)
    {
    case BAD_MISSING:
      break;
    case BAD_FOLDER:
      ck_assert_int_eq (mkdir (path, 0700), 0);
      break;
    case BAD_TEXT:
      write_text (path, "This is a note, not a picture.\n");
      break;
    case BAD_HUGE:
      write_png_header_only (path, 12000, 9000);
      break;
    case BAD_TRUNCATED:
      write_png_header_only (path, 640, 480);
      break;
    case BAD_NO_PERMISSION:
      if (geteuid () == 0)
        {
          /* root reads any file whatever its mode: a folder without
           * permissions stands in for the unreadable file. */
          ck_assert_int_eq (mkdir (path, 0), 0);
          HlError err;
          hl_error_clear (&err);
          ck_assert_ptr_null (hl_underlay_new_from_file (path, &err));
          ck_assert_int_eq (err.status, HL_ERR_IO);
          remove_tmpdir ();
          return;
        }
      write_png_header_only (path, 64, 64);
      ck_assert_int_eq (chmod (path, 0), 0);
      break;
    }
  HlError err;
  hl_error_clear (&err);
  ck_assert_ptr_null (hl_underlay_new_from_file (path, &err));
  ck_assert_int_eq (err.status, bad_images[_i].status);
  ck_assert_msg (strstr (err.message, bad_images[_i].words) != NULL, "%s: \"%s\"",
                 bad_images[_i].name, err.message);
  ck_assert_msg (strstr (err.message, path) != NULL, "the message does not name the file: %s",
                 err.message);
  remove_tmpdir ();
}
END_TEST

/* ---- Verification and the plan without its image ------------------------- */

START_TEST (test_verify)
{
  make_tmpdir ();
  char img[320], plan_path[320];
  snprintf (img, sizeof img, "%s/x-ray.png", tmpdir);
  snprintf (plan_path, sizeof plan_path, "%s/case.hlplan", tmpdir);
  write_png_header_only (img, 32, 32);

  HlPlan *plan = hl_plan_new ();
  hl_plan_set_demo_landmarks (plan);
  char hex[65];
  HlError err;
  hl_error_clear (&err);
  ck_assert_int_eq (hl_file_sha256_hex (img, hex, &err), HL_OK);
  hl_image_attach (plan, img, hex, HL_PIXEL_SPACING_DEFAULT_MM, 32, 32);
  ck_assert_int_eq (hl_plan_save_file (plan, plan_path, &err), HL_OK);

  char msg[1200];
  HlPlan *back = NULL;
  ck_assert_int_eq (hl_plan_load_file (plan_path, &back, &err), HL_OK);
  ck_assert_int_eq (hl_image_verify (&back->radiograph, msg, sizeof msg), HL_IMAGE_OK);
  hl_plan_free (back);

  /* Changed since saving. */
  FILE *f = fopen (img, "ab");
  fputc ('!', f);
  fclose (f);
  ck_assert_int_eq (hl_plan_load_file (plan_path, &back, &err), HL_OK);
  ck_assert_int_eq (hl_image_verify (&back->radiograph, msg, sizeof msg), HL_IMAGE_CHANGED);
  ck_assert_msg (strstr (msg, "changed since the plan was saved") && strstr (msg, "x-ray.png"), "%s", msg);
  hl_plan_free (back);

  /* Moved: the plan still opens, solves and exports. */
  char moved[340];
  snprintf (moved, sizeof moved, "%s/elsewhere.png", tmpdir);
  ck_assert_int_eq (rename (img, moved), 0);
  ck_assert_int_eq (hl_plan_load_file (plan_path, &back, &err), HL_OK);
  ck_assert_int_eq (hl_image_verify (&back->radiograph, msg, sizeof msg), HL_IMAGE_MISSING);
  ck_assert_msg (strstr (msg, "moved or is missing") != NULL, "%s", msg);
  char *summary = NULL;
  ck_assert_int_eq (hl_summary_to_buffer (back, "2026-03-01T09:30:00Z", &summary, NULL, &err), HL_OK);
  ck_assert_ptr_nonnull (strstr (summary, "<measures "));
  ck_assert_ptr_nonnull (strstr (summary, "<radiograph path=\"/"));
  free (summary);
  hl_plan_free (back);

  /* A plan in a sub-folder refers to the image with "..". */
  char sub[340], sub_plan[360];
  snprintf (sub, sizeof sub, "%s/plans", tmpdir);
  snprintf (sub_plan, sizeof sub_plan, "%s/case.hlplan", sub);
  ck_assert_int_eq (mkdir (sub, 0700), 0);
  snprintf (plan->radiograph.path, sizeof plan->radiograph.path, "%s", moved);
  ck_assert_int_eq (hl_plan_save_file (plan, sub_plan, &err), HL_OK);
  char text[8192];
  f = fopen (sub_plan, "rb");
  size_t n = fread (text, 1, sizeof text - 1, f);
  fclose (f);
  text[n] = '\0';
  ck_assert_msg (strstr (text, "path=\"../elsewhere.png\"") != NULL, "%s", text);
  ck_assert_int_eq (hl_plan_load_file (sub_plan, &back, &err), HL_OK);
  ck_assert_str_eq (back->radiograph.path, moved);
  ck_assert_int_eq (hl_image_verify (&back->radiograph, NULL, 0), HL_IMAGE_CHANGED);
  hl_plan_free (back);

  hl_plan_free (plan);
  remove_tmpdir ();
}
END_TEST

/* Range checks on the reference: each refused with the field named. */
static const struct {
  const char *what;
  const char *field;
} bad_refs[] = {
  { "empty path", "radiograph path" },
  { "control character", "radiograph path" },
  { "short digest", "radiograph sha256" },
  { "upper-case digest", "radiograph sha256" },
  { "spacing", "radiograph pixel-spacing" },
  { "origin", "radiograph origin" },
  { "brightness", "radiograph brightness" },
  { "contrast", "radiograph contrast" },
  { "opacity", "radiograph opacity" },
};

START_TEST (test_bad_reference)
{
  HlPlan *plan = hl_plan_new ();
  hl_plan_set_demo_landmarks (plan);
  hl_image_attach (plan, "/data/img.png", NULL, 0.1, 100, 100);
  HlRadiograph *rg = &plan->radiograph;
  switch (_i)
    {
    case 0: rg->path[0] = '\0'; break;
    case 1: rg->path[3] = '\n'; break;
    case 2: snprintf (rg->sha256, sizeof rg->sha256, "abc"); break;
    case 3: memset (rg->sha256, 'A', 64); rg->sha256[64] = '\0'; break;
    case 4: rg->pixel_spacing_mm = 0.0; break;
    case 5: rg->origin_mm.y = NAN; break;
    case 6: rg->brightness = 1.5; break;
    case 7: rg->contrast = 0.0; break;
    case 8: rg->opacity = -0.1; break;
    }
  HlError err;
  hl_error_clear (&err);
  ck_assert_int_eq (hl_plan_check (plan, &err), HL_ERR_INVALID);
  ck_assert_str_eq (err.field, bad_refs[_i].field);
  char *text = NULL;
  ck_assert_int_eq (hl_plan_to_buffer (plan, &text, NULL, &err), HL_ERR_INVALID);
  ck_assert_ptr_null (text);
  hl_plan_free (plan);
}
END_TEST

/* Pixel spacing typed later: landmarks stay on their pixels; with a
 * marker the magnification follows the spacing and true sizes stay. */
START_TEST (test_pixel_spacing_change)
{
  HlPlan *plan = hl_plan_new ();
  hl_plan_set_demo_landmarks (plan);
  hl_image_attach (plan, "/data/img.png", NULL, 0.1, 3000, 2500);
  HlCalibration cal = plan->calibration;
  cal.method = HL_CAL_MARKER;
  cal.marker_diameter_mm = 25.0;
  cal.n_points = 3;
  cal.points[0] = (HlVec2) { 10.0, -10.0 };
  cal.points[1] = (HlVec2) { 40.0, -10.0 };
  cal.points[2] = (HlVec2) { 25.0, -25.0 };   /* radius 15: M = 1.2 */
  HlError err;
  ck_assert_int_eq (hl_image_apply_calibration (plan, &cal, &err), HL_OK);
  HlVec2 before = plan->landmarks.p[HL_LM_HIP_CENTRE];
  ck_assert_int_eq (hl_image_set_pixel_spacing (plan, 0.125, &err), HL_OK);
  double m = hl_image_display_magnification (plan, NULL);
  ck_assert_double_eq_tol (m, 1.2 * 1.25, 1e-12);
  ck_assert_double_eq_tol (plan->landmarks.p[HL_LM_HIP_CENTRE].x, before.x, 1e-9);
  ck_assert_double_eq_tol (plan->landmarks.p[HL_LM_HIP_CENTRE].y, before.y, 1e-9);
  ck_assert_int_eq (hl_image_set_pixel_spacing (plan, 5.0, &err), HL_ERR_INVALID);
  ck_assert_str_eq (err.field, "radiograph pixel-spacing");
  /* A spacing that takes the marker's magnification past 1.5 (0.13 mm:
   * 1.2 x 1.3 = 1.56) or under 1.0 (0.08 mm: 0.96) is refused with the
   * magnification named (limits 1.0-1.5, HL_MAGNIFICATION_MIN/MAX), and
   * nothing changes: a plan holding it could not be saved. */
  static const struct { double spacing; const char *says; } past[] = {
    { 0.13, "comes out at 1.560" }, { 0.08, "comes out at 0.960" },
  };
  for (size_t k = 0; k < N_OF (past); k++)
    {
      HlCalibration kept = plan->calibration;
      hl_error_clear (&err);
      ck_assert_int_eq (hl_image_set_pixel_spacing (plan, past[k].spacing, &err),
                        HL_ERR_INVALID);
      ck_assert_msg (strstr (err.message, past[k].says) != NULL, "%s", err.message);
      ck_assert_double_eq (plan->radiograph.pixel_spacing_mm, 0.125);
      ck_assert_mem_eq (&plan->calibration, &kept, sizeof kept);
      ck_assert_double_eq_tol (plan->landmarks.p[HL_LM_HIP_CENTRE].x, before.x, 1e-9);
      ck_assert_double_eq_tol (hl_image_display_magnification (plan, NULL), 1.5, 1e-12);
    }

  /* A typed factor does not follow the spacing: landmarks move with
   * their pixels. */
  cal.method = HL_CAL_TYPED;
  cal.magnification = 1.15;
  ck_assert_int_eq (hl_image_apply_calibration (plan, &cal, &err), HL_OK);
  HlVec2 o = plan->radiograph.origin_mm;
  HlVec2 p = plan->landmarks.p[HL_LM_MIDLINE];
  ck_assert_int_eq (hl_image_set_pixel_spacing (plan, 0.1, &err), HL_OK);
  ck_assert_double_eq_tol (plan->landmarks.p[HL_LM_MIDLINE].x, o.x + (p.x - o.x) * 0.8, 1e-9);

  /* A calibration that gives no magnification is refused and nothing
   * moves. */
  cal.method = HL_CAL_MARKER;
  cal.points[2] = (HlVec2) { 70.0, -10.0 };   /* on a line */
  p = plan->landmarks.p[HL_LM_MIDLINE];
  ck_assert_int_eq (hl_image_apply_calibration (plan, &cal, &err), HL_ERR_DEGENERATE);
  ck_assert_double_eq (plan->landmarks.p[HL_LM_MIDLINE].x, p.x);
  hl_plan_free (plan);
}
END_TEST

static Suite *
radiograph_suite (void)
{
  Suite *s = suite_create ("radiograph");
  TCase *tc = tcase_create ("synthetic");
  tcase_set_timeout (tc, 120);
  tcase_add_loop_test (tc, test_synthetic_radiograph, 0, N_OF (syn_cases));
  suite_add_tcase (s, tc);
  tc = tcase_create ("adjust");
  tcase_add_loop_test (tc, test_window_value, 0, N_OF (window_cases));
  tcase_add_loop_test (tc, test_brightness_contrast_window, 0, N_OF (old_adjust));
  tcase_add_test (tc, test_known_default_window);
  suite_add_tcase (s, tc);
  tc = tcase_create ("files");
  tcase_add_loop_test (tc, test_bad_image, 0, N_OF (bad_images));
  tcase_add_test (tc, test_verify);
  suite_add_tcase (s, tc);
  tc = tcase_create ("reference");
  tcase_add_loop_test (tc, test_bad_reference, 0, N_OF (bad_refs));
  tcase_add_test (tc, test_pixel_spacing_change);
  suite_add_tcase (s, tc);
  return s;
}

int
main (void)
{
  SRunner *sr = srunner_create (radiograph_suite ());
  srunner_run_all (sr, CK_NORMAL);
  int failed = srunner_ntests_failed (sr);
  srunner_free (sr);
  return failed == 0 ? EXIT_SUCCESS : EXIT_FAILURE;
}
