/* test-report-data.c: the report's content as the core makes it (no drawing).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The report's tables and lines must say what the core computes, for
 * every option of the plan: the results table against hl_plan_solve_all
 * and the result-field table (the decimals people read), every case in
 * every list, every inverse question answered, the chart sweeps in one CSV
 * table.  The numbers are the model's own, so no outside source is cited.
 * The drawing side (pango, pages, nothing lost in the PDF) is checked by
 * tests/test-chart-report.c.
 */
#include "config.h"

#include <check.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hl-report-data.h"
#include "hl-result-fields.h"
#include "hl-test-util.h"

#define MANY_OPTIONS 8
#define SAMPLES 400
/* Inverse questions: native the cane, both hands' loads and the lean; an
 * option its two femoral offset questions, the cane and the lean. */
#define ANSWERS_NATIVE 4
#define ANSWERS_OPTION 4

static HlPlan *
plan_with (size_t n_options)
{
  HlPlan *plan = hl_plan_new ();
  ck_assert_ptr_nonnull (plan);
  hl_plan_set_demo_landmarks (plan);
  plan->uncertainty.n_samples = SAMPLES;
  for (size_t i = 0; i < n_options; i++)
    {
      HlRecon r;
      char name[HL_NAME_MAX];
      hl_recon_init (&r);
      r.femoral_offset_mm = 1.5 * (double) i - 3.0;
      r.cup_medial_mm = 0.5 * (double) i;
      r.head_length_mm = i % 2 == 0 ? 0.0 : 3.5;
      snprintf (name, sizeof name, "Case %c", (char) ('A' + i));
      ck_assert_int_ge (hl_plan_add_option (plan, name, &r), 0);
    }
  return plan;
}

static HlReportData *
data_of (const HlPlan *plan, bool uncertainty)
{
  HlReportSettings settings;
  hl_report_settings_init (&settings);
  settings.date = "2026-03-01";
  settings.uncertainty = uncertainty;
  HlError err;
  hl_error_clear (&err);
  HlReportData *d = hl_report_data_new (plan, &settings, &err);
  ck_assert_msg (d != NULL, "%s", err.message);
  return d;
}

static const size_t option_counts[] = { 0, 1, MANY_OPTIONS };

START_TEST (test_every_case_everywhere)
{
  size_t n = option_counts[_i];
  HlPlan *plan = plan_with (n);
  HlReportData *d = data_of (plan, true);

  ck_assert_uint_eq (d->n_cases, 1 + n);
  ck_assert_str_eq (d->case_names[0], "Native");
  ck_assert_int_eq (d->options.n_rows, 1 + (int) n);
  ck_assert_int_eq (d->results_table.n_cols, 2 + (int) n);
  ck_assert_uint_eq (d->against.n, 1 + n);
  ck_assert_uint_eq (d->flags.n, 1 + n + (hl_plan_cane_note (plan) != NULL));
  ck_assert_uint_eq (d->n_answers, ANSWERS_NATIVE + ANSWERS_OPTION * n);
  ck_assert ((d->options_none != NULL) == (n == 0));
  for (size_t row = 0; row < d->n_cases; row++)
    {
      const char *name = d->case_names[row];
      if (row > 0)
        {
          ck_assert_str_eq (name, plan->options[row - 1].name);
          ck_assert_str_eq (hl_report_table_cell (&d->options, (int) row, 0), name);
        }
      ck_assert_str_eq (hl_report_table_cell (&d->results_table, 0, 1 + (int) row), name);
      ck_assert_msg (strncmp (d->against.items[row], name, strlen (name)) == 0, "%s",
                     d->against.items[row]);
      ck_assert_msg (strncmp (d->flags.items[row], name, strlen (name)) == 0, "%s",
                     d->flags.items[row]);
      ck_assert_ptr_nonnull (strstr (d->capacity_text, name));
    }
  /* Answers grouped by case, in order, every case answered. */
  size_t seen = 0;
  for (size_t i = 0; i < d->n_answers; i++)
    {
      ck_assert (d->answers[i].row >= seen);
      seen = d->answers[i].row;
      ck_assert (d->answers[i].text != NULL && d->answers[i].text[0] != '\0');
    }
  ck_assert_uint_eq (seen, n);
  /* Every source of the report, the last one included. */
  ck_assert_uint_eq (d->sources.n, 9);
  ck_assert_ptr_nonnull (strstr (d->sources.items[8], "Hyndman RJ, Fan Y 1996"));
  hl_report_data_free (d);
  hl_plan_free (plan);
}
END_TEST

/* The results table is the solver's numbers at the decimals people read:
 * each cell starts with the value at the field's decimals. */
START_TEST (test_results_are_the_solve)
{
  HlPlan *plan = plan_with (MANY_OPTIONS);
  HlReportData *d = data_of (plan, true);
  HlResult *want = calloc (1 + plan->n_options, sizeof *want);
  HlError err;
  ck_assert_int_eq (hl_plan_solve_all (plan, want, &err), HL_OK);

  const HlResultField *rows[HL_RESULT_FIELD_MAX];
  size_t n_rows = hl_result_fields_for (HL_OUT_REPORT, rows);
  ck_assert_int_eq (d->results_table.n_rows, 1 + (int) n_rows + 3);
  int headline = 0;
  for (size_t i = 0; i < n_rows; i++)
    {
      int trow = 1 + (int) i;
      headline += d->results_table.emphasis[trow];
      for (size_t row = 0; row < d->n_cases; row++)
        {
          char prefix[64];
          double v = rows[i]->get (&want[row]);
          snprintf (prefix, sizeof prefix,
                    rows[i]->kind == HL_FIELD_CHANGE ? "%+.*f" : "%.*f", rows[i]->decimals,
                    v);
          const char *cell = hl_report_table_cell (&d->results_table, trow, 1 + (int) row);
          ck_assert_msg (strncmp (cell, prefix, strlen (prefix)) == 0,
                         "%s of case %zu: \"%s\", the solve %s", rows[i]->key, row, cell,
                         prefix);
          /* A per-cent change only where the field has one, never for native. */
          ck_assert ((strchr (cell, '%') != NULL)
                     <= (row > 0 && rows[i]->kind == HL_FIELD_PERCENT));
        }
    }
  ck_assert_int_eq (headline, 1);

  /* The ranges rows: the Monte Carlo's 5th and 95th percentiles. */
  int base = 1 + (int) n_rows;
  for (size_t row = 0; row < d->n_cases; row++)
    {
      char want_cell[64];
      snprintf (want_cell, sizeof want_cell, "%.2f to %.2f", d->mc_summary[row].jrf_bw.p05,
                d->mc_summary[row].jrf_bw.p95);
      ck_assert_str_eq (hl_report_table_cell (&d->results_table, base, 1 + (int) row),
                        want_cell);
      ck_assert (d->mc_summary[row].jrf_bw.p05 <= want[row].jrf_bw
                 && want[row].jrf_bw <= d->mc_summary[row].jrf_bw.p95);
    }
  ck_assert_ptr_nonnull (d->mc_note);
  free (want);
  hl_report_data_free (d);
  hl_plan_free (plan);
}
END_TEST

START_TEST (test_without_uncertainty)
{
  HlPlan *plan = plan_with (2);
  HlReportData *d = data_of (plan, false);
  const HlResultField *rows[HL_RESULT_FIELD_MAX];
  ck_assert (!d->have_mc);
  ck_assert_ptr_null (d->mc_note);
  ck_assert_ptr_null (d->mc_summary);
  ck_assert_int_eq (d->results_table.n_rows,
                    1 + (int) hl_result_fields_for (HL_OUT_REPORT, rows));
  for (int k = 0; k < HL_CHART_N; k++)
    ck_assert_ptr_null (d->charts[k]->bands);
  hl_report_data_free (d);
  hl_plan_free (plan);
}
END_TEST

START_TEST (test_sweeps_csv)
{
  HlPlan *plan = plan_with (3);
  HlReportData *d = data_of (plan, false);
  char *csv = NULL;
  size_t size = 0;
  HlError err;
  ck_assert_int_eq (hl_report_data_sweeps_csv (d, &csv, &size, &err), HL_OK);
  ck_assert_uint_eq (strlen (csv), size);
  /* The header once, then every chart's every point of every case. */
  ck_assert (strncmp (csv, HL_SWEEP_CSV_HEADER "\n", strlen (HL_SWEEP_CSV_HEADER) + 1) == 0);
  ck_assert_ptr_null (strstr (csv + 1, HL_SWEEP_CSV_HEADER));
  size_t want = 1;
  for (int k = 0; k < HL_CHART_N; k++)
    want += d->charts[k]->spec.n_steps * d->charts[k]->n_rows;
  ck_assert_uint_eq (hl_test_count_lines (csv), want);
  free (csv);
  hl_report_data_free (d);
  hl_plan_free (plan);
}
END_TEST

START_TEST (test_refusals)
{
  HlPlan *plan = plan_with (1);
  HlReportSettings settings;
  HlError err;
  const double bad[] = { 0.0, HL_REPORT_TARGET_JRF_BW_MAX * 2, NAN };
  for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++)
    {
      hl_report_settings_init (&settings);
      settings.target_jrf_bw = bad[i];
      hl_error_clear (&err);
      ck_assert_ptr_null (hl_report_data_new (plan, &settings, &err));
      ck_assert_int_eq (err.status, HL_ERR_INVALID);
      ck_assert_str_eq (err.field, "report target-jrf");
    }
  /* A plan the solver refuses gives its reason, no report. */
  plan->landmarks.p[HL_LM_MIDLINE].x = plan->landmarks.p[HL_LM_HIP_CENTRE].x - 50.0;
  hl_error_clear (&err);
  ck_assert_ptr_null (hl_report_data_new (plan, NULL, &err));
  ck_assert_int_ne (err.status, HL_OK);
  hl_report_data_free (NULL);
  hl_plan_free (plan);
}
END_TEST

/* Forces people read are in whole newtons: the body weight in the heading
 * and the cane in the inputs (72.5 kg: 711.0 N; a 15% cane: 106.6 N). */
START_TEST (test_inputs_in_whole_newtons)
{
  HlPlan *plan = plan_with (0);
  plan->mass_kg = 72.5;
  plan->cane.enabled = true;
  plan->cane.unit = HL_FORCE_UNIT_PERCENT_BW;
  plan->cane.value = 15.0;
  HlReportData *d = data_of (plan, false);
  ck_assert_msg (strstr (d->meta_line, "(body weight 711 N)") != NULL, "%s", d->meta_line);
  bool cane = false;
  for (size_t i = 0; i < d->inputs_right.n; i++)
    cane |= strncmp (d->inputs_right.items[i], "Cane: 107 N (15.0% of body weight)",
                     strlen ("Cane: 107 N (15.0% of body weight)")) == 0;
  for (size_t i = 0; i < d->inputs_left.n; i++)
    cane |= strncmp (d->inputs_left.items[i], "Cane: 107 N (15.0% of body weight)",
                     strlen ("Cane: 107 N (15.0% of body weight)")) == 0;
  ck_assert_msg (cane, "no input line \"Cane: 107 N (15.0%% of body weight) ...\"");
  hl_report_data_free (d);
  hl_plan_free (plan);
}
END_TEST

static Suite *
report_data_suite (void)
{
  Suite *s = suite_create ("report-data");
  TCase *tc = tcase_create ("content");
  tcase_add_loop_test (tc, test_every_case_everywhere, 0,
                       (int) (sizeof option_counts / sizeof option_counts[0]));
  tcase_add_test (tc, test_results_are_the_solve);
  tcase_add_test (tc, test_without_uncertainty);
  tcase_add_test (tc, test_sweeps_csv);
  tcase_add_test (tc, test_refusals);
  tcase_add_test (tc, test_inputs_in_whole_newtons);
  suite_add_tcase (s, tc);
  return s;
}

int
main (void)
{
  SRunner *sr = srunner_create (report_data_suite ());
  srunner_run_all (sr, CK_NORMAL);
  int failed = srunner_ntests_failed (sr);
  srunner_free (sr);
  return failed == 0 ? EXIT_SUCCESS : EXIT_FAILURE;
}
