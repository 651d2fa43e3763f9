/* hl-bench.c: timing of sweeps and Monte Carlo.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdlib.h>
#include <time.h>

#include "hl-bench.h"
#include "hl-i18n.h"
#include "hl-measure.h"
#include "hl-sweep.h"
#include "hl-uncertainty.h"

#define BENCH_FIELD "benchmark"
#define HL_BENCH_REPEATS_MAX 10000
/* The femoral offset range of the timed sweep: a chart's planning window. */
#define HL_BENCH_SWEEP_FROM_MM (-10.0)
#define HL_BENCH_SWEEP_TO_MM 10.0

static double
now_ms (void)
{
  struct timespec ts;
  clock_gettime (CLOCK_MONOTONIC, &ts);
  return (double) ts.tv_sec * 1e3 + (double) ts.tv_nsec * 1e-6;
}

HlPlan *
hl_bench_demo_plan (void)
{
  /* Four invented options around the demo geometry. */
  static const struct { const char *name; HlRecon recon; } demo[] = {
    { "Standard stem", { 0.0, 0.0, 0.0, 0.0, 0.0, 135.0 } },
    { "Lateralised stem", { 0.0, 0.0, 6.0, 1.0, 0.0, 135.0 } },
    { "Medialised cup", { 4.0, 2.0, 0.0, 0.0, 0.0, 135.0 } },
    { "Long head", { 0.0, 0.0, 0.0, 0.0, 3.5, 131.0 } },
  };
  HlPlan *plan = hl_plan_new ();
  if (plan == NULL)
    return NULL;
  hl_plan_set_demo_landmarks (plan);
  for (size_t i = 0; i < sizeof demo / sizeof demo[0]; i++)
    if (hl_plan_add_option (plan, demo[i].name, &demo[i].recon) < 0)
      {
        hl_plan_free (plan);
        return NULL;
      }
  return plan;
}

HlStatus
hl_bench_analysis (const HlPlan *plan, int repeats, HlBenchResult *out,
                   HlError *err)
{
  if (repeats < 1 || repeats > HL_BENCH_REPEATS_MAX)
    return hl_error_set (err, HL_ERR_INVALID, BENCH_FIELD,
                         _("The benchmark needs 1 to %d repeats, not %d"),
                         HL_BENCH_REPEATS_MAX, repeats);

  HlModel model;
  HlStatus st = hl_model_prepare (&model, plan, err);
  if (st != HL_OK)
    return st;

  const size_t rows = 1 + plan->n_options;
  HlSweepSpec spec = { HL_SWEEP_FEMORAL_OFFSET, HL_BENCH_SWEEP_FROM_MM,
                       HL_BENCH_SWEEP_TO_MM, HL_BENCH_SWEEP_STEPS };
  HlResult *results = malloc (rows * spec.n_steps * sizeof *results);
  HlMcSummary *summary = malloc (rows * sizeof *summary);
  HlMcWorkspace *ws = hl_mc_workspace_new (HL_MC_SAMPLES_DEFAULT, plan->n_options);
  if (results == NULL || summary == NULL || ws == NULL)
    {
      st = hl_error_set (err, HL_ERR_NOMEM, BENCH_FIELD, _("Out of memory"));
      goto out;
    }

  HlMcSettings mc;
  hl_mc_settings_init (&mc);
  bool assumed;
  if ((st = hl_calibration_magnification (&plan->calibration, &mc.magnification,
                                          &assumed, err)))
    goto out;

  out->n_options = plan->n_options;
  out->sweep_steps = spec.n_steps;
  out->mc_samples = mc.n_samples;
  out->repeats = repeats;
  out->sweep_ms = INFINITY;
  out->mc_ms = INFINITY;

  for (int r = 0; r < repeats; r++)
    {
      double t0 = now_ms ();
      st = hl_sweep_run (plan, &model, &spec, NULL, results, NULL,
                         rows * spec.n_steps, err);
      double t1 = now_ms ();
      if (st != HL_OK)
        goto out;
      st = hl_mc_run (ws, &model, plan->options, plan->n_options, &mc, summary,
                      NULL, err);
      double t2 = now_ms ();
      if (st != HL_OK)
        goto out;
      out->sweep_ms = fmin (out->sweep_ms, t1 - t0);
      out->mc_ms = fmin (out->mc_ms, t2 - t1);
    }

out:
  hl_mc_workspace_free (ws);
  free (summary);
  free (results);
  return st;
}
