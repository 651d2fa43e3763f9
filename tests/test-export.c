/* test-export.c: the sweep table the window exports (hl_export_sweeps_csv).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The table is the report's own (hl_report_sweeps_csv), byte for byte,
 * after leading "# " lines that carry the program, the case and the whole
 * caution.  Links the window's library but needs no display: nothing here
 * touches GTK.
 */
#include "config.h"

#include <check.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include <glib.h>
#include <glib/gstdio.h>

#include "hl-chart.h"
#include "hl-document.h"
#include "hl-export.h"
#include "hl-plan-io.h"
#include "hl-report.h"
#include "hl-version.h"

/* Comment lines wrap at 76 characters of text after the "#". */
#define COMMENT_LINE_MAX 77

static const char *const plans[] = {
  "data/examples/demo.hlplan",
  "data/examples/demo-left.hlplan",
  "data/examples/minimal.hlplan",
};

static HlPlan *
load (const char *name)
{
  g_autofree char *path = g_build_filename (HL_TEST_SRCDIR, name, NULL);
  HlPlan *plan = NULL;
  HlError err;

  hl_error_clear (&err);
  ck_assert_msg (hl_plan_load_file (path, &plan, &err) == HL_OK, "%s: %s", path, err.message);
  return plan;
}

/* Runs of spaces as one, as the comment lines break them. */
static char *
squeeze (const char *text)
{
  GString *s = g_string_new (NULL);

  for (const char *p = text; *p != '\0'; p++)
    if (*p != ' ' || (s->len > 0 && s->str[s->len - 1] != ' '))
      g_string_append_c (s, *p);
  return g_string_free (s, FALSE);
}

START_TEST (test_sweeps_csv)
{
  HlPlan *plan = load (plans[_i]);
  HlReportSettings settings;
  HlReport *report;
  HlError err;
  char *table = NULL;
  size_t size = 0;
  g_autofree char *csv = NULL;
  g_autoptr(GString) words = g_string_new (NULL);
  const char *body;
  const char *p;
  int n_comments = 0;

  hl_error_clear (&err);
  csv = hl_export_sweeps_csv (plan, &err);
  ck_assert_msg (csv != NULL, "%s: %s", plans[_i], err.message);
  ck_assert_int_eq (err.status, HL_OK);
  ck_assert_msg (g_str_has_prefix (csv, "# hiplever "), "%s starts %.40s", plans[_i], csv);

  for (p = csv; *p == '#'; n_comments++)
    {
      const char *nl = strchr (p, '\n');

      ck_assert_ptr_nonnull (nl);
      ck_assert_msg (g_utf8_strlen (p, nl - p) <= COMMENT_LINE_MAX,
                     "comment line %d is %ld characters", n_comments,
                     (long) g_utf8_strlen (p, nl - p));
      g_string_append_len (words, p + 1, nl - p - 1);
      p = nl + 1;
    }
  body = p;
  ck_assert_int_ge (n_comments, 3);
  /* The comments give the whole caution back, word for word. */
  {
    g_autofree char *caution = squeeze (hl_caution_text ());

    ck_assert_msg (strstr (words->str, caution) != NULL, "no caution in the comments: %s",
                   words->str);
  }
  ck_assert_msg (strstr (words->str, plan->label) != NULL, "the comments do not name the case");
  ck_assert_msg (g_str_has_prefix (body, HL_SWEEP_CSV_HEADER "\n"), "the table starts %.60s", body);

  hl_report_settings_init (&settings);
  settings.uncertainty = false;
  report = hl_report_new (plan, &settings, &err);
  ck_assert_ptr_nonnull (report);
  ck_assert_int_eq (hl_report_sweeps_csv (report, &table, &size, &err), HL_OK);
  ck_assert_uint_eq (strlen (body), size);
  ck_assert_msg (memcmp (body, table, size) == 0, "the table differs from the report's");
  free (table);
  hl_report_free (report);
  hl_plan_free (plan);
}
END_TEST

/* Plans that cannot be charted: no table, and the reason. */
typedef struct {
  const char *what;
  void (*spoil) (HlPlan *plan);
} HlSpoiled;

static void
no_landmarks (HlPlan *plan)
{
  plan->landmarks.placed = 0;
}

static void
mass_too_small (HlPlan *plan)
{
  plan->mass_kg = HL_MASS_MIN_KG / 2.0;
}

static void
midline_on_operated_side (HlPlan *plan)
{
  HlVec2 hip = plan->landmarks.p[HL_LM_HIP_CENTRE];
  double lateral = plan->side == HL_SIDE_RIGHT ? -1.0 : 1.0;

  /* 40 mm lateral of the hip centre: the refused geometry of model.md s. 6. */
  hl_landmarks_set (&plan->landmarks, HL_LM_MIDLINE, hip.x + 40.0 * lateral, hip.y - 35.0);
}

static const HlSpoiled spoiled[] = {
  { "no landmarks", no_landmarks },
  { "mass below the range", mass_too_small },
  { "midline on the operated side", midline_on_operated_side },
};

START_TEST (test_sweeps_csv_refused)
{
  HlPlan *plan = load (plans[0]);
  HlError err;
  char *csv;

  spoiled[_i].spoil (plan);
  hl_error_clear (&err);
  csv = hl_export_sweeps_csv (plan, &err);
  ck_assert_msg (csv == NULL, "%s: a table was made", spoiled[_i].what);
  ck_assert_msg (err.status != HL_OK, "%s: no status", spoiled[_i].what);
  ck_assert_msg (err.message[0] != '\0', "%s: no message", spoiled[_i].what);
  hl_plan_free (plan);
}
END_TEST

/* Exports and Save As never write over an input: the plan's radiograph
 * (also through a link) and, for exports, the plan's own file. */
START_TEST (test_output_is_input)
{
  g_autofree char *plan_path = g_build_filename (HL_TEST_SRCDIR, plans[0], NULL);
  g_autoptr(GFile) plan_file = g_file_new_for_path (plan_path);
  HlPlan *plan = load (plans[0]);
  HlDocument *doc = hl_document_new ();
  HlError err;

  ck_assert (plan->radiograph.present);
  ck_assert (hl_document_replace (doc, plan, plan_file));
  g_autofree char *dir = g_dir_make_tmp ("hiplever-export-XXXXXX", NULL);
  ck_assert (dir != NULL);
  g_autofree char *link = g_build_filename (dir, "image-link.png", NULL);
  g_autofree char *other = g_build_filename (dir, "figure.png", NULL);
  ck_assert (symlink (plan->radiograph.path, link) == 0);

  hl_error_clear (&err);
  ck_assert (hl_document_output_is_input (doc, plan->radiograph.path, FALSE, &err));
  ck_assert_msg (strstr (err.message, "radiograph") != NULL, "%s", err.message);
  hl_error_clear (&err);
  ck_assert (hl_document_output_is_input (doc, plan->radiograph.path, TRUE, &err));
  hl_error_clear (&err);
  ck_assert (hl_document_output_is_input (doc, link, FALSE, &err));
  hl_error_clear (&err);
  ck_assert (hl_document_output_is_input (doc, plan_path, FALSE, &err));
  ck_assert_msg (strstr (err.message, "plan itself") != NULL, "%s", err.message);
  hl_error_clear (&err);
  ck_assert (!hl_document_output_is_input (doc, plan_path, TRUE, &err));
  ck_assert (!hl_document_output_is_input (doc, other, FALSE, &err));
  ck_assert_int_eq (err.status, HL_OK);

  unlink (link);
  g_rmdir (dir);
  g_object_unref (doc);
  hl_plan_free (plan);
}
END_TEST

static Suite *
export_suite (void)
{
  Suite *s = suite_create ("export");
  TCase *tc = tcase_create ("sweeps-csv");

  tcase_add_loop_test (tc, test_sweeps_csv, 0, G_N_ELEMENTS (plans));
  suite_add_tcase (s, tc);
  tc = tcase_create ("sweeps-csv-refused");
  tcase_add_loop_test (tc, test_sweeps_csv_refused, 0, G_N_ELEMENTS (spoiled));
  suite_add_tcase (s, tc);
  tc = tcase_create ("output-is-input");
  tcase_add_test (tc, test_output_is_input);
  suite_add_tcase (s, tc);
  return s;
}

int
main (void)
{
  SRunner *sr = srunner_create (export_suite ());
  int failed;

  srunner_run_all (sr, CK_NORMAL);
  failed = srunner_ntests_failed (sr);
  srunner_free (sr);
  return failed == 0 ? EXIT_SUCCESS : EXIT_FAILURE;
}
