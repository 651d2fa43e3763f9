/* test-render.c: the schematic drawn with cairo (no display needed).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * These tests check the drawing against itself (round trips, mirror
 * symmetry, what is drawn where); they check no computation against an
 * outside source, so no source is cited.
 */
#include "config.h"

#include <check.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <glib.h>

#include "hl-image.h"
#include "hl-render.h"
#include "hl-report.h"
#include "hl-underlay.h"

#define W 1000
#define H 700
#define MARGIN_PX 30.0
/* plan -> screen -> plan is exact but for rounding. */
#define TOL_ROUND_TRIP_MM 1e-9
/* A drawn schematic covers well over this share of the picture. */
#define MIN_INK_SHARE 0.05
/* Two colour channels closer than this count as equal (0..255). */
#define CHANNEL_TOL 24
/* For a flat fill, such as the error box: no anti-aliasing inside. */
#define CHANNEL_TOL_FLAT 3
/* A pixel this far from the background is ink: the pale bone fill is. */
#define INK_TOL 6
/* Pixels of a colour that count as "drawn". */
/* An error box is a filled panel of some thousands of pixels. */
#define ERROR_BOX_MIN_PIXELS 400
#define MIN_COLOUR_PIXELS 40
/* Mirror images may differ along anti-aliased edges only. */
#define MIRROR_MISMATCH_MAX 0.01
/* A click this far from every landmark hits nothing. */
#define FAR_PX 60.0
#define HIT_RADIUS_PX 10.0
#define NEAR_OFFSET_PX 3.0

static HlPlan *
demo_plan (void)
{
  HlPlan *plan = hl_plan_new ();
  ck_assert_ptr_nonnull (plan);
  hl_plan_set_demo_landmarks (plan);
  HlRecon r;
  hl_recon_init (&r);
  r.femoral_offset_mm = 6.25;
  ck_assert_int_ge (hl_plan_add_option (plan, "Lateral offset stem", &r), 0);
  hl_recon_init (&r);
  r.cup_medial_mm = 4.5;
  r.cup_superior_mm = 2.75;
  r.head_length_mm = 3.5;
  ck_assert_int_ge (hl_plan_add_option (plan, "Medialised cup, long head", &r), 0);
  return plan;
}

static cairo_surface_t *
render (const HlPlan *plan, int option, const HlView *view_or_null,
        const HlRenderStyle *style, HlView *view_out)
{
  cairo_surface_t *s = cairo_image_surface_create (CAIRO_FORMAT_RGB24, W, H);
  ck_assert_int_eq (cairo_surface_status (s), CAIRO_STATUS_SUCCESS);
  cairo_t *cr = cairo_create (s);
  HlScene scene;
  hl_scene_build (&scene, plan, option);
  HlView view;
  if (view_or_null != NULL)
    view = *view_or_null;
  else
    hl_render_fit_view (&scene, W, H, MARGIN_PX, &view);
  hl_render_scene (cr, &scene, &view, style, W, H);
  cairo_destroy (cr);
  cairo_surface_flush (s);
  if (view_out != NULL)
    *view_out = view;
  return s;
}

static void
pixel (cairo_surface_t *s, int x, int y, int rgb[3])
{
  const unsigned char *data = cairo_image_surface_get_data (s);
  int stride = cairo_image_surface_get_stride (s);
  uint32_t v = *(const uint32_t *) (data + y * stride + 4 * x);
  rgb[0] = (v >> 16) & 0xff;
  rgb[1] = (v >> 8) & 0xff;
  rgb[2] = v & 0xff;
}

static bool
near_colour (const int rgb[3], HlRgba c, int tol)
{
  return abs (rgb[0] - (int) lround (c.r * 255)) <= tol
         && abs (rgb[1] - (int) lround (c.g * 255)) <= tol
         && abs (rgb[2] - (int) lround (c.b * 255)) <= tol;
}

static long
count_near (cairo_surface_t *s, int x0, int y0, int x1, int y1, HlRgba c, int tol)
{
  long n = 0;
  int rgb[3];
  for (int y = y0; y < y1; y++)
    for (int x = x0; x < x1; x++)
      {
        pixel (s, x, y, rgb);
        n += near_colour (rgb, c, tol);
      }
  return n;
}

static long
count_colour (cairo_surface_t *s, int x0, int y0, int x1, int y1, HlRgba c)
{
  return count_near (s, x0, y0, x1, y1, c, CHANNEL_TOL);
}

static long
count_flat (cairo_surface_t *s, int x0, int y0, int x1, int y1, HlRgba c)
{
  return count_near (s, x0, y0, x1, y1, c, CHANNEL_TOL_FLAT);
}

static double
ink_share (cairo_surface_t *s, HlRgba bg)
{
  long total = (long) W * H;
  return 1.0 - (double) count_near (s, 0, 0, W, H, bg, INK_TOL) / (double) total;
}

/* ---- Views ------------------------------------------------------------- */

static const struct {
  HlView view;
  double x, y;
} round_trips[] = {
  { { 1.0, 0.0, 0.0 }, 0.0, 0.0 },
  { { 2.385, 512.25, 311.75 }, -95.0, 0.0 },
  { { 0.0731, -40.5, 900.125 }, 1234.5, -1987.25 },
  { { 37.9, 3.3, -7.7 }, -0.001, 1e-6 },
  { { 3.125, 480.0, 360.0 }, 155.55, -180.125 },
};

START_TEST (test_view_round_trip)
{
  const HlView *v = &round_trips[_i].view;
  HlVec2 p = { round_trips[_i].x, round_trips[_i].y };
  HlVec2 s = hl_view_to_screen (v, p);
  HlVec2 q = hl_view_to_plan (v, s);
  ck_assert_double_eq_tol (q.x, p.x, TOL_ROUND_TRIP_MM);
  ck_assert_double_eq_tol (q.y, p.y, TOL_ROUND_TRIP_MM);
  /* Radiographic convention: plan x right, plan y up = screen y down. */
  HlVec2 right = hl_view_to_screen (v, (HlVec2) { p.x + 1.0, p.y });
  HlVec2 up = hl_view_to_screen (v, (HlVec2) { p.x, p.y + 1.0 });
  ck_assert (right.x > s.x);
  ck_assert (up.y < s.y);
}
END_TEST

static const struct {
  double x0, y0, x1, y1, w, h;
} fit_boxes[] = {
  { -200.0, -220.0, 200.0, 160.0, 1000.0, 700.0 },
  { -12.5, 3.0, 400.25, 7.0, 640.0, 480.0 },       /* flat box */
  { 5.0, 5.0, 5.0, 5.0, 300.0, 300.0 },            /* a point */
  { -1000.0, -900.0, 1100.0, 950.0, 320.0, 2400.0 },
};

START_TEST (test_view_fit)
{
  HlView v;
  double m = 20.0;
  hl_view_fit_box (&v, fit_boxes[_i].x0, fit_boxes[_i].y0, fit_boxes[_i].x1,
                   fit_boxes[_i].y1, fit_boxes[_i].w, fit_boxes[_i].h, m);
  ck_assert (v.scale >= HL_VIEW_SCALE_MIN && v.scale <= HL_VIEW_SCALE_MAX);
  HlVec2 a = hl_view_to_screen (&v, (HlVec2) { fit_boxes[_i].x0, fit_boxes[_i].y1 });
  HlVec2 b = hl_view_to_screen (&v, (HlVec2) { fit_boxes[_i].x1, fit_boxes[_i].y0 });
  const double slack = 1e-6;
  if (v.scale < HL_VIEW_SCALE_MAX)
    {
      ck_assert (a.x >= m - slack && b.x <= fit_boxes[_i].w - m + slack);
      ck_assert (a.y >= m - slack && b.y <= fit_boxes[_i].h - m + slack);
    }
  /* Centred. */
  ck_assert_double_eq_tol (0.5 * (a.x + b.x), 0.5 * fit_boxes[_i].w, 1e-6);
  ck_assert_double_eq_tol (0.5 * (a.y + b.y), 0.5 * fit_boxes[_i].h, 1e-6);
}
END_TEST

START_TEST (test_view_zoom_about)
{
  HlView v = { 2.0, 100.0, 50.0 };
  HlVec2 anchor_s = { 333.0, 222.0 };
  HlVec2 before = hl_view_to_plan (&v, anchor_s);
  hl_view_zoom_about (&v, 1.7, anchor_s.x, anchor_s.y);
  ck_assert_double_eq_tol (v.scale, 3.4, 1e-12);
  HlVec2 after = hl_view_to_plan (&v, anchor_s);
  ck_assert_double_eq_tol (after.x, before.x, TOL_ROUND_TRIP_MM);
  ck_assert_double_eq_tol (after.y, before.y, TOL_ROUND_TRIP_MM);

  /* Bad factors are ignored, huge ones clamped. */
  HlView keep = v;
  hl_view_zoom_about (&v, 0.0, 0, 0);
  hl_view_zoom_about (&v, -2.0, 0, 0);
  hl_view_zoom_about (&v, NAN, 0, 0);
  ck_assert_double_eq (v.scale, keep.scale);
  hl_view_zoom_about (&v, 1e9, 10, 10);
  ck_assert_double_eq (v.scale, HL_VIEW_SCALE_MAX);
  hl_view_zoom_about (&v, 1e-12, 10, 10);
  ck_assert_double_eq (v.scale, HL_VIEW_SCALE_MIN);
}
END_TEST

/* ---- Hit tests ---------------------------------------------------------- */

START_TEST (test_hit_each_landmark)
{
  HlPlan *plan = demo_plan ();
  HlScene scene;
  hl_scene_build (&scene, plan, -1);
  HlView v;
  hl_render_fit_view (&scene, W, H, MARGIN_PX, &v);
  int n = 0;
  for (int i = 0; i < HL_LM_COUNT; i++)
    {
      if (!hl_landmarks_has (&plan->landmarks, (HlLandmarkId) i))
        continue;
      n++;
      HlVec2 s = hl_view_to_screen (&v, plan->landmarks.p[i]);
      ck_assert_msg (s.x >= 0 && s.x < W && s.y >= 0 && s.y < H,
                     "landmark %s is drawn off the fitted view",
                     hl_landmark_info ((HlLandmarkId) i)->key);
      ck_assert_int_eq (hl_render_hit_landmark (plan, &v, s.x, s.y, HIT_RADIUS_PX), i);
      ck_assert_int_eq (hl_render_hit_landmark (plan, &v, s.x + NEAR_OFFSET_PX,
                                                s.y - NEAR_OFFSET_PX, HIT_RADIUS_PX), i);
    }
  ck_assert_int_eq (n, HL_LM_COUNT);

  /* Points far from every landmark hit nothing. */
  const HlVec2 far_pts[] = { { 2, 2 }, { W - 3, H - 3 }, { W / 2.0, 5 }, { 5, H / 2.0 } };
  for (size_t k = 0; k < sizeof far_pts / sizeof far_pts[0]; k++)
    {
      for (int i = 0; i < HL_LM_COUNT; i++)
        {
          HlVec2 s = hl_view_to_screen (&v, plan->landmarks.p[i]);
          ck_assert (hypot (s.x - far_pts[k].x, s.y - far_pts[k].y) > FAR_PX);
        }
      ck_assert_int_eq (hl_render_hit_landmark (plan, &v, far_pts[k].x, far_pts[k].y,
                                                HIT_RADIUS_PX), -1);
    }

  /* Unplaced landmarks are never hit. */
  HlVec2 s = hl_view_to_screen (&v, plan->landmarks.p[HL_LM_TEARDROP]);
  hl_landmarks_unset (&plan->landmarks, HL_LM_TEARDROP);
  ck_assert_int_ne (hl_render_hit_landmark (plan, &v, s.x, s.y, HIT_RADIUS_PX),
                    HL_LM_TEARDROP);
  ck_assert_int_eq (hl_render_hit_landmark (NULL, &v, s.x, s.y, HIT_RADIUS_PX), -1);
  ck_assert_int_eq (hl_render_hit_landmark (plan, NULL, s.x, s.y, HIT_RADIUS_PX), -1);
  hl_plan_free (plan);
}
END_TEST

/* ---- Rendering ------------------------------------------------------------ */

static const struct {
  int option;
  bool dark;
  bool cane_and_loads;
} render_cases[] = {
  { -1, false, false },
  { 0, false, false },
  { 1, false, true },
  { -1, true, true },
  { 1, true, false },
  { 7, false, false },   /* no such option: drawn as native */
};

START_TEST (test_render_not_blank)
{
  HlPlan *plan = demo_plan ();
  if (render_cases[_i].cane_and_loads)
    {
      plan->cane.enabled = true;
      plan->loads.hand[HL_HAND_CONTRALATERAL].mass_kg = 7.5;
      plan->loads.hand[HL_HAND_IPSILATERAL].mass_kg = 4.25;
    }
  HlRenderStyle style;
  hl_render_style_init (&style, render_cases[_i].dark);
  style.selected_landmark = HL_LM_ABDUCTOR_INSERTION;
  style.hover_landmark = HL_LM_HIP_CENTRE;
  cairo_surface_t *s = render (plan, render_cases[_i].option, NULL, &style, NULL);

  ck_assert (ink_share (s, style.bg) > MIN_INK_SHARE);
  /* The joint reaction and abductor arrows are there, in their colours. */
  ck_assert_int_gt (count_colour (s, 0, 0, W, H,
                                  hl_palette_color (HL_ROLE_JOINT, style.dark)),
                    MIN_COLOUR_PIXELS);
  ck_assert_int_gt (count_colour (s, 0, 0, W, H,
                                  hl_palette_color (HL_ROLE_ABDUCTOR, style.dark)),
                    MIN_COLOUR_PIXELS);
  ck_assert_int_gt (count_colour (s, 0, 0, W, H,
                                  hl_palette_color (HL_ROLE_HANDLE, style.dark)),
                    MIN_COLOUR_PIXELS);
  if (render_cases[_i].cane_and_loads)
    ck_assert_int_gt (count_colour (s, 0, 0, W, H,
                                    hl_palette_color (HL_ROLE_LOAD, style.dark)),
                      MIN_COLOUR_PIXELS);
  /* No error box on a plan that solves (the arrows' anti-aliased edges
   * pass through the box's light colour on a few dozen pixels). */
  ck_assert_int_lt (count_flat (s, 0, 0, W, H,
                                hl_palette_color (HL_ROLE_ERROR_FILL, style.dark)),
                    ERROR_BOX_MIN_PIXELS);

  if (_i == 1 && getenv ("HL_RENDER_PNG") != NULL)
    cairo_surface_write_to_png (s, getenv ("HL_RENDER_PNG"));
  cairo_surface_destroy (s);
  hl_plan_free (plan);
}
END_TEST

/* An option moves the femur: the picture changes, the pelvis does not. */
START_TEST (test_render_option_differs)
{
  HlPlan *plan = demo_plan ();
  HlRenderStyle style;
  hl_render_style_init (&style, false);
  style.show_frame = false;
  style.show_legend = false;
  HlView v;
  cairo_surface_t *a = render (plan, -1, NULL, &style, &v);
  cairo_surface_t *b = render (plan, 0, &v, &style, NULL);
  long differ = 0;
  int pa[3], pb[3];
  for (int y = 0; y < H; y++)
    for (int x = 0; x < W; x++)
      {
        pixel (a, x, y, pa);
        pixel (b, x, y, pb);
        differ += abs (pa[0] - pb[0]) + abs (pa[1] - pb[1]) + abs (pa[2] - pb[2]) > 3 * CHANNEL_TOL;
      }
  ck_assert_int_gt (differ, MIN_COLOUR_PIXELS);
  /* The option's cup is drawn. */
  ck_assert_int_gt (count_colour (b, 0, 0, W, H, hl_palette_color (HL_ROLE_OPTION, false)),
                    MIN_COLOUR_PIXELS);
  cairo_surface_destroy (a);
  cairo_surface_destroy (b);
  hl_plan_free (plan);
}
END_TEST

/* Plans that cannot be solved still draw, with the message in a box. */
typedef enum { BREAK_NOTHING_PLACED, BREAK_NO_INSERTION, BREAK_INSERTION_ON_HIP,
               BREAK_NAN, BREAK_MASS, BREAK_MIDLINE_LATERAL } Break;

static const struct {
  Break how;
  const char *name;
} degenerate_cases[] = {
  { BREAK_NOTHING_PLACED, "nothing placed" },
  { BREAK_NO_INSERTION, "no abductor insertion" },
  { BREAK_INSERTION_ON_HIP, "insertion on the hip centre" },
  { BREAK_NAN, "non-finite coordinate" },
  { BREAK_MASS, "body mass out of range" },
  { BREAK_MIDLINE_LATERAL, "midline lateral of the hip" },
};

START_TEST (test_render_degenerate)
{
  HlPlan *plan = demo_plan ();
  switch (degenerate_cases[_i].how)
    {
    case BREAK_NOTHING_PLACED:
      memset (&plan->landmarks, 0, sizeof plan->landmarks);
      break;
    case BREAK_NO_INSERTION:
      hl_landmarks_unset (&plan->landmarks, HL_LM_ABDUCTOR_INSERTION);
      break;
    case BREAK_INSERTION_ON_HIP:
      plan->landmarks.p[HL_LM_ABDUCTOR_INSERTION] = plan->landmarks.p[HL_LM_HIP_CENTRE];
      plan->landmarks.p[HL_LM_ABDUCTOR_ORIGIN] = plan->landmarks.p[HL_LM_HIP_CENTRE];
      plan->landmarks.p[HL_LM_ABDUCTOR_ORIGIN].y += 1.5;
      break;
    case BREAK_NAN:
      plan->landmarks.p[HL_LM_ABDUCTOR_INSERTION].x = NAN;
      break;
    case BREAK_MASS:
      plan->mass_kg = 0.0;
      break;
    case BREAK_MIDLINE_LATERAL:
      plan->landmarks.p[HL_LM_MIDLINE].x = -180.0;
      break;
    }
  HlScene scene;
  hl_scene_build (&scene, plan, 0);
  ck_assert_msg (!scene.solved, "%s: solved", degenerate_cases[_i].name);
  ck_assert_msg (scene.error.message[0] != '\0', "%s: no message",
                 degenerate_cases[_i].name);

  HlRenderStyle style;
  hl_render_style_init (&style, false);
  cairo_surface_t *s = render (plan, 0, NULL, &style, NULL);
  /* The box sits at the top centre, below the side markers. */
  long box = count_flat (s, W / 2 - 100, 60, W / 2 + 100, 110,
                           hl_palette_color (HL_ROLE_ERROR_FILL, false));
  ck_assert_msg (box > 2000, "%s: error box missing (%ld px)",
                 degenerate_cases[_i].name, box);
  if (degenerate_cases[_i].how != BREAK_NOTHING_PLACED)
    ck_assert (ink_share (s, style.bg) > MIN_INK_SHARE);
  cairo_surface_destroy (s);
  hl_plan_free (plan);
}
END_TEST

START_TEST (test_render_null_plan)
{
  HlScene scene;
  hl_scene_build (&scene, NULL, 0);
  ck_assert (!scene.solved);
  ck_assert (scene.error.message[0] != '\0');
  double x0, y0, x1, y1;
  ck_assert (!hl_scene_bounds (&scene, &x0, &y0, &x1, &y1));
  ck_assert (x1 > x0 && y1 > y0);
  HlRenderStyle style;
  hl_render_style_init (&style, true);
  cairo_surface_t *s = render (NULL, -1, NULL, &style, NULL);
  ck_assert_int_gt (count_flat (s, W / 2 - 100, 60, W / 2 + 100, 110,
                                hl_palette_color (HL_ROLE_ERROR_FILL, true)), 2000);
  cairo_surface_destroy (s);
  /* A zero or broken view draws nothing and does not crash. */
  cairo_surface_t *blank = cairo_image_surface_create (CAIRO_FORMAT_RGB24, 16, 16);
  cairo_t *cr = cairo_create (blank);
  HlView bad = { 0.0, 0.0, 0.0 };
  hl_render_scene (cr, &scene, &bad, &style, 16, 16);
  bad.scale = NAN;
  hl_render_scene (cr, &scene, &bad, &style, 16, 16);
  hl_render_scene (cr, NULL, &bad, &style, 16, 16);
  cairo_destroy (cr);
  cairo_surface_destroy (blank);
}
END_TEST

/* A right hip and the same hip mirrored to the left draw as mirror images:
 * x -> -x is sx -> W - sx with the translation mirrored too. */
static const int mirror_options[] = { -1, 0, 1 };

START_TEST (test_render_mirror)
{
  HlPlan *right = demo_plan ();
  right->cane.enabled = true;
  right->loads.hand[HL_HAND_IPSILATERAL].mass_kg = 6.5;
  HlPlan *left = hl_plan_copy (right);
  ck_assert_ptr_nonnull (left);
  hl_plan_mirror (left);
  ck_assert_int_eq (left->side, HL_SIDE_LEFT);

  HlRenderStyle style;
  hl_render_style_init (&style, false);
  style.show_frame = false;    /* the R and L markers are not mirrored */
  style.show_legend = false;
  style.show_labels = false;   /* nor is text */
  HlView vr;
  cairo_surface_t *a = render (right, mirror_options[_i], NULL, &style, &vr);
  HlView vl = { vr.scale, W - vr.tx, vr.ty };
  cairo_surface_t *b = render (left, mirror_options[_i], &vl, &style, NULL);

  long mismatch = 0, compared = 0;
  int pa[3], pb[3];
  for (int y = 0; y < H; y += 7)
    for (int x = 0; x < W; x++)
      {
        pixel (a, x, y, pa);
        pixel (b, W - 1 - x, y, pb);
        compared++;
        mismatch += abs (pa[0] - pb[0]) > CHANNEL_TOL || abs (pa[1] - pb[1]) > CHANNEL_TOL
                    || abs (pa[2] - pb[2]) > CHANNEL_TOL;
      }
  ck_assert_msg ((double) mismatch / compared < MIRROR_MISMATCH_MAX,
                 "%ld of %ld pixels differ", mismatch, compared);
  /* ... and the mirror image is not trivially the same picture. */
  long same_unmirrored = 0;
  for (int x = 0; x < W; x++)
    {
      pixel (a, x, H / 2, pa);
      pixel (b, x, H / 2, pb);
      same_unmirrored += abs (pa[0] - pb[0]) > CHANNEL_TOL;
    }
  ck_assert_int_gt (same_unmirrored, 0);
  cairo_surface_destroy (a);
  cairo_surface_destroy (b);
  hl_plan_free (right);
  hl_plan_free (left);
}
END_TEST

/* ---- Figures ------------------------------------------------------------------ */

START_TEST (test_figures)
{
  HlPlan *plan = demo_plan ();
  char dir[] = "/tmp/hl-test-render-XXXXXX";
  ck_assert_ptr_nonnull (mkdtemp (dir));
  char png[256], svg[256];
  snprintf (png, sizeof png, "%s/figure.png", dir);
  snprintf (svg, sizeof svg, "%s/figure.svg", dir);
  HlError err;

  ck_assert_int_eq (hl_figure_save (plan, 1, 900, 640, png, &err), HL_OK);
  cairo_surface_t *s = cairo_image_surface_create_from_png (png);
  ck_assert_int_eq (cairo_surface_status (s), CAIRO_STATUS_SUCCESS);
  ck_assert_int_eq (cairo_image_surface_get_width (s), 900);
  ck_assert_int_eq (cairo_image_surface_get_height (s), 640);
  cairo_surface_destroy (s);

  ck_assert_int_eq (hl_figure_save (plan, -1, 800, 600, svg, &err), HL_OK);
  FILE *f = fopen (svg, "r");
  ck_assert_ptr_nonnull (f);
  char head[512] = "";
  size_t got = fread (head, 1, sizeof head - 1, f);
  fclose (f);
  ck_assert_uint_gt (got, 100);
  ck_assert_ptr_nonnull (strstr (head, "<svg"));

  unlink (png);
  unlink (svg);
  rmdir (dir);
  hl_plan_free (plan);
}
END_TEST

/* A path of NULL or "" is used as it is; any other gets ".svg" or ".png". */
static const struct {
  int w, h;
  const char *path;
  HlStatus expect;
} figure_errors[] = {
  { 10, 600, "/tmp/x", HL_ERR_INVALID },
  /* Below the smallest size the layout holds at (test_layout_smallest). */
  { 299, 600, "/tmp/x", HL_ERR_INVALID },
  { 600, 299, "/tmp/x", HL_ERR_INVALID },
  { 800, HL_FIGURE_SIZE_MAX + 1, "/tmp/x", HL_ERR_INVALID },
  { 800, 600, NULL, HL_ERR_INVALID },
  { 800, 600, "", HL_ERR_INVALID },
  { 800, 600, "/nonexistent-hl-dir/sub/figure", HL_ERR_IO },
};

START_TEST (test_figure_errors)
{
  HlPlan *plan = demo_plan ();
  HlError err;
  for (int svg = 0; svg < 2; svg++)
    {
      char path[256];
      const char *p = figure_errors[_i].path;
      if (p != NULL && p[0] != '\0')
        {
          snprintf (path, sizeof path, "%s%s", p, svg ? ".svg" : ".png");
          p = path;
        }
      hl_error_clear (&err);
      HlStatus st = hl_figure_save (plan, 0, figure_errors[_i].w, figure_errors[_i].h, p,
                                    &err);
      ck_assert_int_eq (st, figure_errors[_i].expect);
      ck_assert_int_eq (err.status, figure_errors[_i].expect);
      ck_assert (err.message[0] != '\0');
      ck_assert (err.field[0] != '\0');
    }
  hl_plan_free (plan);
}
END_TEST

/* ---- Palette ------------------------------------------------------------------- */

START_TEST (test_palette)
{
  static const HlPaletteRole force_roles[] = {
    HL_ROLE_WEIGHT, HL_ROLE_ABDUCTOR, HL_ROLE_JOINT, HL_ROLE_CANE, HL_ROLE_LOAD,
  };
  const size_t n = sizeof force_roles / sizeof force_roles[0];
  for (int dark = 0; dark < 2; dark++)
    for (int r = 0; r < HL_ROLE_N; r++)
      {
        HlRgba c = hl_palette_color ((HlPaletteRole) r, dark);
        ck_assert (c.r >= 0 && c.r <= 1 && c.g >= 0 && c.g <= 1 && c.b >= 0 && c.b <= 1);
        ck_assert_double_eq (c.a, 1.0);
        double d[HL_PALETTE_DASHES_MAX];
        int nd = hl_palette_dashes ((HlPaletteRole) r, d);
        ck_assert (nd >= 0 && nd <= HL_PALETTE_DASHES_MAX);
        for (int k = 0; k < nd; k++)
          ck_assert (d[k] > 0.0);
      }
  /* Line style is a second cue: no two forces share one. */
  for (size_t i = 0; i < n; i++)
    for (size_t j = i + 1; j < n; j++)
      ck_assert_str_ne (hl_palette_line_style_name (force_roles[i]),
                        hl_palette_line_style_name (force_roles[j]));
  /* In a dark theme the dark blue gives way to a lighter one. */
  HlRgba wl = hl_palette_color (HL_ROLE_WEIGHT, false);
  HlRgba wd = hl_palette_color (HL_ROLE_WEIGHT, true);
  ck_assert (wd.r + wd.g + wd.b > wl.r + wl.g + wl.b);
}
END_TEST

/* ---- Layout at every target ------------------------------------------------ */

/* Boxes that touch within this are taken as apart (anti-aliasing). */
#define LAYOUT_TOL_PX 0.5

static bool
boxes_meet (const HlRenderBox *a, const HlRenderBox *b)
{
  return a->x + a->w > b->x + LAYOUT_TOL_PX && b->x + b->w > a->x + LAYOUT_TOL_PX
         && a->y + a->h > b->y + LAYOUT_TOL_PX && b->y + b->h > a->y + LAYOUT_TOL_PX;
}

static bool
box_inside (const HlRenderBox *b, double w, double h)
{
  return b->x >= -LAYOUT_TOL_PX && b->y >= -LAYOUT_TOL_PX
         && b->x + b->w <= w + LAYOUT_TOL_PX && b->y + b->h <= h + LAYOUT_TOL_PX;
}

static const char *const box_names[] = {
  "label", "scale bar", "force scale", "legend", "caution", "frame",
};

/* No two labels meet, no label meets the bars, the legend, the caution or
 * the frame; labels, bars and legend lie inside the drawing; the text is at
 * least min_text_px. */
static void
check_layout (const char *what, const HlRenderLayout *l, double w, double h,
              double min_text_px)
{
  int n_labels = 0, n_bars = 0;
  ck_assert_msg (l->n < HL_RENDER_LAYOUT_MAX, "%s: the layout is full", what);
  for (int i = 0; i < l->n; i++)
    {
      const HlRenderBox *a = &l->box[i];
      n_labels += a->kind == HL_BOX_LABEL;
      n_bars += a->kind == HL_BOX_SCALE_BAR || a->kind == HL_BOX_FORCE_SCALE;
      ck_assert_msg (box_inside (a, w, h), "%s: the %s at (%.1f, %.1f) %.1f x %.1f leaves "
                     "the %.0f x %.0f drawing", what, box_names[a->kind], a->x, a->y,
                     a->w, a->h, w, h);
      for (int j = 0; j < i; j++)
        {
          const HlRenderBox *b = &l->box[j];
          if (a->kind != HL_BOX_LABEL && b->kind != HL_BOX_LABEL)
            continue;
          ck_assert_msg (!boxes_meet (a, b), "%s: a %s (%.1f, %.1f, %.1f x %.1f) meets a "
                         "%s (%.1f, %.1f, %.1f x %.1f)", what, box_names[a->kind], a->x,
                         a->y, a->w, a->h, box_names[b->kind], b->x, b->y, b->w, b->h);
        }
    }
  ck_assert_msg (n_labels >= 4, "%s: %d labels", what, n_labels);
  ck_assert_msg (n_bars == 2, "%s: %d scale bars", what, n_bars);
  ck_assert_msg (l->body_text_px >= min_text_px - 1e-9, "%s: text %.1f px, at least %.1f",
                 what, l->body_text_px, min_text_px);
}

/* The legend is drawn (full or compact), with its box in the layout. */
static void
check_legend (const char *what, const HlRenderLayout *l)
{
  int n = 0;
  for (int i = 0; i < l->n; i++)
    n += l->box[i].kind == HL_BOX_LEGEND;
  ck_assert_msg (l->legend_shown && !l->legend_noted, "%s: the legend is left out", what);
  ck_assert_msg (n == 1, "%s: %d legend boxes", what, n);
}

typedef struct {
  const char *name;
  int width, height;
  HlRenderPreset preset;
  double min_text_px;
} LayoutCase;

static const LayoutCase layout_cases[] = {
  { "figure 400 x 300", 400, 300, HL_RENDER_PRESET_AUTO, HL_RENDER_TEXT_MIN_PX },
  { "figure 1200 x 900", 1200, 900, HL_RENDER_PRESET_AUTO, HL_RENDER_TEXT_MIN_PX },
  { "figure 1920 x 1080", 1920, 1080, HL_RENDER_PRESET_AUTO, HL_RENDER_TEXT_MIN_PX },
  { "figure A4 portrait (595 x 842)", 595, 842, HL_RENDER_PRESET_AUTO, HL_RENDER_TEXT_MIN_PX },
  { "figure A4 landscape (842 x 595)", 842, 595, HL_RENDER_PRESET_AUTO, HL_RENDER_TEXT_MIN_PX },
  { "slide", 0, 0, HL_RENDER_PRESET_SLIDE, HL_RENDER_SLIDE_TEXT_PX },
  { "half slide", 0, 0, HL_RENDER_PRESET_HALF_SLIDE, HL_RENDER_SLIDE_TEXT_PX },
};

START_TEST (test_layout_figures)
{
  const LayoutCase *c = &layout_cases[_i];
  HlPlan *plan = demo_plan ();
  int w = c->width, h = c->height;
  hl_render_preset_size (c->preset, &w, &h);
  if (c->preset == HL_RENDER_PRESET_SLIDE)
    ck_assert (w == 1920 && h == 1080);
  if (c->preset == HL_RENDER_PRESET_HALF_SLIDE)
    ck_assert (w == 960 && h == 1080);

  for (int option = -1; option < (int) plan->n_options; option++)
    {
      HlRenderLayout layout;
      cairo_surface_t *surface = cairo_image_surface_create (CAIRO_FORMAT_RGB24, w, h);
      cairo_t *cr = cairo_create (surface);
      hl_render_figure_draw (cr, plan, option, w, h, c->preset, NULL, &layout);
      cairo_destroy (cr);
      cairo_surface_destroy (surface);
      char what[96];
      snprintf (what, sizeof what, "%s, option %d", c->name, option);
      check_layout (what, &layout, w, h, c->min_text_px);
      /* the caution and the legend are in every figure */
      bool caution = false;
      for (int i = 0; i < layout.n; i++)
        caution |= layout.box[i].kind == HL_BOX_CAUTION;
      ck_assert_msg (caution, "%s: no caution", what);
      check_legend (what, &layout);
    }
  hl_plan_free (plan);
}
END_TEST

/* The legend is never dropped silently: at 400 x 300 with the most rows
 * (a cane, a carried load and an option) it is drawn in its compact form
 * beside the bones; at a size too small for any form a line in its corner
 * says it is left out. */
START_TEST (test_layout_legend_small)
{
  HlPlan *plan = demo_plan ();
  plan->cane.enabled = true;
  plan->cane.hand = HL_HAND_CONTRALATERAL;
  plan->cane.unit = HL_FORCE_UNIT_PERCENT_BW;
  plan->cane.value = 15.0;
  plan->cane.distance_mm = 280.0;
  plan->loads.hand[HL_HAND_IPSILATERAL].mass_kg = 4.0;
  plan->loads.hand[HL_HAND_IPSILATERAL].distance_mm = 220.0;
  static const struct { int w, h; bool shown; } sizes[] = {
    { 400, 300, true }, { 480, 360, true }, { 160, 120, false },
  };
  for (size_t k = 0; k < sizeof sizes / sizeof sizes[0]; k++)
    {
      int w = sizes[k].w, h = sizes[k].h;
      HlRenderLayout layout;
      cairo_surface_t *surface = cairo_image_surface_create (CAIRO_FORMAT_RGB24, w, h);
      cairo_t *cr = cairo_create (surface);
      hl_render_figure_draw (cr, plan, 0, w, h, HL_RENDER_PRESET_AUTO, NULL, &layout);
      cairo_destroy (cr);
      cairo_surface_destroy (surface);
      char what[64];
      snprintf (what, sizeof what, "figure %d x %d, crowded", w, h);
      int n = 0;
      for (int i = 0; i < layout.n; i++)
        n += layout.box[i].kind == HL_BOX_LEGEND;
      ck_assert_msg (n == 1, "%s: %d legend boxes", what, n);
      ck_assert_msg (layout.legend_shown != layout.legend_noted,
                     "%s: the legend is neither drawn nor said to be left out", what);
      ck_assert_msg (layout.legend_shown == sizes[k].shown, "%s: legend %s", what,
                     layout.legend_shown ? "drawn" : "left out");
      if (sizes[k].shown)
        check_layout (what, &layout, w, h, HL_RENDER_TEXT_MIN_PX);
    }
  hl_plan_free (plan);
}
END_TEST

/* At the smallest figure size and above it, every box of the layout lies
 * inside the drawing and no two meet, whatever their kind (the title, the
 * legend or its note, the scale bars, the caution and the labels): below
 * it they did (at 292 px high the force scale met the legend; at 200 x
 * 150 the legend's note met the title; at 64 x 64 the caution was cut),
 * so HL_FIGURE_SIZE_MIN refuses those sizes (test_figure_errors). */
START_TEST (test_layout_smallest)
{
  static const int sides[] = { HL_FIGURE_SIZE_MIN, HL_FIGURE_SIZE_MIN + 1, 317, 333, 360,
                               400, 480, 600, 720, 1000, 1200 };
  const size_t n_sides = sizeof sides / sizeof sides[0];
  HlPlan *plan = demo_plan ();
  for (size_t a = 0; a < n_sides; a++)
    for (size_t b = 0; b < n_sides; b++)
      {
        int w = sides[a], h = sides[b];
        HlRenderLayout l;
        cairo_surface_t *surface = cairo_image_surface_create (CAIRO_FORMAT_RGB24, w, h);
        cairo_t *cr = cairo_create (surface);
        hl_render_figure_draw (cr, plan, 1, w, h, HL_RENDER_PRESET_AUTO, NULL, &l);
        cairo_destroy (cr);
        cairo_surface_destroy (surface);
        ck_assert_msg (l.n >= 8 && l.n < HL_RENDER_LAYOUT_MAX, "%d x %d: %d boxes", w, h, l.n);
        ck_assert_msg (l.legend_shown || l.legend_noted, "%d x %d: no legend", w, h);
        for (int i = 0; i < l.n; i++)
          {
            const HlRenderBox *p = &l.box[i];
            ck_assert_msg (box_inside (p, w, h), "%d x %d: the %s (%.1f, %.1f, %.1f x %.1f) "
                           "leaves the drawing", w, h, box_names[p->kind], p->x, p->y, p->w,
                           p->h);
            for (int j = 0; j < i; j++)
              {
                const HlRenderBox *q = &l.box[j];
                ck_assert_msg (!boxes_meet (p, q), "%d x %d: a %s (%.1f, %.1f, %.1f x %.1f) "
                               "meets a %s (%.1f, %.1f, %.1f x %.1f)", w, h,
                               box_names[p->kind], p->x, p->y, p->w, p->h,
                               box_names[q->kind], q->x, q->y, q->w, q->h);
              }
          }
      }
  hl_plan_free (plan);
}
END_TEST

/* Over a radiograph the scale bar's and the force scale's text lie on a
 * pale backing, in the exports (over_image) and in the window
 * (text_backing alone): drawn over black, the mean of each bar's box is
 * pale; with neither, it stays dark (the check can fail). */
START_TEST (test_scale_text_backing)
{
  const int w = 900, h = 560;
  HlPlan *plan = demo_plan ();
  HlScene scene;
  hl_scene_build (&scene, plan, 0);
  for (int mode = 0; mode < 3; mode++)
    {
      HlRenderStyle style;
      HlRenderLayout layout;
      HlView view;
      hl_render_style_init (&style, false);
      style.layout = &layout;
      style.paint_background = false;
      style.over_image = mode == 1;
      style.text_backing = mode == 2;
      hl_render_fit_view_framed (&scene, &style, w, h, MARGIN_PX, &view);
      cairo_surface_t *surface = cairo_image_surface_create (CAIRO_FORMAT_RGB24, w, h);
      cairo_t *cr = cairo_create (surface);
      cairo_set_source_rgb (cr, 0, 0, 0);
      cairo_paint (cr);
      hl_render_scene (cr, &scene, &view, &style, w, h);
      cairo_destroy (cr);
      cairo_surface_flush (surface);
      const unsigned char *data = cairo_image_surface_get_data (surface);
      int stride = cairo_image_surface_get_stride (surface);
      int n_bars = 0;
      for (int i = 0; i < layout.n; i++)
        {
          const HlRenderBox *b = &layout.box[i];
          if (b->kind != HL_BOX_SCALE_BAR && b->kind != HL_BOX_FORCE_SCALE)
            continue;
          n_bars++;
          double sum = 0.0;
          long n = 0;
          for (int y = (int) ceil (b->y); y < (int) floor (b->y + b->h) && y < h; y++)
            for (int x = (int) ceil (b->x); x < (int) floor (b->x + b->w) && x < w; x++)
              {
                const unsigned char *px = data + (size_t) y * (size_t) stride + 4 * (size_t) x;
                sum += (px[0] + px[1] + px[2]) / 3.0;
                n++;
              }
          ck_assert_int_gt (n, 50);
          double mean = sum / (double) n;
          if (mode == 0)
            ck_assert_msg (mean < 60.0, "no backing: the %s's box is %.0f of 255 (black "
                           "under it)", box_names[b->kind], mean);
          else
            ck_assert_msg (mean > 150.0, "%s: the %s's box is %.0f of 255: no pale backing",
                           mode == 1 ? "over_image" : "text_backing", box_names[b->kind],
                           mean);
        }
      ck_assert_int_eq (n_bars, 2);
      cairo_surface_destroy (surface);
    }
  hl_plan_free (plan);
}
END_TEST

/* The window's canvas: the screen's own sizes (style defaults), at the
 * size of the canvas on a 1366 x 768 screen and at a large one. */
START_TEST (test_layout_window)
{
  static const int sizes[][2] = { { 900, 560 }, { 1500, 900 } };
  HlPlan *plan = demo_plan ();
  HlScene scene;
  hl_scene_build (&scene, plan, 0);
  for (size_t k = 0; k < sizeof sizes / sizeof sizes[0]; k++)
    {
      int w = sizes[k][0], h = sizes[k][1];
      HlRenderStyle style;
      HlRenderLayout layout;
      HlView view;
      hl_render_style_init (&style, false);
      style.layout = &layout;
      hl_render_fit_view_framed (&scene, &style, w, h, MARGIN_PX, &view);
      cairo_surface_t *surface = cairo_image_surface_create (CAIRO_FORMAT_RGB24, w, h);
      cairo_t *cr = cairo_create (surface);
      hl_render_scene (cr, &scene, &view, &style, w, h);
      cairo_destroy (cr);
      cairo_surface_destroy (surface);
      char what[64];
      snprintf (what, sizeof what, "window %d x %d", w, h);
      check_layout (what, &layout, w, h, HL_RENDER_TEXT_MIN_PX);
      check_legend (what, &layout);
    }
  hl_plan_free (plan);
}
END_TEST

/* Page 2 of the report: the schematic in its box at the report's 8 pt. */
START_TEST (test_layout_report)
{
  HlPlan *plan = demo_plan ();
  HlError err = { 0 };
  HlReportSettings settings;
  hl_report_settings_init (&settings);
  settings.uncertainty = false;
  settings.date = "2026-01-01";
  HlReport *r = hl_report_new (plan, &settings, &err);
  ck_assert_msg (r != NULL, "%s", err.message);
  HlRenderLayout layout;
  double w, h;
  hl_report_figure_layout (r, &layout, &w, &h);
  check_layout ("report page 2", &layout, w, h, 6.0);
  check_legend ("report page 2", &layout);
  /* Every page's text (page 1 too): each box inside the page, no two
   * intersecting (half a point of slack for lines that only touch). */
  int n_pages = hl_report_n_pages (r);
  ck_assert_int_ge (n_pages, 2);
  for (int page = 0; page < n_pages; page++)
    {
      size_t n = 0;
      HlReportTextBox *b = hl_report_page_text_boxes (r, page, &n);
      ck_assert_msg (n >= 5, "report page %d: %zu text boxes", page + 1, n);
      for (size_t i = 0; i < n; i++)
        {
          ck_assert_msg (b[i].x >= 0.0 && b[i].y >= 0.0
                         && b[i].x + b[i].w <= HL_REPORT_PAGE_WIDTH_PT
                         && b[i].y + b[i].h <= HL_REPORT_PAGE_HEIGHT_PT,
                         "report page %d: \"%s\" leaves the page", page + 1, b[i].text);
          for (size_t j = i + 1; j < n; j++)
            {
              double ox = fmin (b[i].x + b[i].w, b[j].x + b[j].w) - fmax (b[i].x, b[j].x);
              double oy = fmin (b[i].y + b[i].h, b[j].y + b[j].h) - fmax (b[i].y, b[j].y);
              ck_assert_msg (ox <= 0.5 || oy <= 0.5,
                             "report page %d: \"%s\" and \"%s\" overlap", page + 1,
                             b[i].text, b[j].text);
            }
        }
      g_free (b);
    }
  hl_report_free (r);
  hl_plan_free (plan);
}
END_TEST

/* ---- The radiograph under a figure ------------------------------------------ */

/* A synthetic radiograph: mid-grey (128) with a black square of
 * UL_SQUARE_PX pixels centred on pixel (UL_CENTRE_PX, UL_CENTRE_PX). */
#define UL_SIDE_PX 400
#define UL_CENTRE_PX 200
#define UL_SQUARE_PX 60
#define UL_GREY 128
/* A free spot of the demo figure (between the femora, below the pelvis,
 * beside the midline and the weight line), plan mm. */
#define UL_FREE_X_MM (-55.0)
#define UL_FREE_Y_MM (-175.0)
/* Image pixels from the square's edge to the points checked inside and
 * outside it: a few screen px at the smallest figure, clear of the
 * anti-aliased edge. */
#define UL_INSIDE_PX 12.0
#define UL_OUTSIDE_PX 40.0

static HlUnderlay *
synthetic_underlay (void)
{
  cairo_surface_t *img = cairo_image_surface_create (CAIRO_FORMAT_RGB24, UL_SIDE_PX, UL_SIDE_PX);
  cairo_t *cr = cairo_create (img);
  cairo_set_source_rgb (cr, UL_GREY / 255.0, UL_GREY / 255.0, UL_GREY / 255.0);
  cairo_paint (cr);
  cairo_set_source_rgb (cr, 0, 0, 0);
  cairo_rectangle (cr, UL_CENTRE_PX - UL_SQUARE_PX / 2, UL_CENTRE_PX - UL_SQUARE_PX / 2,
                   UL_SQUARE_PX, UL_SQUARE_PX);
  cairo_fill (cr);
  cairo_destroy (cr);
  HlUnderlay *u = hl_underlay_new_from_surface (img);
  cairo_surface_destroy (img);
  ck_assert_ptr_nonnull (u);
  /* centre 128, width 256: 0 black, 128 mid-grey, as held */
  hl_underlay_set_window (u, UL_GREY, 256.0, false);
  return u;
}

/* The demo plan with the synthetic image placed so that the square's
 * centre lies on the free spot; *mpp gets plan mm per image pixel. */
static HlPlan *
underlay_plan (double *mpp)
{
  HlPlan *plan = demo_plan ();
  hl_image_attach (plan, "/nonexistent/synthetic.png", NULL, 0.3, UL_SIDE_PX, UL_SIDE_PX);
  HlImagePlacement pl;
  HlError err = { 0 };
  ck_assert_int_eq (hl_image_placement (plan, &pl, &err), HL_OK);
  *mpp = pl.mm_per_pixel;
  plan->radiograph.origin_mm.x = UL_FREE_X_MM - UL_CENTRE_PX * pl.mm_per_pixel;
  plan->radiograph.origin_mm.y = UL_FREE_Y_MM + UL_CENTRE_PX * pl.mm_per_pixel;
  return plan;
}

/* The grey (mean of R, G, B) of the pixel under a plan point. */
static double
grey_at (cairo_surface_t *s, const HlView *view, HlVec2 plan)
{
  HlVec2 p = hl_view_to_screen (view, plan);
  int x = (int) floor (p.x), y = (int) floor (p.y);
  ck_assert (x >= 0 && y >= 0 && x < cairo_image_surface_get_width (s)
             && y < cairo_image_surface_get_height (s));
  cairo_surface_flush (s);
  const unsigned char *row = cairo_image_surface_get_data (s)
                             + (size_t) y * cairo_image_surface_get_stride (s);
  uint32_t px = ((const uint32_t *) row)[x];
  return (((px >> 16) & 0xff) + ((px >> 8) & 0xff) + (px & 0xff)) / 3.0;
}

typedef struct {
  const char *name;
  int width, height;
  HlRenderPreset preset;
} UnderlayCase;

static const UnderlayCase underlay_cases[] = {
  { "400 x 300", 400, 300, HL_RENDER_PRESET_AUTO },
  { "1200 x 900", 1200, 900, HL_RENDER_PRESET_AUTO },
  { "slide", 1920, 1080, HL_RENDER_PRESET_SLIDE },
  { "A4 portrait", 595, 842, HL_RENDER_PRESET_AUTO },
};

/* The image lies where the calibration puts it, at the figure's scale,
 * with the window set; the layout holds over it; without an underlay the
 * spot is paper. */
START_TEST (test_figure_underlay)
{
  const UnderlayCase *c = &underlay_cases[_i];
  double mpp;
  HlPlan *plan = underlay_plan (&mpp);
  HlUnderlay *u = synthetic_underlay ();
  int w = c->width, h = c->height;
  HlView view;
  hl_render_figure_view (plan, 0, w, h, c->preset, &view);
  const HlVec2 centre = { UL_FREE_X_MM, UL_FREE_Y_MM };
  /* inside the square near its edge, and just outside it on the grey */
  const HlVec2 inside = { UL_FREE_X_MM + (UL_SQUARE_PX / 2 - UL_INSIDE_PX) * mpp, UL_FREE_Y_MM };
  const HlVec2 outside = { UL_FREE_X_MM + (UL_SQUARE_PX / 2 + UL_OUTSIDE_PX) * mpp, UL_FREE_Y_MM };

  for (int with = 0; with < 2; with++)
    {
      HlRenderLayout layout;
      cairo_surface_t *s = cairo_image_surface_create (CAIRO_FORMAT_RGB24, w, h);
      cairo_t *cr = cairo_create (s);
      hl_render_figure_draw (cr, plan, 0, w, h, c->preset, with ? u : NULL, &layout);
      cairo_destroy (cr);
      char what[96];
      snprintf (what, sizeof what, "%s, %s the radiograph", c->name, with ? "with" : "without");
      double gc = grey_at (s, &view, centre), gi = grey_at (s, &view, inside),
             go = grey_at (s, &view, outside);
      if (with)
        {
          ck_assert_msg (gc < 20.0 && gi < 20.0, "%s: the square is %.0f / %.0f, not black",
                         what, gc, gi);
          ck_assert_msg (fabs (go - UL_GREY) <= CHANNEL_TOL,
                         "%s: beside the square %.0f, not the image's grey %d", what, go,
                         UL_GREY);
        }
      else
        ck_assert_msg (gc > 255.0 - INK_TOL && gi > 255.0 - INK_TOL,
                       "%s: the free spot is %.0f / %.0f, not paper", what, gc, gi);
      check_layout (what, &layout, w, h,
                    c->preset == HL_RENDER_PRESET_SLIDE ? HL_RENDER_SLIDE_TEXT_PX
                                                        : HL_RENDER_TEXT_MIN_PX);
      bool caution = false;
      for (int i = 0; i < layout.n; i++)
        caution |= layout.box[i].kind == HL_BOX_CAUTION;
      ck_assert_msg (caution, "%s: no caution", what);
      cairo_surface_destroy (s);
    }

  /* The window drawn is the one set: inverted, the square is white. */
  hl_underlay_set_window (u, UL_GREY, 256.0, true);
  cairo_surface_t *s = cairo_image_surface_create (CAIRO_FORMAT_RGB24, w, h);
  cairo_t *cr = cairo_create (s);
  hl_render_figure_draw (cr, plan, 0, w, h, c->preset, u, NULL);
  cairo_destroy (cr);
  ck_assert_msg (grey_at (s, &view, centre) > 235.0, "%s: inverted, the square is %.0f",
                 c->name, grey_at (s, &view, centre));
  cairo_surface_destroy (s);

  hl_underlay_free (u);
  hl_plan_free (plan);
}
END_TEST

/* The report loads the plan's radiograph itself: a missing file leaves the
 * report complete and says why; not asked for, nothing is said. */
START_TEST (test_report_underlay_missing)
{
  double mpp;
  HlPlan *plan = underlay_plan (&mpp);
  HlError err = { 0 };
  HlReportSettings settings;
  hl_report_settings_init (&settings);
  ck_assert (settings.underlay);
  settings.uncertainty = false;
  settings.date = "2026-01-01";
  HlReport *r = hl_report_new (plan, &settings, &err);
  ck_assert_msg (r != NULL, "%s", err.message);
  const HlError *note = hl_report_underlay_note (r);
  ck_assert_ptr_nonnull (note);
  ck_assert_msg (strstr (note->message, "/nonexistent/synthetic.png") != NULL,
                 "the note does not name the file: %s", note->message);
  HlRenderLayout layout;
  double w, h;
  hl_report_figure_layout (r, &layout, &w, &h);
  check_layout ("report page 2, radiograph missing", &layout, w, h, 6.0);
  hl_report_free (r);

  settings.underlay = false;
  r = hl_report_new (plan, &settings, &err);
  ck_assert_ptr_nonnull (r);
  ck_assert_ptr_null (hl_report_underlay_note (r));
  hl_report_free (r);

  /* A plan whose image the calibration cannot place is refused too. */
  HlUnderlay *u = hl_underlay_for_plan (plan, &err);
  ck_assert_ptr_null (u);
  plan->radiograph.present = false;
  u = hl_underlay_for_plan (plan, &err);
  ck_assert_ptr_null (u);
  ck_assert_int_ne (err.status, HL_OK);
  hl_plan_free (plan);
}
END_TEST

/* ---- Layers: the base layer as a picture under the top layer ---- */

typedef struct {
  int option;
  bool dark;
  bool labels;
  bool paint_background;
  int selected;
  int hover;
} LayerCase;

static const LayerCase layer_cases[] = {
  { -1, false, true, true, -1, -1 },
  { 0, false, true, true, HL_LM_ABDUCTOR_INSERTION, HL_LM_HIP_CENTRE },
  { 1, true, true, false, HL_LM_MIDLINE, -1 },
  { 0, false, false, true, -1, HL_LM_TEARDROP },
};

static cairo_surface_t *
draw_layers (const HlPlan *plan, const LayerCase *c, const HlView *fixed_view,
             unsigned layers_first, unsigned layers_then)
{
  cairo_surface_t *s = cairo_image_surface_create (CAIRO_FORMAT_RGB24, W, H);
  cairo_t *cr = cairo_create (s);
  HlScene scene;
  HlView view;
  HlRenderStyle style;

  hl_render_style_init (&style, c->dark);
  style.show_labels = c->labels;
  style.paint_background = c->paint_background;
  style.selected_landmark = c->selected;
  style.hover_landmark = c->hover;
  /* Under a drawing that paints no background: a grey like a radiograph. */
  cairo_set_source_rgb (cr, 0.35, 0.35, 0.35);
  cairo_paint (cr);
  hl_scene_build (&scene, plan, c->option);
  if (fixed_view != NULL)
    view = *fixed_view;
  else
    hl_render_fit_view (&scene, W, H, MARGIN_PX, &view);
  hl_render_scene_layers (cr, &scene, &view, &style, W, H, (HlRenderLayers) layers_first);
  if (layers_then != 0)
    hl_render_scene_layers (cr, &scene, &view, &style, W, H, (HlRenderLayers) layers_then);
  cairo_destroy (cr);
  cairo_surface_flush (s);
  return s;
}

static bool
same_pixels (cairo_surface_t *a, cairo_surface_t *b)
{
  int stride = cairo_image_surface_get_stride (a);

  return stride == cairo_image_surface_get_stride (b)
         && memcmp (cairo_image_surface_get_data (a), cairo_image_surface_get_data (b),
                    (size_t) stride * H) == 0;
}

/* The base layer and then the top layer draw exactly the whole scene. */
START_TEST (test_layers_same_picture)
{
  HlPlan *plan = demo_plan ();
  const LayerCase *c = &layer_cases[_i];
  cairo_surface_t *all = draw_layers (plan, c, NULL, HL_RENDER_LAYERS_ALL, 0);
  cairo_surface_t *split = draw_layers (plan, c, NULL, HL_RENDER_LAYER_BASE, HL_RENDER_LAYER_TOP);
  cairo_surface_t *base = draw_layers (plan, c, NULL, HL_RENDER_LAYER_BASE, 0);

  ck_assert_msg (same_pixels (all, split), "case %d: base + top differs from the scene", _i);
  ck_assert_msg (!same_pixels (all, base), "case %d: the top layer drew nothing", _i);
  cairo_surface_destroy (all);
  cairo_surface_destroy (split);
  cairo_surface_destroy (base);
  hl_plan_free (plan);
}
END_TEST

static uint64_t
base_key (const HlPlan *plan, const HlView *view, const HlRenderStyle *style)
{
  cairo_surface_t *s = cairo_image_surface_create (CAIRO_FORMAT_RGB24, W, H);
  cairo_t *cr = cairo_create (s);
  HlScene scene;
  uint64_t key;

  hl_scene_build (&scene, plan, 0);
  key = hl_render_scene_base_key (cr, &scene, view, style, W, H);
  cairo_destroy (cr);
  cairo_surface_destroy (s);
  return key;
}

/* The key changes with what the base layer draws and only with that: a
 * femoral landmark dragged leaves it, the pelvis's landmarks, the view and
 * the colours change it. */
START_TEST (test_layers_base_key)
{
  HlPlan *plan = demo_plan ();
  HlScene scene;
  HlView view;
  HlRenderStyle style;
  LayerCase c = { 0, false, true, true, -1, -1 };

  hl_render_style_init (&style, false);
  hl_scene_build (&scene, plan, 0);
  hl_render_fit_view (&scene, W, H, MARGIN_PX, &view);
  uint64_t key = base_key (plan, &view, &style);
  ck_assert_uint_ne (key, 0);
  ck_assert_uint_eq (base_key (plan, &view, &style), key);

  cairo_surface_t *before = draw_layers (plan, &c, &view, HL_RENDER_LAYER_BASE, 0);
  HlVec2 ins = plan->landmarks.p[HL_LM_ABDUCTOR_INSERTION];
  plan->landmarks.p[HL_LM_ABDUCTOR_INSERTION].x = ins.x + 4.0;
  ck_assert_uint_eq (base_key (plan, &view, &style), key);
  cairo_surface_t *after = draw_layers (plan, &c, &view, HL_RENDER_LAYER_BASE, 0);
  ck_assert_msg (same_pixels (before, after), "an equal key drew a different base layer");
  cairo_surface_destroy (before);
  cairo_surface_destroy (after);
  plan->landmarks.p[HL_LM_ABDUCTOR_INSERTION] = ins;

  static const HlLandmarkId pelvic[] = { HL_LM_MIDLINE, HL_LM_HIP_CENTRE,
                                         HL_LM_ABDUCTOR_ORIGIN };
  for (size_t k = 0; k < sizeof pelvic / sizeof pelvic[0]; k++)
    {
      HlVec2 p = plan->landmarks.p[pelvic[k]];
      plan->landmarks.p[pelvic[k]].x = p.x + 3.0;
      ck_assert_msg (base_key (plan, &view, &style) != key,
                     "moving landmark %d left the base key", (int) pelvic[k]);
      plan->landmarks.p[pelvic[k]] = p;
    }
  ck_assert_uint_eq (base_key (plan, &view, &style), key);

  HlView moved = view;
  moved.tx += 1.0;
  ck_assert_uint_ne (base_key (plan, &moved, &style), key);
  HlRenderStyle dark;
  hl_render_style_init (&dark, true);
  ck_assert_uint_ne (base_key (plan, &view, &dark), key);
  hl_plan_free (plan);
}
END_TEST

static Suite *
render_suite (void)
{
  Suite *s = suite_create ("ui");
  TCase *tc;

  tc = tcase_create ("view");
  tcase_add_loop_test (tc, test_view_round_trip, 0,
                       sizeof round_trips / sizeof round_trips[0]);
  tcase_add_loop_test (tc, test_view_fit, 0, sizeof fit_boxes / sizeof fit_boxes[0]);
  tcase_add_test (tc, test_view_zoom_about);
  suite_add_tcase (s, tc);

  tc = tcase_create ("hit");
  tcase_add_test (tc, test_hit_each_landmark);
  suite_add_tcase (s, tc);

  tc = tcase_create ("render");
  tcase_add_loop_test (tc, test_render_not_blank, 0,
                       sizeof render_cases / sizeof render_cases[0]);
  tcase_add_test (tc, test_render_option_differs);
  tcase_add_loop_test (tc, test_render_degenerate, 0,
                       sizeof degenerate_cases / sizeof degenerate_cases[0]);
  tcase_add_test (tc, test_render_null_plan);
  tcase_add_loop_test (tc, test_render_mirror, 0,
                       sizeof mirror_options / sizeof mirror_options[0]);
  suite_add_tcase (s, tc);

  tc = tcase_create ("layers");
  tcase_add_loop_test (tc, test_layers_same_picture, 0,
                       sizeof layer_cases / sizeof layer_cases[0]);
  tcase_add_test (tc, test_layers_base_key);
  suite_add_tcase (s, tc);

  tc = tcase_create ("figure");
  tcase_add_test (tc, test_figures);
  tcase_add_loop_test (tc, test_figure_errors, 0,
                       sizeof figure_errors / sizeof figure_errors[0]);
  tcase_add_test (tc, test_palette);
  suite_add_tcase (s, tc);

  tc = tcase_create ("layout");
  tcase_set_timeout (tc, 60);
  tcase_add_loop_test (tc, test_layout_figures, 0,
                       sizeof layout_cases / sizeof layout_cases[0]);
  tcase_add_test (tc, test_layout_window);
  tcase_add_test (tc, test_layout_report);
  tcase_add_test (tc, test_layout_legend_small);
  tcase_add_test (tc, test_layout_smallest);
  tcase_add_test (tc, test_scale_text_backing);
  suite_add_tcase (s, tc);

  tc = tcase_create ("underlay");
  tcase_set_timeout (tc, 60);
  tcase_add_loop_test (tc, test_figure_underlay, 0,
                       sizeof underlay_cases / sizeof underlay_cases[0]);
  tcase_add_test (tc, test_report_underlay_missing);
  suite_add_tcase (s, tc);
  return s;
}

int
main (void)
{
  setenv ("LC_ALL", "C", 1);
  setenv ("TZ", "UTC", 1);
  SRunner *sr = srunner_create (render_suite ());
  srunner_run_all (sr, CK_NORMAL);
  int failed = srunner_ntests_failed (sr);
  srunner_free (sr);
  return failed == 0 ? EXIT_SUCCESS : EXIT_FAILURE;
}
