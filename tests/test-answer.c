/* test-answer.c: the analysis page's inverse answers applied to plans.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * For every plan of the table, every option (and native) and every
 * question: an answer that can be applied, applied to a copy of the plan,
 * makes the forward solve meet the question's goal (the check is the
 * model's own, hl_model_solve, so it holds whatever the numbers); applying
 * it again changes nothing; answers without a value change nothing.
 */
#include "config.h"

#include <check.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hl-answer.h"
#include "hl-plan-io.h"
#include "hl-test-util.h"

/* The root finder stops within 1e-6 of the unknown (hl-root.h); the goal
 * quantities move by at most a few units per unit of it. */
#define GOAL_TOL_MM 1e-4
#define GOAL_TOL_BW 1e-4
#define GOAL_TOL_DEMAND 1e-4
#define TARGET_BW 2.0
/* A target under the demo's loads, so that the cane and load answers
 * fall inside their ranges. */
#define TARGET_LOW_BW 1.2
/* A capacity low enough that the demo needs a lean: an assumption of the
 * test, well under the presets. */
#define WEAK_CAPACITY_NM_PER_KG 0.25

typedef struct {
  const char *what;
  const char *file;
  double target_bw;
  int cane_unit;              /* -1: as in the file */
  double capacity;            /* 0: as in the file */
} HlAnswerCase;

static const HlAnswerCase cases[] = {
  { "demo, cane in %BW", "data/examples/demo.hlplan", TARGET_BW, -1, 0.0 },
  { "demo, low target, cane in N", "data/examples/demo.hlplan", TARGET_LOW_BW, HL_FORCE_UNIT_N, 0.0 },
  { "demo, low target, cane in kg", "data/examples/demo.hlplan", TARGET_LOW_BW, HL_FORCE_UNIT_KG, 0.0 },
  { "demo, weak abductors", "data/examples/demo.hlplan", TARGET_BW, -1, WEAK_CAPACITY_NM_PER_KG },
  { "left demo", "data/examples/demo-left.hlplan", TARGET_LOW_BW, -1, 0.0 },
  { "minimal, no options", "data/examples/minimal.hlplan", TARGET_BW, -1, WEAK_CAPACITY_NM_PER_KG },
};

static HlPlan *
load_case (const HlAnswerCase *c)
{
  char path[1024];
  HlPlan *plan = NULL;
  HlError err;

  snprintf (path, sizeof path, "%s/%s", HL_TEST_SRCDIR, c->file);
  hl_error_clear (&err);
  ck_assert_msg (hl_plan_load_file (path, &plan, &err) == HL_OK, "%s: %s", path, err.message);
  if (c->cane_unit >= 0)
    {
      double n = hl_plan_cane_force (plan);

      plan->cane.unit = (HlForceUnit) c->cane_unit;
      plan->cane.value = hl_force_from_newtons (n, plan->cane.unit, plan->mass_kg);
    }
  if (c->capacity > 0.0)
    plan->capacity.torque_nm_per_kg = c->capacity;
  return plan;
}

static void
solve_row (const HlPlan *plan, int option, HlResult *res)
{
  HlModel model;
  HlError err;

  hl_error_clear (&err);
  ck_assert_msg (hl_model_prepare (&model, plan, &err) == HL_OK, "%s", err.message);
  ck_assert_msg (hl_model_solve (&model, option < 0 ? NULL : &plan->options[option].recon, res,
                                 &err) == HL_OK, "%s", err.message);
}

/* The joint load at or under the target, and at it unless the whole
 * range meets it. */
static void
check_target (const HlAnswerCase *c, const HlResult *res, int option, const char *key,
              const HlInverseAnswer *a)
{
  ck_assert_msg (res->jrf_bw <= c->target_bw + GOAL_TOL_BW,
                 "%s, option %d, %s: joint load %.6f over the target %.2f", c->what, option,
                 key, res->jrf_bw, c->target_bw);
  if (!a->at_limit)
    ck_assert_msg (fabs (res->jrf_bw - c->target_bw) <= GOAL_TOL_BW,
                   "%s, option %d, %s: joint load %.6f, not at the target %.2f", c->what,
                   option, key, res->jrf_bw, c->target_bw);
}

/* The goal of the question, met by the plan with the answer in it. */
static void
check_goal (const HlAnswerCase *c, const HlPlan *applied, int option, HlQuestion q,
            const HlInverseAnswer *a)
{
  HlResult res, native;
  const char *key = hl_question_key (q);

  solve_row (applied, option, &res);
  solve_row (applied, -1, &native);
  switch (hl_question_kind (q))
    {
    case HL_INVERSE_OFFSET_FOR_ARM:
      ck_assert_msg (fabs (res.abductor_arm_mm - native.abductor_arm_mm) <= GOAL_TOL_MM,
                     "%s, option %d, %s: arm %.6f, native %.6f", c->what, option, key,
                     res.abductor_arm_mm, native.abductor_arm_mm);
      break;
    case HL_INVERSE_OFFSET_FOR_GLOBAL:
      ck_assert_msg (fabs (res.global_offset_change_mm - a->goal) <= GOAL_TOL_MM,
                     "%s, option %d, %s: global offset change %.6f, goal %.6f", c->what, option,
                     key, res.global_offset_change_mm, a->goal);
      break;
    case HL_INVERSE_CANE_FOR_JRF:
      ck_assert_msg (fabs (hl_plan_cane_force (applied) - a->value) <= GOAL_TOL_BW * a->body_weight_n,
                     "%s: the plan's cane is %.6f N, the answer %.6f N", c->what,
                     hl_plan_cane_force (applied), a->value);
      check_target (c, &res, option, key, a);
      break;
    case HL_INVERSE_LOAD_FOR_JRF:
      check_target (c, &res, option, key, a);
      break;
    case HL_INVERSE_LEAN_FOR_CAPACITY:
    case HL_INVERSE_N:
    default:
      ck_assert_msg (res.demand <= HL_DEMAND_LIMIT + GOAL_TOL_DEMAND,
                     "%s, option %d, %s: demand %.6f", c->what, option, key, res.demand);
      if (!a->at_limit)
        ck_assert_msg (fabs (res.demand - HL_DEMAND_LIMIT) <= GOAL_TOL_DEMAND,
                       "%s, option %d, %s: demand %.6f, not at capacity", c->what, option, key,
                       res.demand);
      break;
    }
}

START_TEST (test_apply_meets_goal)
{
  const HlAnswerCase *c = &cases[_i];
  HlPlan *plan = load_case (c);
  HlModel model;
  HlError err;
  int applied = 0;

  hl_error_clear (&err);
  ck_assert (hl_model_prepare (&model, plan, &err) == HL_OK);
  for (int option = -1; option < (int) plan->n_options; option++)
    for (int q = 0; q < HL_QUESTION_N; q++)
      {
        const HlRecon *recon = option < 0 ? NULL : &plan->options[option].recon;
        HlInverseAnswer a;
        HlStatus st;
        HlPlan *copy;
        HlApplyState state;

        hl_error_clear (&err);
        st = hl_question_ask ((HlQuestion) q, &model, plan, recon, c->target_bw, &a, &err);
        if (hl_question_needs_option ((HlQuestion) q) && recon == NULL)
          {
            ck_assert_int_eq (st, HL_ERR_INVALID);
            ck_assert_msg (err.message[0] != '\0', "no reason for a question without option");
            continue;
          }
        ck_assert_msg (st == HL_OK || st == HL_ERR_NOT_REACHABLE || st == HL_ERR_NOT_CONVERGED,
                       "%s, %s: %s", c->what, hl_question_key ((HlQuestion) q), err.message);
        copy = hl_plan_copy (plan);
        ck_assert_ptr_nonnull (copy);
        state = hl_answer_apply_state (copy, option, (HlQuestion) q, &a);
        if (st != HL_OK)
          ck_assert_int_eq (state, HL_APPLY_NO_ANSWER);
        if (state != HL_APPLY_CHANGES)
          {
            ck_assert (!hl_answer_apply (copy, option, (HlQuestion) q, &a));
          }
        else
          {
            ck_assert (hl_answer_apply (copy, option, (HlQuestion) q, &a));
            ck_assert_int_eq (hl_answer_apply_state (copy, option, (HlQuestion) q, &a),
                              HL_APPLY_ALREADY);
            ck_assert (!hl_answer_apply (copy, option, (HlQuestion) q, &a));
            check_goal (c, copy, option, (HlQuestion) q, &a);
            applied++;
          }
        hl_plan_free (copy);
      }
  ck_assert_msg (applied > 0, "%s: no answer could be applied", c->what);
  hl_plan_free (plan);
}
END_TEST

/* Answers that are not answers change nothing. */
START_TEST (test_apply_refused)
{
  HlPlan *plan = load_case (&cases[0]);
  HlInverseAnswer a;
  HlPlan *copy = hl_plan_copy (plan);
  HlModel model;
  HlError err;
  char *before = NULL;
  char *after = NULL;
  size_t size;

  ck_assert_ptr_nonnull (copy);
  hl_error_clear (&err);
  ck_assert (hl_model_prepare (&model, plan, &err) == HL_OK);
  ck_assert_int_eq (hl_question_ask (HL_QUESTION_OFFSET_FOR_ARM, &model, plan,
                                     &plan->options[0].recon, TARGET_BW, &a, &err), HL_OK);
  ck_assert_int_eq (hl_plan_to_buffer (copy, &before, &size, &err), HL_OK);

  /* no such option, no such question, a kind that is not the question's */
  ck_assert_int_eq (hl_answer_apply_state (copy, (int) copy->n_options, HL_QUESTION_OFFSET_FOR_ARM, &a),
                    HL_APPLY_NO_ANSWER);
  ck_assert_int_eq (hl_answer_apply_state (copy, -1, HL_QUESTION_OFFSET_FOR_ARM, &a),
                    HL_APPLY_NO_ANSWER);
  ck_assert_int_eq (hl_answer_apply_state (copy, 0, HL_QUESTION_N, &a), HL_APPLY_NO_ANSWER);
  ck_assert_int_eq (hl_answer_apply_state (copy, 0, HL_QUESTION_LEAN_FOR_CAPACITY, &a),
                    HL_APPLY_NO_ANSWER);
  a.status = HL_ERR_NOT_REACHABLE;
  ck_assert_int_eq (hl_answer_apply_state (copy, 0, HL_QUESTION_OFFSET_FOR_ARM, &a),
                    HL_APPLY_NO_ANSWER);
  a.status = HL_OK;
  a.value = NAN;
  ck_assert (!hl_answer_apply (copy, 0, HL_QUESTION_OFFSET_FOR_ARM, &a));
  ck_assert_int_eq (hl_plan_to_buffer (copy, &after, &size, &err), HL_OK);
  ck_assert_str_eq (before, after);
  free (before);
  free (after);

  hl_error_clear (&err);
  ck_assert_int_eq (hl_question_ask (HL_QUESTION_N, &model, plan, NULL, TARGET_BW, &a, &err),
                    HL_ERR_INVALID);
  ck_assert (err.message[0] != '\0');
  ck_assert_str_eq (hl_question_key (HL_QUESTION_N), "");
  hl_plan_free (copy);
  hl_plan_free (plan);
}
END_TEST

static Suite *
answer_suite (void)
{
  Suite *s = suite_create ("answer");
  TCase *tc = tcase_create ("apply-meets-goal");

  tcase_add_loop_test (tc, test_apply_meets_goal, 0, sizeof cases / sizeof cases[0]);
  suite_add_tcase (s, tc);
  tc = tcase_create ("apply-refused");
  tcase_add_test (tc, test_apply_refused);
  suite_add_tcase (s, tc);
  return s;
}

int
main (void)
{
  SRunner *sr = srunner_create (answer_suite ());
  int failed;

  srunner_run_all (sr, CK_NORMAL);
  failed = srunner_ntests_failed (sr);
  srunner_free (sr);
  return failed == 0 ? EXIT_SUCCESS : EXIT_FAILURE;
}
