/* test-template.c: implant catalogues, template geometry, templated options
 * in plan files, and the ranking of implant combinations.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The geometry is templating.md section 2 (the project's own contract);
 * every expected number is worked by hand in the comment beside its case.
 * Landmarks and implants are invented.
 */
#include "config.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "hl-catalogue.h"
#include "hl-fit.h"
#include "hl-plan-io.h"
#include "hl-template.h"
#include "hl-test-util.h"

/* Hand-worked values are rounded to 6 decimals below. */
#define TOL_HAND_MM 1e-6
/* The same arithmetic in two orders: rounding only. */
#define TOL_SAME 1e-9

static HlTemplate
resolved_template (double lat_mm, double offset, double height, double angle,
                   double seat, double head)
{
  HlTemplate t;
  memset (&t, 0, sizeof t);
  t.on = true;
  t.resolved = true;
  t.cup_diameter_mm = 52.0;
  t.inclination_deg = 40.0;
  t.seat_mm = seat;
  t.head_length_mm = head;
  t.dims.liner_lateralisation_mm = lat_mm;
  t.dims.neck_offset_mm = offset;
  t.dims.neck_height_mm = height;
  t.dims.neck_shaft_angle_deg = angle;
  return t;
}

static void
set (HlLandmarks *lm, HlLandmarkId id, double x, double y)
{
  hl_landmarks_set (lm, id, x, y);
}

/* ---- Geometry ---------------------------------------------------------- */

/* A right hip (solver lat = -x).  Teardrops: operated (-60, -20), other
 * (60, 15): operated minus other = (-120, -35), length 125, so the pelvic
 * lateral is (-0.96, -0.28) and the pelvic up (-0.28, 0.96).  Cup centre C
 * at the hip centre C0 = (-95, 0), inclination 30 deg, a 4 mm liner:
 *   n = sin 30 lat_p - cos 30 up_p
 *     = 0.5 (-0.96, -0.28) - 0.866025 (-0.28, 0.96) = (-0.237513, -0.971384)
 *   C' = C + 4 n = (-95.950052, -3.885538)
 *   c_med = (C0 - C') . (-1, 0) = -0.950052 (lateralised)
 *   c_sup = (C' - C0) . (0, 1) = -3.885538 (lower, along the tilted normal). */
START_TEST (test_liner_tilted_teardrops)
{
  HlLandmarks lm;
  memset (&lm, 0, sizeof lm);
  set (&lm, HL_LM_HIP_CENTRE, -95, 0);
  set (&lm, HL_LM_TEARDROP, -60, -20);
  set (&lm, HL_LM_TEARDROP_OTHER, 60, 15);
  set (&lm, HL_LM_SHAFT_PROXIMAL, -126, -80);
  set (&lm, HL_LM_SHAFT_DISTAL, -126, -180);
  HlTemplateFrame f;
  hl_template_frame (&lm, HL_SIDE_RIGHT, &f);
  ck_assert (f.pelvis_turned);
  hl_ck_rel (f.pelvis_lat.x, -0.96, TOL_SAME, 1.0);
  hl_ck_rel (f.pelvis_lat.y, -0.28, TOL_SAME, 1.0);
  hl_ck_rel (f.pelvis_up.x, -0.28, TOL_SAME, 1.0);
  hl_ck_rel (f.pelvis_up.y, 0.96, TOL_SAME, 1.0);

  HlTemplate t = resolved_template (4.0, 40.0, 30.0, 130.0, 0.0, 0.0);
  t.cup_x_mm = -95.0;
  t.cup_y_mm = 0.0;
  t.inclination_deg = 30.0;
  HlTemplateGeometry g;
  HlError err;
  ck_assert_int_eq (hl_template_derive (&f, &t, &g, &err), HL_OK);
  ck_assert (fabs (g.face_normal.x - (-0.237513)) < TOL_HAND_MM);
  ck_assert (fabs (g.face_normal.y - (-0.971384)) < TOL_HAND_MM);
  ck_assert (fabs (g.rotation_centre.x - (-95.950052)) < TOL_HAND_MM);
  ck_assert (fabs (g.rotation_centre.y - (-3.885538)) < TOL_HAND_MM);
  ck_assert (fabs (g.cup_medial_mm - (-0.950052)) < TOL_HAND_MM);
  ck_assert (fabs (g.cup_superior_mm - (-3.885538)) < TOL_HAND_MM);

  /* Without the other teardrop the frame is level: n = (-0.5, -0.866025),
   * c_med = -2, c_sup = -3.464102. */
  hl_landmarks_unset (&lm, HL_LM_TEARDROP_OTHER);
  hl_template_frame (&lm, HL_SIDE_RIGHT, &f);
  ck_assert (!f.pelvis_turned);
  ck_assert_int_eq (hl_template_derive (&f, &t, &g, &err), HL_OK);
  ck_assert (fabs (g.cup_medial_mm - (-2.0)) < TOL_HAND_MM);
  ck_assert (fabs (g.cup_superior_mm - (-3.464102)) < TOL_HAND_MM);
}
END_TEST

/* A stem on a tilted shaft axis, right hip.  Axis: distal (-96, -160),
 * proximal (-126, -120): d = (-30, 40), |d| = 50, p = (-0.6, 0.8); the
 * perpendicular towards medial (+x for a right hip) is m = (0.8, 0.6).
 * Lesser trochanter tip (-110, -130): (tip - distal) . p = (-14, 30) . p
 * = 8.4 + 24 = 32.4, so T = (-96, -160) + 32.4 p = (-115.44, -134.08).
 * Seat 10, neck offset 40 and height 30, version angle 130 deg, head +4:
 *   (s + height) p = 40 p = (-24, 32);  offset m = (32, 24);
 *   h (sin a m - cos a p) = 4 (0.766044 (0.8, 0.6) + 0.642788 (-0.6, 0.8))
 *                         = (0.908652, 3.895427);
 *   H = (-106.531348, -74.184573);  C0 = (-95, 0):
 *   f_off = (C0 - H) . (-1, 0) = -11.531348;  f_len = H.y - 0 = -74.184573. */
static void
tilted_axis (HlLandmarks *lm)
{
  memset (lm, 0, sizeof *lm);
  set (lm, HL_LM_HIP_CENTRE, -95, 0);
  set (lm, HL_LM_SHAFT_PROXIMAL, -126, -120);
  set (lm, HL_LM_SHAFT_DISTAL, -96, -160);
  set (lm, HL_LM_LESSER_TROCHANTER, -110, -130);
}

START_TEST (test_stem_tilted_axis)
{
  HlLandmarks lm;
  tilted_axis (&lm);
  HlTemplateFrame f;
  hl_template_frame (&lm, HL_SIDE_RIGHT, &f);
  ck_assert (f.has_axis);
  ck_assert (!f.t_from_hip_centre);
  hl_ck_rel (f.axis_p.x, -0.6, TOL_SAME, 1.0);
  hl_ck_rel (f.axis_p.y, 0.8, TOL_SAME, 1.0);
  hl_ck_rel (f.axis_m.x, 0.8, TOL_SAME, 1.0);
  hl_ck_rel (f.axis_m.y, 0.6, TOL_SAME, 1.0);
  hl_ck_rel (f.t.x, -115.44, TOL_SAME, 1.0);
  hl_ck_rel (f.t.y, -134.08, TOL_SAME, 1.0);

  HlTemplate t = resolved_template (0.0, 40.0, 30.0, 130.0, 10.0, 4.0);
  t.cup_x_mm = -95.0;
  HlTemplateGeometry g;
  HlError err;
  ck_assert_int_eq (hl_template_derive (&f, &t, &g, &err), HL_OK);
  ck_assert (fabs (g.head_centre.x - (-106.531348)) < TOL_HAND_MM);
  ck_assert (fabs (g.head_centre.y - (-74.184573)) < TOL_HAND_MM);
  ck_assert (fabs (g.femoral_offset_mm - (-11.531348)) < TOL_HAND_MM);
  ck_assert (fabs (g.femoral_length_mm - (-74.184573)) < TOL_HAND_MM);

  /* The same landmarks with the two shaft points swapped: same axis. */
  set (&lm, HL_LM_SHAFT_PROXIMAL, -96, -160);
  set (&lm, HL_LM_SHAFT_DISTAL, -126, -120);
  HlTemplateFrame f2;
  hl_template_frame (&lm, HL_SIDE_RIGHT, &f2);
  hl_ck_rel (f2.axis_p.x, -0.6, TOL_SAME, 1.0);
  hl_ck_rel (f2.t.y, -134.08, TOL_SAME, 1.0);
}
END_TEST

/* Head length along the neck at the version's angle, vertical axis, right
 * hip (medial = +x = -lat): going from head 0 to head +4 at a = 127 deg
 * moves H by 4 (sin 127, -cos 127) = (3.194542, 2.407260) in (medial,
 * proximal), so f_off grows by 3.194542 and f_len by 2.407260: model.md
 * section 5's head-length rule (f_off += h sin a, f_len -= h cos a). */
START_TEST (test_head_length_along_neck)
{
  HlLandmarks lm;
  memset (&lm, 0, sizeof lm);
  set (&lm, HL_LM_HIP_CENTRE, -95, 0);
  set (&lm, HL_LM_SHAFT_PROXIMAL, -130, -80);
  set (&lm, HL_LM_SHAFT_DISTAL, -130, -180);
  set (&lm, HL_LM_LESSER_TROCHANTER, -118, -55);
  HlTemplateFrame f;
  hl_template_frame (&lm, HL_SIDE_RIGHT, &f);
  HlTemplate t0 = resolved_template (0.0, 38.0, 31.0, 127.0, 20.0, 0.0);
  HlTemplate t4 = t0;
  t4.head_length_mm = 4.0;
  HlTemplateGeometry g0, g4;
  ck_assert_int_eq (hl_template_derive (&f, &t0, &g0, NULL), HL_OK);
  ck_assert_int_eq (hl_template_derive (&f, &t4, &g4, NULL), HL_OK);
  ck_assert (fabs ((g4.femoral_offset_mm - g0.femoral_offset_mm) - 3.194542) < TOL_HAND_MM);
  ck_assert (fabs ((g4.femoral_length_mm - g0.femoral_length_mm) - 2.407260) < TOL_HAND_MM);
  /* head 0, T = (-130, -55): H = (-130 + 38, -55 + 20 + 31) = (-92, -4),
   * 3 mm medial of C0 = (-95, 0): f_off = (C0 - H) . (-1, 0) = +3 (the
   * femur moves 3 mm lateral when the head is reduced), f_len = -4. */
  ck_assert (fabs (g0.femoral_offset_mm - 3.0) < TOL_HAND_MM);
  ck_assert (fabs (g0.femoral_length_mm - (-4.0)) < TOL_HAND_MM);
  /* the same through the manual option's head-length rule */
  HlRecon r;
  hl_recon_init (&r);
  r.femoral_offset_mm = g0.femoral_offset_mm;
  r.femoral_length_mm = g0.femoral_length_mm;
  r.head_length_mm = 4.0;
  r.neck_shaft_angle_deg = 127.0;
  hl_ck_rel (hl_recon_total_offset (&r), g4.femoral_offset_mm, TOL_SAME, 1.0);
  hl_ck_rel (hl_recon_total_length (&r), g4.femoral_length_mm, TOL_SAME, 1.0);
}
END_TEST

/* A left hip is the mirror image of a right one: every derived number is
 * the same.  Right: the head-length case above (f_off +3, f_len -4); its
 * mirror about x = 0 gives, for the left hip, the same +3 and -4. */
START_TEST (test_left_and_right)
{
  HlPlan *right = hl_plan_new ();
  set (&right->landmarks, HL_LM_HIP_CENTRE, -95, 0);
  set (&right->landmarks, HL_LM_SHAFT_PROXIMAL, -130, -80);
  set (&right->landmarks, HL_LM_SHAFT_DISTAL, -130, -180);
  set (&right->landmarks, HL_LM_LESSER_TROCHANTER, -118, -55);
  set (&right->landmarks, HL_LM_TEARDROP, -60, -20);
  set (&right->landmarks, HL_LM_TEARDROP_OTHER, 60, -14);
  right->side = HL_SIDE_RIGHT;
  HlPlan *left = hl_plan_copy (right);
  hl_plan_mirror (left);
  ck_assert_int_eq (left->side, HL_SIDE_LEFT);

  HlTemplate t = resolved_template (4.0, 38.0, 31.0, 127.0, 20.0, 0.0);
  t.cup_x_mm = -93.0;
  t.cup_y_mm = 2.0;
  HlTemplate tl = t;
  tl.cup_x_mm = 93.0;

  /* hl_plan_mirror mirrors a template's cup centre with the landmarks */
  long kr = hl_plan_add_option (right, "t", NULL);
  right->options[kr].recon.tmpl = t;
  HlPlan *mirrored = hl_plan_copy (right);
  hl_plan_mirror (mirrored);
  ck_assert (mirrored->options[kr].recon.tmpl.cup_x_mm == tl.cup_x_mm);
  hl_plan_free (mirrored);

  HlTemplateFrame fr, fl;
  HlTemplateGeometry gr, gl;
  hl_template_frame (&right->landmarks, HL_SIDE_RIGHT, &fr);
  hl_template_frame (&left->landmarks, HL_SIDE_LEFT, &fl);
  ck_assert_int_eq (hl_template_derive (&fr, &t, &gr, NULL), HL_OK);
  ck_assert_int_eq (hl_template_derive (&fl, &tl, &gl, NULL), HL_OK);
  hl_ck_rel (gr.cup_medial_mm, gl.cup_medial_mm, TOL_SAME, 1.0);
  hl_ck_rel (gr.cup_superior_mm, gl.cup_superior_mm, TOL_SAME, 1.0);
  hl_ck_rel (gr.femoral_offset_mm, gl.femoral_offset_mm, TOL_SAME, 1.0);
  hl_ck_rel (gr.femoral_length_mm, gl.femoral_length_mm, TOL_SAME, 1.0);
  ck_assert (fabs (gl.femoral_offset_mm - 3.0) < TOL_HAND_MM);
  ck_assert (fabs (gl.femoral_length_mm - (-4.0)) < TOL_HAND_MM);
  /* the left hip's lateral is +x, its medial stem direction -x */
  ck_assert (fl.lat.x > 0.0 && fl.axis_m.x < 0.0);
  ck_assert (fr.lat.x < 0.0 && fr.axis_m.x > 0.0);
  hl_plan_free (right);
  hl_plan_free (left);
}
END_TEST

/* T from the lesser trochanter, and from the hip centre when the tip is
 * not placed.  Tilted axis of test_stem_tilted_axis: the hip centre
 * (-95, 0) projects at (-95 + 96, 0 + 160) . p = (1, 160) . (-0.6, 0.8)
 * = 127.4 from the distal point: T = (-96 - 76.44, -160 + 101.92)
 * = (-172.44, -58.08). */
START_TEST (test_t_point)
{
  HlLandmarks lm;
  tilted_axis (&lm);
  HlTemplateFrame f;
  hl_template_frame (&lm, HL_SIDE_RIGHT, &f);
  ck_assert (!f.t_from_hip_centre);
  hl_ck_rel (f.t.x, -115.44, TOL_SAME, 1.0);
  hl_landmarks_unset (&lm, HL_LM_LESSER_TROCHANTER);
  hl_template_frame (&lm, HL_SIDE_RIGHT, &f);
  ck_assert (f.t_from_hip_centre);
  hl_ck_rel (f.t.x, -172.44, TOL_SAME, 1.0);
  hl_ck_rel (f.t.y, -58.08, TOL_SAME, 1.0);
}
END_TEST

/* No shaft axis: no stem, with a message naming the two landmarks. */
START_TEST (test_no_axis)
{
  HlLandmarks lm;
  tilted_axis (&lm);
  hl_landmarks_unset (&lm, HL_LM_SHAFT_DISTAL);
  HlTemplateFrame f;
  hl_template_frame (&lm, HL_SIDE_RIGHT, &f);
  ck_assert (!f.has_axis);
  HlTemplate t = resolved_template (0.0, 40.0, 30.0, 130.0, 10.0, 4.0);
  HlTemplateGeometry g;
  HlError err;
  hl_error_clear (&err);
  ck_assert_int_eq (hl_template_derive (&f, &t, &g, &err), HL_ERR_DEGENERATE);
  ck_assert (hl_test_error_mentions (&err, "Shaft axis, proximal"));
  ck_assert (hl_test_error_mentions (&err, "Shaft axis, distal"));
}
END_TEST

/* ---- Catalogue ----------------------------------------------------------- */

START_TEST (test_demo_catalogue)
{
  HlCatalogue *cat = NULL;
  HlError err;
  ck_assert_int_eq (hl_catalogue_load_demo (&cat, &err), HL_OK);
  ck_assert_str_eq (cat->id, HL_CATALOGUE_DEMO_ID);
  ck_assert_uint_eq (strlen (cat->sha256), 64);
  ck_assert_uint_eq (cat->n_cups, 1);
  const HlCupFamily *cf = &cat->cups[0];
  ck_assert_uint_eq (cf->n_sizes, 12);                 /* 44..66 in 2 mm steps */
  ck_assert (cf->diameters_mm[0] == 44.0 && cf->diameters_mm[11] == 66.0);
  ck_assert_uint_eq (cf->n_liners, 2);
  ck_assert (hl_cup_family_liner (cf, "lateralised-4")->lateralisation_mm == 4.0);
  ck_assert_uint_eq (cat->n_stems, 2);
  ck_assert_int_eq (cat->stems[0].fixation, HL_FIXATION_CEMENTLESS);
  ck_assert_int_eq (cat->stems[1].fixation, HL_FIXATION_CEMENTED);
  for (size_t i = 0; i < cat->n_stems; i++)
    {
      const HlStemFamily *sf = &cat->stems[i];
      ck_assert_uint_eq (sf->n_sizes, 10);
      ck_assert_uint_eq (sf->n_versions, 2);
      for (size_t k = 0; k < sf->n_sizes; k++)
        {
          /* lateralised: same height, more offset */
          const HlNeck *a = hl_stem_family_neck (sf, k, 0), *b = hl_stem_family_neck (sf, k, 1);
          ck_assert (a->height_mm == b->height_mm && b->offset_mm > a->offset_mm);
          if (k > 0)
            ck_assert (a->offset_mm > hl_stem_family_neck (sf, k - 1, 0)->offset_mm);
          double w;
          ck_assert (hl_stem_body_width (&sf->sizes[k], 0.0, &w) && w > 0.0);
        }
    }
  double heads[8];
  ck_assert_uint_eq (hl_catalogue_head_lengths (cat, heads, 8), 4);
  ck_assert (heads[0] == -4.0 && heads[3] == 8.0);
  /* body width interpolates between listed levels: size 1 of the
   * cementless family has 18 mm at 0 and 14 mm at -20: 16 mm at -10 */
  double w;
  ck_assert (hl_stem_body_width (&cat->stems[0].sizes[0], -10.0, &w));
  hl_ck_rel (w, 16.0, TOL_SAME, 1.0);
  ck_assert (!hl_stem_body_width (&cat->stems[0].sizes[0], 40.0, &w));
  hl_catalogue_free (cat);
}
END_TEST

static const struct {
  const char *from;
  const char *to;
  const char *words;      /* the distinct message */
  const char *element;
} broken[] = {
  { "<stem size=\"3\" ", "<stem ", "missing size", "<stem>" },
  { "width-mm=\"18.0\"", "width-mm=\"wide\"", "is not a number", "<body>" },
  { "<neck version=\"lateralised\" offset-mm=\"44.0\"",
    "<neck version=\"offset\" offset-mm=\"44.0\"", "unknown version", "<neck>" },
  { "<stem size=\"4\" ", "<stem size=\"3\" ", "duplicate size", "<stem>" },
};

static char *
replace_once (const char *text, const char *from, const char *to)
{
  const char *at = strstr (text, from);
  ck_assert_msg (at != NULL, "the demo catalogue has no %s", from);
  size_t n = strlen (text) - strlen (from) + strlen (to);
  char *out = malloc (n + 1);
  size_t head = (size_t) (at - text);
  memcpy (out, text, head);
  strcpy (out + head, to);
  strcat (out, at + strlen (from));
  return out;
}

START_TEST (test_broken_catalogue)
{
  size_t size;
  const char *demo = hl_catalogue_demo_text (&size);
  char *text = replace_once (demo, broken[_i].from, broken[_i].to);
  HlCatalogue *cat = NULL;
  HlError err;
  hl_error_clear (&err);
  ck_assert_int_eq (hl_catalogue_load_buffer (text, strlen (text), "broken.hlcat", &cat,
                                              &err), HL_ERR_PARSE);
  ck_assert_ptr_null (cat);
  ck_assert_msg (hl_test_contains_ci (err.message, broken[_i].words),
                 "message \"%s\" lacks \"%s\"", err.message, broken[_i].words);
  ck_assert_str_eq (err.field, broken[_i].element);
  ck_assert_int_gt (err.line, 0);
  /* the line is the broken element's (where the replacement went) */
  const char *at = text + (strstr (demo, broken[_i].from) - demo);
  int line = 1;
  for (const char *p = text; p < at; p++)
    line += *p == '\n';
  if (strcmp (broken[_i].words, "missing size") != 0)
    ck_assert_int_eq (err.line, line);
  ck_assert (strstr (err.message, "broken.hlcat: line ") == err.message);
  /* each message is its own */
  for (size_t k = 0; k < sizeof broken / sizeof broken[0]; k++)
    if (k != (size_t) _i)
      ck_assert (!hl_test_contains_ci (err.message, broken[k].words));
  free (text);
}
END_TEST

START_TEST (test_hostile_catalogue)
{
  static const char doctype[] =
    "<?xml version=\"1.0\"?>\n<!DOCTYPE x [<!ENTITY e \"boom\">]>\n"
    "<implant-catalogue xmlns=\"urn:hiplever:implants\" id=\"a\" version=\"1\"/>\n";
  HlCatalogue *cat = NULL;
  HlError err;
  ck_assert_int_eq (hl_catalogue_load_buffer (doctype, strlen (doctype), "x", &cat, &err),
                    HL_ERR_PARSE);
  ck_assert (hl_test_contains_ci (err.message, "document type"));
  static const char other_ns[] =
    "<implant-catalogue xmlns=\"urn:other\" id=\"a\" version=\"1\"/>";
  ck_assert_int_eq (hl_catalogue_load_buffer (other_ns, strlen (other_ns), "x", &cat, &err),
                    HL_ERR_PARSE);
  ck_assert (hl_test_contains_ci (err.message, "urn:hiplever:implants"));
}
END_TEST

/* ---- Plans with templates ------------------------------------------------ */

static HlPlan *
templated_demo (HlCatalogue **cat, long *index)
{
  HlPlan *plan = NULL;
  HlError err;
  ck_assert_int_eq (hl_catalogue_load_demo (cat, &err), HL_OK);
  ck_assert_int_eq (hl_plan_load_file (HL_TEST_SRCDIR "/data/examples/demo.hlplan", &plan,
                                       &err), HL_OK);
  HlTemplate t;
  ck_assert_int_eq (hl_template_place_default (plan, *cat, &t, &err), HL_OK);
  *index = hl_plan_add_option (plan, "Test template", NULL);
  ck_assert_int_eq (hl_plan_set_template (plan, (size_t) *index, &t, *cat, &err), HL_OK);
  return plan;
}

/* The default placement starts from the suggested cup size where the
 * acetabulum is marked (the demo marks the teardrop and the margin). */
START_TEST (test_default_takes_suggested_cup)
{
  HlCatalogue *cat;
  long k;
  HlPlan *plan = templated_demo (&cat, &k);
  const HlTemplate *t = &plan->options[k].recon.tmpl;
  HlCupSuggestion cup;
  HlError err;
  ck_assert_int_eq (hl_template_suggest_cup (plan, t, cat, &cup, &err), HL_OK);
  ck_assert_double_eq_tol (t->cup_diameter_mm, cup.diameter_mm, 1e-9);
  hl_plan_free (plan);
  hl_catalogue_free (cat);
}
END_TEST

START_TEST (test_solve_follows_template)
{
  HlCatalogue *cat;
  long k;
  HlPlan *plan = templated_demo (&cat, &k);
  HlRecon *rc = &plan->options[k].recon;
  /* the solve derives the numbers itself: stale stored numbers do not
   * matter while the template is resolved */
  HlRecon manual = *rc;
  manual.tmpl.on = false;
  HlResult a, b, c;
  hl_test_solve (plan, rc, &a);
  hl_test_solve (plan, &manual, &b);
  rc->femoral_offset_mm += 7.0;
  hl_test_solve (plan, rc, &c);
  hl_ck_rel (a.jrf_n, b.jrf_n, TOL_SAME, 1.0);
  hl_ck_rel (a.jrf_n, c.jrf_n, TOL_SAME, 1.0);
  /* a landmark move is followed without a sync */
  HlResult d;
  plan->landmarks.p[HL_LM_LESSER_TROCHANTER].y -= 3.0;
  hl_test_solve (plan, rc, &d);
  ck_assert (fabs (d.leg_length_change_mm - a.leg_length_change_mm) > 1.0);
  hl_plan_free (plan);
  hl_catalogue_free (cat);
}
END_TEST

START_TEST (test_plan_round_trip)
{
  HlCatalogue *cat;
  long k;
  HlPlan *plan = templated_demo (&cat, &k);
  HlError err;
  char *text = NULL;
  size_t size = 0;
  ck_assert_int_eq (hl_plan_to_buffer (plan, &text, &size, &err), HL_OK);
  ck_assert (strstr (text, "<template catalogue=\"hiplever-demo\"") != NULL);
  ck_assert (strstr (text, "<catalogue id=\"hiplever-demo\" version=\"1\" sha256=\"") != NULL);
  HlPlan *back = NULL;
  ck_assert_int_eq (hl_plan_load_buffer (text, size, "rt", &back, &err), HL_OK);
  const HlTemplate *a = &plan->options[k].recon.tmpl, *b = &back->options[k].recon.tmpl;
  ck_assert (b->on && !b->resolved);
  ck_assert_str_eq (a->stem_size, b->stem_size);
  ck_assert_str_eq (a->version, b->version);
  ck_assert (a->seat_mm == b->seat_mm && a->cup_x_mm == b->cup_x_mm);
  /* unresolved, the saved numbers stand and give the same forces */
  HlResult ra, rb;
  hl_test_solve (plan, &plan->options[k].recon, &ra);
  hl_test_solve (back, &back->options[k].recon, &rb);
  hl_ck_rel (ra.jrf_n, rb.jrf_n, TOL_SAME, 1.0);

  HlCatalogueSet *set = NULL;
  ck_assert_int_eq (hl_catalogue_set_load (&set, NULL, 0, NULL), HL_OK);
  char *warn = NULL;
  ck_assert_uint_eq (hl_plan_resolve_templates (back, set, &warn), 0);
  ck_assert_ptr_null (warn);
  ck_assert (back->options[k].recon.tmpl.resolved);
  hl_test_solve (back, &back->options[k].recon, &rb);
  hl_ck_rel (ra.jrf_n, rb.jrf_n, TOL_SAME, 1.0);

  /* a changed catalogue is reported and nothing is re-derived */
  HlPlan *changed = NULL;
  ck_assert_int_eq (hl_plan_load_buffer (text, size, "rt", &changed, &err), HL_OK);
  changed->catalogues[0].sha256[0] = changed->catalogues[0].sha256[0] == '0' ? '1' : '0';
  size_t n_templated = 0;
  for (size_t i = 0; i < changed->n_options; i++)
    n_templated += changed->options[i].recon.tmpl.on;
  ck_assert_uint_ge (n_templated, 1);
  ck_assert_uint_eq (hl_plan_resolve_templates (changed, set, &warn), n_templated);
  ck_assert_ptr_nonnull (warn);
  ck_assert (hl_test_contains_ci (warn, "has changed"));
  ck_assert (!changed->options[k].recon.tmpl.resolved);
  free (warn);
  /* a missing one too */
  HlCatalogueSet *empty = hl_catalogue_set_new ();
  ck_assert_uint_eq (hl_plan_resolve_templates (changed, empty, &warn), n_templated);
  ck_assert (hl_test_contains_ci (warn, "is not loaded"));
  free (warn);
  hl_catalogue_set_free (empty);

  /* the summary lists the implants and validates against the schema */
  char path[] = "/tmp/hl-test-template-XXXXXX";
  int fd = mkstemp (path);
  ck_assert_int_ge (fd, 0);
  close (fd);
  ck_assert_int_eq (hl_summary_save_file (back, path, &err), HL_OK);
  FILE *f = fopen (path, "r");
  char buf[1 << 16];
  size_t n = fread (buf, 1, sizeof buf - 1, f);
  fclose (f);
  buf[n] = '\0';
  ck_assert (strstr (buf, "<implants catalogue=\"hiplever-demo\"") != NULL);
  ck_assert (strstr (buf, "derived=\"now\"") != NULL);
  ck_assert (strstr (buf, "seat-from=\"lesser-trochanter\"") != NULL);
  char cmd[512];
  snprintf (cmd, sizeof cmd, "xmllint --noout --schema '%s/data/hiplever-plan.xsd' '%s' "
            ">/dev/null 2>&1", HL_TEST_SRCDIR, path);
  ck_assert_int_eq (system (cmd), 0);
  unlink (path);

  hl_catalogue_set_free (set);
  hl_plan_free (changed);
  hl_plan_free (back);
  hl_plan_free (plan);
  hl_catalogue_free (cat);
  free (text);
}
END_TEST

/* ---- Readouts and suggestions ------------------------------------------- */

/* Right hip, level teardrops at y = -20; cup centre (-90, 0), 50 mm, at
 * 40 deg.  Ilioischial line through (-60, 40) and (-60, -20) (vertical):
 * the cup's most medial point is at x = -90 + 25 = -65, 5 mm lateral to
 * it.  Lateral end of the face line: (-90 - 25 cos 40, 25 sin 40)
 * = (-109.151111, 16.069690); acetabular margin at (-105, 18): uncovered
 * 4.151111 mm.  Centre height above the teardrop line 20 mm.  Suggestion:
 * teardrop (-60, -20) to margin (-105, 18): span sqrt(45^2 + 38^2)
 * = 58.898 mm, so the 58 mm cup (the largest not over 58.898 + 1). */
START_TEST (test_readouts_and_cup_suggestion)
{
  HlCatalogue *cat;
  HlError err;
  ck_assert_int_eq (hl_catalogue_load_demo (&cat, &err), HL_OK);
  HlPlan *plan = hl_plan_new ();
  plan->side = HL_SIDE_RIGHT;
  HlLandmarks *lm = &plan->landmarks;
  set (lm, HL_LM_HIP_CENTRE, -92, 2);
  set (lm, HL_LM_TEARDROP, -60, -20);
  set (lm, HL_LM_TEARDROP_OTHER, 60, -20);
  set (lm, HL_LM_ILIOISCHIAL_UPPER, -60, 40);
  set (lm, HL_LM_ILIOISCHIAL_LOWER, -60, -20);
  set (lm, HL_LM_ACETABULAR_MARGIN, -105, 18);
  HlTemplate t;
  memset (&t, 0, sizeof t);
  t.on = true;
  snprintf (t.cup_family, sizeof t.cup_family, "%s", "demo-cup");
  t.cup_diameter_mm = 50.0;
  t.cup_x_mm = -90.0;
  t.inclination_deg = 40.0;
  HlTemplateReadouts r;
  hl_template_readouts (plan, &t, cat, &r);
  ck_assert (fabs (r.medial_edge_to_ilioischial_mm - 5.0) < TOL_HAND_MM);
  ck_assert (fabs (r.uncovered_lateral_mm - 4.151111) < TOL_HAND_MM);
  ck_assert (fabs (r.centre_height_mm - 20.0) < TOL_HAND_MM);
  ck_assert (isnan (r.canal_fill_pct[0]));
  HlCupSuggestion s;
  ck_assert_int_eq (hl_template_suggest_cup (plan, &t, cat, &s, &err), HL_OK);
  ck_assert (s.diameter_mm == 58.0);
  ck_assert (strstr (s.reason, "58 mm") != NULL);
  hl_plan_free (plan);
  hl_catalogue_free (cat);
}
END_TEST

/* Stem from the canal, vertical axis x = -130 (right hip), T at y = -55
 * (the tip), seat 0.  One canal level at y = -75 (20 mm below R), inner
 * width 16 mm.  Cementless demo stems at level -20 have widths 14.0, 15.1,
 * 16.3, ... (size 1, 2, 3): the largest not over 16 is size 2, fill
 * 15.1 / 16 = 94.4 %.  Cemented with a 2 mm mantle each side: at most
 * 12 mm; cemented demo stems at -20: 11.0 (size 1), 12.1 (size 2): size 1. */
START_TEST (test_stem_suggestion)
{
  HlCatalogue *cat;
  HlError err;
  ck_assert_int_eq (hl_catalogue_load_demo (&cat, &err), HL_OK);
  HlPlan *plan = hl_plan_new ();
  plan->side = HL_SIDE_RIGHT;
  HlLandmarks *lm = &plan->landmarks;
  set (lm, HL_LM_HIP_CENTRE, -95, 0);
  set (lm, HL_LM_SHAFT_PROXIMAL, -130, -80);
  set (lm, HL_LM_SHAFT_DISTAL, -130, -180);
  set (lm, HL_LM_LESSER_TROCHANTER, -118, -55);
  set (lm, HL_LM_CANAL_MEDIAL_1, -122, -75);
  set (lm, HL_LM_CANAL_LATERAL_1, -138, -75);
  HlTemplate t;
  memset (&t, 0, sizeof t);
  t.on = true;
  snprintf (t.stem_family, sizeof t.stem_family, "%s", "demo-cementless");
  snprintf (t.stem_size, sizeof t.stem_size, "%s", "2");
  HlStemSuggestion s;
  ck_assert_int_eq (hl_template_suggest_stem (plan, &t, cat, &s, &err), HL_OK);
  ck_assert_str_eq (s.size, "2");
  ck_assert (s.mantle_mm == 0.0);
  HlTemplateReadouts r;
  hl_template_readouts (plan, &t, cat, &r);
  hl_ck_rel (r.canal_width_mm[0], 16.0, TOL_SAME, 1.0);
  hl_ck_rel (r.canal_level_mm[0], -20.0, TOL_SAME, 1.0);
  ck_assert (fabs (r.canal_fill_pct[0] - 100.0 * 15.1 / 16.0) < 1e-3);
  snprintf (t.stem_family, sizeof t.stem_family, "%s", "demo-cemented");
  ck_assert_int_eq (hl_template_suggest_stem (plan, &t, cat, &s, &err), HL_OK);
  ck_assert_str_eq (s.size, "1");
  ck_assert (s.mantle_mm == HL_CEMENT_MANTLE_MM);
  ck_assert (hl_test_contains_ci (s.reason, "cement mantle"));
  hl_plan_free (plan);
  hl_catalogue_free (cat);
}
END_TEST

/* ---- Ranking ------------------------------------------------------------- */

START_TEST (test_fit_ranking)
{
  HlCatalogue *cat;
  long k;
  HlPlan *plan = templated_demo (&cat, &k);
  HlFitTable t;
  HlError err;
  ck_assert_int_eq (hl_fit_rank (plan, (size_t) k, cat, 0, &t, &err), HL_OK);
  ck_assert_uint_eq (t.n, 2 * 2 * 4);          /* liners x versions x heads */
  ck_assert (t.against_other_hip);              /* the demo measures both hips */
  for (size_t i = 0; i < t.n; i++)
    {
      const HlFitRow *r = &t.rows[i];
      ck_assert_uint_eq (r->rank, i + 1);
      if (i > 0)
        ck_assert (r->score_mm >= t.rows[i - 1].score_mm - HL_FIT_TIE_MM);
      /* each row is the solve of its own derived numbers */
      HlRecon manual = r->recon;
      manual.tmpl.on = false;
      HlResult res;
      hl_test_solve (plan, &manual, &res);
      hl_ck_rel (res.jrf_n, r->result.jrf_n, TOL_SAME, 1.0);
      ck_assert (r->jrf_p95_bw > r->result.jrf_bw * 0.9);
    }
  HlFitTable all;
  ck_assert_int_eq (hl_fit_rank (plan, (size_t) k, cat, HL_FIT_SIZES | HL_FIT_NO_MC, &all,
                                 &err), HL_OK);
  ck_assert_uint_eq (all.n, 12 * 2 * 10 * 2 * 4);
  ck_assert (isnan (all.rows[0].jrf_p95_bw));
  /* applying a row puts exactly that combination in the option */
  ck_assert_int_eq (hl_fit_apply (plan, (size_t) k, &t.rows[3], cat, &err), HL_OK);
  HlResult res;
  hl_test_solve (plan, &plan->options[k].recon, &res);
  hl_ck_rel (res.jrf_n, t.rows[3].result.jrf_n, TOL_SAME, 1.0);
  ck_assert_str_eq (plan->options[k].recon.tmpl.version, t.rows[3].tmpl.version);
  hl_fit_table_clear (&t);
  hl_fit_table_clear (&all);
  hl_plan_free (plan);
  hl_catalogue_free (cat);
}
END_TEST

static Suite *
template_suite (void)
{
  Suite *s = suite_create ("template");
  TCase *tc = tcase_create ("geometry");
  tcase_add_test (tc, test_liner_tilted_teardrops);
  tcase_add_test (tc, test_stem_tilted_axis);
  tcase_add_test (tc, test_head_length_along_neck);
  tcase_add_test (tc, test_left_and_right);
  tcase_add_test (tc, test_t_point);
  tcase_add_test (tc, test_no_axis);
  suite_add_tcase (s, tc);
  tc = tcase_create ("catalogue");
  tcase_add_test (tc, test_demo_catalogue);
  tcase_add_loop_test (tc, test_broken_catalogue, 0, (int) (sizeof broken / sizeof broken[0]));
  tcase_add_test (tc, test_hostile_catalogue);
  suite_add_tcase (s, tc);
  tc = tcase_create ("plan");
  tcase_add_test (tc, test_default_takes_suggested_cup);
  tcase_add_test (tc, test_solve_follows_template);
  tcase_add_test (tc, test_plan_round_trip);
  tcase_add_test (tc, test_readouts_and_cup_suggestion);
  tcase_add_test (tc, test_stem_suggestion);
  tcase_add_test (tc, test_fit_ranking);
  suite_add_tcase (s, tc);
  return s;
}

int
main (void)
{
  return hl_test_run (template_suite ());
}
