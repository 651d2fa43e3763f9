/* bench-analysis.c: prints the timings of the analysis hot paths.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * A benchmark, not a test: it never fails on a slow machine.
 */
#include "config.h"

#include <stdio.h>
#include <stdlib.h>

#include "hl-bench.h"
#include "hl-plan.h"

int
main (int argc, char **argv)
{
  int repeats = argc > 1 ? atoi (argv[1]) : HL_BENCH_REPEATS_DEFAULT;
  HlPlan *plan = hl_bench_demo_plan ();
  HlBenchResult res;
  HlError err = { 0 };

  if (plan == NULL)
    {
      fprintf (stderr, "bench-analysis: out of memory\n");
      return EXIT_FAILURE;
    }
  HlStatus st = hl_bench_analysis (plan, repeats, &res, &err);
  hl_plan_free (plan);
  if (st != HL_OK)
    {
      fprintf (stderr, "bench-analysis: %s: %s\n", err.field, err.message);
      return EXIT_FAILURE;
    }

  printf ("MC %zu samples x %zu options: %.3f ms (target %.1f ms)\n",
          res.mc_samples, res.n_options, res.mc_ms, HL_BENCH_MC_TARGET_MS);
  printf ("sweep %zu points x %zu options: %.3f ms (target %.1f ms)\n",
          res.sweep_steps, res.n_options, res.sweep_ms, HL_BENCH_SWEEP_TARGET_MS);
  printf ("best of %d runs\n", res.repeats);
  return EXIT_SUCCESS;
}
