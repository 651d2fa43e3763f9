/* hl-fuzz-load.c: fuzz target for the plan-file loader.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Properties, for any bytes:
 *  - a refusal leaves the output untouched and says why (non-empty message);
 *  - an accepted plan saves, the saved text loads again, and saving that
 *    gives the same bytes (the file format is a fixed point after one trip);
 *  - its planning summary loads back to the same plan and carries the
 *    caution;
 *  - solving it either fails with a message or gives finite numbers.
 */
#include "config.h"

#include <math.h>
#include <string.h>

#include "hl-fuzz.h"
#include "hl-plan-io.h"
#include "hl-solve.h"
#include "hl-version.h"

/* A fixed date keeps the summary deterministic. */
#define HL_FUZZ_DATE "2026-01-01T00:00:00Z"

static void
check_refusal (HlStatus st, const HlError *err, const HlPlan *out)
{
  HL_FUZZ_CHECK (out == NULL, "output set on failure (%s)", hl_status_name (st));
  HL_FUZZ_CHECK (err->message[0] != '\0', "empty message for %s", hl_status_name (st));
  HL_FUZZ_CHECK (err->status == st, "err.status %d, returned %d", err->status, st);
  HL_FUZZ_CHECK (err->line >= 0, "negative line %d", err->line);
}

static bool
result_finite (const HlResult *r)
{
  const double v[] = {
    r->abductor_arm_mm, r->bw_arm_mm, r->lever_ratio, r->abductor_force_n,
    r->abductor_force_bw, r->jrf_x_n, r->jrf_y_n, r->jrf_n, r->jrf_bw,
    r->moment_ext_nmm, r->unbalanced_nmm, r->x_s_mm, r->demand,
    r->leg_length_change_mm, r->femoral_offset_change_mm,
    r->acetabular_offset_change_mm, r->global_offset_change_mm,
    r->abductor_length_change_mm,
  };
  for (size_t i = 0; i < sizeof v / sizeof v[0]; i++)
    if (!isfinite (v[i]))
      return false;
  return true;
}

static void
check_solve (const HlPlan *plan)
{
  HlResult *results = calloc (plan->n_options + 1, sizeof *results);
  HlError err = { 0 };

  HL_FUZZ_CHECK (results != NULL, "out of memory for %zu options", plan->n_options);
  HlStatus st = hl_plan_solve_all (plan, results, &err);
  if (st != HL_OK)
    HL_FUZZ_CHECK (err.message[0] != '\0', "solve failed (%s) without a message",
                   hl_status_name (st));
  else
    for (size_t i = 0; i <= plan->n_options; i++)
      HL_FUZZ_CHECK (result_finite (&results[i]), "non-finite result %zu", i);
  free (results);
}

static HlPlan *
reload (const char *text, size_t size, const char *what)
{
  HlPlan *plan = NULL;
  HlError err = { 0 };
  HlStatus st = hl_plan_load_buffer (text, size, what, &plan, &err);

  HL_FUZZ_CHECK (st == HL_OK && plan != NULL, "%s does not load: %s: %s: %s", what,
                 hl_status_name (st), err.field, err.message);
  return plan;
}

static void
check_round_trip (const HlPlan *plan)
{
  char *first = NULL, *second = NULL, *summary = NULL, *third = NULL;
  size_t n_first = 0, n_second = 0, n_summary = 0, n_third = 0;
  HlError err = { 0 };
  HlStatus st;

  st = hl_plan_to_buffer (plan, &first, &n_first, &err);
  HL_FUZZ_CHECK (st == HL_OK, "an accepted plan does not save: %s", err.message);
  HL_FUZZ_CHECK (strlen (first) == n_first, "saved size %zu, text %zu", n_first,
                 strlen (first));

  HlPlan *again = reload (first, n_first, "saved plan");
  st = hl_plan_to_buffer (again, &second, &n_second, &err);
  HL_FUZZ_CHECK (st == HL_OK, "a reloaded plan does not save: %s", err.message);
  HL_FUZZ_CHECK (n_first == n_second && memcmp (first, second, n_first) == 0,
                 "save, load, save changes the text:\n%s\n----\n%s", first, second);

  st = hl_summary_to_buffer (again, HL_FUZZ_DATE, &summary, &n_summary, &err);
  if (st == HL_OK)
    {
      HL_FUZZ_CHECK (strstr (summary, hl_caution_text ()) != NULL,
                     "summary without the caution");
      HlPlan *from_summary = reload (summary, n_summary, "planning summary");
      st = hl_plan_to_buffer (from_summary, &third, &n_third, &err);
      HL_FUZZ_CHECK (st == HL_OK, "a plan from a summary does not save: %s",
                     err.message);
      HL_FUZZ_CHECK (n_third == n_first && memcmp (third, first, n_first) == 0,
                     "the plan inside the summary differs from the plan");
      hl_plan_free (from_summary);
    }
  else
    /* Every plan that loads has a summary, solvable or not (a refusal is
     * written into it): only running out of memory stops one. */
    HL_FUZZ_CHECK (st == HL_ERR_NOMEM && err.message[0] != '\0',
                   "a plan that loads gives no summary (%s): %s", hl_status_name (st),
                   err.message);

  hl_plan_free (again);
  free (first);
  free (second);
  free (summary);
  free (third);
}

int
LLVMFuzzerTestOneInput (const uint8_t *data, size_t size)
{
  HlPlan *plan = NULL;
  HlError err = { 0 };
  HlStatus st = hl_plan_load_buffer ((const char *) data, size, "fuzz input",
                                     &plan, &err);

  if (st != HL_OK)
    {
      check_refusal (st, &err, plan);
      return 0;
    }
  HL_FUZZ_CHECK (plan != NULL, "HL_OK without a plan");
  check_round_trip (plan);
  check_solve (plan);
  hl_plan_free (plan);
  return 0;
}
