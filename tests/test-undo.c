/* test-undo.c: the window's undo stack of plan snapshots (ui/hl-undo.c).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Each table row is a script of edits, undos and redos on a plan whose
 * body mass stands for "the state"; after the script the mass, the
 * revision and what can still be undone and redone are checked.
 */
#include "config.h"

#include <check.h>
#include <stdlib.h>

#include "hl-undo.h"

/* Masses are set and compared exactly: snapshots are copies, not sums. */
#define MASS_TOL 0.0

typedef enum {
  OP_END = 0,
  OP_EDIT,       /* record with `field`, then set the mass to `value` */
  OP_UNDO,       /* expect `ok` */
  OP_REDO,
  OP_BREAK,
  OP_DROP,       /* hl_undo_drop_last, expect `ok` */
} Op;

typedef struct {
  Op op;
  const char *field;
  double value;
  gboolean ok;
} Step;

typedef struct {
  const char *name;
  guint limit;
  Step steps[12];
  double mass;          /* expected at the end */
  guint64 revision;     /* expected revision at the end */
  guint n_undo;
  gboolean can_redo;
} Script;

/* The plan starts at 71.3 kg, revision 0; each edit bumps the revision. */
#define START_MASS 71.3

static const Script scripts[] = {
  { "edit and undo", 10,
    { { OP_EDIT, NULL, 80.25, TRUE }, { OP_UNDO, NULL, 0, TRUE } },
    START_MASS, 0, 0, TRUE },
  { "edit, undo, redo", 10,
    { { OP_EDIT, NULL, 80.25, TRUE }, { OP_UNDO, NULL, 0, TRUE }, { OP_REDO, NULL, 0, TRUE } },
    80.25, 1, 1, FALSE },
  { "same field coalesces", 10,
    { { OP_EDIT, "mass", 72.5, TRUE }, { OP_EDIT, "mass", 73.5, TRUE },
      { OP_EDIT, "mass", 74.5, TRUE }, { OP_UNDO, NULL, 0, TRUE } },
    START_MASS, 0, 0, TRUE },
  { "other field starts a new step", 10,
    { { OP_EDIT, "mass", 72.5, TRUE }, { OP_EDIT, "lean", 73.5, TRUE },
      { OP_UNDO, NULL, 0, TRUE } },
    72.5, 1, 1, TRUE },
  { "no field never coalesces", 10,
    { { OP_EDIT, NULL, 72.5, TRUE }, { OP_EDIT, NULL, 73.5, TRUE },
      { OP_UNDO, NULL, 0, TRUE } },
    72.5, 1, 1, TRUE },
  { "break ends coalescing", 10,
    { { OP_EDIT, "mass", 72.5, TRUE }, { OP_BREAK, NULL, 0, TRUE },
      { OP_EDIT, "mass", 73.5, TRUE }, { OP_UNDO, NULL, 0, TRUE } },
    72.5, 1, 1, TRUE },
  { "undo ends coalescing", 10,
    { { OP_EDIT, "mass", 72.5, TRUE }, { OP_EDIT, "lean", 73.5, TRUE },
      { OP_UNDO, NULL, 0, TRUE }, { OP_EDIT, "lean", 74.5, TRUE },
      { OP_UNDO, NULL, 0, TRUE } },
    72.5, 1, 1, TRUE },
  { "a new edit drops the redo steps", 10,
    { { OP_EDIT, NULL, 72.5, TRUE }, { OP_UNDO, NULL, 0, TRUE },
      { OP_EDIT, NULL, 90.5, TRUE }, { OP_REDO, NULL, 0, FALSE } },
    90.5, 2, 1, FALSE },
  { "the oldest steps are forgotten beyond the limit", 3,
    { { OP_EDIT, NULL, 72.5, TRUE }, { OP_EDIT, NULL, 73.5, TRUE },
      { OP_EDIT, NULL, 74.5, TRUE }, { OP_EDIT, NULL, 75.5, TRUE },
      { OP_EDIT, NULL, 76.5, TRUE }, { OP_UNDO, NULL, 0, TRUE },
      { OP_UNDO, NULL, 0, TRUE }, { OP_UNDO, NULL, 0, TRUE },
      { OP_UNDO, NULL, 0, FALSE } },
    73.5, 2, 0, TRUE },
  { "a cancelled drag is dropped with its revision", 10,
    { { OP_EDIT, NULL, 72.5, TRUE }, { OP_EDIT, NULL, 73.5, TRUE },
      { OP_DROP, NULL, 0, TRUE } },
    73.5, 1, 1, FALSE },
  { "nothing to undo, redo or drop", 10,
    { { OP_UNDO, NULL, 0, FALSE }, { OP_REDO, NULL, 0, FALSE }, { OP_DROP, NULL, 0, FALSE } },
    START_MASS, 0, 0, FALSE },
};

START_TEST (test_script)
{
  const Script *s = &scripts[_i];
  g_autoptr(HlUndo) undo = hl_undo_new (s->limit);
  HlPlan *plan = hl_plan_new ();
  guint64 revision = 0, next = 0;

  ck_assert_ptr_nonnull (plan);
  hl_plan_set_demo_landmarks (plan);
  plan->mass_kg = START_MASS;

  for (const Step *st = s->steps; st->op != OP_END; st++)
    {
      switch (st->op)
        {
        case OP_EDIT:
          ck_assert_msg (hl_undo_record (undo, plan, revision, st->field), "%s: record", s->name);
          revision = ++next;
          plan->mass_kg = st->value;
          break;
        case OP_UNDO:
          ck_assert_msg (hl_undo_undo (undo, plan, &revision) == st->ok, "%s: undo", s->name);
          break;
        case OP_REDO:
          ck_assert_msg (hl_undo_redo (undo, plan, &revision) == st->ok, "%s: redo", s->name);
          break;
        case OP_BREAK:
          hl_undo_break (undo);
          break;
        case OP_DROP:
          ck_assert_msg (hl_undo_drop_last (undo, &revision) == st->ok, "%s: drop", s->name);
          break;
        case OP_END:
        default:
          break;
        }
    }
  ck_assert_msg (plan->mass_kg - s->mass <= MASS_TOL && s->mass - plan->mass_kg <= MASS_TOL,
                 "%s: mass %g, expected %g", s->name, plan->mass_kg, s->mass);
  ck_assert_msg (revision == s->revision, "%s: revision %" G_GUINT64_FORMAT ", expected %"
                 G_GUINT64_FORMAT, s->name, revision, s->revision);
  ck_assert_msg (hl_undo_n_undo (undo) == s->n_undo, "%s: %u undo steps, expected %u",
                 s->name, hl_undo_n_undo (undo), s->n_undo);
  ck_assert_msg (hl_undo_can_undo (undo) == (s->n_undo > 0), "%s: can undo", s->name);
  ck_assert_msg (hl_undo_can_redo (undo) == s->can_redo, "%s: can redo", s->name);
  hl_plan_free (plan);
}
END_TEST

/* Snapshots are deep: options added after a record are gone after undo,
 * and the landmarks come back exactly. */
START_TEST (test_deep_snapshot)
{
  g_autoptr(HlUndo) undo = hl_undo_new (HL_UNDO_DEFAULT_LIMIT);
  HlPlan *plan = hl_plan_new ();
  guint64 revision = 0;
  HlVec2 before;

  hl_plan_set_demo_landmarks (plan);
  before = plan->landmarks.p[HL_LM_ABDUCTOR_INSERTION];
  ck_assert (hl_undo_record (undo, plan, revision, NULL));
  revision = 1;
  ck_assert_int_ge (hl_plan_add_option (plan, "Lateralised stem", NULL), 0);
  hl_landmarks_set (&plan->landmarks, HL_LM_ABDUCTOR_INSERTION, before.x - 7.25, before.y);
  ck_assert (hl_undo_undo (undo, plan, &revision));
  ck_assert_uint_eq (plan->n_options, 0);
  ck_assert (plan->landmarks.p[HL_LM_ABDUCTOR_INSERTION].x == before.x);
  ck_assert (hl_undo_redo (undo, plan, &revision));
  ck_assert_uint_eq (plan->n_options, 1);
  ck_assert_str_eq (plan->options[0].name, "Lateralised stem");
  ck_assert (plan->landmarks.p[HL_LM_ABDUCTOR_INSERTION].x == before.x - 7.25);
  hl_plan_free (plan);
}
END_TEST

static Suite *
undo_suite (void)
{
  Suite *s = suite_create ("undo");
  TCase *scripts_case = tcase_create ("scripts");
  TCase *deep = tcase_create ("deep");

  tcase_add_loop_test (scripts_case, test_script, 0, G_N_ELEMENTS (scripts));
  tcase_add_test (deep, test_deep_snapshot);
  suite_add_tcase (s, scripts_case);
  suite_add_tcase (s, deep);
  return s;
}

int
main (void)
{
  SRunner *runner = srunner_create (undo_suite ());
  int failed;

  srunner_run_all (runner, CK_NORMAL);
  failed = srunner_ntests_failed (runner);
  srunner_free (runner);
  return failed == 0 ? EXIT_SUCCESS : EXIT_FAILURE;
}
