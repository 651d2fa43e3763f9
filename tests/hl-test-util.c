/* hl-test-util.c: helpers shared by the core's Check tests.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include "hl-test-util.h"

#include <ctype.h>
#include <locale.h>
#include <stdlib.h>
#include <string.h>

void
hl_test_fix_environment (void)
{
  setenv ("LC_ALL", "C", 1);
  setenv ("TZ", "UTC", 1);
  setlocale (LC_ALL, "C");
}

double
hl_test_side_sign (HlSide side)
{
  return side == HL_SIDE_RIGHT ? -1.0 : 1.0;
}

HlPlan *
hl_test_plan_new (HlSide side, double mass_kg)
{
  HlPlan *plan = hl_plan_new ();

  ck_assert_ptr_nonnull (plan);
  plan->side = side;
  plan->mass_kg = mass_kg;
  plan->cane.enabled = false;
  plan->loads.hand[HL_HAND_CONTRALATERAL].mass_kg = 0.0;
  plan->loads.hand[HL_HAND_IPSILATERAL].mass_kg = 0.0;
  plan->loads.midline_kg = 0.0;
  plan->model.lean_mm = 0.0;
  /* the hip centre of a left hip is the mirror image of the right one */
  hl_landmarks_set (&plan->landmarks, HL_LM_HIP_CENTRE,
                    -hl_test_side_sign (side) * HL_TEST_HIP_X, HL_TEST_HIP_Y);
  return plan;
}

void
hl_test_place (HlPlan *plan, HlLandmarkId id, double x_lat, double y)
{
  HlVec2 hip = plan->landmarks.p[HL_LM_HIP_CENTRE];

  ck_assert (hl_landmarks_has (&plan->landmarks, HL_LM_HIP_CENTRE));
  hl_landmarks_set (&plan->landmarks, id,
                    hip.x + hl_test_side_sign (plan->side) * x_lat,
                    hip.y + y);
}

HlPlan *
hl_test_base_plan (HlSide side)
{
  HlPlan *plan = hl_test_plan_new (side, HL_TEST_MASS_KG);

  hl_test_place (plan, HL_LM_MIDLINE, HL_TEST_MIDLINE_X, HL_TEST_MIDLINE_Y);
  hl_test_place (plan, HL_LM_ABDUCTOR_ORIGIN, HL_TEST_ORIGIN_X, HL_TEST_ORIGIN_Y);
  hl_test_place (plan, HL_LM_ABDUCTOR_INSERTION,
                 HL_TEST_INSERTION_X, HL_TEST_INSERTION_Y);
  return plan;
}

void
hl_test_solve (const HlPlan *plan, const HlRecon *recon, HlResult *res)
{
  HlModel model;
  HlError err = { 0 };
  HlStatus st;

  st = hl_model_prepare (&model, plan, &err);
  ck_assert_msg (st == HL_OK, "prepare: %s: %s: %s", hl_status_name (st),
                 err.field, err.message);
  st = hl_model_solve (&model, recon, res, &err);
  ck_assert_msg (st == HL_OK, "solve: %s: %s: %s", hl_status_name (st),
                 err.field, err.message);
}

bool
hl_test_contains_ci (const char *hay, const char *needle)
{
  size_t n;

  if (hay == NULL || needle == NULL)
    return false;
  n = strlen (needle);
  for (; *hay != '\0'; hay++)
    {
      size_t i = 0;

      while (i < n && hay[i] != '\0'
             && tolower ((unsigned char) hay[i]) == tolower ((unsigned char) needle[i]))
        i++;
      if (i == n)
        return true;
    }
  return n == 0;
}

bool
hl_test_error_mentions (const HlError *err, const char *word)
{
  return hl_test_contains_ci (err->field, word)
         || hl_test_contains_ci (err->message, word);
}

bool
hl_test_error_names_landmark (const HlError *err, HlLandmarkId id)
{
  const HlLandmarkInfo *info = hl_landmark_info (id);

  ck_assert_ptr_nonnull (info);
  return hl_test_error_mentions (err, info->key)
         || hl_test_error_mentions (err, info->label);
}

int
hl_test_run (Suite *suite)
{
  SRunner *runner;
  int failed;

  hl_test_fix_environment ();
  runner = srunner_create (suite);
  srunner_run_all (runner, CK_NORMAL);
  failed = srunner_ntests_failed (runner);
  srunner_free (runner);
  return failed == 0 ? EXIT_SUCCESS : EXIT_FAILURE;
}

size_t
hl_test_count_lines (const char *s)
{
  size_t n = 0;
  for (; *s != '\0'; s++)
    n += *s == '\n';
  return n;
}
