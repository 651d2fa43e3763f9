/* test-template-shape.c: the drawing data of a template, its drag inverses,
 * the catalogue registry and the template drawn with cairo.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The geometry itself (templating.md section 2) is tested in the core's
 * template tests; these check that the shape drawn and dragged is that
 * geometry, worked by hand from its definitions.
 */
#include "config.h"

#include <check.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hl-render-template.h"
#include "hl-template-shape.h"

#define DEG (M_PI / 180.0)
#define TOL 1e-9
#define W 640
#define H 480

/* The demo landmarks with one templated option (demo catalogue, default
 * placement). */
static HlPlan *
templated_plan (void)
{
  HlPlan *plan = hl_plan_new ();
  ck_assert_ptr_nonnull (plan);
  hl_plan_set_demo_landmarks (plan);
  const HlCatalogue *cat = hl_catalogue_registry_find (HL_CATALOGUE_DEMO_ID);
  ck_assert_ptr_nonnull (cat);
  HlRecon r;
  hl_recon_init (&r);
  long idx = hl_plan_add_option (plan, "Templated", &r);
  ck_assert_int_ge (idx, 0);
  HlTemplate t;
  HlError err;
  hl_error_clear (&err);
  ck_assert_int_eq (hl_template_place_default (plan, cat, &t, &err), HL_OK);
  ck_assert_int_eq (hl_plan_set_template (plan, (size_t) idx, &t, cat, &err), HL_OK);
  return plan;
}

START_TEST (test_shape_is_the_geometry)
{
  HlPlan *plan = templated_plan ();
  const HlTemplate *t = &plan->options[0].recon.tmpl;
  HlTemplateShape s;
  ck_assert (hl_template_shape (plan, 0, NULL, &s));
  ck_assert (s.cup);
  ck_assert (s.stem);
  ck_assert_double_eq_tol (s.cup_radius_mm, 0.5 * t->cup_diameter_mm, TOL);
  ck_assert_double_eq_tol (s.cup_centre.x, t->cup_x_mm, TOL);
  ck_assert_double_eq_tol (s.cup_centre.y, t->cup_y_mm, TOL);
  /* The face line is a diameter of the circle. */
  ck_assert_double_eq_tol (hypot (s.face_lateral.x - s.face_medial.x,
                                  s.face_lateral.y - s.face_medial.y),
                           t->cup_diameter_mm, 1e-9);
  /* C' = C + l n (templating.md section 2). */
  double l = t->dims.liner_lateralisation_mm;
  ck_assert_double_eq_tol (s.rotation_centre.x, s.cup_centre.x + l * s.face_normal.x, TOL);
  ck_assert_double_eq_tol (s.rotation_centre.y, s.cup_centre.y + l * s.face_normal.y, TOL);
  /* The dome is the half away from n: its middle direction is -n. */
  double mid = 0.5 * (s.dome_start_rad + s.dome_end_rad);
  ck_assert_double_eq_tol (s.dome_end_rad - s.dome_start_rad, M_PI, TOL);
  ck_assert_double_le (hypot (cos (mid) + s.face_normal.x, sin (mid) + s.face_normal.y), 1e-9);
  /* The inclination handle lies on the face line, beyond its lateral end. */
  double ex = s.face_lateral.x - s.cup_centre.x, ey = s.face_lateral.y - s.cup_centre.y;
  double hx = s.inclination_handle.x - s.cup_centre.x, hy = s.inclination_handle.y - s.cup_centre.y;
  ck_assert_double_le (fabs (ex * hy - ey * hx), 1e-9);
  ck_assert_double_eq_tol (hypot (hx, hy), s.cup_radius_mm + HL_TEMPLATE_INCLINATION_HANDLE_MM,
                           1e-9);
  /* The stem: the outline's last points are the neck base and H. */
  HlTemplateFrame f;
  hl_template_frame (&plan->landmarks, plan->side, &f);
  HlTemplateGeometry g;
  ck_assert_int_eq (hl_template_derive (&f, t, &g, NULL), HL_OK);
  ck_assert_double_eq_tol (s.head_centre.x, g.head_centre.x, TOL);
  ck_assert_double_eq_tol (s.head_centre.y, g.head_centre.y, TOL);
  ck_assert_double_eq_tol (s.stem_origin.x, g.stem_origin.x, TOL);
  ck_assert_uint_ge (s.n_body, 4);
  ck_assert_uint_eq (s.n_body % 2, 0);
  ck_assert_double_gt (s.head_radius_mm, 10.0);
  hl_plan_free (plan);
}
END_TEST

START_TEST (test_unresolved_is_not_drawn)
{
  HlPlan *plan = templated_plan ();
  plan->options[0].recon.tmpl.resolved = false;
  HlTemplateShape s;
  ck_assert (!hl_template_shape (plan, 0, NULL, &s));
  ck_assert_ptr_nonnull (strstr (s.message, HL_CATALOGUE_DEMO_ID));
  hl_plan_free (plan);
}
END_TEST

START_TEST (test_drag_inverses)
{
  HlPlan *plan = templated_plan ();
  HlTemplateFrame f;
  hl_template_frame (&plan->landmarks, plan->side, &f);
  HlVec2 c = { 10.0, 20.0 };
  for (double t = 5.0; t <= 85.0; t += 10.0)
    {
      HlVec2 e = { cos (t * DEG) * f.pelvis_lat.x + sin (t * DEG) * f.pelvis_up.x,
                   cos (t * DEG) * f.pelvis_lat.y + sin (t * DEG) * f.pelvis_up.y };
      HlVec2 p = { c.x + 30.0 * e.x, c.y + 30.0 * e.y };
      ck_assert_double_eq_tol (hl_template_inclination_towards (plan, c, p), t, 1e-9);
      /* the medial end of the same line gives the same angle */
      HlVec2 q = { c.x - 30.0 * e.x, c.y - 30.0 * e.y };
      ck_assert_double_eq_tol (hl_template_inclination_towards (plan, c, q), t, 1e-9);
    }
  ck_assert (isnan (hl_template_inclination_towards (plan, c, c)));
  /* A movement across the axis leaves the seat; along it changes it by its length. */
  ck_assert (f.has_axis);
  HlVec2 a = { 0.0, 0.0 };
  HlVec2 across = { 7.0 * f.axis_m.x, 7.0 * f.axis_m.y };
  HlVec2 along = { -4.0 * f.axis_p.x, -4.0 * f.axis_p.y };
  ck_assert_double_eq_tol (hl_template_seat_moved (plan, 3.0, a, across), 3.0, 1e-9);
  ck_assert_double_eq_tol (hl_template_seat_moved (plan, 3.0, a, along), -1.0, 1e-9);
  ck_assert_double_eq_tol (hl_template_seat_step (HL_TEMPLATE_SEAT_MAX_MM, 1.0),
                           HL_TEMPLATE_SEAT_MAX_MM, 1e-12);
  hl_plan_free (plan);
}
END_TEST

START_TEST (test_size_steps)
{
  HlPlan *plan = templated_plan ();
  const HlCatalogue *cat = hl_catalogue_registry_find (HL_CATALOGUE_DEMO_ID);
  HlTemplate t = plan->options[0].recon.tmpl;
  const HlCupFamily *cf = hl_catalogue_cup_family (cat, t.cup_family);
  ck_assert_uint_ge (cf->n_sizes, 3);
  long ci = 1;
  t.cup_diameter_mm = cf->diameters_mm[ci];
  ck_assert (hl_template_step_cup (&t, cat, +1));
  ck_assert_double_eq_tol (t.cup_diameter_mm, cf->diameters_mm[ci + 1], 1e-12);
  ck_assert (hl_template_step_cup (&t, cat, -1));
  ck_assert (hl_template_step_cup (&t, cat, -1));
  ck_assert_double_eq_tol (t.cup_diameter_mm, cf->diameters_mm[ci - 1], 1e-12);
  t.cup_diameter_mm = cf->diameters_mm[cf->n_sizes - 1];
  ck_assert (!hl_template_step_cup (&t, cat, +1));

  const HlStemFamily *sf = hl_catalogue_stem_family (cat, t.stem_family);
  snprintf (t.stem_size, sizeof t.stem_size, "%s", sf->sizes[1].size);
  long si = 1;
  ck_assert (hl_template_step_stem (&t, cat, +1));
  ck_assert_str_eq (t.stem_size, sf->sizes[si + 1].size);
  snprintf (t.stem_size, sizeof t.stem_size, "%s", sf->sizes[0].size);
  ck_assert (!hl_template_step_stem (&t, cat, -1));
  hl_plan_free (plan);
}
END_TEST

START_TEST (test_registry)
{
  const HlCatalogue *list[8];
  size_t n = hl_catalogue_registry_list (list, 8);
  ck_assert_uint_ge (n, 1);
  ck_assert_str_eq (list[0]->id, HL_CATALOGUE_DEMO_ID);
  ck_assert_ptr_null (hl_catalogue_registry_find ("no-such-catalogue"));
  /* A later catalogue of the same id takes precedence. */
  HlCatalogue *again = NULL;
  ck_assert_int_eq (hl_catalogue_load_demo (&again, NULL), HL_OK);
  hl_catalogue_registry_add (again);
  ck_assert_ptr_eq (hl_catalogue_registry_find (HL_CATALOGUE_DEMO_ID), again);
  ck_assert_uint_eq (hl_catalogue_registry_list (list, 8), n);
}
END_TEST

/* The drawing puts the option's colour on the face line and a handle's
 * ink on the cup handle; the hit test finds the handles drawn. */
START_TEST (test_drawn_and_hit)
{
  HlPlan *plan = templated_plan ();
  HlScene scene;
  hl_scene_build (&scene, plan, 0);
  ck_assert (scene.has_template);
  ck_assert (scene.tmpl.cup && scene.tmpl.stem);
  HlRenderStyle style;
  hl_render_style_init (&style, false);
  HlView view;
  hl_render_fit_view (&scene, W, H, 20.0, &view);

  cairo_surface_t *surf = cairo_image_surface_create (CAIRO_FORMAT_RGB24, W, H);
  cairo_t *cr = cairo_create (surf);
  hl_render_scene (cr, &scene, &view, &style, W, H);
  cairo_destroy (cr);
  cairo_surface_flush (surf);
  /* For looking at: HL_TEST_TEMPLATE_PNG=FILE writes the picture. */
  if (getenv ("HL_TEST_TEMPLATE_PNG") != NULL)
    cairo_surface_write_to_png (surf, getenv ("HL_TEST_TEMPLATE_PNG"));
  const unsigned char *px = cairo_image_surface_get_data (surf);
  int stride = cairo_image_surface_get_stride (surf);

  /* Middle of the face line, halfway between centre and lateral end. */
  HlVec2 m = { 0.5 * (scene.tmpl.cup_centre.x + scene.tmpl.face_lateral.x),
               0.5 * (scene.tmpl.cup_centre.y + scene.tmpl.face_lateral.y) };
  HlVec2 s = hl_view_to_screen (&view, m);
  HlRgba c = hl_palette_color (HL_ROLE_OPTION, false);
  int best = 1000;
  for (int dy = -2; dy <= 2; dy++)
    for (int dx = -2; dx <= 2; dx++)
      {
        const unsigned char *p = px + ((int) s.y + dy) * stride + 4 * ((int) s.x + dx);
        int d = abs (p[2] - (int) (c.r * 255)) + abs (p[1] - (int) (c.g * 255))
                + abs (p[0] - (int) (c.b * 255));
        if (d < best)
          best = d;
      }
  ck_assert_int_lt (best, 60);
  cairo_surface_destroy (surf);

  for (int part = 0; part < HL_TEMPLATE_PART_N; part++)
    {
      HlVec2 at;
      ck_assert (hl_render_template_handle (&scene.tmpl, part, &at));
      HlVec2 hs = hl_view_to_screen (&view, at);
      ck_assert_int_eq (hl_render_hit_template (&scene.tmpl, &view, hs.x + 1.0, hs.y, 8.0),
                        part);
    }
  /* Far away: nothing. */
  ck_assert_int_eq (hl_render_hit_template (&scene.tmpl, &view, -500.0, -500.0, 8.0), -1);
  hl_plan_free (plan);
}
END_TEST

int
main (void)
{
  Suite *s = suite_create ("template-shape");
  TCase *tc = tcase_create ("core");
  tcase_add_test (tc, test_shape_is_the_geometry);
  tcase_add_test (tc, test_unresolved_is_not_drawn);
  tcase_add_test (tc, test_drag_inverses);
  tcase_add_test (tc, test_size_steps);
  tcase_add_test (tc, test_registry);
  tcase_add_test (tc, test_drawn_and_hit);
  suite_add_tcase (s, tc);
  SRunner *sr = srunner_create (s);
  srunner_run_all (sr, CK_NORMAL);
  int failed = srunner_ntests_failed (sr);
  srunner_free (sr);
  return failed == 0 ? EXIT_SUCCESS : EXIT_FAILURE;
}
